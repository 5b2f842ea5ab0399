import { describe, expect, it } from 'vitest';
import { Matrix, inverse, determinant } from 'ml-matrix';
import { ConditionalWorkspace, prepareParams } from '../../../src-shared/engine/gaussian/conditional';

// A known 3-variable normal (positive definite: leading minors 4, 5.75, 13.2).
const mu = [2, -1, 0.5];
const sigma = [
  [4, 1.5, -1],
  [1.5, 2, 0.6],
  [-1, 0.6, 3],
];

/** Schur-complement conditional computed independently with ml-matrix. */
function schurReference(x: number[], obs: number[], mis: number[]) {
  const s = new Matrix(sigma);
  const soo = s.selection(obs, obs);
  const smo = s.selection(mis, obs);
  const smm = s.selection(mis, mis);
  const d = Matrix.columnVector(obs.map((a) => x[a] - mu[a]));
  const sooInv = inverse(soo);
  const mean = smo
    .mmul(sooInv)
    .mmul(d)
    .to1DArray()
    .map((v, a) => v + mu[mis[a]]);
  const cov = smm.clone().sub(smo.mmul(sooInv).mmul(smo.transpose()));
  const q = d.transpose().mmul(sooInv).mmul(d).get(0, 0);
  const logDensity = -0.5 * (obs.length * Math.log(2 * Math.PI) + Math.log(determinant(soo)) + q);
  return { mean, cov, logDensity };
}

describe('conditional expectation fill against the Schur-complement formula (ml-matrix)', () => {
  const params = prepareParams(3, Float64Array.from(mu), Float64Array.from(sigma.flat()));
  const x = [3.1, NaN, -0.7];
  const cases: { obs: number[]; mis: number[] }[] = [
    { obs: [0, 2], mis: [1] },
    { obs: [1], mis: [0, 2] },
    { obs: [0], mis: [1, 2] },
    { obs: [0, 1, 2], mis: [] },
  ];
  for (const route of ['covariance', 'precision'] as const) {
    for (const { obs, mis } of cases) {
      it(`${route} route, observed {${obs.join(',')}}`, () => {
        // Source: conditional distribution of a partitioned multivariate normal,
        // E[x_m|x_o] = μ_m + Σ_mo Σ_oo⁻¹(x_o − μ_o), Cov = Σ_mm − Σ_mo Σ_oo⁻¹ Σ_om;
        // reference computed with ml-matrix (inverse, determinant, selection).
        const row = Float64Array.from(
          [0, 1, 2].map((j) => (obs.includes(j) ? (Number.isNaN(x[j]) ? 1.4 : x[j]) : NaN)),
        );
        const xs = Array.from(row);
        const ref = schurReference(xs, obs, mis);
        const ws = new ConditionalWorkspace(3);
        ws.prepare(params, Int32Array.from(obs), Int32Array.from(mis), route);
        const ll = ws.row(params, row, 0);
        const m = mis.length;
        for (let a = 0; a < m; a++) {
          expect(ws.condMean[a]).toBeCloseTo(ref.mean[a], 12);
          for (let b = 0; b < m; b++) expect(ws.condCov[a * m + b]).toBeCloseTo(ref.cov.get(a, b), 12);
        }
        expect(ll).toBeCloseTo(ref.logDensity, 12);
      });
    }
  }

  it('a hand-worked case: x₂ given x₁ = 3.1 and x₃ = −0.7', () => {
    // Source: from memory, worked by hand from the formula above:
    // Σ_oo = [[4, −1], [−1, 3]], det 11, Σ_oo⁻¹ = [[3, 1], [1, 4]] / 11, Σ_mo = [1.5, 0.6],
    // d = (1.1, −1.2): Σ_oo⁻¹ d = (2.1, −3.7)/11; mean = −1 + (3.15 − 2.22)/11 = −0.91545…
    // variance = 2 − (1.5·(5.1) + 0.6·(3.9))/11 = 2 − 9.99/11 = 1.09181…
    const ws = new ConditionalWorkspace(3);
    ws.prepare(params, Int32Array.from([0, 2]), Int32Array.from([1]));
    ws.row(params, Float64Array.from([3.1, NaN, -0.7]), 0);
    expect(ws.condMean[0]).toBeCloseTo(-1 + 0.93 / 11, 12);
    expect(ws.condCov[0]).toBeCloseTo(2 - 9.99 / 11, 12);
  });
});
