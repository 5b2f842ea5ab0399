import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { run } from './captureCli';
import { parseArgs, UsageError } from '../../../src-main/cli/args';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { createRng } from '../../../src-shared/engine/random';

let dir = '';
const file = (name: string, text: string | Buffer) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

/** A 12 × 8 rank-1 table on 1–5 with about a third missing, as wide CSV. */
function wideCsv(): { text: string; values: number[][] } {
  const rng = createRng(3);
  const a = Array.from({ length: 12 }, () => 1 + 2 * rng.next());
  const b = Array.from({ length: 8 }, () => 0.6 + 0.7 * rng.next());
  const values = a.map((ai) => b.map((bj) => (rng.next() < 0.35 ? NaN : Math.round(ai * bj * 10) / 10)));
  const lines = ['item,' + b.map((_, j) => `p${j + 1}`).join(',')];
  values.forEach((row, i) => lines.push(`i${i + 1},` + row.map((x) => (Number.isNaN(x) ? '' : String(x))).join(',')));
  return { text: lines.join('\n') + '\n', values };
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rankfill-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('rankfill fill', () => {
  it('writes every cell, keeps observed values and matches an in-process fit', async () => {
    const { text, values } = wideCsv();
    const input = file('in.csv', text);
    const out = join(dir, 'out.csv');
    const r = await run(
      'fill',
      input,
      '--out',
      out,
      '--rank',
      '1',
      '--lambda',
      '0.5',
      '--centering',
      'row',
      '--seed',
      '4',
      '--json',
    );
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout);
    expect(summary).toMatchObject({
      command: 'fill',
      rows: 12,
      cols: 8,
      settings: { rank: 1, lambda: 0.5, centering: 'row', seed: 4 },
    });
    expect(summary.iterations).toBeGreaterThan(0);
    expect(summary.objective).toBe(summary.objectiveTrace[summary.objectiveTrace.length - 1]);
    const lines = readFileSync(out, 'utf8').trim().split(/\r?\n/);
    expect(lines).toHaveLength(13);
    // Reference: the same fit in-process (the CLI must go through fitModel with these settings,
    // scale = observed min and max).
    const flat = values.flat();
    const observed = flat.filter((x) => !Number.isNaN(x));
    const fit = fitModel(
      {
        rowLabels: values.map((_, i) => `i${i + 1}`),
        colLabels: values[0].map((_, j) => `p${j + 1}`),
        values: Float64Array.from(flat),
        scale: { min: Math.min(...observed), max: Math.max(...observed), step: 0 },
      },
      { ...defaultLowRankSettings(), rank: 1, lambda: 0.5, centering: 'row', seed: 4 },
    );
    for (let i = 0; i < 12; i++) {
      const fields = lines[i + 1].split(',');
      expect(fields[0]).toBe(`i${i + 1}`);
      for (let j = 0; j < 8; j++) {
        const y = values[i][j];
        // Source: shortest round-trip number text (ECMAScript Number::toString) reads back exactly.
        if (Number.isNaN(y)) expect(Number(fields[j + 1])).toBe(fit.predictions[i * 8 + j]);
        else expect(fields[j + 1]).toBe(String(y));
      }
    }
  });

  it('--long reads and writes triples; --decimals rounds only predictions; --scale with step snaps', async () => {
    const input = file('long.csv', 'row,column,value\na,x,1\na,y,2\nb,x,2\nb,z,5\nc,y,4\nc,z,3\n');
    const out = join(dir, 'long-out.csv');
    const r = await run(
      'fill',
      input,
      '--out',
      out,
      '--long',
      '--rank',
      '0',
      '--centering',
      'column',
      '--decimals',
      '1',
    );
    expect(r.code).toBe(0);
    const lines = readFileSync(out, 'utf8').trim().split(/\r?\n/);
    // --long input writes the window's long layout: value, source, baseline, spread.
    expect(lines[0]).toBe('row,column,value,source,baseline,spread');
    expect(lines).toHaveLength(10); // 3 × 3 cells
    // a,z is missing → column z mean (5 + 3)/2 = 4; b,y → (2 + 4)/2 = 3; c,x → 1.5
    expect(lines).toContain('a,z,4,filled,4,');
    expect(lines).toContain('b,y,3,filled,3,');
    expect(lines).toContain('c,x,1.5,filled,1.5,');
    expect(lines).toContain('a,x,1,observed,1.5,');
    const snapped = join(dir, 'snapped.csv');
    expect(
      (await run('fill', input, '--out', snapped, '--long', '--rank', '0', '--centering', 'column', '--scale', '1:5:1'))
        .code,
    ).toBe(0);
    expect(readFileSync(snapped, 'utf8')).toContain('c,x,2,filled'); // 1.5 → nearest step (round half up)
  });
});

