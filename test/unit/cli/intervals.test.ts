import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { run } from './captureCli';
import { parseArgs, UsageError } from '../../../src-main/cli/args';
import { tallPanelCsv } from '../../../bench/tallPanel';

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rankfill-cli-iv-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('rankfill intervals', () => {
  it('fill --level 0.9 --long writes lower,upper columns: inclusive, clipped, around every estimate', async () => {
    // --long reads triples too: the tall panel as row,column,value (blank cells left out).
    const wide = tallPanelCsv(200, 10, 0.2, 9)
      .trim()
      .split('\n')
      .map((l) => l.split(','));
    const triples = ['row,column,value'];
    for (const r of wide.slice(1))
      r.slice(1).forEach((v, j) => v !== '' && triples.push(`${r[0]},${wide[0][j + 1]},${v}`));
    const input = join(dir, 'tall.csv');
    writeFileSync(input, triples.join('\n') + '\n');
    const out = join(dir, 'tall-long.csv');
    const r = await run('fill', input, '--out', out, '--long', '--level', '0.9', '--sidecar', '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.intervals).toMatchObject({
      level: 0.9,
      boundsInclusive: true,
      clippedToScale: true,
      method: 'cross-validated normalized conformal',
      written: 'lower,upper columns',
    });
    expect(j.intervals.folds).toHaveLength(5);
    const lines = readFileSync(out, 'utf8').trim().split(/\r?\n/);
    expect(lines[0]).toBe('row,column,value,source,baseline,spread,lower,upper');
    let filled = 0;
    for (const line of lines.slice(1)) {
      const [, , v, source, , , lo, hi] = line.split(',');
      expect(lo === '').toBe(source === 'observed');
      if (lo === '') {
        expect(hi).toBe(''); // observed cell: no interval
        continue;
      }
      filled++;
      expect(Number(lo)).toBeLessThanOrEqual(Number(v));
      expect(Number(v)).toBeLessThanOrEqual(Number(hi));
      expect(Number(lo)).toBeGreaterThanOrEqual(1); // scale = observed min … max = 1 … 7
      expect(Number(hi)).toBeLessThanOrEqual(7);
    }
    expect(filled).toBe(j.filled);
    const sidecar = JSON.parse(readFileSync(join(dir, 'tall-long.settings.json'), 'utf8'));
    expect(sidecar.intervals).toMatchObject({
      level: 0.9,
      method: 'cross-validated normalized conformal',
      scaleFrom: 'error model',
      boundsInclusive: true,
    });
    expect(sidecar.intervals.heldOutCoverage).toBeCloseTo(j.intervals.heldOutCoverage, 12);
    expect(sidecar.intervals.meaning).toMatch(/on average over cells, not for each cell/);
  });

  it('evaluate reports coverage and mean width per fold, near the level on exchangeable data', async () => {
    // Source: Lei, G'Sell, Rinaldo, Tibshirani & Wasserman (2018), JASA, Theorem 2.1: with
    // exchangeable cells a fold calibrated on the others covers with probability in
    // [level, level + 1/(n + 1)]; the tall panel's cells are hidden completely at random.
    const input = join(dir, 'tall2.csv');
    writeFileSync(input, tallPanelCsv(400, 12, 0.2, 10));
    const r = await run('evaluate', input, '--model', 'gaussian', '--level', '0.8', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.table).toHaveLength(5);
    let n = 0;
    let covered = 0;
    for (const f of j.table) {
      expect(f.coverage).toBeGreaterThan(0.7);
      expect(f.coverage).toBeLessThan(0.9);
      expect(f.meanWidth).toBeGreaterThan(0);
      n += f.n;
      covered += f.coverage * f.n;
    }
    expect(j.intervals.coverage).toBeCloseTo(covered / n, 12);
    expect(Math.abs(j.intervals.coverage - 0.8)).toBeLessThan(0.03);
    const text = await run('evaluate', input, '--model', 'gaussian');
    expect(text.stdout).toMatch(/80\.0 % intervals calibrated on the other folds/);
    expect(text.stdout).toMatch(/fold {2}rmse {4}mae {5}cells {2}coverage {2}mean width/);
  });

  it('refuses a level outside 0.5–0.99 and on tune', () => {
    expect(() => parseArgs(['fill', 'x.csv', '--out', 'y.csv', '--level', '0.3'])).toThrow(UsageError);
    expect(() => parseArgs(['fill', 'x.csv', '--out', 'y.csv', '--level', '90'])).toThrow(/between 0.5 and 0.99/);
    expect(() => parseArgs(['tune', 'x.csv', '--level', '0.9'])).toThrow(/does not apply/);
  });
});
