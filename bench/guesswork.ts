/**
 * Benchmark of guesswork with quantum side information (issue 9; not a test, asserts nothing).
 *
 * 1. AGAINST CVXOPT, same problems in the same run: random ensembles of K = 5, 6, 7 qubit states
 *    (probabilities flat Dirichlet, Ginibre states of random rank), drawn by
 *    scripts/reference/cvxopt_guesswork.py (numpy seed below) and solved there by cvxopt.solvers.sdp
 *    over all K! orders (--tolerance 1e-8, one attempt, OPENBLAS_NUM_THREADS=1). cvxopt's time is
 *    END TO END: building the K!-block problem with numpy and the solve (its solve alone is printed
 *    too). Ours: guessworkWithSideInformation end to end (validation, column generation, pricing every
 *    order, the strategy and the dual point), certified to 1e-7 relative — a stricter target than
 *    cvxopt's 1e-8 stopping tolerances on its own gap, since ours is the width of a bracket proved by
 *    two points. Per round cvxopt's medians (a fresh python process) then ours (median of k calls);
 *    over the rounds the medians of each column and of the per-round ratios. Goal: K = 7 at least 50×
 *    faster than cvxopt.
 * 2. SIZES NO GENERIC SDP REACHES: K = 10 with d = 2, K = 9 with d = 4 (and K = 10, d = 3; K = 11,
 *    d = 2): median of a few calls, the certified relative width, rounds, working set, orders priced, and
 *    the process's peak resident memory. Goal: certified within 30 s, memory bounded.
 *
 * Ours is timed after warm-up calls on a small case (V8 compiles the hot paths only after they ran a
 * while; bench/guessing.ts explains). Usage: npm run bench -- guesswork [-- --slow]
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { PYTHON } from '../test/helpers/python.js';
import { fromRows, type CMatrix } from '../src/linalg/index.js';
import { guessworkWithSideInformation } from '../src/guessing/side-information.js';
import { median, timeCalls, warmUp } from './timing.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_guesswork.py`;

interface Case {
  name: string;
  probabilities: number[];
  states: { re: number[][]; im: number[][] }[];
  value: number;
  seconds: number;
  secondsTotal: number;
}

function cvxopt(shapes: string, seed: number, repeats: number): { version: string; cases: Case[] } | string {
  const run = spawnSync(PYTHON, [script, '--seed', String(seed), '--shapes', shapes, '--time', String(repeats), '--tolerance', '1e-8', '--out', '-'], {
    encoding: 'utf8',
    env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    maxBuffer: 1 << 26,
  });
  if (run.status !== 0) return run.error?.message ?? run.stderr.split('\n').slice(-3).join(' ');
  const doc = JSON.parse(run.stdout);
  return { version: doc.cvxopt, cases: doc.cases };
}

/** Park–Miller numbers for the large cases (no reference needed there). */
function lcg(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647;
  };
}

function randomEnsemble(K: number, d: number, r: () => number): { p: number[]; states: CMatrix[] } {
  const gauss = () => Math.sqrt(-2 * Math.log(Math.max(r(), 1e-300))) * Math.cos(2 * Math.PI * r());
  const w = Array.from({ length: K }, () => -Math.log(Math.max(r(), 1e-300)));
  const s = w.reduce((a, b) => a + b, 0);
  const states = Array.from({ length: K }, () => {
    const gr = Array.from({ length: d }, () => Array.from({ length: d }, gauss));
    const gi = Array.from({ length: d }, () => Array.from({ length: d }, gauss));
    // ρ = G G* / Tr
    const re = Array.from({ length: d }, () => Array(d).fill(0));
    const im = Array.from({ length: d }, () => Array(d).fill(0));
    let t = 0;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        for (let k = 0; k < d; k++) {
          re[i][j] += gr[i][k] * gr[j][k] + gi[i][k] * gi[j][k];
          im[i][j] += gi[i][k] * gr[j][k] - gr[i][k] * gi[j][k];
        }
      }
      t += re[i][i];
    }
    return fromRows(re.map((row) => row.map((v) => v / t)), im.map((row) => row.map((v) => v / t)));
  });
  return { p: w.map((x) => x / s), states };
}

