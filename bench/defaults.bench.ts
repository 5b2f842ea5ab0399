/**
 * Defaults benchmark (issue 15; run by `npm run bench`, not a test). On a seeded 80/20 split of
 * the ratings (20 % hidden by createRng(1), the model sees the other 80 %), prints hold-out RMSE of:
 *   - the rank-0 fill (baselines alone, centering both);
 *   - a plain `fill` without model options (the settings chosen by engine/autoSettings.ts);
 *   - `tune` with its defaults (engine/defaultTune.ts: data-derived grid + refinement, 5 folds),
 *     then a fill with its one-SE choice and with its best setting;
 * for the open movie set (skipped when absent) and the tall invented panel (bench/tallPanel.ts).
 * Then times the whole `rankfill tune` process (built CLI, engine pool) on the full movie set.
 * Targets: tune-then-fill ≤ 0.846 on the movie set; plain fill no worse than rank 0 on both;
 * default tune on the movie set < 60 s whole process. Each line carries the load average.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { fitModel } from '../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../src-shared/engine/defaults';
import { autoSettings } from '../src-shared/engine/autoSettings';
import { tuneDefault } from '../src-shared/engine/defaultTune';
import { createRng, shuffleInPlace } from '../src-shared/engine/random';
import type { FitSettings } from '../src-shared/engine/types';
import type { RatingMatrix } from '../src-shared/matrix/ratingMatrix';
import { loadMovieRatings, movieRatingsAvailable, movieRatingsPath } from './datasets';
import { tallPanelCsv } from './tallPanel';

const here = dirname(fileURLToPath(import.meta.url));
const load = () => `load ${loadavg()[0].toFixed(1)}`;

function holdOut(m: RatingMatrix, share: number, seed: number): { train: RatingMatrix; hidden: Int32Array } {
  const cells: number[] = [];
  for (let c = 0; c < m.values.length; c++) if (m.values[c] === m.values[c]) cells.push(c);
  const order = Int32Array.from(cells);
  shuffleInPlace(order, createRng(seed));
  const hidden = order.slice(0, Math.round(share * order.length));
  const values = new Float64Array(m.values);
  for (const c of hidden) values[c] = NaN;
  return { train: { ...m, values }, hidden };
}

function rmse(m: RatingMatrix, hidden: Int32Array, pred: Float64Array): number {
  let se = 0;
  for (const c of hidden) se += (pred[c] - m.values[c]) ** 2;
  return Math.sqrt(se / hidden.length);
}

const label = (s: FitSettings) =>
  s.model === 'lowrank' ? `rank ${s.rank}, λ ${s.lambda}, ${s.centering}` : `gaussian ${s.shrinkage}`;

async function report(name: string, m: RatingMatrix, withTune: boolean): Promise<void> {
  const { train, hidden } = holdOut(m, 0.2, 1);
  const score = (s: FitSettings) => rmse(m, hidden, fitModel(train, s).predictions);
  const r0 = score({ ...defaultLowRankSettings(), rank: 0, centering: 'both' });
  let t = performance.now();
  const auto = autoSettings(train);
  const plain = score(auto.settings);
  console.log(`${name}: ${hidden.length} hidden ratings`);
  console.log(`  rank-0 fill (baselines alone): hold-out RMSE ${r0.toFixed(4)}`);
  console.log(
    `  plain fill (${auto.reason}): ${plain.toFixed(4)} (${((performance.now() - t) / 1000).toFixed(1)} s) — ${plain <= r0 ? 'no worse than rank 0' : 'WORSE than rank 0'}; ${load()}`,
  );
  if (!withTune) return;
  t = performance.now();
  const tuned = await tuneDefault(train, { folds: 5, seed: 1 });
  const secs = (performance.now() - t) / 1000;
  const one = score(tuned.oneStandardError.settings);
  const best = score(tuned.best.settings);
  console.log(
    `  default tune (${tuned.table.length} settings, refined with λ ${tuned.refinedLambdas.join(', ') || '—'}; ${secs.toFixed(1)} s in-process): one-SE ${label(tuned.oneStandardError.settings)} → ${one.toFixed(4)}; best ${label(tuned.best.settings)} → ${best.toFixed(4)}${name.startsWith('movie') ? '; target ≤ 0.846' : ''}; ${load()}`,
  );
}

async function main(): Promise<void> {
  await report('tall invented panel 600 × 20', parseWide(tallPanelCsv()), true);
  if (!movieRatingsAvailable()) console.log(`movie set: skipped (${movieRatingsPath} is absent)`);
  else {
    const m = loadMovieRatings();
    await report('movie-ratings-small', m, process.env.BENCH_SKIP_TUNE !== '1');
    const bin = resolve(here, '../bin/rankfill.js');
    const cli = resolve(here, '../out/cli');
    if (!existsSync(cli)) console.log('whole-process tune: skipped (run npm run build:cli first)');
    else {
      const dir = mkdtempSync(join(tmpdir(), 'rankfill-bench-'));
      const file = join(dir, 'movies-long.csv');
      const lines = ['film,person,rating'];
      const cols = m.colLabels.length;
      for (let c = 0; c < m.values.length; c++)
        if (m.values[c] === m.values[c])
          lines.push(`${m.rowLabels[(c / cols) | 0]},${m.colLabels[c % cols]},${m.values[c]}`);
      writeFileSync(file, lines.join('\n') + '\n');
      const before = load();
      const t0 = performance.now();
      const r = spawnSync(process.execPath, [bin, 'tune', file, '--long', '--scale', '0.5:5:0.5', '--json'], {
        encoding: 'utf8',
        maxBuffer: 64 << 20,
      });
      const secs = (performance.now() - t0) / 1000;
      const choice = r.status === 0 ? JSON.parse(r.stdout).choice : undefined;
      console.log(
        `  whole-process rankfill tune (defaults) on all ${lines.length - 1} ratings: ${secs.toFixed(1)} s (target < 60 s), exit ${r.status}${choice ? `, choice rank ${choice.rank}, λ ${choice.lambda}` : ''}; ${before} → ${load()}`,
      );
    }
  }
}

void main();

function parseWide(text: string): RatingMatrix {
  const rows = text
    .trim()
    .split('\n')
    .map((l) => l.split(','));
  const colLabels = rows[0].slice(1);
  const body = rows.slice(1);
  const values = new Float64Array(body.length * colLabels.length);
  body.forEach((r, i) => r.slice(1).forEach((x, j) => (values[i * colLabels.length + j] = x === '' ? NaN : Number(x))));
  return { rowLabels: body.map((r) => r[0]), colLabels, values, scale: { min: 1, max: 7, step: 1 } };
}
