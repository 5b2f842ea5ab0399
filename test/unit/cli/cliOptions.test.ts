/**
 * The command line's own options: per-command help, --force, the export layouts shared
 * with the window, --duplicates for long input, the --long hint, and tune's --scale.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { run } from './captureCli';
import { OPTIONS } from '../../../src-main/cli/args';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { defaultGaussianSettings } from '../../../src-shared/engine/gaussian/settings';

let dir = '';
const file = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

const WIDE = 'who,a,b,c\nr1,1,2,\nr2,2,,4\nr3,,3,5\nr4,4,5,5\n';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rankfill-cli-opts-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('per-command --help', () => {
  for (const command of ['fill', 'evaluate', 'tune', 'report'] as const) {
    it(`${command} --help lists every option of ${command} with its default`, async () => {
      const r = await run(command, '--help');
      expect(r.code).toBe(0);
      expect(r.stdout).toMatch(new RegExp(`^usage: rankfill ${command} IN\\.csv`));
      const mine = OPTIONS.filter((o) => o.commands.includes(command));
      expect(mine.length).toBeGreaterThan(8);
      for (const o of mine) {
        const line = r.stdout
          .split('\n')
          .find((l) => l.trimStart().startsWith(`--${o.name}`) && !l.includes(`--${o.name}s`));
        expect(line, `--${o.name}`).toBeDefined();
        expect(line).toMatch(/\(default: .+\)$/);
      }
      // Options of other commands are not listed.
      const names = new Set(mine.map((o) => o.name));
      for (const o of OPTIONS.filter((x) => !x.commands.includes(command) && !names.has(x.name)))
        expect(r.stdout).not.toMatch(new RegExp(`^  --${o.name} `, 'm'));
    });
  }

  it('the defaults shown are the engine defaults', async () => {
    const lr = defaultLowRankSettings();
    const g = defaultGaussianSettings();
    const fill = (await run('help', 'fill')).stdout;
    // fill without model options chooses rank, λ and centering from the data (issue 15);
    // evaluate keeps the engine defaults.
    expect(fill).toMatch(/--rank K .*\(default: chosen from the data/);
    const evaluate = (await run('help', 'evaluate')).stdout;
    expect(evaluate).toMatch(new RegExp(`--rank K .*\\(default: ${lr.rank}\\)`));
    expect(evaluate).toMatch(new RegExp(`--lambda L .*\\(default: ${lr.lambda}\\)`));
    expect(evaluate).toMatch(new RegExp(`--centering \\S+ .*\\(default: ${lr.centering}\\)`));
    expect(fill).toMatch(new RegExp(`--shrinkage S .*\\(default: ${g.shrinkage}\\)`));
    expect(fill).toMatch(
      new RegExp(
        `--iterations N .*\\(default: ${lr.maxIterations} \\(low-rank\\), ${g.maxIterations} \\(gaussian\\)\\)`,
      ),
    );
    expect(fill).toMatch(new RegExp(`--seed S .*\\(default: ${lr.seed}\\)`));
    expect(fill).toContain('(default: 1e-6)');
    expect(lr.tolerance).toBe(1e-6);
    // The global help names the model options and points to the per-command help.
    const global = (await run('--help')).stdout;
    expect(global).toMatch(/"model options" are --model, --rank, --lambda/);
    expect(global).toContain('rankfill COMMAND --help');
  });
});

describe('--force', () => {
  it('an existing output is left untouched without --force (exit 2) and replaced with it', async () => {
    const input = file('in.csv', WIDE);
    const out = file('out.csv', 'keep me\n');
    const before = statSync(out).mtimeMs;
    const r = await run('fill', input, '--out', out, '--rank', '1');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/out\.csv already exists; nothing written \(add --force to replace it\)/);
    expect(readFileSync(out, 'utf8')).toBe('keep me\n');
    expect(statSync(out).mtimeMs).toBe(before);
    const forced = await run('fill', input, '--out', out, '--rank', '1', '--force');
    expect(forced.code).toBe(0);
    expect(readFileSync(out, 'utf8')).toMatch(/^"?row \\ column \(blank cells filled with model estimates\)/);
  });

  it('an existing sidecar also needs --force', async () => {
    const input = file('in2.csv', WIDE);
    const out = join(dir, 'o2.csv');
    file('o2.settings.json', '{}');
    const r = await run('fill', input, '--out', out, '--sidecar');
    expect(r.code).toBe(2);
    expect(existsSync(out)).toBe(false);
    expect(readFileSync(join(dir, 'o2.settings.json'), 'utf8')).toBe('{}');
  });

  it('a missing output folder says so', async () => {
    const r = await run('fill', file('in3.csv', WIDE), '--out', join(dir, 'no-such-folder', 'o.csv'));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/cannot write .*no-such-folder\/o\.csv: its folder does not exist \(create it first\)/);
  });
});

describe("--layout, --decimals, --sidecar, --mask (the window's writers)", () => {
  it('filled: observed cells as read, estimates rounded to --decimals, corner says estimates', async () => {
    const input = file('l1.csv', WIDE);
    const out = join(dir, 'l1-out.csv');
    const r = await run(
      'fill',
      input,
      '--out',
      out,
      '--rank',
      '0',
      '--centering',
      'column',
      '--decimals',
      '2',
      '--mask',
      '--sidecar',
    );
    expect(r.code).toBe(0);
    const lines = readFileSync(out, 'utf8').trim().split(/\r\n/);
    expect(lines[0]).toBe('row \\ column (blank cells filled with model estimates),a,b,c');
    // Column means (rank 0, centering column): c = (4 + 5 + 5) / 3 = 4.666… → 4.67; a = 7/3 → 2.33; b = 10/3 → 3.33.
    expect(lines[1]).toBe('r1,1,2,4.67');
    expect(lines[2]).toBe('r2,2,3.33,4');
    expect(lines[3]).toBe('r3,2.33,3,5');
    const mask = readFileSync(join(dir, 'l1-out.mask.csv'), 'utf8').trim().split(/\r\n/);
    expect(mask[1]).toBe('r1,observed,observed,filled');
    expect(mask[3]).toBe('r3,filled,observed,observed');
    const sidecar = JSON.parse(readFileSync(join(dir, 'l1-out.settings.json'), 'utf8'));
    expect(sidecar).toMatchObject({
      format: 'rankfill-export-settings',
      export: { kind: 'filled-wide', decimals: 2 },
      model: { family: 'lowrank' },
    });
    expect(sidecar.input.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(sidecar.caution).toMatch(/model estimates/);
  });

  it('estimates: observed cells blank; long: a source column', async () => {
    const input = file('l2.csv', WIDE);
    const est = join(dir, 'l2-est.csv');
    expect(
      (
        await run(
          'fill',
          input,
          '--out',
          est,
          '--rank',
          '0',
          '--centering',
          'column',
          '--layout',
          'estimates',
          '--decimals',
          '1',
        )
      ).code,
    ).toBe(0);
    expect(readFileSync(est, 'utf8').split(/\r\n/)[1]).toBe('r1,,,4.7');
    const long = join(dir, 'l2-long.csv');
    expect(
      (
        await run(
          'fill',
          input,
          '--out',
          long,
          '--rank',
          '0',
          '--centering',
          'column',
          '--layout',
          'long',
          '--decimals',
          '1',
        )
      ).code,
    ).toBe(0);
    const lines = readFileSync(long, 'utf8').trim().split(/\r\n/);
    expect(lines[0]).toBe('row,column,value,source,baseline,spread');
    expect(lines).toContain('r1,a,1,observed,2.3,');
    expect(lines).toContain('r1,c,4.7,filled,4.7,');
    expect((await run('fill', input, '--out', join(dir, 'x.csv'), '--layout', 'long', '--mask')).code).toBe(2);
    expect((await run('fill', input, '--out', join(dir, 'x.csv'), '--layout', 'wide')).stderr).toMatch(
      /--layout expects one of filled, estimates, long/,
    );
  });
});

describe('--duplicates and the --long hint', () => {
  const LONG = 'row,column,value\nr1,a,1\nr1,b,2\nr2,a,3\nr1,a,4\nr2,b,5\n';

  it('refuse (default) stops with the line; last and average resolve', async () => {
    const input = file('dup.csv', LONG);
    const refused = await run('fill', input, '--long', '--out', join(dir, 'd0.csv'));
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/dup\.csv:5:\d+: /);
    expect(existsSync(join(dir, 'd0.csv'))).toBe(false);
    const last = join(dir, 'd-last.csv');
    expect((await run('fill', input, '--long', '--duplicates', 'last', '--out', last)).code).toBe(0);
    expect(readFileSync(last, 'utf8')).toContain('r1,a,4,observed');
    const avg = join(dir, 'd-avg.csv');
    const r = await run('fill', input, '--long', '--duplicates', 'average', '--out', avg);
    expect(r.code).toBe(0);
    expect(readFileSync(avg, 'utf8')).toContain('r1,a,2.5,observed'); // (1 + 4) / 2
    expect((await run('fill', input, '--duplicates', 'last', '--out', join(dir, 'd3.csv'))).stderr).toMatch(
      /--duplicates applies to long input only/,
    );
  });

  it('a long file read as wide ends with one line suggesting --long', async () => {
    const text =
      ['row,column,value', ...Array.from({ length: 30 }, (_, i) => `p${i % 6},item ${i % 5},${1 + (i % 4)}`)].join(
        '\n',
      ) + '\n';
    const r = await run('evaluate', file('long-as-wide.csv', text));
    expect(r.code).toBe(2);
    const lines = r.stderr.trim().split('\n');
    expect(lines.filter((l) => l.includes('--long'))).toHaveLength(1);
    expect(lines[lines.length - 1]).toMatch(/looks like row,column,value triples .*add --long$/);
    // A wide file with a repeated row label gets no such hint.
    const wide = await run('evaluate', file('dup-wide.csv', 'x,a,b\nr1,1,2\nr1,2,3\n'));
    expect(wide.code).toBe(2);
    expect(wide.stderr).not.toContain('--long');
  });
});

describe('tune honours --scale', () => {
  it('the scale given is the one used (and reported)', async () => {
    const input = file('tune.csv', WIDE);
    const plain = JSON.parse(
      (await run('tune', input, '--ranks', '0', '--lambdas', '1', '--centering', 'column', '--folds', '2', '--json'))
        .stdout,
    );
    const scaled = JSON.parse(
      (
        await run(
          'tune',
          input,
          '--ranks',
          '0',
          '--lambdas',
          '1',
          '--centering',
          'column',
          '--folds',
          '2',
          '--scale',
          '0:10:1',
          '--json',
        )
      ).stdout,
    );
    expect(plain.scale).toEqual({ min: 1, max: 5, step: 1 });
    expect(scaled.scale).toEqual({ min: 0, max: 10, step: 1 });
    // A step given with --scale rounds the estimates to it (a column mean of 2.5 → 3), so the errors differ.
    expect(scaled.best.settings.snapToStep).toBe(true);
    expect(scaled.best.meanRmse).not.toBeCloseTo(plain.best.meanRmse, 6);
  });

  it('input values outside --scale or between its steps are located problems', async () => {
    const input = file('offstep.csv', 'who,a,b\nr1,1,4.5\nr2,2,3\nr3,7,1\n');
    const r = await run('evaluate', input, '--scale', '1:5:1');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /offstep\.csv:2:3: 4\.5 lies between the allowed values 4 and 5 \(scale 1–5 in steps of 1\)/,
    );
    expect(r.stderr).toMatch(/offstep\.csv:4:2: 7 lies outside the scale 1–5 in steps of 1/);
  });
});
