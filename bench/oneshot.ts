/**
 * Benchmark of the hypothesis-testing SDP (not a test; asserts nothing): D_H^ε(ρ‖σ) for random
 * non-commuting states at d = 8 and 16, our solver against cvxopt.solvers.sdp, both measured in this
 * run on the same instances.
 *
 * Ours: the problem of src/oneshot/hypothesis-testing.ts (hypothesisTestingProblem) is built once and
 * only solveSdp is timed (performance.now()), after three warm-up solves. cvxopt: /usr/bin/python3 with
 * OPENBLAS_NUM_THREADS=1 runs scripts/reference/cvxopt_oneshot.py --solve-hypothesis-stdin, which
 * builds its own (independent) formulation once and times only solvers.sdp with time.perf_counter(),
 * at abstol = reltol = feastol = 1e-8 (our defaults are gapTolerance = feasibilityTolerance = 1e-8;
 * the two solvers define their tolerances differently, so the accuracies are comparable, not equal).
 * Prints medians over repetitions, iteration counts, the values (they must agree) and the ratio
 * ours/cvxopt. The goal set for this module is a ratio of at most 0.5.
 *
 * Usage: npm run bench -- oneshot [-- --slow]   (--slow: more repetitions)
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { scale, trace, toRows, type CMatrix } from '../src/linalg/index.js';
import { solveSdp } from '../src/sdp/index.js';
import { hypothesisTestingProblem } from '../src/oneshot/hypothesis-testing.js';
import { randomDensity, rng } from '../test/helpers/random.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_oneshot.py`;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

interface Instance {
  d: number;
  rho: CMatrix;
  sigma: CMatrix;
  epsilon: number;
}

function timeOurs(inst: Instance, repeats: number): { ms: number; value: number; iterations: number; status: string } {
  const sigmaUnit = scale(inst.sigma, 1 / trace(inst.sigma).re);
  const problem = hypothesisTestingProblem(inst.rho, sigmaUnit, inst.epsilon);
  let ans = solveSdp(problem);
  for (let k = 0; k < 2; k++) ans = solveSdp(problem); // warm-up (JIT)
  const times: number[] = [];
  for (let k = 0; k < repeats; k++) {
    const t0 = performance.now();
    ans = solveSdp(problem);
    times.push(performance.now() - t0);
  }
  return { ms: median(times), value: -Math.log2(ans.primalObjective * trace(inst.sigma).re), iterations: ans.iterations, status: ans.status };
}

function timeCvxopt(instances: Instance[], repeats: number) {
  const cases = instances.map((i) => ({ rho: toRows(i.rho), sigma: toRows(i.sigma), epsilon: i.epsilon }));
  const r = spawnSync('/usr/bin/python3', [script, '--solve-hypothesis-stdin'], {
    input: JSON.stringify({ cases, repeats }),
    encoding: 'utf8',
    env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    timeout: 600_000,
    maxBuffer: 1 << 26,
  });
  if (r.error || r.status !== 0) {
    console.log(`cvxopt unavailable (${r.error?.message ?? r.stderr.trim().split('\n').pop()}); printing our times only`);
    return null;
  }
  return JSON.parse(r.stdout) as { cvxopt: string; results: { value: number; seconds: number; iterations: number; status: string }[] };
}

export default async function run(flags: string[]): Promise<void> {
  const slow = flags.includes('--slow');
  const r = rng(2024);
  const plan = [
    { d: 8, repeats: slow ? 15 : 7 },
    { d: 16, repeats: slow ? 9 : 5 },
  ];
  const instances: Instance[] = plan.map(({ d }) => ({ d, rho: randomDensity(d, r), sigma: randomDensity(d, r), epsilon: 0.1 }));
  console.log('D_H^ε(ρ‖σ), ε = 0.1, random full-rank non-commuting states; solve time only, medians');
  const ours = instances.map((inst, k) => timeOurs(inst, plan[k].repeats));
  const ref = timeCvxopt(instances, Math.max(...plan.map((p) => p.repeats)));
  if (ref) console.log(`cvxopt ${ref.cvxopt}, OPENBLAS_NUM_THREADS=1`);
  console.log('   d  constraints   ours ms (iters)   cvxopt ms (iters)   ours/cvxopt   |Δ value|');
  instances.forEach((inst, k) => {
    const o = ours[k];
    const c = ref?.results[k];
    const cms = c ? c.seconds * 1000 : NaN;
    const line = [
      String(inst.d).padStart(4),
      String(inst.d * inst.d + 1).padStart(12),
      `${o.ms.toFixed(1)} (${o.iterations})`.padStart(17),
      (c ? `${cms.toFixed(1)} (${c.iterations})` : '—').padStart(19),
      (c ? (o.ms / cms).toFixed(2) : '—').padStart(13),
      (c ? Math.abs(o.value - c.value).toExponential(1) : '—').padStart(11),
    ].join(' ');
    console.log(line + (o.status !== 'optimal' ? `  (our status ${o.status})` : '') + (c && c.status !== 'optimal' ? `  (cvxopt status ${c.status})` : ''));
  });
  console.log('goal: ours/cvxopt ≤ 0.5');
}
