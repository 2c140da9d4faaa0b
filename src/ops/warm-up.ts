/**
 * Warming a long-lived engine while it is idle (issue 6 §3): the first SDP solve in a process pays for
 * the JIT compilation of the solver's hot loops (70–220 ms measured before this module); a long-lived
 * engine (`rhosigma serve` behind the Python package, the web worker behind the widgets) calls `warmUp()`
 * after it starts, so that the first solve a user waits for runs near steady-state speed
 * (bench/warmup.ts measures first-call and steady times, with and without it).
 *
 * How: small requests through `handle` (their answers are thrown away) that run the hot paths — the
 * eigensolver at a few sizes, the SDP solver on each family of problems the ops build (Hermitian blocks
 * with coordinate constraints, partial-trace constraints, several blocks, a vector block), the codec's
 * readers (rows, {re, im}, packed) and the expression reader (mathjs is loaded here, not on the first
 * expression a user types; unless `expressions: false`). One request per step; between steps the function yields to the event loop
 * (a macrotask), so that a request arriving meanwhile is answered after at most one step (a few
 * milliseconds to a few tens), and `options.busy()` can hold warming back while the engine works.
 *
 * Deliberately not here: any timer that keeps a process alive (warming ends by itself), any state the
 * answers depend on (warming changes speed, never results). Cost: about half a second to a second of
 * one core, once.
 */
import './all.js';
import { handle, mayNeedExpressions } from './handle.js';
import { loadExpressionReader } from './expressions.js';

export interface WarmUpOptions {
  /** Polled before each step: while it returns true, warming waits (the engine is answering a request). */
  busy?: () => boolean;
  /** Aborted → warming stops after the current step. */
  signal?: { readonly aborted: boolean };
  /** How many times the whole list of steps is run (default 3: enough for the optimising compiler). */
  rounds?: number;
  /**
   * Whether to load and warm the expression reader (default true). False leaves mathjs unloaded until an
   * expression needs it: the wiki embed's worker, where it is a chunk fetched over the network, which a
   * reader who types only numbers never needs.
   */
  expressions?: boolean;
}

export interface WarmUpReport {
  /** Steps run. */
  steps: number;
  /** Steps whose answer was not ok (a warming request gone stale after an op changed; a test checks none). */
  failed: string[];
  /** Milliseconds from start to end, waits included. */
  elapsedMs: number;
}

const mixed = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? (i + 1) / ((d * (d + 1)) / 2) : 0)));
const coherent = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? 1 / d : 0.4 / d)));
const complexState = (d: number) => {
  const re = coherent(d);
  const im = re.map((row, i) => row.map((_, j) => (i === j ? 0 : i < j ? 0.1 / d : -0.1 / d)));
  return { re, im };
};
const hermitian = (n: number) => {
  const re = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => Math.cos(i * 7 + j * 7 + 3 * i * j) + (i === j ? n : 0)));
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) re[i][j] = re[j][i];
  return re;
};
const packed = (rows: number[][]) => {
  const n = rows.length;
  const f = new Float64Array(n * n);
  rows.forEach((r, i) => r.forEach((x, j) => (f[i * n + j] = x)));
  const bytes = new Uint8Array(f.buffer);
  let text = '';
  for (const b of bytes) text += String.fromCharCode(b);
  return { shape: [n, n], packed: 'float64-le', re: btoa(text) };
};
const identity = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? 1 : 0)));
const shift = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => ((j + 1) % d === i ? 1 : 0)));

/** The warming requests, in order (exported for the test that checks each is answered ok). */
export function warmUpRequests(): Record<string, unknown>[] {
  return [
    { op: 'spectrum', matrix: [['1/2', 'i/4'], ['-i/4', '1/2']] },
    { op: 'spectrum', matrix: hermitian(8), vectors: true },
    { op: 'spectrum', matrix: packed(hermitian(48)) },
    { op: 'spectrum', matrix: { re: hermitian(96) } },
    { op: 'spectrum', matrix: hermitian(64), vectors: true },
    { op: 'entropy', rho: complexState(4) },
    { op: 'divergence', family: 'sandwiched', alpha: 2, rho: complexState(4), sigma: mixed(4) },
    { op: 'fidelity', rho: complexState(4), sigma: mixed(4) },
    { op: 'fidelity-sdp', rho: complexState(3), sigma: mixed(3) },
    { op: 'guessing-probability', probabilities: [0.3, 0.3, 0.4], states: [complexState(3), mixed(3), coherent(3)] },
    { op: 'diamond-distance', a: { kraus: [identity(3)] }, b: { kraus: [shift(3)] } },
    { op: 'conditional-min-entropy', rho: { matrix: complexState(4), dims: [2, 2] }, a: [0], b: [1] },
    { op: 'smooth-max-divergence', rho: complexState(3), sigma: mixed(3), epsilon: 0.1 },
    { op: 'divergence', family: 'hypothesis-testing', rho: complexState(3), sigma: mixed(3), epsilon: 0.1 },
    { op: 'fidelity-of-recovery', rho: { matrix: complexState(8), dims: [2, 2, 2] }, a: [0], b: [1], c: [2] },
  ];
}

/** A macrotask's pause (setTimeout 0: lets pending input and messages in before the next step). */
function pause(ms = 0): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/**
 * Warms the engine (see the header). Resolves when done; never throws (a failed step is listed in the
 * report). Call it once when a long-lived engine starts.
 */
export async function warmUp(options: WarmUpOptions = {}): Promise<WarmUpReport> {
  const t0 = performance.now();
  const report: WarmUpReport = { steps: 0, failed: [], elapsedMs: 0 };
  const expressions = options.expressions ?? true;
  if (expressions) {
    try {
      await loadExpressionReader();
    } catch {
      // Without the reader the expression step fails and is listed; everything else still warms.
    }
  }
  const requests = warmUpRequests().filter((r) => expressions || !mayNeedExpressions(r));
  const rounds = options.rounds ?? 3;
  for (let round = 0; round < rounds; round++) {
    for (const request of requests) {
      if (options.signal?.aborted) return { ...report, elapsedMs: performance.now() - t0 };
      while (options.busy?.()) await pause(5);
      await pause();
      const answer = handle(request);
      report.steps++;
      if (!answer.ok && round === 0) report.failed.push(`${String(request.op)}: ${answer.error.code} ${answer.error.message}`);
    }
  }
  report.elapsedMs = performance.now() - t0;
  return report;
}
