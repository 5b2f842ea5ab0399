import { mkdtempSync, readFileSync, readdirSync, rmSync, utimesSync, writeFileSync, mkdirSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { formatProblem } from '../../../../src-shared/io/problem';
import { atomicWrite, backupPathFor, removeLeftoverTemps } from '../../../../src-main/services/atomicWrite';
import { Autosaver } from '../../../../src-main/services/autosave';
import { defaultConfigDir } from '../../../../src-main/services/configDir';
import {
  importDelimitedFile,
  openProjectFile,
  saveProjectFile,
  withProjectExtension,
} from '../../../../src-main/services/projectStore';
import { decodeText, readTextFile } from '../../../../src-main/services/readTextFile';
import { RecentFiles } from '../../../../src-main/services/recentFiles';
import { RecoveryStore } from '../../../../src-main/services/recovery';
import { crashTestVersion } from './crash.versions';

const work = mkdtempSync(path.join(os.tmpdir(), 'rankfill-store-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

describe('atomicWrite', () => {
  it('replaces the file and keeps the previous version as NAME.bak', async () => {
    const f = path.join(work, 'a.txt');
    await atomicWrite(f, 'one');
    expect(readFileSync(f, 'utf8')).toBe('one');
    expect(readdirSync(work)).not.toContain('a.txt.bak');
    await atomicWrite(f, 'two');
    await atomicWrite(f, 'three');
    expect(readFileSync(f, 'utf8')).toBe('three');
    expect(readFileSync(backupPathFor(f), 'utf8')).toBe('two');
    expect(readdirSync(work).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  });

  it('leaves the target unchanged and no temp file when the write fails', async () => {
    const f = path.join(work, 'b.txt');
    await atomicWrite(f, 'safe');
    // Renaming a file over a non-empty folder fails: use a folder as the target.
    const dirTarget = path.join(work, 'folder-target');
    mkdirSync(path.join(dirTarget, 'inner'), { recursive: true });
    await expect(atomicWrite(dirTarget, 'x', { backup: false })).rejects.toThrow();
    await expect(atomicWrite(path.join(work, 'no-such-dir', 'c.txt'), 'x')).rejects.toThrow();
    expect(readFileSync(f, 'utf8')).toBe('safe');
    expect(readdirSync(work).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  });

  it("removes temp files of interrupted writes: a dead writer's at once, a running one's only after a day", async () => {
    const dir = path.join(work, 'leftovers');
    mkdirSync(dir);
    // pid 2147483646 does not run on any system we test on; process.ppid (the test runner) does.
    const dead = path.join(dir, '.c.txt.2147483646.0123456789ab.tmp');
    const running = path.join(dir, `.c.txt.${process.ppid}.0123456789ab.tmp`);
    const runningOld = path.join(dir, `.d.txt.${process.ppid}.0123456789ab.tmp`);
    const notOurs = path.join(dir, '.other.txt.1.x.tmp');
    for (const f of [dead, running, runningOld, notOurs]) writeFileSync(f, 'partial');
    const twoDaysAgo = new Date(Date.now() - 2 * 86_400_000);
    utimesSync(runningOld, twoDaysAgo, twoDaysAgo);
    utimesSync(notOurs, new Date(0), new Date(0));
    expect(await removeLeftoverTemps(dir)).toBe(2);
    expect(readdirSync(dir).sort()).toEqual([path.basename(running), path.basename(notOurs)].sort());
  });
});

describe('projectStore', () => {
  it('saves, reopens and keeps a backup', async () => {
    const f = withProjectExtension(path.join(work, 'panel'));
    expect(f.endsWith('panel.rankfill')).toBe(true);
    const v0 = crashTestVersion(0);
    const saved = await saveProjectFile(f, v0, { now: new Date('2026-03-04T05:06:07.000Z') });
    expect(saved.ok).toBe(true);
    const v1 = crashTestVersion(1);
    await saveProjectFile(f, v1);
    const opened = await openProjectFile(f);
    if (!opened.ok) throw new Error(opened.problems.map(formatProblem).join('\n'));
    expect(opened.project.notes).toBe('version 1');
    const backup = await openProjectFile(f + '.bak');
    if (!backup.ok) throw new Error(backup.problems.map(formatProblem).join('\n'));
    expect(backup.project.notes).toBe('version 0');
    expect(backup.project.modifiedAt).toBe('2026-03-04T05:06:07.000Z');
    expect(Array.from(backup.project.matrix.values)).toEqual(Array.from(v0.matrix.values));
  });

  it('answers file-system errors with a problem, not an exception', async () => {
    const missing = await openProjectFile(path.join(work, 'nope.rankfill'));
    expect(missing.ok).toBe(false);
    if (!missing.ok)
      expect(formatProblem(missing.problems[0])).toBe('nope.rankfill:1:1: cannot read the file: file not found');
    const folder = await importDelimitedFile(work);
    expect(folder.ok).toBe(false);
    if (!folder.ok) expect(folder.problems[0].message).toBe('this is a folder, not a file');
    const cantSave = await saveProjectFile(path.join(work, 'missing-dir', 'x.rankfill'), crashTestVersion(0));
    expect(cantSave.ok).toBe(false);
    if (!cantSave.ok)
      expect(cantSave.problems[0].message).toBe(
        `cannot save: the folder ${path.join(work, 'missing-dir')} does not exist; create it first or choose another folder (nothing was written)`,
      );
  });

  it('checks the size limit before reading', async () => {
    const f = path.join(work, 'big.csv');
    writeFileSync(f, 'row,a\n' + 'x,1\n'.repeat(1000));
    const r = await readTextFile(f, 1000);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0].message).toBe('file is too large to open (3.9 KB; the limit is 1000 bytes)');
  });

  it('decodes UTF-8 (keeping the BOM for the parser) and UTF-16 with a BOM', async () => {
    // Source: Unicode standard, BOM byte sequences EF BB BF (UTF-8), FF FE (UTF-16LE), FE FF (UTF-16BE).
    expect(decodeText(new Uint8Array([0xef, 0xbb, 0xbf, 0x61]))).toBe('\uFEFFa');
    expect(decodeText(new Uint8Array([0xff, 0xfe, 0x61, 0x00, 0xe9, 0x00]))).toBe('aé');
    expect(decodeText(new Uint8Array([0xfe, 0xff, 0x00, 0x61, 0x00, 0xe9]))).toBe('aé');
    expect(decodeText(new Uint8Array([0x61, 0xff]))).toBe('a\uFFFD');
    const f = path.join(work, 'utf16.csv');
    writeFileSync(f, Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('row,a\r\nx,4\r\n', 'utf16le')]));
    const r = await importDelimitedFile(f);
    expect(r.ok && Array.from(r.matrix.values)).toEqual([4]);
  });
});

describe('recovery and autosave', () => {
  it('autosave writes a snapshot within the delay, restore gives the last edits, save discards it', async () => {
    const store = new RecoveryStore({ dir: path.join(work, 'rec'), fsync: false });
    const doc = crashTestVersion(0);
    const saver = new Autosaver(store, 'doc-1', { delayMs: 20, maxDelayMs: 60 });
    for (let k = 1; k <= 5; k++) {
      doc.matrix.values[k] = k * 0.5;
      saver.changed({ doc: () => doc, sourcePath: '/data/panel.rankfill' });
    }
    doc.matrix.rowLabels[0] = 'renamed';
    saver.changed({ doc: () => doc, sourcePath: '/data/panel.rankfill' });
    await new Promise((r) => setTimeout(r, 150));
    const entries = await store.list();
    expect(entries.map((e) => [e.id, e.title, e.sourcePath])).toEqual([
      ['doc-1', 'panel.rankfill', '/data/panel.rankfill'],
    ]);
    // A fresh store (as after a restart) restores the edits.
    const restored = await new RecoveryStore({ dir: path.join(work, 'rec') }).restore('doc-1');
    if (!restored.ok) throw new Error(restored.problems.map(formatProblem).join('\n'));
    expect(restored.project.matrix.rowLabels[0]).toBe('renamed');
    expect(Array.from(restored.project.matrix.values.subarray(1, 6))).toEqual([0.5, 1, 1.5, 2, 2.5]);
    await saver.saved();
    expect(await store.list()).toEqual([]);
  });

  it('keeps writing during continuous edits (max delay) and refuses damaged snapshots', async () => {
    const dir = path.join(work, 'rec2');
    const store = new RecoveryStore({ dir, fsync: false });
    const doc = crashTestVersion(0);
    const saver = new Autosaver(store, 'doc-2', { delayMs: 40, maxDelayMs: 60 });
    const t0 = Date.now();
    while (Date.now() - t0 < 150) {
      saver.changed({ doc: () => doc });
      await new Promise((r) => setTimeout(r, 10));
    }
    await saver.flush();
    expect((await store.list()).length).toBe(1);
    saver.dispose();
    writeFileSync(
      path.join(dir, 'doc-3.rankfill-recovery'),
      '{"format":"rankfill-recovery","version":1,"meta":{"id":"doc-3","savedAt":"x"},"project":{"format":"rankfill-project","version":9}}',
    );
    const r = await store.restore('doc-3');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0].message).toBe('made by a newer Rankfill (format v9); this version reads up to v2');
    writeFileSync(path.join(dir, 'doc-4.rankfill-recovery'), '{"format":"rankfill-recov');
    expect((await store.list()).map((e) => e.id).sort()).toEqual(['doc-2', 'doc-3']);
    const damaged = await store.restore('doc-4');
    expect(damaged.ok).toBe(false);
    await expect(store.writeSnapshot('../escape', doc)).rejects.toThrow(/invalid recovery id/);
  });
});

