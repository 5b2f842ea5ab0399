/**
 * Which observed cells a filled value leans on (low-rank family).
 *
 * With the column factors V fixed, row i's factor is the ridge solution over its
 * observed cells O_i (see lowRank.ts):
 *   u_i = A⁻¹ Σ_{l∈O_i} r_il v_l,   A = Σ_{l∈O_i} v_l v_lᵀ + λ w_i I,   r_il = y_il − b_il.
 * So the interaction term of any cell (i, j) is a weighted sum of row i's residuals:
 *   v_j · u_i = Σ_{l∈O_i} (v_jᵀ A⁻¹ v_l) r_il = Σ_l c_l,
 * and c_l is observed cell (i, l)'s contribution to the estimate. At convergence this
 * u_i is the fitted one, so the contributions add up to the fitted interaction term;
 * the filled value is b_ij + Σ_l c_l (before clipping to the scale).
 */
import { choleskyInPlace, choleskySolveInPlace } from './cholesky';
import type { FitResult, LowRankSettings } from './types';

interface Contribution {
  /** Column of the observed cell in the same row. */
  col: number;
  /** Observed value y_il and its residual r_il = y_il − b_il. */
  value: number;
  residual: number;
  /** Weight v_jᵀ A⁻¹ v_l, and contribution weight × residual. */
  weight: number;
  contribution: number;
}

export interface CellExplanation {
  baseline: number;
  /** Σ of all contributions (the interaction term re-derived from row i's cells). */
  interaction: number;
  contributions: Contribution[];
}

/**
 * Explain cell (i, j) of a low-rank result on the data `values` (row-major, NaN = missing).
 * Returns undefined for results without factors (rank 0, other families).
 */
export function explainCell(
  values: Float64Array,
  result: FitResult,
  i: number,
  j: number,
): CellExplanation | undefined {
  const s = result.settings;
  const k = result.rank;
  const cols = result.cols;
  const baseline = result.baseline[i * cols + j];
  if (s.model !== 'lowrank' || k === 0 || result.colFactors.length !== cols * k) return undefined;
  const V = result.colFactors;
  const a = new Float64Array(k * k);
  let n = 0;
  for (let l = 0; l < cols; l++) {
    const y = values[i * cols + l];
    if (y !== y) continue;
    n++;
    for (let p = 0; p < k; p++) for (let q = 0; q < k; q++) a[p * k + q] += V[l * k + p] * V[l * k + q];
  }
  const lam = (s as LowRankSettings).lambda * ((s as LowRankSettings).scaleLambdaByCount ? n : 1);
  for (let p = 0; p < k; p++) a[p * k + p] += lam;
  if (n === 0) return { baseline, interaction: 0, contributions: [] };
  if (!choleskyInPlace(a, k)) {
    let trace = 0;
    for (let p = 0; p < k; p++) trace += a[p * k + p];
    for (let p = 0; p < k; p++) a[p * k + p] += 1e-10 * (trace / k + 1);
    if (!choleskyInPlace(a, k)) return undefined;
  }
  // z = A⁻¹ v_j, so weight_l = v_lᵀ z (A is symmetric).
  const z = new Float64Array(k);
  for (let p = 0; p < k; p++) z[p] = V[j * k + p];
  choleskySolveInPlace(a, k, z);
  const contributions: Contribution[] = [];
  let interaction = 0;
  for (let l = 0; l < cols; l++) {
    const y = values[i * cols + l];
    if (y !== y) continue;
    let w = 0;
    for (let p = 0; p < k; p++) w += V[l * k + p] * z[p];
    const residual = y - result.baseline[i * cols + l];
    const c = w * residual;
    interaction += c;
    contributions.push({ col: l, value: y, residual, weight: w, contribution: c });
  }
  contributions.sort((x, y) => Math.abs(y.contribution) - Math.abs(x.contribution));
  return { baseline, interaction, contributions };
}
