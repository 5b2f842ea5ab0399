/**
 * A filled value taken apart into terms that add up to it exactly (up to rounding in
 * the last digits), recomputed from the fitted parameters rather than read back.
 *
 * Low-rank family (predictions.ts, baseline.ts): p_ij = adjust(b_ij + u_i · v_j) with
 *   none    b_ij = 0
 *   row     b_ij = r_i                  (row i's mean)
 *   column  b_ij = c_j                  (column j's mean)
 *   both    b_ij = μ + a_i + c_j        (global mean, row offset, column offset;
 *                                        rowBaseline_i = μ + a_i, colBaseline_j = c_j)
 * and adjust = rounding to the scale's step and clipping to [min, max] when the settings ask.
 * Terms: the baseline parts, the interaction u_i · v_j, and — only when it is not zero —
 * the adjustment adjust(x) − x.
 *
 * Gaussian family (gaussian/conditional.ts): for variable j of draw d with observed set o,
 *   E[x_j | x_o] = μ_j + Σ_jo Σ_oo⁻¹ (x_o − μ_o) = μ_j + Σ_{k∈o} w_k (x_k − μ_k),  w = Σ_oo⁻¹ Σ_oj,
 * so the terms are the variable's mean μ_j and the regression on the draw's observed cells
 * (each k contributes w_k (x_k − μ_k)), then the adjustment as above.
 */
import type { RatingScale } from '../matrix/ratingMatrix';
import { choleskyInPlace, choleskySolveInPlace } from './cholesky';
import { clipSnap } from './predictions';
import type { FitResult } from './types';

type TermKind = 'global' | 'row' | 'column' | 'interaction' | 'mean' | 'regression' | 'adjustment';

interface DecompositionTerm {
  kind: TermKind;
  label: string;
  value: number;
}

/** One observed cell's share of a Gaussian regression term. */
interface RegressionShare {
  /** Row and column of the observed cell. */
  row: number;
  col: number;
  value: number;
  weight: number;
  contribution: number;
}

export interface CellDecomposition {
  /** Σ of the terms: the model's value for the cell. */
  total: number;
  terms: DecompositionTerm[];
  /** Gaussian family: the regression term's parts, largest first. */
  shares?: RegressionShare[];
}

function adjustment(raw: number, result: FitResult, scale: RatingScale): DecompositionTerm | undefined {
  const s = result.settings;
  const adjusted = clipSnap(raw, scale, s.clipToScale, s.snapToStep);
  const d = adjusted - raw;
  if (d === 0) return undefined;
  const clipped =
    s.clipToScale && (adjusted === scale.min || adjusted === scale.max) && (raw < scale.min || raw > scale.max);
  return {
    kind: 'adjustment',
    label: clipped ? 'kept inside the scale (clipped)' : 'rounded to the scale’s step',
    value: d,
  };
}

function sum(terms: DecompositionTerm[]): number {
  let t = 0;
  for (const x of terms) t += x.value;
  return t;
}

function lowRankTerms(result: FitResult, i: number, j: number): DecompositionTerm[] {
  const s = result.settings;
  if (s.model !== 'lowrank') return [];
  const rb = result.rowBaseline[i];
  const cb = result.colBaseline[j];
  const terms: DecompositionTerm[] = [];
  if (s.centering === 'row') terms.push({ kind: 'row', label: 'row mean', value: rb });
  else if (s.centering === 'column') terms.push({ kind: 'column', label: 'column mean', value: cb });
  else if (s.centering === 'both') {
    terms.push(
      { kind: 'global', label: 'global mean', value: result.globalMean },
      { kind: 'row', label: 'row offset', value: rb - result.globalMean },
      { kind: 'column', label: 'column offset', value: cb },
    );
  }
  const k = result.rank;
  if (k > 0) {
    let dot = 0;
    for (let c = 0; c < k; c++) dot += result.rowFactors[i * k + c] * result.colFactors[j * k + c];
    terms.push({ kind: 'interaction', label: 'interaction (hidden traits)', value: dot });
  }
  return terms;
}

function gaussianTerms(
  values: Float64Array,
  result: FitResult,
  i: number,
  j: number,
): { terms: DecompositionTerm[]; shares: RegressionShare[] } | undefined {
  const s = result.settings;
  const S = result.covariance;
  if (s.model !== 'gaussian' || !S) return undefined;
  const rows = result.rows;
  const cols = result.cols;
  // Variables are columns (draw = row i, variable = j), or rows when transposed.
  const t = s.transpose;
  const p = t ? rows : cols;
  if (S.length !== p * p) return undefined;
  const mu = t ? result.rowBaseline : result.colBaseline;
  const target = t ? i : j;
  const obs: number[] = [];
  for (let v = 0; v < p; v++) {
    const x = t ? values[v * cols + j] : values[i * cols + v];
    if (x === x) obs.push(v);
  }
  const terms: DecompositionTerm[] = [
    { kind: 'mean', label: t ? 'row mean μ (the model’s)' : 'column mean μ (the model’s)', value: mu[target] },
  ];
  const shares: RegressionShare[] = [];
  const o = obs.length;
  if (o > 0) {
    const a = new Float64Array(o * o);
    const w = new Float64Array(o);
    for (let x = 0; x < o; x++) {
      w[x] = S[obs[x] * p + target];
      for (let y = 0; y < o; y++) a[x * o + y] = S[obs[x] * p + obs[y]];
    }
    if (!choleskyInPlace(a, o)) return undefined;
    choleskySolveInPlace(a, o, w);
    let reg = 0;
    for (let x = 0; x < o; x++) {
      const v = obs[x];
      const value = t ? values[v * cols + j] : values[i * cols + v];
      const c = w[x] * (value - mu[v]);
      reg += c;
      shares.push({ row: t ? v : i, col: t ? j : v, value, weight: w[x], contribution: c });
    }
    shares.sort((x, y) => Math.abs(y.contribution) - Math.abs(x.contribution));
    terms.push({
      kind: 'regression',
      label: `regression on the ${o} observed cell${o === 1 ? '' : 's'} of this ${t ? 'column' : 'row'}`,
      value: reg,
    });
  }
  return { terms, shares };
}

/**
 * The terms of cell (i, j)'s model value on the data `values` (row-major, NaN = missing) the
 * result was fitted on. Undefined when the result lacks what is needed (a Gaussian result
 * without its covariance).
 */
export function decomposeCell(
  values: Float64Array,
  result: FitResult,
  scale: RatingScale,
  i: number,
  j: number,
): CellDecomposition | undefined {
  let terms: DecompositionTerm[];
  let shares: RegressionShare[] | undefined;
  if (result.settings.model === 'lowrank') terms = lowRankTerms(result, i, j);
  else {
    const g = gaussianTerms(values, result, i, j);
    if (!g) return undefined;
    terms = g.terms;
    shares = g.shares;
  }
  const adj = adjustment(sum(terms), result, scale);
  if (adj) terms.push(adj);
  return { total: sum(terms), terms, ...(shares ? { shares } : {}) };
}
