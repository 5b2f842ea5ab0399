import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { run } from '../cli/captureCli';
import { parseArgs, UsageError } from '../../../src-main/cli/args';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { crossValidate, makeFolds } from '../../../src-shared/engine/crossValidation';
import { defaultGaussianSettings } from '../../../src-shared/engine/gaussian';
import { ar1Covariance, drawNormal, hideAtRandom, toMatrix } from './helpers';

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rankfill-gaussian-cli-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A tall panel (rows = draws of an AR(1)-correlated normal) as wide CSV, values to 2 decimals. */
function tallPanel(n: number, p: number, seed: number): { path: string; values: Float64Array } {
  const raw = hideAtRandom(drawNormal(n, Array(p).fill(5), ar1Covariance(Array(p).fill(1), 0.8), seed), 0.2, seed + 1);
  const values = raw.map((x) => (Number.isNaN(x) ? NaN : Math.round(x * 100) / 100));
  const lines = ['who,' + Array.from({ length: p }, (_, j) => `q${j + 1}`).join(',')];
  for (let i = 0; i < n; i++) {
    const row = Array.from(values.subarray(i * p, i * p + p), (x) => (Number.isNaN(x) ? '' : String(x)));
    lines.push(`r${i + 1},${row.join(',')}`);
  }
  const path = join(dir, `tall-${n}x${p}-${seed}.csv`);
  writeFileSync(path, lines.join('\n') + '\n');
  return { path, values };
}

/** The matrix the CLI reads from that file: scale = observed min and max (step as detected). */
function asRead(values: Float64Array, n: number, p: number) {
  let min = Infinity;
  let max = -Infinity;
  for (const x of values) if (!Number.isNaN(x)) [min, max] = [Math.min(min, x), Math.max(max, x)];
  return toMatrix(new Float64Array(values), n, p, min, max, 0.01);
}

