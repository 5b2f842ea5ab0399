/**
 * In-place Cholesky factorization and solve for small symmetric positive
 * definite systems (the k × k ridge normal equations of the alternating fit).
 *
 *   A = L Lᵀ,  L lower triangular:  L_jj = √(A_jj − Σ_{m<j} L_jm²),
 *                                   L_ij = (A_ij − Σ_{m<j} L_im L_jm) / L_jj  (i > j);
 *   then A x = b is solved by forward substitution L z = b and back substitution Lᵀ x = z.
 *
 * Everything works on caller-owned Float64Array buffers (row-major k × k), so the
 * hot loop allocates nothing.
 */

/**
 * Factor the row-major k × k matrix `a` in place (lower triangle receives L).
 * Returns false when a pivot is not positive (matrix not positive definite).
 */
export function choleskyInPlace(a: Float64Array, k: number): boolean {
  for (let j = 0; j < k; j++) {
    const rj = j * k;
    let d = a[rj + j];
    for (let m = 0; m < j; m++) d -= a[rj + m] * a[rj + m];
    if (!(d > 0)) return false;
    const ljj = Math.sqrt(d);
    a[rj + j] = ljj;
    const inv = 1 / ljj;
    for (let i = j + 1; i < k; i++) {
      const ri = i * k;
      let s = a[ri + j];
      for (let m = 0; m < j; m++) s -= a[ri + m] * a[rj + m];
      a[ri + j] = s * inv;
    }
  }
  return true;
}

/** Solve L Lᵀ x = b in place (b becomes x), with L from choleskyInPlace. */
export function choleskySolveInPlace(l: Float64Array, k: number, b: Float64Array): void {
  for (let i = 0; i < k; i++) {
    const ri = i * k;
    let s = b[i];
    for (let m = 0; m < i; m++) s -= l[ri + m] * b[m];
    b[i] = s / l[ri + i];
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = b[i];
    for (let m = i + 1; m < k; m++) s -= l[m * k + i] * b[m];
    b[i] = s / l[i * k + i];
  }
}