describe('recent files and config folder', () => {
  it('keeps newest first, without duplicates, capped, and survives a damaged list', async () => {
    const file = path.join(work, 'cfg', 'recent-files.json');
    const recent = new RecentFiles({ file, max: 3 });
    expect(await recent.list()).toEqual([]);
    for (const n of ['a', 'b', 'c', 'a', 'd'])
      await recent.add(path.join(work, n + '.rankfill'), new Date('2026-01-01T00:00:00Z'));
    expect((await recent.list()).map((f) => path.basename(f.path))).toEqual(['d.rankfill', 'a.rankfill', 'c.rankfill']);
    await recent.remove(path.join(work, 'a.rankfill'));
    expect((await recent.list()).map((f) => path.basename(f.path))).toEqual(['d.rankfill', 'c.rankfill']);
    writeFileSync(file, '{broken');
    expect(await recent.list()).toEqual([]);
  });

  it('puts the config folder where each platform expects it', () => {
    // Source: XDG Base Directory spec (Linux), Apple File System Programming Guide (macOS), %APPDATA% (Windows).
    expect(defaultConfigDir({ XDG_CONFIG_HOME: '/x/cfg' }, 'linux')).toBe(path.join('/x/cfg', 'rankfill'));
    expect(defaultConfigDir({}, 'darwin')).toBe(path.join(os.homedir(), 'Library', 'Application Support', 'Rankfill'));
    expect(defaultConfigDir({ APPDATA: '/appdata' }, 'win32')).toBe(path.join('/appdata', 'Rankfill'));
    expect(defaultConfigDir({ RANKFILL_CONFIG_DIR: '/portable' }, 'linux')).toBe(path.resolve('/portable'));
  });
});