describe('rankfill fill without model options', () => {
  it('chooses its settings by a quick cross-validation and says so', async () => {
    const input = file('auto.csv', wideCsv().text);
    const out = join(dir, 'auto-out.csv');
    const r = await run('fill', input, '--out', out, '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.chosen.reason).toMatch(/^rank \d+.*: lowest 3-fold error of 13 settings; /);
    expect(j.chosen.meanRmse).toBeLessThanOrEqual(j.chosen.baselineMeanRmse);
    expect(j.settings.maxIterations).toBe(defaultLowRankSettings().maxIterations);
    const text = await run('fill', input, '--out', out, '--force');
    expect(text.stdout.split('\n')[0]).toBe(`settings chosen: ${j.chosen.reason}`);
    // Any model option means the user's settings are used as given.
    const own = JSON.parse((await run('fill', input, '--out', out, '--rank', '1', '--force', '--json')).stdout);
    expect(own.chosen).toBeUndefined();
    expect(own.settings).toMatchObject({ rank: 1, lambda: defaultLowRankSettings().lambda });
  });

  it('evaluate --json reports how much the estimates move between seeds s and s + 1', async () => {
    const { text, values } = wideCsv();
    const input = file('seeds.csv', text);
    const j = JSON.parse((await run('evaluate', input, '--folds', '3', '--rank', '1', '--seed', '4', '--json')).stdout);
    expect(j.seedStability.seeds).toEqual([4, 5]);
    expect(j.seedStability.cells).toBe(values.flat().filter((x) => Number.isNaN(x)).length);
    expect(typeof j.seedStability.flagged).toBe('boolean');
    expect(j.seedStability.flagged).toBe(j.seedStability.movedFraction > 0.01);
  });

  it('tune without --ranks/--lambdas uses the data-derived grid and a refinement pass', async () => {
    const input = file('grid.csv', wideCsv().text);
    const j = JSON.parse((await run('tune', input, '--folds', '3', '--models', 'lowrank', '--json')).stdout);
    expect(j.grid.ranks[0]).toBe(0);
    // 12 × 8: half of 8 = 4 → ranks 0, 1, 2, 3.
    expect(j.grid.ranks).toEqual([0, 1, 2, 3]);
    expect(j.grid.lambdas).toHaveLength(5);
    for (let t = 1; t < 5; t++) expect(j.grid.lambdas[t] / j.grid.lambdas[t - 1]).toBeLessThanOrEqual(2.06);
    const rankZero = j.table.filter((r: { rank: number }) => r.rank === 0);
    expect(rankZero.map((r: { centering: string }) => r.centering)).toEqual(['none', 'row', 'column', 'both']);
  });
});

describe('rankfill evaluate and tune', () => {
  it('evaluate --json prints the fold table', async () => {
    const input = file('e.csv', wideCsv().text);
    const r = await run('evaluate', input, '--folds', '4', '--rank', '1', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.table).toHaveLength(4);
    const mean = j.table.reduce((a: number, f: { rmse: number }) => a + f.rmse, 0) / 4;
    expect(j.meanRmse).toBeCloseTo(mean, 12);
    expect(j.table.reduce((a: number, f: { n: number }) => a + f.n, 0)).toBe(
      wideCsv()
        .values.flat()
        .filter((x) => !Number.isNaN(x)).length,
    );
  });

  it('tune --json reports the grid, the best and the one-standard-error choice', async () => {
    const input = file('t.csv', wideCsv().text);
    const r = await run(
      'tune',
      input,
      '--ranks',
      '0,1,2',
      '--lambdas',
      '1,10',
      '--centering',
      'row,both',
      '--folds',
      '3',
      '--json',
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.table).toHaveLength(12);
    const best = Math.min(...j.table.map((t: { meanRmse: number }) => t.meanRmse));
    expect(j.best.meanRmse).toBe(best);
    expect(j.oneStandardError.meanRmse).toBeLessThanOrEqual(j.threshold);
    expect(j.oneStandardError.rank).toBeLessThanOrEqual(j.best.rank);
  });

  it('text output without --json', async () => {
    const input = file('t2.csv', wideCsv().text);
    const r = await run('tune', input, '--ranks', '0,1', '--lambdas', '1', '--centering', 'both', '--folds', '3');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/best: rank \d, lambda 1, centering both/);
  });
});

