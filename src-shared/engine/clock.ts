/** Monotonic milliseconds in Node and browsers (falls back to Date.now). */
const perf = (globalThis as unknown as { performance?: { now(): number } }).performance;

export function nowMs(): number {
  return perf ? perf.now() : Date.now();
}
