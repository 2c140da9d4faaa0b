/**
 * Steady-state timing for the benchmarks that compare our end-to-end calls with a reference solver
 * (bench/guessing.ts, bench/oneshot.ts): warm-up until V8 has compiled the hot functions, then the
 * median time of k calls. A helper module, not a benchmark: it has no default export, and
 * bench/run.ts does not run it.
 *
 * Deliberately not here: the rounds, the reference processes and the printing (each benchmark's own).
 * Cost: what the timed functions cost; warmUp runs for at least `ms` milliseconds.
 */

/** The median of a non-empty list (the upper one of the two middle values for an even length). */
export function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** Call fn until at least `calls` calls and `ms` milliseconds have passed; returns the first call's time. */
export function warmUp(fn: () => unknown, calls: number, ms: number): number {
  const t0 = performance.now();
  fn();
  const first = performance.now() - t0;
  for (let k = 1; k < calls || performance.now() - t0 < ms; k++) fn();
  return first;
}

/** Median time of k calls, in milliseconds. */
export function timeCalls(fn: () => unknown, k: number): number {
  const ts: number[] = [];
  for (let r = 0; r < k; r++) {
    const t0 = performance.now();
    fn();
    ts.push(performance.now() - t0);
  }
  return median(ts);
}
