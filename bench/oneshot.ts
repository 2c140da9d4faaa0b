/**
 * Benchmark of the hypothesis-testing relative entropy (not a test; asserts nothing): D_H^ε(ρ‖σ) for
 * random non-commuting states at d = 8 and 16, ours against cvxopt.solvers.sdp, both measured in this
 * run on the same instances at the same tolerances.
 *
 * WHAT IS COMPARED (like with like):
 *  - ours, end to end: performance.now() around hypothesisTestingDivergence as a user calls it (the
 *    commutator and kernel checks, building the SDP, solving it, reading back the test, value and
 *    certificate); beside it, for reference, the solve alone of the very problem it builds
 *    (hypothesisTestingProblem, built once). Our tolerances are the defaults, gapTolerance =
 *    feasibilityTolerance = 1e-8.
 *  - cvxopt: .venv/bin/python with OPENBLAS_NUM_THREADS=1 runs scripts/reference/cvxopt_oneshot.py
 *    --solve-hypothesis-stdin, which builds its own (independent) formulation once — building is
 *    EXCLUDED from its time — and times only solvers.sdp with time.perf_counter(), at abstol = reltol
 *    = feastol = 1e-8 (the two solvers define their tolerances differently, so the accuracies are
 *    comparable, not equal; the values are printed side by side and must agree).
 *
 * HOW: ours is timed in steady state. V8 compiles the solver's hot functions only after they have
 * run for a while: in a fresh process the first call takes many times its steady time and the next
 * 10–40 calls several times it, so a median after a few warm-up calls measures the JIT, not the
 * code. Each function is first called until at least WARM_CALLS calls and WARM_MS milliseconds have
 * passed (the first call's time is printed: the cost of a one-off call in a fresh process). Then R
 * interleaved rounds: cvxopt in a fresh python process times k solves of each instance, then ours k
 * calls of each; over the rounds the median of each column and of the per-round ratios. The goal
 * set for this module is a ratio of at most 0.5.
 *
 * Usage: npm run bench -- oneshot [-- --slow]   (--slow: more rounds)
 */
import { spawnSync } from 'node:child_process';
import { PYTHON } from '../test/helpers/python.js';
import { fileURLToPath } from 'node:url';
import { scale, trace, toRows, type CMatrix } from '../src/linalg/index.js';
import { solveSdp } from '../src/sdp/index.js';
import { hypothesisTestingDivergence, hypothesisTestingProblem } from '../src/oneshot/hypothesis-testing.js';
import { randomDensity, rng } from '../test/helpers/random.js';
import { median, timeCalls, warmUp } from './timing.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_oneshot.py`;
const WARM_CALLS = 12;
const WARM_MS = 1000;

interface Instance {
  d: number;
  rho: CMatrix;
  sigma: CMatrix;
  epsilon: number;
}

type Reference = { cvxopt: string; results: { value: number; seconds: number; iterations: number; status: string }[] };

function cvxoptRound(instances: Instance[], repeats: number): Reference | string {
  const cases = instances.map((i) => ({ rho: toRows(i.rho), sigma: toRows(i.sigma), epsilon: i.epsilon }));
  const r = spawnSync(PYTHON, [script, '--solve-hypothesis-stdin'], {
    input: JSON.stringify({ cases, repeats, tolerance: 1e-8 }),
    encoding: 'utf8',
    env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    timeout: 600_000,
    maxBuffer: 1 << 26,
  });
  if (r.error || r.status !== 0) return r.error?.message ?? r.stderr.trim().split('\n').pop() ?? 'failed';
  return JSON.parse(r.stdout) as Reference;
}

export default async function run(flags: string[]): Promise<void> {
  const rounds = flags.includes('--slow') ? 11 : 5;
  const k = 3;
  const r = rng(2024);
  const instances: Instance[] = [8, 16].map((d) => ({ d, rho: randomDensity(d, r), sigma: randomDensity(d, r), epsilon: 0.1 }));
  const cases = instances.map((inst) => {
    const problem = hypothesisTestingProblem(inst.rho, scale(inst.sigma, 1 / trace(inst.sigma).re), inst.epsilon);
    return { full: () => hypothesisTestingDivergence(inst.rho, inst.sigma, inst.epsilon), solve: () => solveSdp(problem) };
  });
  const first = cases.map((c) => warmUp(c.full, WARM_CALLS, WARM_MS));
  cases.forEach((c) => warmUp(c.solve, WARM_CALLS, WARM_MS));
  const answers = cases.map((c) => c.full());
  console.log(
    `D_H^ε(ρ‖σ), ε = 0.1, random full-rank non-commuting states: ours end to end vs cvxopt.solvers.sdp, ${rounds} interleaved ` +
      `rounds of ${k} calls, steady state after ≥ ${WARM_CALLS} warm-up calls and ≥ ${WARM_MS} ms`,
  );
  const ours = cases.map(() => [] as number[]);
  const solveOnly = cases.map(() => [] as number[]);
  const theirs = cases.map(() => [] as number[]);
  const ratios = cases.map(() => [] as number[]);
  let ref: Reference | null = null;
  for (let round = 0; round < rounds; round++) {
    const got = cvxoptRound(instances, k);
    if (typeof got === 'string') {
      console.log(`  cvxopt unavailable (${got}); ours only`);
      ref = null;
      break;
    }
    ref = got;
    cases.forEach((c, i) => {
      const o = timeCalls(c.full, k);
      const t = got.results[i].seconds * 1000;
      ours[i].push(o);
      solveOnly[i].push(timeCalls(c.solve, k));
      theirs[i].push(t);
      ratios[i].push(o / t);
    });
  }
  if (ref) console.log(`  cvxopt ${ref.cvxopt}, OPENBLAS_NUM_THREADS=1`);
  console.log('     d  constraints   ours ms  solve ms  cvxopt ms  ratio  first call  iterations ours/cvxopt  value ours / cvxopt (bits)');
  instances.forEach((inst, i) => {
    const a = answers[i];
    const c = ref?.results[i];
    const o = ours[i].length ? median(ours[i]) : timeCalls(cases[i].full, k);
    const line =
      String(inst.d).padStart(6) + String(inst.d * inst.d + 1).padStart(13) + o.toFixed(1).padStart(10) +
      (solveOnly[i].length ? median(solveOnly[i]).toFixed(1) : '—').padStart(10) +
      (c ? median(theirs[i]).toFixed(1) : '—').padStart(11) + (c ? median(ratios[i]).toFixed(2) : '—').padStart(7) +
      `${first[i].toFixed(0)} ms`.padStart(12) +
      `  ${String(a.certificate.iterations).padStart(5)} / ${String(c?.iterations ?? '—').padEnd(13)}` +
      (c ? `  ${a.value.toPrecision(10)} / ${c.value.toPrecision(10)} (|Δ| ${Math.abs(a.value - c.value).toExponential(1)})` : `  ${a.value.toPrecision(10)}`);
    console.log(line + (a.certificate.status !== 'optimal' ? `  (our status ${a.certificate.status})` : '') + (c && c.status !== 'optimal' ? `  (cvxopt status ${c.status})` : ''));
  });
  console.log('  ours ms: hypothesisTestingDivergence end to end as a user calls it, steady state; solve ms: our solve alone of');
  console.log('  the same problem; cvxopt ms: solvers.sdp alone at 1e-8 (its problem build excluded); ratio: median over rounds');
  console.log('  of ours/cvxopt; first call: ours in this fresh process before any warm-up (d = 16 runs after d = 8 compiled the');
  console.log('  shared code). Goal: ratio ≤ 0.5.');
}
