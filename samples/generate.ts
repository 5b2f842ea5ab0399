/**
 * Seeded generator for Rankfill's invented demo matrices.
 *
 *   npx tsx samples/generate.ts            rewrite the three committed samples
 *   npx tsx samples/generate.ts --large ROWSxCOLS [--observed 0.05] [--rank 10] [--seed 7] [--out FILE]
 *                                          write a large synthetic matrix (default under samples/generated/,
 *                                          which git ignores: large outputs are never committed)
 *
 * Every value is y_ij = centre + a_i + c_j + u_i·v_j + noise, rounded to the scale's step and
 * clipped to it, so the matrices have a plausible low-rank structure plus noise. The people,
 * products and tasks are invented.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { createRng } from '../src-shared/engine/random';

/**
 * Uniform draws in [0, 1) from the engine's seeded generator. createRng mixes its
 * seed with the constant 0x9e3779b9; undoing that mix here keeps the streams (and so
 * the committed samples) exactly as they were first generated with the plain seed.
 */
function rng(seed: number): () => number {
  const r = createRng(seed ^ 0x9e3779b9);
  return () => r.next();
}

function gauss(r: () => number): number {
  const u = Math.max(r(), 1e-12);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * r());
}

interface Spec {
  rows: string[];
  cols: string[];
  min: number;
  max: number;
  step: number;
  centre: number;
  rowSpread: number;
  colSpread: number;
  rank: number;
  factorSpread: number;
  noise: number;
  missing: number;
  seed: number;
}

function quote(s: string): string {
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function generate(spec: Spec): string {
  const r = rng(spec.seed);
  const a = spec.rows.map(() => spec.rowSpread * gauss(r));
  const c = spec.cols.map(() => spec.colSpread * gauss(r));
  const u = spec.rows.map(() => Array.from({ length: spec.rank }, () => spec.factorSpread * gauss(r)));
  const v = spec.cols.map(() => Array.from({ length: spec.rank }, () => gauss(r)));
  const decimals = spec.step < 1 ? String(spec.step).split('.')[1].length : 0;
  const lines = [['', ...spec.cols].map(quote).join(',')];
  spec.rows.forEach((label, i) => {
    const cells = spec.cols.map((_, j) => {
      if (r() < spec.missing) return '';
      let y = spec.centre + a[i] + c[j] + spec.noise * gauss(r);
      for (let k = 0; k < spec.rank; k++) y += u[i][k] * v[j][k];
      y = Math.round(y / spec.step) * spec.step;
      y = Math.min(spec.max, Math.max(spec.min, y));
      return y.toFixed(decimals);
    });
    lines.push([quote(label), ...cells].join(','));
  });
  return lines.join('\n') + '\n';
}

const here = dirname(new URL(import.meta.url).pathname);

const blends = [
  'Harbor Dawn', 'Copper Kettle', 'Night Ferry', 'Quarry Red', 'Lantern Street', 'Mossback',
  'Saltmarsh', 'Tin Roof', 'Orchard Smoke', 'Slate & Honey', 'Foghorn', 'Brass Compass',
  'Low Tide', 'Cinder Path', 'Juniper Yard', 'Hollow Oak', 'Kiln No. 4', 'Granary',
  'Riverstone', 'Ember Lane', 'Pale Meridian', 'Driftwood', 'Old Signal', 'Thistle Mill',
];
const tasters = ['Ines', 'Tomasz', 'Aiko', 'Bram', 'Oluwa', 'Greta', 'Ravi', 'Solveig', 'Mateo', 'Hanne', 'Yusuf', 'Lior', 'Petra', 'Kofi'];

const tasks = [
  'Sign in', 'Find last invoice', 'Change delivery address', 'Add a team member', 'Export a report',
  'Set a spending limit', 'Cancel an order', 'Upload a receipt', 'Switch language', 'Contact support',
  'Reset password', 'Compare two plans',
];
const participants = Array.from({ length: 40 }, (_, i) => `P${String(i + 1).padStart(2, '0')}`);

const submissions = Array.from({ length: 30 }, (_, i) => `Submission ${101 + i}`);
const reviewers = Array.from({ length: 18 }, (_, i) => `Reviewer ${String.fromCharCode(65 + i)}`);

export const committedSamples: { file: string; spec: Spec }[] = [
  {
    file: 'coffee-cupping-panel.csv',
    spec: { rows: blends, cols: tasters, min: 1, max: 9, step: 1, centre: 5.6, rowSpread: 0.9, colSpread: 0.6, rank: 2, factorSpread: 0.9, noise: 0.45, missing: 0.35, seed: 2024 },
  },
  {
    file: 'usability-pilot.csv',
    spec: { rows: participants, cols: tasks, min: 1, max: 7, step: 1, centre: 4.9, rowSpread: 0.6, colSpread: 0.8, rank: 2, factorSpread: 0.6, noise: 0.4, missing: 0.25, seed: 77 },
  },
  {
    file: 'peer-review-round.csv',
    spec: { rows: submissions, cols: reviewers, min: 0, max: 10, step: 0.5, centre: 6.2, rowSpread: 1.3, colSpread: 0.7, rank: 1, factorSpread: 0.8, noise: 0.6, missing: 0.55, seed: 31 },
  },
];

function main(argv: string[]): void {
  const largeAt = argv.indexOf('--large');
  if (largeAt === -1) {
    for (const s of committedSamples) writeFileSync(join(here, s.file), generate(s.spec));
    console.log(`wrote ${committedSamples.length} samples to ${here}`);
    return;
  }
  const opt = (name: string, dflt: string) => {
    const at = argv.indexOf(name);
    return at === -1 ? dflt : argv[at + 1];
  };
  const [rows, cols] = (argv[largeAt + 1] ?? '1000x1000').split('x').map(Number);
  if (!(rows > 0 && cols > 0)) throw new Error('usage: --large ROWSxCOLS');
  const observed = Number(opt('--observed', '0.05'));
  const rank = Number(opt('--rank', '10'));
  const seed = Number(opt('--seed', '7'));
  const out = opt('--out', join(here, 'generated', `synthetic-${rows}x${cols}.csv`));
  const text = generate({
    rows: Array.from({ length: rows }, (_, i) => `item ${i + 1}`),
    cols: Array.from({ length: cols }, (_, j) => `rater ${j + 1}`),
    min: 1, max: 5, step: 0.5, centre: 3.4, rowSpread: 0.5, colSpread: 0.4, rank,
    factorSpread: 0.35, noise: 0.4, missing: 1 - observed, seed,
  });
  mkdirSync(dirname(out), { recursive: true });
  writeFileSync(out, text);
  console.log(`wrote ${out} (${(text.length / 1e6).toFixed(1)} MB)`);
}

if (process.argv[1] && process.argv[1].endsWith('generate.ts')) main(process.argv.slice(2));
