import { describe, expect, it } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { createWorkspace, ridgeHalfStep } from '../../../src-shared/engine/lowRank';
import { choleskyInPlace, choleskySolveInPlace } from '../../../src-shared/engine/cholesky';
import { createRng } from '../../../src-shared/engine/random';

describe('ALS half-step = ridge regression', () => {
  it('each row solves (XᵀX + λI)⁻¹ Xᵀy, matching ml-matrix', () => {
    // Source: ridge regression normal equations (Hoerl & Kennard, 1970); reference solve by ml-matrix (LU).
    const rng = createRng(42);
    const k = 4;
    const cols = 9;
    const other = new Float64Array(cols * k).map(() => rng.normal());
    // Two rows: row 0 sees columns 0,2,3,5,8; row 1 sees 1,4,6,7.
    const ptr = Int32Array.from([0, 5, 9]);
    const nbr = Int32Array.from([0, 2, 3, 5, 8, 1, 4, 6, 7]);
    const res = new Float64Array(9).map(() => rng.normal());
    for (const [lambda, scaled] of [
      [0.7, false],
      [0.3, true],
    ] as const) {
      const out = new Float64Array(2 * k);
      ridgeHalfStep(out, other, ptr, nbr, res, lambda, scaled, createWorkspace(k));
      for (let e = 0; e < 2; e++) {
        const ts = Array.from({ length: ptr[e + 1] - ptr[e] }, (_, t) => ptr[e] + t);
        const x = new Matrix(ts.map((t) => Array.from(other.subarray(nbr[t] * k, nbr[t] * k + k))));
        const y = Matrix.columnVector(ts.map((t) => res[t]));
        const reg = scaled ? lambda * ts.length : lambda;
        const lhs = x.transpose().mmul(x).add(Matrix.eye(k).mul(reg));
        const want = solve(lhs, x.transpose().mmul(y)).to1DArray();
        for (let c = 0; c < k; c++) expect(out[e * k + c]).toBeCloseTo(want[c], 10);
      }
    }
  });

  it('entities with fewer neighbours than the rank (dual form) give the same ridge solution', () => {
    // Source: ridge normal equations (Hoerl & Kennard, 1970) solved by ml-matrix; the code takes the
    // dual path u = Xᵀ(XXᵀ + λI)⁻¹y here, equal by the push-through identity (XᵀX + λI)⁻¹Xᵀ = Xᵀ(XXᵀ + λI)⁻¹.
    const rng = createRng(11);
    const k = 6;
    const other = new Float64Array(8 * k).map(() => rng.normal());
    // Entity 0 sees 2 neighbours, entity 1 sees 5 (both fewer than k = 6), entity 2 sees 1.
    const ptr = Int32Array.from([0, 2, 7, 8]);
    const nbr = Int32Array.from([3, 6, 0, 1, 2, 4, 7, 5]);
    const res = new Float64Array(8).map(() => rng.normal());
    for (const [lambda, scaled] of [
      [0.5, false],
      [0.2, true],
    ] as const) {
      const out = new Float64Array(3 * k);
      ridgeHalfStep(out, other, ptr, nbr, res, lambda, scaled, createWorkspace(k));
      for (let e = 0; e < 3; e++) {
        const ts = Array.from({ length: ptr[e + 1] - ptr[e] }, (_, t) => ptr[e] + t);
        const x = new Matrix(ts.map((t) => Array.from(other.subarray(nbr[t] * k, nbr[t] * k + k))));
        const y = Matrix.columnVector(ts.map((t) => res[t]));
        const reg = scaled ? lambda * ts.length : lambda;
        const want = solve(x.transpose().mmul(x).add(Matrix.eye(k).mul(reg)), x.transpose().mmul(y)).to1DArray();
        for (let c = 0; c < k; c++) expect(out[e * k + c]).toBeCloseTo(want[c], 10);
      }
    }
  });

  it('hand-written Cholesky solve matches ml-matrix on an SPD system', () => {
    // Source: ml-matrix solve as the reference; A = BᵀB + I is symmetric positive definite.
    const rng = createRng(7);
    const k = 6;
    const b = Matrix.rand(k, k, { random: () => rng.next() });
    const a = b.transpose().mmul(b).add(Matrix.eye(k));
    const rhs = Array.from({ length: k }, () => rng.normal());
    const buf = Float64Array.from(a.to1DArray());
    expect(choleskyInPlace(buf, k)).toBe(true);
    const x = Float64Array.from(rhs);
    choleskySolveInPlace(buf, k, x);
    const want = solve(a, Matrix.columnVector(rhs)).to1DArray();
    for (let c = 0; c < k; c++) expect(x[c]).toBeCloseTo(want[c], 10);
  });

  it('Cholesky reports a matrix that is not positive definite', () => {
    // Source: a symmetric matrix with a negative eigenvalue has no Cholesky factor.
    const a = Float64Array.from([1, 2, 2, 1]);
    expect(choleskyInPlace(a, 2)).toBe(false);
  });
});
