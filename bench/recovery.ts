/**
 * Benchmark of the fidelity of recovery F(A;C|B) (src/recovery/fidelity-of-recovery.ts) against
 * cvxopt.solvers.sdp on the same SDP, at (d_A, d_B, d_C) = (2,4,2), (2,4,4), (4,2,4) (not a test;
 * asserts nothing).
 *
 * The same Hilbert–Schmidt states (the op random-state, seeded) go to both. Ours: the whole op function
 * fidelityOfRecovery (SDP, repaired channel, closed-form fidelity, dual point, bracket; median of
 * --repeats after one warm-up call). cvxopt: scripts/reference/cvxopt_recovery.py --solve-stdin (the dual
 * SDP with sparse LMIs, as many real variables as our primal has constraints; the time is inside
 * solvers.sdp only, the median of its repeats, at the first tolerance of its ladder that reaches
 * 'optimal'), in a process of its own with OPENBLAS_NUM_THREADS=1. cvxopt takes minutes at the two larger
 * sizes, so it runs once there unless --cvxopt-repeats says otherwise. Prints both medians, the ratio,
 * both values and their relative difference, and the load (uptime) before and after.
 *
 * Flags: --repeats=N (ours, default 3), --cvxopt-repeats=N (default 3 at (2,4,2), 1 above), --sizes=2x4x2,...
 */
import { spawnSync } from 'node:child_process';
import { loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import '../src/ops/all.js';
import { handle } from '../src/ops/handle.js';
import { fromRows } from '../src/linalg/index.js';
import { fidelityOfRecovery } from '../src/recovery/fidelity-of-recovery.js';
import { PYTHON } from '../test/helpers/python.js';
import { median } from './timing.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_recovery.py`;
const env = { ...process.env, OPENBLAS_NUM_THREADS: '1' };

const flag = (name: string): string | undefined => process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1];

function load(): string {
  return loadavg().map((x) => x.toFixed(2)).join(' ');
}

export default function main(): void {
  const repeats = Number(flag('repeats') ?? 3);
  const sizes = (flag('sizes') ?? '2x4x2,2x4x4,4x2x4').split(',').map((s) => s.split('x').map(Number));
  console.log(`fidelity of recovery: ours (fidelityOfRecovery, certified) against cvxopt.solvers.sdp (dual SDP), load ${load()}`);
  console.log('dims     | ours ms (iterations) | cvxopt ms (iterations, tol) | cvxopt/ours | F ours | F cvxopt | rel. diff');
  sizes.forEach((dims, k) => {
    const st = handle({ op: 'random-state', ensemble: 'hilbert-schmidt', dims, seed: 1203 + k }) as Record<string, any>;
    if (!st.ok) throw new Error(JSON.stringify(st.error));
    const m = st.value.matrix;
    const rho = fromRows(m.re, m.im);
    let iterations = 0;
    const run = () => fidelityOfRecovery(rho, dims, [0], [1], [2], { sdp: { onIteration: () => iterations++ } });
    run(); // warm-up (JIT)
    const times: number[] = [];
    let ours = run();
    for (let r = 0; r < repeats; r++) {
      iterations = 0;
      const t0 = performance.now();
      ours = run();
      times.push(performance.now() - t0);
    }
    const cvxRepeats = Number(flag('cvxopt-repeats') ?? (dims.reduce((a, b) => a * b, 1) > 16 ? 1 : 3));
    const r = spawnSync(PYTHON, [script, '--solve-stdin', '--time', String(cvxRepeats)], {
      input: JSON.stringify({ recovery: [{ rho: m, dims }] }),
      encoding: 'utf8',
      env,
      maxBuffer: 1 << 28,
    });
    if (r.status !== 0) throw new Error(`cvxopt_recovery.py failed: ${r.stderr}`);
    const c = JSON.parse(r.stdout).recovery[0];
    const oursMs = median(times);
    const cvxMs = 1000 * c.seconds;
    console.log(
      `${dims.join(',')}    | ${oursMs.toFixed(0).padStart(7)} (${iterations}) | ${cvxMs.toFixed(0).padStart(8)} (${c.iterations}, ${c.cvxoptTolerance}) | ` +
        `${(cvxMs / oursMs).toFixed(1)}× | ${ours.value.toPrecision(10)} | ${c.value.toPrecision(10)} | ${(Math.abs(ours.value - c.value) / c.value).toExponential(1)}`,
    );
  });
  console.log(`load after: ${load()}`);
}

if (import.meta.url === `file://${process.argv[1]}`) main();
