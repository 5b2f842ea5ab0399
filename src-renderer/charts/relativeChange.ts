/** The objective chart's series: r_t = |f_t − f_{t−1}| / max(|f_{t−1}|, tiny). */

/** Relative change per iteration (null for the first and for non-finite or zero changes, which a log axis cannot show). */
export function relativeChanges(values: number[]): (number | null)[] {
  return values.map((v, t) => {
    if (t === 0) return null;
    const prev = values[t - 1];
    if (!Number.isFinite(v) || !Number.isFinite(prev)) return null;
    const r = Math.abs(v - prev) / Math.max(Math.abs(prev), 1e-300);
    return r > 0 ? r : null;
  });
}
