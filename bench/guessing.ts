/**
 * Benchmark of the guessing probability and the diamond distance (not a test; asserts nothing).
 *
 * 1. p_guess(X|B) for 6 random states at d = 4 (equal priors).
 * 2. ½‖N − M‖_⋄ of two random qubit channels (amplitude damping against a random unitary mixed
 *    with dephasing, given by Kraus operators).
 *
 * WHAT IS COMPARED (like with like, both at the same tolerances):
 *  - ours, end to end: performance.now() around guessingProbability / diamondDistance as a user
 *    calls them (building the SDP, solving it, rebuilding the dual point, the bounds and the
 *    diagnostics); beside it, for reference, the solve alone of the very problem those functions
 *    build (guessingProblem / diamondProblem, built once). Our gap and feasibility tolerances are the
 *    defaults, 1e-8.
 *  - cvxopt: scripts/reference/cvxopt_guessing.py --solve-stdin --time k --tolerance 1e-8 times only
 *    the call to cvxopt.solvers.sdp (with its cvxopt.matrix conversion) on the dual problem it builds
 *    with numpy; building that problem is EXCLUDED. abstol = reltol = feastol = 1e-8 and no loosening
 *    retries (a failed attempt would otherwise count); .venv/bin/python with OPENBLAS_NUM_THREADS=1.
 *
 * HOW: ours is timed in steady state. V8 compiles the solver's hot functions only after they have
 * run for a while: in a fresh process the first call of a quantity takes ~100× its steady time and
 * the next 10–40 calls several times it, so a median after one or three warm-up calls measures the
 * JIT, not the code. Each function is first called until at least WARM_CALLS calls and WARM_MS
 * milliseconds have passed (the first call's time is printed, for the cost of a one-off call in a
 * fresh process). Then R interleaved rounds: cvxopt in a fresh python process times k solves of each
 * problem, then ours k calls of each; per round the medians and their ratio, and over the rounds the
 * median of each column and of the per-round ratios — a change of machine load between rounds moves
 * both sides. The values of both solvers are printed beside each other (they must agree). The goal
 * set for this code is a ratio of at most 0.5.
 *
 * Usage: npm run bench -- guessing [-- --slow]   (--slow: more rounds)
 */
import { spawnSync } from 'node:child_process';
import { PYTHON } from '../test/helpers/python.js';
import { fileURLToPath } from 'node:url';
import { adjoint, hermitianPart, mul, scale, sub, toRows, zeros, type CMatrix } from '../src/linalg/index.js';
import { amplitudeDamping } from '../src/quantum/presets.js';
import type { Channel } from '../src/quantum/types.js';
import { krausToChoi } from '../src/quantum/channels.js';
import { solveSdp } from '../src/sdp/index.js';
import { guessingProbability, guessingProblem } from '../src/oneshot/guessing.js';
import { diamondDistance, diamondProblem } from '../src/oneshot/diamond.js';
import { median, timeCalls, warmUp } from './timing.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_guessing.py`;

/** Deterministic pseudo-random numbers (Park–Miller), so both sides see the same data. */
function lcg(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647;
  };
}

function gauss(r: () => number): number {
  return Math.sqrt(-2 * Math.log(Math.max(r(), 1e-300))) * Math.cos(2 * Math.PI * r());
}

function randomState(d: number, r: () => number): CMatrix {
  const g = zeros(d, d);
  for (let k = 0; k < d * d; k++) {
    g.re[k] = gauss(r);
    g.im[k] = gauss(r);
  }
  const p = mul(g, adjoint(g));
  let t = 0;
  for (let i = 0; i < d; i++) t += p.re[i * d + i];
  return scale(p, 1 / t);
}

const WARM_CALLS = 30;
const WARM_MS = 1000;

interface Reference {
  cvxopt: string;
  guessing: { value: number; seconds: number; iterations: number }[];
  diamond: { value: number; seconds: number; iterations: number }[];
}

