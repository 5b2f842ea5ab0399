/**
 * Helpers on a Cholesky factor L (lower triangle of a row-major k × k buffer,
 * as left by `choleskyInPlace` in ../cholesky.ts; the upper triangle is ignored).
 *
 *   forward substitution   L y = b:      y_i = (b_i − Σ_{m<i} L_im y_m) / L_ii
 *   log-determinant        log|A| = 2 Σ_i log L_ii           (A = L Lᵀ)
 *   inverse                A⁻¹ = L⁻ᵀ L⁻¹, built column by column from A x = e_j
 */

/** Solve L y = b in place for the k-vector stored in b[offset .. offset+k). */
export function forwardSubstituteInPlace(l: Float64Array, k: number, b: Float64Array, offset = 0): void {
  for (let i = 0; i < k; i++) {
    const ri = i * k;
    let s = b[offset + i];
    for (let m = 0; m < i; m++) s -= l[ri + m] * b[offset + m];
    b[offset + i] = s / l[ri + i];
  }
}

/** log|A| for A = L Lᵀ. */
export function choleskyLogDet(l: Float64Array, k: number): number {
  let s = 0;
  for (let i = 0; i < k; i++) s += Math.log(l[i * k + i]);
  return 2 * s;
}

/**
 * Write A⁻¹ (full symmetric, row-major k × k) into `out`, using `col` (length ≥ k)
 * as scratch. `out` must not alias `l`.
 */
export function choleskyInverse(l: Float64Array, k: number, out: Float64Array, col: Float64Array): void {
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < k; i++) col[i] = i === j ? 1 : 0;
    // L y = e_j (y_i = 0 for i < j)
    for (let i = j; i < k; i++) {
      const ri = i * k;
      let s = col[i];
      for (let m = j; m < i; m++) s -= l[ri + m] * col[m];
      col[i] = s / l[ri + i];
    }
    // Lᵀ x = y
    for (let i = k - 1; i >= 0; i--) {
      let s = col[i];
      for (let m = i + 1; m < k; m++) s -= l[m * k + i] * col[m];
      col[i] = s / l[i * k + i];
    }
    for (let i = 0; i < k; i++) out[i * k + j] = col[i];
  }
  // enforce exact symmetry
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      const v = 0.5 * (out[i * k + j] + out[j * k + i]);
      out[i * k + j] = v;
      out[j * k + i] = v;
    }
  }
}