export default async function bench(argv: string[]): Promise<void> {
  const slow = argv.includes('--slow');
  const rounds = slow ? 5 : 3;
  const k = 3;
  const seed = 20261202;
  const shapes = '5x2,6x2,7x2';

  // Warm-up on a small case of each dimension used below.
  for (const d of [2, 3, 4]) {
    const e = randomEnsemble(6, d, lcg(7 + d));
    warmUp(() => guessworkWithSideInformation(e.p, e.states), 10, 1000);
  }

  console.log(`guesswork with quantum side information: ours (column generation, certified to 1e-7) vs cvxopt.solvers.sdp over all K! orders (1e-8), ${rounds} interleaved rounds`);
  const ours: number[][] = [];
  const theirs: number[][] = [];
  const theirsSolve: number[][] = [];
  const ratios: number[][] = [];
  let names: string[] = [];
  let version = '';
  const values: { ours: number; cvxopt: number; width: number }[] = [];
  for (let round = 0; round < rounds; round++) {
    const ref = cvxopt(shapes, seed, 1);
    if (typeof ref === 'string') {
      console.log(`  cvxopt unavailable (${ref}); comparison skipped`);
      break;
    }
    version = ref.version;
    names = ref.cases.map((c) => c.name);
    ref.cases.forEach((c, i) => {
      const states = c.states.map((s) => fromRows(s.re, s.im));
      const call = () => guessworkWithSideInformation(c.probabilities, states);
      const o = timeCalls(call, k);
      const g = call();
      (ours[i] ??= []).push(o);
      (theirs[i] ??= []).push(c.secondsTotal * 1000);
      (theirsSolve[i] ??= []).push(c.seconds * 1000);
      (ratios[i] ??= []).push((c.secondsTotal * 1000) / o);
      values[i] = { ours: g.value, cvxopt: c.value, width: g.certificate.accuracy.relative };
    });
  }
  if (names.length) {
    console.log(`  cvxopt ${version}, numpy seed ${seed}`);
    console.log('  problem'.padEnd(30) + 'ours ms'.padStart(10) + 'cvxopt ms'.padStart(12) + '(solve ms)'.padStart(12) + 'cvxopt/ours'.padStart(13) + '  value ours / cvxopt (certified width)');
    names.forEach((name, i) => {
      console.log(
        `  ${name.replace(/^case \d+: /, '')}`.padEnd(30) + median(ours[i]).toFixed(1).padStart(10) + median(theirs[i]).toFixed(0).padStart(12) +
          `(${median(theirsSolve[i]).toFixed(0)})`.padStart(12) + `${median(ratios[i]).toFixed(0)}×`.padStart(13) +
          `  ${values[i].ours.toPrecision(10)} / ${values[i].cvxopt.toPrecision(10)} (${values[i].width.toExponential(1)})`,
      );
    });
    console.log('  cvxopt ms: building the K!-block problem and solving it (solve alone in parentheses); ours: end to end. Goal: K = 7 ≥ 50×.');
  }

  console.log('beyond the generic SDP (no reference can run there): median of calls, certified relative width, peak memory');
  console.log('  problem'.padEnd(22) + 'median s'.padStart(10) + 'width'.padStart(10) + 'rounds'.padStart(8) + 'working set'.padStart(13) + 'orders priced'.padStart(15) + 'peak RSS'.padStart(10));
  for (const [K, d, calls] of [[10, 2, 3], [9, 4, 3], [10, 3, 3], [11, 2, 1]] as const) measure(`K = ${K}, d = ${d}`, randomEnsemble(K, d, lcg(1000 * K + d)), calls);
  // A symmetric ensemble (equal priors, the Weyl–Heisenberg orbit of one pure qutrit state): more orders tie,
  // so more rounds and more of the tree stay open than for random ensembles.
  measure('K = 9, d = 3, orbit', weylHeisenbergOrbit(3, lcg(99)), 3);
  console.log('  Goal: K = 10, d = 2 and K = 9, d = 4 certified within 30 s; peak RSS is the whole process (engine and the cases above).');
}

/** One warm call, then `calls` timed calls; one line of the table. */
function measure(name: string, e: { p: number[]; states: CMatrix[] }, calls: number): void {
  const times: number[] = [];
  let g = guessworkWithSideInformation(e.p, e.states);
  for (let c = 0; c < calls; c++) {
    const t0 = performance.now();
    g = guessworkWithSideInformation(e.p, e.states);
    times.push((performance.now() - t0) / 1000);
  }
  const rss = process.resourceUsage().maxRSS / 1024;
  console.log(
    `  ${name}`.padEnd(22) + median(times).toFixed(2).padStart(10) + g.certificate.accuracy.relative.toExponential(1).padStart(10) +
      String(g.search.rounds).padStart(8) + String(g.search.workingSet).padStart(13) + g.search.ordersPriced.toExponential(2).padStart(15) +
      `${rss.toFixed(0)} MB`.padStart(10) + (g.certified ? '' : '  NOT certified: ' + (g.warning ?? '')),
  );
}

/** The d² states X^a Z^b |ψ⟩⟨ψ| Z^−b X^−a of a random pure |ψ⟩ (clock and shift matrices), equal priors. */
function weylHeisenbergOrbit(d: number, r: () => number): { p: number[]; states: CMatrix[] } {
  const gauss = () => Math.sqrt(-2 * Math.log(Math.max(r(), 1e-300))) * Math.cos(2 * Math.PI * r());
  const vr = Array.from({ length: d }, gauss);
  const vi = Array.from({ length: d }, gauss);
  const n = Math.sqrt(vr.reduce((s, v, i) => s + v * v + vi[i] * vi[i], 0));
  const states: CMatrix[] = [];
  for (let a = 0; a < d; a++) {
    for (let b = 0; b < d; b++) {
      // (X^a Z^b ψ)_i = ω^{b(i−a)} ψ_{i−a}
      const wr: number[] = [];
      const wi: number[] = [];
      for (let i = 0; i < d; i++) {
        const j = (i - a + d) % d;
        const ph = (2 * Math.PI * b * j) / d;
        wr.push((Math.cos(ph) * vr[j] - Math.sin(ph) * vi[j]) / n);
        wi.push((Math.sin(ph) * vr[j] + Math.cos(ph) * vi[j]) / n);
      }
      const re = wr.map((x, i) => wr.map((y, j) => x * y + wi[i] * wi[j]));
      const im = wr.map((_, i) => wr.map((_, j) => wi[i] * wr[j] - wr[i] * wi[j]));
      states.push(fromRows(re, im));
    }
  }
  return { p: Array(d * d).fill(1 / (d * d)), states };
}