export default async function bench(argv: string[]): Promise<void> {
  const rounds = argv.includes('--slow') ? 15 : 7;
  const k = 3;
  const r = lcg(20240607);
  const states = Array.from({ length: 6 }, () => randomState(4, r));
  const probs = states.map(() => 1 / 6);
  // Qubit channels: amplitude damping γ = 0.3 against a rotation by 0.4 rad about y mixed with dephasing.
  const a = amplitudeDamping(0.3);
  const c = Math.cos(0.2);
  const s = Math.sin(0.2);
  const rot = { rows: 2, cols: 2, re: new Float64Array([c, -s, s, c]), im: new Float64Array(4) };
  const z = { rows: 2, cols: 2, re: new Float64Array([1, 0, 0, -1]), im: new Float64Array(4) };
  const b: Channel = { kraus: [scale(rot, Math.sqrt(0.8)), scale(mul(z, rot), Math.sqrt(0.2))], fromDims: [2], toDims: [2] };

  // The problems the two functions build, for the solve-only column (the same construction they use).
  const guessProblem = guessingProblem(states.map((st, x) => hermitianPart(scale(st, probs[x]))));
  const diamondSdp = diamondProblem(hermitianPart(sub(krausToChoi(a), krausToChoi(b))), 2, 2);

  const cases = [
    { name: 'p_guess, 6 states, d = 4', full: () => guessingProbability(probs, states), solve: () => solveSdp(guessProblem) },
    { name: '½‖N − M‖_⋄, qubit channels', full: () => diamondDistance(a, b), solve: () => solveSdp(diamondSdp) },
  ];
  const first = cases.map((cs) => warmUp(cs.full, WARM_CALLS, WARM_MS));
  cases.forEach((cs) => warmUp(cs.solve, WARM_CALLS, WARM_MS));
  const g = guessingProbability(probs, states);
  const d = diamondDistance(a, b);

  console.log(
    `guessing probability (6 states, d = 4) and diamond distance (qubit channels): ours end to end vs cvxopt.solvers.sdp, ` +
      `${rounds} interleaved rounds of ${k} calls, steady state after ≥ ${WARM_CALLS} warm-up calls and ≥ ${WARM_MS} ms`,
  );
  const plain = (ch: Channel) => ({ kraus: ch.kraus.map(toRows), fromDims: ch.fromDims, toDims: ch.toDims });
  const input = JSON.stringify({ guessing: [{ probabilities: probs, states: states.map(toRows) }], diamond: [{ a: plain(a), b: plain(b) }] });
  const ours = cases.map(() => [] as number[]);
  const solveOnly = cases.map(() => [] as number[]);
  const theirs = cases.map(() => [] as number[]);
  const ratios = cases.map(() => [] as number[]);
  let ref: Reference | null = null;
  for (let round = 0; round < rounds; round++) {
    const run = spawnSync(PYTHON, [script, '--solve-stdin', '--time', String(k), '--tolerance', '1e-8'], {
      input,
      encoding: 'utf8',
      env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
      maxBuffer: 1 << 26,
    });
    if (run.status !== 0) {
      console.log(`  cvxopt unavailable (${run.error?.message ?? run.stderr.split('\n').slice(-2).join(' ')}); ours only`);
      ref = null;
      break;
    }
    ref = JSON.parse(run.stdout) as Reference;
    const t = [ref.guessing[0].seconds * 1000, ref.diamond[0].seconds * 1000];
    cases.forEach((cs, i) => {
      const o = timeCalls(cs.full, k);
      ours[i].push(o);
      solveOnly[i].push(timeCalls(cs.solve, k));
      theirs[i].push(t[i]);
      ratios[i].push(o / t[i]);
    });
  }
  const its = [g.certificate.iterations, d.certificate.iterations];
  const values = [g.value, d.value];
  if (!ref) {
    cases.forEach((cs, i) => {
      const o = ours[i].length ? median(ours[i]) : timeCalls(cs.full, 7);
      console.log(`  ${cs.name}: ${o.toFixed(2)} ms end to end (${its[i]} iterations; first call ${first[i].toFixed(1)} ms)`);
    });
    return;
  }
  const refs = [ref.guessing[0], ref.diamond[0]];
  console.log(`  cvxopt ${ref.cvxopt}`);
  console.log(
    '  problem'.padEnd(32) + 'ours ms'.padStart(9) + 'solve ms'.padStart(10) + 'cvxopt ms'.padStart(11) + 'ratio'.padStart(7) +
      'first call'.padStart(12) + '  iterations ours/cvxopt  value ours / cvxopt',
  );
  cases.forEach((cs, i) => {
    console.log(
      `  ${cs.name}`.padEnd(32) + median(ours[i]).toFixed(2).padStart(9) + median(solveOnly[i]).toFixed(2).padStart(10) +
        median(theirs[i]).toFixed(2).padStart(11) + median(ratios[i]).toFixed(2).padStart(7) + `${first[i].toFixed(1)} ms`.padStart(12) +
        `  ${String(its[i]).padStart(5)} / ${String(refs[i].iterations).padEnd(13)}` +
        `  ${values[i].toPrecision(10)} / ${refs[i].value.toPrecision(10)} (|Δ| ${Math.abs(values[i] - refs[i].value).toExponential(1)})`,
    );
  });
  console.log('  ours ms: end to end as a user calls it (build + solve + dual point, bounds, diagnostics), steady state;');
  console.log('  solve ms: our solve alone of the same problem; cvxopt ms: solvers.sdp alone at 1e-8 (its problem build excluded);');
  console.log('  ratio: median over rounds of ours/cvxopt; first call: ours in this fresh process, before any warm-up');
  console.log('  (rows share the solver code, so the second row\'s first call is already partly compiled). Goal: ratio ≤ 0.5.');
}
