/**
 * The main-side handlers behind the document and project API, run inline
 * (no worker, no host): import preview, project save/open with validation,
 * recovery snapshots and recent files, each against files in a temp folder.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createDocumentHandlers } from '../../../src-main/services/documentHandlers';
import { RecentFiles } from '../../../src-main/services/recentFiles';
import { RecoveryStore } from '../../../src-main/services/recovery';
import { newProjectDocument } from '../../../src-shared/project/projectDocument';
import { parseProject, serializeProject } from '../../../src-shared/project/projectFile';

const dir = mkdtempSync(join(tmpdir(), 'rankfill-handlers-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const h = createDocumentHandlers({
  recovery: new RecoveryStore({ dir: join(dir, 'recovery'), fsync: false }),
  recent: new RecentFiles({ file: join(dir, 'recent.json') }),
});

const project = (v: number) =>
  serializeProject({
    ...newProjectDocument({
      rowLabels: ['a', 'b'],
      colLabels: ['x'],
      values: Float64Array.from([v, NaN]),
      scale: { min: 1, max: 5, step: 1 },
    }),
    notes: `v${v}`,
  });

describe('document handlers', () => {
  it('previews a semicolon file with decimal commas, and refuses a ragged one with line:column problems', async () => {
    const ok = await h['document.previewImport']({ fileName: 's.csv', text: 'who;q1;q2\nann;3,5;\nbo;NA;4\n' });
    if (!ok.ok) throw new Error(JSON.stringify(ok.problems));
    expect(ok.info).toMatchObject({
      delimiter: ';',
      layout: 'wide',
      decimalComma: true,
      rows: 2,
      cols: 2,
      observed: 2,
      offThread: false,
    });
    expect(ok.document.matrix.values).toEqual([3.5, null, null, 4]);
    const bad = await h['document.previewImport']({ fileName: 'r.csv', text: 'id,a,b\nr1,1,2\nr2,3\n' });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.problems[0]).toMatchObject({ file: 'r.csv', line: 3 });
  });

  it('the user’s missing-value words and duplicate policy reach the parser', async () => {
    const text = 'row,col,value\nr1,c1,2\nr1,c1,4\nr2,c1,missing\n';
    const refused = await h['document.previewImport']({ fileName: 'l.csv', text, missingTokens: ['missing'] });
    expect(refused.ok).toBe(false);
    const averaged = await h['document.previewImport']({
      fileName: 'l.csv',
      text,
      missingTokens: ['missing'],
      duplicates: 'average',
    });
    if (!averaged.ok) throw new Error(JSON.stringify(averaged.problems));
    // Source: arithmetic mean of 2 and 4.
    expect(averaged.document.matrix.values).toEqual([3, null]);
  });

  it('saves atomically with a backup, reopens the same project, and lists it as recent', async () => {
    const p = join(dir, 'one.rankfill');
    const first = await h['project.save']({ path: p, projectText: project(1) });
    expect(first.ok).toBe(true);
    const second = await h['project.save']({ path: p, projectText: project(2) });
    expect(second.ok).toBe(true);
    const bak = parseProject(readFileSync(p + '.bak', 'utf8'), 'bak');
    expect(bak.ok && bak.project.notes).toBe('v1');
    const opened = await h['project.open']({ path: p });
    if (!opened.ok) throw new Error(JSON.stringify(opened.problems));
    const parsed = parseProject(opened.projectText, 'x');
    expect(parsed.ok && parsed.project.notes).toBe('v2');
    expect((await h['recent.list']({})).files[0].path).toBe(p);
  });

  it('refuses to write an invalid project and leaves the file on disk unchanged', async () => {
    const p = join(dir, 'two.rankfill');
    await h['project.save']({ path: p, projectText: project(3) });
    const before = readFileSync(p, 'utf8');
    const reply = await h['project.save']({ path: p, projectText: '{"format":"rankfill-project","version":1' });
    expect(reply.ok).toBe(false);
    expect(readFileSync(p, 'utf8')).toBe(before);
  });

  it('saving into a folder that does not exist says so and what to do', async () => {
    const p = join(dir, 'no-such-folder', 'x.rankfill');
    const reply = await h['project.save']({ path: p, projectText: project(3) });
    expect(reply.ok).toBe(false);
    if (!reply.ok)
      expect(reply.problems[0].message).toBe(
        `cannot save: the folder ${join(dir, 'no-such-folder')} does not exist; create it first or choose another folder (nothing was written)`,
      );
  });

  it('opening a truncated or future-version file answers with problems, never a project', async () => {
    const t = join(dir, 'trunc.rankfill');
    writeFileSync(t, project(4).slice(0, 60));
    const r1 = await h['project.open']({ path: t });
    expect(r1.ok).toBe(false);
    const f = join(dir, 'future.rankfill');
    writeFileSync(f, project(4).replace('"version": 2,', '"version": 99,'));
    expect(readFileSync(f, 'utf8')).toContain('"version": 99,');
    const r2 = await h['project.open']({ path: f });
    expect(r2.ok).toBe(false);
    if (!r2.ok) expect(r2.problems[0].message).toMatch(/newer|version/i);
  });

  it('writes, lists, restores and discards recovery snapshots', async () => {
    await h['recovery.write']({ id: 'w1', title: 'Panel', sourcePath: null, projectText: project(5) });
    const list = (await h['recovery.list']({})).entries;
    expect(list.map((e) => e.id)).toEqual(['w1']);
    const r = await h['recovery.restore']({ id: 'w1' });
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    const parsed = parseProject(r.projectText, 'x');
    expect(parsed.ok && parsed.project.notes).toBe('v5');
    await h['recovery.discard']({ id: 'w1' });
    expect((await h['recovery.list']({})).entries).toEqual([]);
    expect(existsSync(join(dir, 'recovery', 'w1.rankfill-recovery'))).toBe(false);
  });

  it('without a desktop shell, native dialogs and window close say unsupported', async () => {
    expect(await h['project.choosePath']({ purpose: 'save-project' })).toEqual({ supported: false });
    expect(await h['app.closeWindow']({})).toEqual({ supported: false });
  });
});
