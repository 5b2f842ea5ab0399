import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { run } from './captureCli';
import { parseArgs } from '../../../src-main/cli/args';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { matrixFingerprintText } from '../../../src-shared/io/exportFilled';
import { parseDelimited } from '../../../src-shared/io';
import { newProjectDocument, serializeProject } from '../../../src-shared/project';
import { REPORT_DATA_ID } from '../../../src-shared/report/buildReport';

let dir = '';
const sample = join(__dirname, '..', '..', '..', 'samples', 'coffee-cupping-panel.csv');

function data(html: string): {
  run: { settings: Record<string, unknown>; label: string };
  evaluation: { k: number; table: unknown[] };
  centering: unknown;
  tuning: unknown;
  exports: { path: string }[];
  input: { sha256: string };
} {
  const m = new RegExp(`<script type="application/json" id="${REPORT_DATA_ID}">(.*?)</script>`, 's').exec(html);
  return JSON.parse(m![1]);
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rankfill-report-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('rankfill report', () => {
  it('parses its options: model options as for fill, --out required, --ranks only with --tune', () => {
    const p = parseArgs([
      'report',
      'in.csv',
      '--out',
      'r.html',
      '--rank',
      '3',
      '--centering',
      'row',
      '--tune',
      '--ranks',
      '0,1',
      '--compare-centering',
    ]);
    expect(p.kind === 'run' && p.options).toMatchObject({
      command: 'report',
      rank: 3,
      centering: 'row',
      tune: true,
      ranks: [0, 1],
      compareCentering: true,
    });
    expect(() => parseArgs(['report', 'in.csv'])).toThrow('"report" needs --out REPORT.html');
    expect(() => parseArgs(['report', 'in.csv', '--out', 'r.html', '--ranks', '1,2'])).toThrow(
      '--ranks and --lambdas apply to "report" with --tune only',
    );
    expect(() => parseArgs(['report', 'in.csv', '--out', 'r.html', '--model', 'gaussian', '--rank', '2'])).toThrow(
      '--rank applies to the lowrank model only',
    );
  });

  it('writes a report of a ratings file with the given settings, the filled CSV and its settings file', async () => {
    const out = join(dir, 'coffee.html');
    const csv = join(dir, 'coffee filled.csv');
    const r = await run('report', sample, '--out', out, '--rank', '1', '--lambda', '2', '--seed', '4', '--csv', csv);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain(`→ ${out}`);
    const html = readFileSync(out, 'utf8');
    const d = data(html);
    expect(d.run.settings).toMatchObject({ model: 'lowrank', rank: 1, lambda: 2, centering: 'both', seed: 4 });
    expect(d.evaluation.k).toBe(5);
    expect(d.evaluation.table).toHaveLength(4);
    expect(d.centering).toBeNull();
    expect(d.tuning).toBeNull();
    expect(d.exports.map((x) => x.path)).toEqual([csv]);
    expect(existsSync(join(dir, 'coffee filled.settings.json'))).toBe(true);
    // The report's hash is the export sidecar's hash, i.e. SHA-256 of the matrix fingerprint (FIPS 180-4 via node:crypto).
    const sidecar = JSON.parse(readFileSync(join(dir, 'coffee filled.settings.json'), 'utf8')) as {
      input: { sha256: string };
    };
    const parsed = parseDelimited(readFileSync(sample, 'utf8'), { fileName: sample, layout: 'wide' });
    if (!parsed.ok) throw new Error('sample did not parse');
    const expected = createHash('sha256').update(matrixFingerprintText(parsed.matrix)).digest('hex');
    expect(d.input.sha256).toBe(expected);
    expect(sidecar.input.sha256).toBe(expected);
    expect(html).toContain('rank-1 factorization');
    expect(html).toContain('(λ = 2)');
    expect(readFileSync(csv, 'utf8').split('\n')[0]).toContain('blank cells filled with model estimates');
  });

  it('without model options chooses the settings as fill does, and says so in the methods', async () => {
    const out = join(dir, 'auto.html');
    const r = await run('report', sample, '--out', out);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/settings chosen: rank \d+/);
    const html = readFileSync(out, 'utf8');
    const d = data(html) as unknown as { choice: { folds: number; candidates: number } };
    expect(d.choice.folds).toBe(3);
    expect(d.choice.candidates).toBeGreaterThan(4);
    expect(html).toContain(
      `were scored by a quick 3-fold cross-validation, and the one with the lowest error was kept.`,
    );
    // A second report to the same file is refused without --force and leaves the file alone.
    const again = await run('report', sample, '--out', out, '--rank', '1');
    expect(again.code).toBe(2);
    expect(again.stderr).toContain('already exists; nothing written (add --force to replace it)');
    expect(readFileSync(out, 'utf8')).toBe(html);
    expect((await run('report', sample, '--out', out, '--rank', '1', '--force')).code).toBe(0);
    expect(data(readFileSync(out, 'utf8')).run.settings).toMatchObject({ rank: 1 });
  });

  it('with --level adds the intervals section, the method and its sources, and the interval record in the --csv settings file', async () => {
    const out = join(dir, 'intervals.html');
    const csv = join(dir, 'intervals filled.csv');
    const r = await run('report', sample, '--out', out, '--rank', '2', '--level', '0.8', '--csv', csv);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    const d = data(html) as unknown as {
      intervals: { level: number; coverage: number; meanWidth: number; sources: string[] };
    };
    expect(d.intervals.level).toBe(0.8);
    // Held-out coverage is a share; the conformal guarantee is ≥ 1 − 2α in the worst case (Barber et al. 2021), near the level in practice.
    expect(d.intervals.coverage).toBeGreaterThan(0.6);
    expect(d.intervals.coverage).toBeLessThanOrEqual(1);
    expect(d.intervals.meanWidth).toBeGreaterThan(0);
    expect(html).toContain('data-testid="report-intervals"');
    expect(html).toContain(
      'Each filled value was given an 80 % cross-validated normalized conformal prediction interval (Vovk, Gammerman &amp; Shafer, 2005',
    );
    expect(html).toContain('Predictive inference with the jackknife+');
    const sidecar = JSON.parse(readFileSync(join(dir, 'intervals filled.settings.json'), 'utf8')) as {
      intervals: { level: number; heldOutCoverage: number };
    };
    expect(sidecar.intervals.level).toBe(0.8);
    expect(sidecar.intervals.heldOutCoverage).toBeCloseTo(d.intervals.coverage, 12);
  });

  it('adds the centering comparison and the tuning grid when asked', async () => {
    const out = join(dir, 'tuned.html');
    const r = await run(
      'report',
      sample,
      '--out',
      out,
      '--compare-centering',
      '--tune',
      '--ranks',
      '0,1,2',
      '--lambdas',
      '1,10',
      '--json',
    );
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout) as { centering: boolean; tuning: boolean };
    expect(summary).toMatchObject({ centering: true, tuning: true });
    const d = data(readFileSync(out, 'utf8')) as unknown as {
      centering: { table: unknown[] };
      tuning: { table: unknown[] };
    };
    expect(d.centering.table).toHaveLength(4);
    expect(d.tuning.table).toHaveLength(6);
  });

  it('reports a saved run of a project (by id or position) and refuses model options that would contradict it', async () => {
    const parsed = parseDelimited(readFileSync(sample, 'utf8'), { fileName: sample, layout: 'wide' });
    if (!parsed.ok) throw new Error('sample did not parse');
    const doc = newProjectDocument(parsed.matrix);
    const s = defaultLowRankSettings();
    doc.runs = [
      {
        id: 'run-1',
        number: 1,
        name: '',
        fittedAt: '2026-01-01T00:00:00.000Z',
        savedAt: '2026-01-01T00:00:00.000Z',
        settings: s,
        metrics: {},
      },
      {
        id: 'run-2',
        number: 2,
        name: 'rank 3 by row',
        fittedAt: '2026-01-01T00:01:00.000Z',
        savedAt: '2026-01-01T00:01:00.000Z',
        settings: { ...s, rank: 3, centering: 'row' },
        metrics: {},
      },
    ];
    const project = join(dir, 'study.rankfill');
    writeFileSync(project, serializeProject(doc));
    const last = join(dir, 'last.html');
    expect((await run('report', project, '--out', last)).code).toBe(0);
    expect(data(readFileSync(last, 'utf8')).run).toMatchObject({
      label: 'Saved run run-2 (“rank 3 by row”)',
      settings: { rank: 3, centering: 'row' },
    });
    const first = join(dir, 'first.html');
    expect((await run('report', project, '--out', first, '--run', '1')).code).toBe(0);
    expect(data(readFileSync(first, 'utf8')).run.settings).toMatchObject({ rank: 2, centering: 'both' });
    const byId = await run('report', project, '--out', join(dir, 'x.html'), '--run', 'run-9');
    expect(byId.code).toBe(2);
    expect(byId.stderr).toContain('--run run-9 is not in');
    const clash = await run('report', project, '--out', join(dir, 'y.html'), '--rank', '4');
    expect(clash.code).toBe(2);
    expect(clash.stderr).toContain('a saved run fixes the model settings; leave out --rank');
    expect(existsSync(join(dir, 'y.html'))).toBe(false);
  });

  it('refuses malformed input with FILE:LINE:COLUMN and writes nothing', async () => {
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'r,a,b\nx,1,2\ny,3\n');
    const out = join(dir, 'bad.html');
    const r = await run('report', bad, '--out', out);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.csv:3:\d+: /);
    expect(existsSync(out)).toBe(false);
  });
});