describe('rankfill options for the Gaussian model', () => {
  it('parses --model, --shrinkage, --transpose, --models and --shrinkages', () => {
    expect(
      parseArgs(['fill', 'a.csv', '--out', 'b.csv', '--model', 'gaussian', '--shrinkage=0.1', '--transpose']),
    ).toMatchObject({
      options: { model: 'gaussian', shrinkage: 0.1, transpose: true },
    });
    expect(parseArgs(['evaluate', 'a.csv'])).toMatchObject({ options: { model: 'lowrank', transpose: false } });
    expect(parseArgs(['tune', 'a.csv'])).toMatchObject({ options: { shrinkages: [0, 0.05, 0.1, 0.2] } });
    expect((parseArgs(['tune', 'a.csv']) as { options: { models?: unknown } }).options.models).toBeUndefined();
    expect(parseArgs(['tune', 'a.csv', '--models', 'gaussian,lowrank', '--shrinkages', '0,0.3'])).toMatchObject({
      options: { models: ['gaussian', 'lowrank'], shrinkages: [0, 0.3] },
    });
  });

  it('refuses options that do not belong to the chosen family or are out of range', () => {
    const bad: [string[], RegExp][] = [
      [
        ['fill', 'a.csv', '--out', 'b.csv', '--model', 'gaussian', '--centering', 'row'],
        /centering does not apply to the gaussian model/,
      ],
      [['evaluate', 'a.csv', '--model', 'gaussian', '--rank', '2'], /--rank applies to the lowrank model only/],
      [['evaluate', 'a.csv', '--shrinkage', '0.1'], /--shrinkage applies to the gaussian model only/],
      [['evaluate', 'a.csv', '--model', 'gaussian', '--shrinkage', '1'], /≥ 0 and < 1/],
      [['evaluate', 'a.csv', '--model', 'normal'], /one of lowrank, gaussian/],
      [['tune', 'a.csv', '--models', 'lowrank,other'], /lowrank, gaussian/],
      [['tune', 'a.csv', '--shrinkage', '0.1'], /does not apply to "tune"/],
      [['fill', 'a.csv', '--out', 'b.csv', '--shrinkages', '0.1'], /does not apply to "fill"/],
    ];
    for (const [argv, pattern] of bad) {
      expect(() => parseArgs(argv)).toThrow(UsageError);
      expect(() => parseArgs(argv)).toThrow(pattern);
    }
  });

  it('fill --model gaussian writes the same cells as an in-process Gaussian fit', async () => {
    const n = 80;
    const p = 5;
    const { path, values } = tallPanel(n, p, 3);
    const out = join(dir, 'filled.csv');
    const r = await run('fill', path, '--out', out, '--model', 'gaussian', '--shrinkage', '0.1', '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout);
    expect(summary.settings).toMatchObject({ model: 'gaussian', shrinkage: 0.1, transpose: false });
    // Reference: the same fit through fitModel in-process.
    const ref = fitModel(asRead(values, n, p), { ...defaultGaussianSettings(), shrinkage: 0.1 });
    expect(summary.iterations).toBe(ref.iterations);
    const lines = readFileSync(out, 'utf8').trim().split(/\r?\n/).slice(1);
    for (let i = 0; i < n; i++) {
      const cells = lines[i].split(',').slice(1).map(Number);
      for (let j = 0; j < p; j++) expect(cells[j]).toBeCloseTo(ref.predictions[i * p + j], 9);
    }
  });

  it('evaluate --model gaussian reports the cross-validated RMSE of the in-process folds', async () => {
    const n = 60;
    const p = 4;
    const { path, values } = tallPanel(n, p, 5);
    const r = await run('evaluate', path, '--model', 'gaussian', '--folds', '3', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    const m = asRead(values, n, p);
    const s = defaultGaussianSettings();
    const cv = crossValidate(m, s, makeFolds(m, 3, s.seed));
    expect(j.settings.model).toBe('gaussian');
    expect(j.meanRmse).toBeCloseTo(cv.meanRmse, 12);
  });
});

describe('rankfill tune between families', () => {
  it('on a tall correlated panel the choice is the Gaussian family, with the options to fill with it', async () => {
    const { path } = tallPanel(150, 6, 7);
    const r = await run(
      'tune',
      path,
      '--ranks',
      '1,2',
      '--lambdas',
      '1,10',
      '--centering',
      'column,both',
      '--folds',
      '3',
      '--json',
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.models).toEqual(['lowrank', 'gaussian']);
    expect(j.table).toHaveLength(8 + 4);
    expect(
      j.table.filter((t: { model: string }) => t.model === 'gaussian').map((t: { shrinkage: number }) => t.shrinkage),
    ).toEqual([0, 0.05, 0.1, 0.2]);
    expect(j.choice.model).toBe('gaussian');
    expect(typeof j.choice.shrinkage).toBe('number');
    expect(j.choice.fillArguments).toEqual(['--model', 'gaussian', '--shrinkage', String(j.choice.shrinkage)]);
    expect(j.choice.reason).toMatch(/lowest cross-validated RMSE/);
    const bestLow = Math.min(
      ...j.table.filter((t: { model: string }) => t.model === 'lowrank').map((t: { meanRmse: number }) => t.meanRmse),
    );
    // the family is chosen by its best row; the choice is its simplest setting within one SE
    expect(j.best.model).toBe('gaussian');
    expect(j.best.meanRmse).toBeLessThan(bestLow);
    expect(j.choice.meanRmse).toBeLessThanOrEqual(j.threshold);
    // and fill accepts exactly those options
    const f = await run('fill', path, '--out', join(dir, 'chosen.csv'), ...j.choice.fillArguments);
    expect(f.code).toBe(0);
  });

  it('leaves the Gaussian model out, saying why, when it would refuse the matrix', async () => {
    // 8 rows × 301 columns: more than 300 variables
    const rows = ['id,' + Array.from({ length: 301 }, (_, j) => `c${j + 1}`).join(',')];
    for (let i = 0; i < 8; i++)
      rows.push(
        `r${i + 1},` +
          Array.from({ length: 301 }, (_, j) => ((i * 7 + j * 3) % 5 === 0 ? '' : String(1 + ((i + j) % 5)))).join(','),
      );
    const path = join(dir, 'wide.csv');
    writeFileSync(path, rows.join('\n') + '\n');
    const r = await run(
      'tune',
      path,
      '--ranks',
      '0,1',
      '--lambdas',
      '1',
      '--centering',
      'both',
      '--folds',
      '3',
      '--json',
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.models).toEqual(['lowrank']);
    expect(j.skipped[0].reason).toMatch(/at most 300 variables.*301 columns/);
    expect(j.choice.model).toBe('lowrank');
    expect(j.choice.reason).toMatch(/at most 300 variables/);
    const only = await run('tune', path, '--models', 'gaussian', '--folds', '3');
    expect(only.code).toBe(1);
    expect(only.stderr).toMatch(/^rankfill: fit failed: The Gaussian model handles at most 300 variables/);
  });

  it('by default tries the Gaussian model only on tall panels', async () => {
    const { path } = tallPanel(12, 8, 9);
    const r = await run(
      'tune',
      path,
      '--ranks',
      '0,1',
      '--lambdas',
      '1',
      '--centering',
      'both',
      '--folds',
      '3',
      '--json',
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.models).toEqual(['lowrank']);
    expect(j.skipped[0].reason).toMatch(/not tall enough.*12 draws for 8 variables/);
  });
});
