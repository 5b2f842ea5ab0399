/**
 * Seeded pseudo-random numbers for the engine, so every fit, fold split and
 * bootstrap is reproducible from one integer seed.
 *
 * Generator: mulberry32 (a 32-bit state, one multiply–xorshift mix per draw),
 *   t ← t + 0x6D2B79F5;  z ← (t ⊕ t≫15)·(t | 1);  z ← z ⊕ (z + (z ⊕ z≫7)·(z | 61));
 *   u = (z ⊕ z≫14) / 2³²  ∈ [0, 1).
 * Normal draws use the Box–Muller transform: with u₁, u₂ uniform,
 *   x = √(−2 ln u₁) · cos(2π u₂)  ~ N(0, 1).
 */

export interface Rng {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal. */
  normal(): number;
  /** Integer in [0, n). */
  int(n: number): number;
}

export function createRng(seed: number): Rng {
  let t = (Math.floor(seed) ^ 0x9e3779b9) >>> 0;
  let spare = NaN;
  const next = (): number => {
    t = (t + 0x6d2b79f5) >>> 0;
    let z = t;
    z = Math.imul(z ^ (z >>> 15), z | 1);
    z ^= z + Math.imul(z ^ (z >>> 7), z | 61);
    return ((z ^ (z >>> 14)) >>> 0) / 4294967296;
  };
  return {
    next,
    normal(): number {
      if (spare === spare) {
        const s = spare;
        spare = NaN;
        return s;
      }
      let u1 = next();
      while (u1 <= 0) u1 = next();
      const u2 = next();
      const r = Math.sqrt(-2 * Math.log(u1));
      spare = r * Math.sin(2 * Math.PI * u2);
      return r * Math.cos(2 * Math.PI * u2);
    },
    int(n: number): number {
      return Math.floor(next() * n);
    },
  };
}

/** Fisher–Yates shuffle in place. */
export function shuffleInPlace(a: Int32Array, rng: Rng): void {
  for (let i = a.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    const tmp = a[i];
    a[i] = a[j];
    a[j] = tmp;
  }
}
