/**
 * Benchmark of the SDP solver (not a test; asserts nothing).
 *
 * 1. Our solver against cvxopt.solvers.sdp on the problem shapes of scripts/reference/cvxopt_sdp.py
 *    (real, Hermitian-in-embedding, orthant, many small blocks, partial trace), measured in this run:
 *    cvxopt through /usr/bin/python3 with OPENBLAS_NUM_THREADS=1 (its own timer around the solve,
 *    excluding interpreter start-up), ours with performance.now() around solveSdp. Medians per shape.
 * 2. Many 2×2 blocks (5,000 / 10,000 / 20,000; add --slow for 40,000): each block has its own
 *    trace constraint and all are coupled by one global row, the structure the Schur complement's
 *    grouping is for. Prints time per block, which should stay roughly flat (linear growth), and
 *    cvxopt's time on the 1,000- and 2,000-block instances for scale.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { solveSdp, type SdpProblem, type Constraint } from '../src/sdp/index.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_sdp.py`;
const env = { ...process.env, OPENBLAS_NUM_THREADS: '1' };

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function timeOurs(p: SdpProblem, repeats: number): { ms: number; iterations: number; value: number; status: string } {
  const times: number[] = [];
  let last = solveSdp(p);
  for (let w = 0; w < 3; w++) last = solveSdp(p); // let the JIT settle
  for (let r = 0; r < repeats; r++) {
    const t0 = performance.now();
    last = solveSdp(p);
    times.push(performance.now() - t0);
  }
  return { ms: median(times), iterations: last.iterations, value: last.primalObjective, status: last.status };
}

/** K blocks of size 2: min Σ⟨C_k, X_k⟩, tr X_k = 1, Σ_k (X_k)_00 + t = K + 1, t ≥ 0. Deterministic data. */
function manyBlocks(K: number): SdpProblem {
  let seed = 12345;
  const rnd = () => {
    seed = (seed * 16807) % 2147483647;
    return seed / 2147483647 - 0.5;
  };
  const cones: SdpProblem['cones'][number][] = [];
  const objective: SdpProblem['objective'][number][] = [];
  const constraints: Constraint[] = [];
  const coupling: Constraint['terms'][number][] = [{ block: K, vector: [1] }];
  for (let k = 0; k < K; k++) {
    cones.push({ kind: 'symmetric', size: 2 });
    objective.push({ block: k, entries: [[0, 0, rnd()], [0, 1, rnd()], [1, 1, rnd()]] });
    constraints.push({ terms: [{ block: k, entries: [[0, 0, 1], [1, 1, 1]] }], equals: 1 });
    coupling.push({ block: k, entries: [[0, 0, 1]] });
  }
  cones.push({ kind: 'nonnegative', size: 1 });
  constraints.push({ terms: coupling, equals: K + 1 });
  return { cones, objective, constraints };
}

function cvxoptSolve(problems: SdpProblem[], repeats: number): { cvxopt: string; results: { optimal: number; seconds: number }[] } | null {
  const r = spawnSync('/usr/bin/python3', [script, '--solve-stdin', '--time', String(repeats)], {
    input: JSON.stringify({ problems }),
    encoding: 'utf8',
    env,
    maxBuffer: 1 << 28,
  });
  if (r.status !== 0) {
    console.log(`  cvxopt unavailable: ${r.error?.message ?? r.stderr.split('\n').slice(-2).join(' ')}`);
    return null;
  }
  return JSON.parse(r.stdout);
}

export default async function bench(argv: string[]): Promise<void> {
  const slow = argv.includes('--slow');
  const repeats = 5;

  console.log('SDP solver vs cvxopt.solvers.sdp (same machine, same run; OPENBLAS_NUM_THREADS=1), medians of ' + repeats);
  const gen = spawnSync('/usr/bin/python3', [script, '--seed', '99', '--count', '18', '--time', String(repeats), '--out', '-'], {
    encoding: 'utf8',
    env,
    maxBuffer: 1 << 28,
  });
  if (gen.status !== 0) {
    console.log(`  cvxopt unavailable (${gen.error?.message ?? gen.stderr.split('\n').slice(-2).join(' ')}); shape comparison skipped`);
  } else {
    const ref = JSON.parse(gen.stdout) as {
      cvxopt: string;
      cases: { shape: string; problem: SdpProblem; optimal: number; cvxoptSeconds: number }[];
    };
    console.log(`  cvxopt ${ref.cvxopt}`);
    const byShape = new Map<string, { ours: number[]; theirs: number[]; maxDiff: number }>();
    for (const c of ref.cases) {
      const o = timeOurs(c.problem, repeats);
      const e = byShape.get(c.shape) ?? { ours: [], theirs: [], maxDiff: 0 };
      e.ours.push(o.ms);
      e.theirs.push(c.cvxoptSeconds * 1000);
      e.maxDiff = Math.max(e.maxDiff, Math.abs(o.value - c.optimal) / Math.max(1, Math.abs(c.optimal)));
      byShape.set(c.shape, e);
    }
    console.log('  shape'.padEnd(50) + 'ours ms'.padStart(10) + 'cvxopt ms'.padStart(11) + 'ratio'.padStart(8) + '  max rel diff');
    for (const [shape, e] of byShape) {
      const a = median(e.ours);
      const b = median(e.theirs);
      console.log(`  ${shape}`.padEnd(50) + a.toFixed(2).padStart(10) + b.toFixed(2).padStart(11) + (a / b).toFixed(2).padStart(8) + `  ${e.maxDiff.toExponential(1)}`);
    }
  }

  console.log('\nMany 2×2 blocks, each with a trace row, all coupled by one global row (time per block should stay flat)');
  const sizes = slow ? [5000, 10000, 20000, 40000] : [5000, 10000, 20000];
  console.log('  blocks'.padEnd(10) + 'ms'.padStart(10) + 'µs/block'.padStart(10) + 'iters'.padStart(7) + '  status');
  for (const K of sizes) {
    const p = manyBlocks(K);
    const t0 = performance.now();
    const a = solveSdp(p);
    const ms = performance.now() - t0;
    console.log(`  ${K}`.padEnd(10) + ms.toFixed(0).padStart(10) + ((ms * 1000) / K).toFixed(1).padStart(10) + String(a.iterations).padStart(7) + `  ${a.status}`);
  }
  const small = [1000, 2000];
  const theirs = cvxoptSolve(small.map(manyBlocks), 1);
  if (theirs) {
    small.forEach((K, i) => {
      const o = timeOurs(manyBlocks(K), 3);
      const c = theirs.results[i];
      console.log(
        `  ${K} blocks: ours ${o.ms.toFixed(0)} ms, cvxopt ${(c.seconds * 1000).toFixed(0)} ms (ratio ${(o.ms / (c.seconds * 1000)).toFixed(2)}), ` +
          `values ${o.value.toFixed(6)} / ${c.optimal.toFixed(6)}`,
      );
    });
  }
}