describe('exit codes and messages', () => {
  // The message names the file as given on the command line.
  const cases: [string, string | Buffer, RegExp][] = [
    ['text.csv', 'x,a,b\nr1,1,abc\nr2,2,3\n', /^text\.csv:2:3: /],
    ['fields.csv', 'x,a,b\nr1,1,2,3\nr2,2,3\n', /^fields\.csv:2:\d+: /],
    ['quote.csv', 'x,a,b\nr1,1,"2\nr2,2,3\n', /^quote\.csv:\d+:\d+: .*quote/],
    ['dup.csv', 'x,a,b\nr1,1,2\nr1,2,3\n', /^dup\.csv:3:1: .*r1/],
    ['binary.csv', Buffer.from([0x78, 0x2c, 0x61, 0x0a, 0x00, 0x01, 0x02, 0x0a]), /^binary\.csv:\d+:\d+: /],
    ['empty.csv', 'x,a,b\n', /^empty\.csv:1:1: .*no data rows/],
    ['none.csv', 'x,a,b\nr1,,\nr2,,\n', /^none\.csv:1:1: no observed values/],
    ['inf.csv', 'x,a,b\nr1,1,Infinity\nr2,2,3\n', /^inf\.csv:2:3: /],
  ];
  for (const [name, text, pattern] of cases) {
    it(`malformed input ${name} → exit 2, FILE:LINE:COLUMN, nothing written`, async () => {
      const path = file(name, text);
      const out = join(dir, `${name}.out`);
      const r = await run('fill', path, '--out', out);
      expect(r.code).toBe(2);
      expect(r.stderr.startsWith(`${dir}/`)).toBe(true);
      expect(r.stderr.slice(dir.length + 1)).toMatch(pattern);
      expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
      expect(r.stdout).toBe('');
      expect(existsSync(out)).toBe(false);
    });
  }

  it('a failing fit exits 1 with a one-line reason', async () => {
    const input = file('few.csv', 'x,a,b\nr1,1,\nr2,,\n');
    const r = await run('evaluate', input, '--folds', '3');
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^rankfill: fit failed: /);
  });

  it('usage errors exit 2 with the usage line', async () => {
    for (const argv of [
      [],
      ['fit', 'x.csv'],
      ['fill', 'x.csv'],
      ['tune', 'x.csv', '--rank', '2'],
      ['fill', 'x.csv', '--out', 'y', '--rank', 'two'],
      ['evaluate', 'x.csv', '--scale', '5:1'],
    ]) {
      const r = await run(...argv);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/^rankfill: .+\nusage: rankfill fill/);
    }
    expect(() => parseArgs(['tune', 'a.csv', '--centering', 'row,diagonal'])).toThrow(UsageError);
    expect(parseArgs(['tune', 'a.csv', '--centering=row,both'])).toMatchObject({
      options: { centerings: ['row', 'both'] },
    });
  });

  it('a missing input file is reported as FILE:1:1 with exit 2', async () => {
    const r = await run('evaluate', join(dir, 'nope.csv'));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/nope\.csv:1:1: cannot read the file: file not found/);
  });
});

describe('bin/rankfill.js', () => {
  it('runs the built bundle (npm run build:cli, part of npm run test:unit) and sets the exit status', () => {
    const bin = fileURLToPath(new URL('../../../bin/rankfill.js', import.meta.url));
    const bundle = fileURLToPath(new URL('../../../out/cli/rankfill.js', import.meta.url));
    // Build the bundle when a focused run (npx vitest …) comes before any build.
    if (!existsSync(bundle))
      spawnSync('npm', ['run', 'build:cli'], {
        cwd: fileURLToPath(new URL('../../..', import.meta.url)),
        encoding: 'utf8',
      });
    expect(existsSync(bundle), 'out/cli/rankfill.js is missing: run `npm run build:cli` first').toBe(true);
    const input = file('bin.csv', wideCsv().text);
    const ok = spawnSync(process.execPath, [bin, 'evaluate', input, '--folds', '3', '--json'], { encoding: 'utf8' });
    expect(ok.status).toBe(0);
    expect(JSON.parse(ok.stdout).table).toHaveLength(3);
    const bad = spawnSync(
      process.execPath,
      [bin, 'fill', file('bad.csv', 'x,a\nr1,zz\n'), '--out', join(dir, 'o.csv')],
      { encoding: 'utf8' },
    );
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/bad\.csv:2:2: /);
    const usage = spawnSync(process.execPath, [bin, 'frobnicate'], { encoding: 'utf8' });
    expect(usage.status).toBe(2);
    expect(usage.stderr).toMatch(/usage: rankfill/);
  });
});
