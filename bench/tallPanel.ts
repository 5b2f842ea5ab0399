/**
 * A tall, questionnaire-like test matrix: 600 respondents × 20 items on a 1–7 scale.
 *
 * Each respondent is one draw z ~ N(0, R) with R = 0.35·J + 0.65·A (J: all ones, a
 * general factor; A_jk = 0.7^|j−k|, neighbouring items correlate more), shown as
 * round(4 + 1.4·z) clipped to 1–7; then 20 % of the cells are hidden completely at
 * random. Invented data for demos and the model-choice check only. Seeded.
 *
 * Run: npx tsx bench/tallPanel.ts [out.csv]   (default .rankfill-tmp/tall-panel-600x20.csv)
 */

import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { choleskyInPlace } from '../src-shared/engine/cholesky';
import { createRng } from '../src-shared/engine/random';

export function tallPanelCsv(rows = 600, items = 20, missing = 0.2, seed = 6): string {
  const r = new Float64Array(items * items);
  for (let j = 0; j < items; j++)
    for (let k = 0; k < items; k++) r[j * items + k] = 0.35 + 0.65 * 0.7 ** Math.abs(j - k);
  if (!choleskyInPlace(r, items)) throw new Error('correlation not positive definite');
  const rng = createRng(seed);
  const z = new Float64Array(items);
  const lines = [['respondent', ...Array.from({ length: items }, (_, j) => `item${j + 1}`)].join(',')];
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < items; j++) z[j] = rng.normal();
    const fields = [`resp${i + 1}`];
    for (let j = 0; j < items; j++) {
      let s = 0;
      for (let k = 0; k <= j; k++) s += r[j * items + k] * z[k];
      const y = Math.min(7, Math.max(1, Math.round(4 + 1.4 * s)));
      fields.push(rng.next() < missing ? '' : String(y));
    }
    lines.push(fields.join(','));
  }
  return lines.join('\n') + '\n';
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const out = resolve(process.argv[2] ?? '.rankfill-tmp/tall-panel-600x20.csv');
  mkdirSync(dirname(out), { recursive: true });
  writeFileSync(out, tallPanelCsv());
  console.log(`wrote ${out}`);
}
