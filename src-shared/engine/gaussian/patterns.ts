/**
 * Group the rows of an n × p data block (row-major, NaN = missing) by their
 * missingness pattern, so every row sharing a pattern can share one matrix
 * factorization per EM iteration. Patterns are listed in order of first
 * appearance, rows inside a pattern in increasing order (deterministic).
 */

export interface MissingnessPattern {
  /** Observed variable indices, increasing. */
  observed: Int32Array;
  /** Missing variable indices, increasing. */
  missing: Int32Array;
  /** Row indices having exactly this pattern, increasing. */
  rows: Int32Array;
}

export function groupByPattern(data: Float64Array, n: number, p: number): MissingnessPattern[] {
  const keyIndex = new Map<string, number>();
  const firstRow: number[] = [];
  const members: number[][] = [];
  const chars = new Array<string>(p);
  for (let i = 0; i < n; i++) {
    const base = i * p;
    for (let j = 0; j < p; j++) {
      const x = data[base + j];
      chars[j] = x === x ? '1' : '0';
    }
    const key = chars.join('');
    let g = keyIndex.get(key);
    if (g === undefined) {
      g = members.length;
      keyIndex.set(key, g);
      firstRow.push(i);
      members.push([]);
    }
    members[g].push(i);
  }
  const out: MissingnessPattern[] = [];
  for (let g = 0; g < members.length; g++) {
    const base = firstRow[g] * p;
    let o = 0;
    for (let j = 0; j < p; j++) if (data[base + j] === data[base + j]) o++;
    const observed = new Int32Array(o);
    const missing = new Int32Array(p - o);
    let a = 0;
    let b = 0;
    for (let j = 0; j < p; j++) {
      if (data[base + j] === data[base + j]) observed[a++] = j;
      else missing[b++] = j;
    }
    out.push({ observed, missing, rows: Int32Array.from(members[g]) });
  }
  return out;
}
