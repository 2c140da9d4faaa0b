/**
 * Benchmark of the SDP solver (not a test; asserts nothing).
 *
 * 1. Our solver against cvxopt.solvers.sdp on the problem shapes of scripts/reference/cvxopt_sdp.py
 *    (real, Hermitian-in-embedding, orthant, many small blocks, partial trace), measured in this run:
 *    cvxopt through .venv/bin/python with OPENBLAS_NUM_THREADS=1 (its own timer around the solve,
 *    excluding interpreter start-up), ours with performance.now() around solveSdp. Medians per shape.
 * 2. Many 2×2 blocks (5,000 / 10,000 / 20,000; add --slow for 40,000): each block has its own
 *    trace constraint and all are coupled by one global row, the structure the Schur complement's
 *    grouping is for. Prints time per block, which should stay roughly flat (linear growth), and
 *    cvxopt's time on the 1,000- and 2,000-block instances for scale.
 * 0. First, the shapes the one-shot quantities solve (hypothesis testing at d = 8 and 16, guessing
 *    probability of 6 states at d = 4, diamond distance of qubit channels; see quantityShapes),
 *    against cvxopt at the same 1e-8 tolerances.
 *
 * Flags: --quantities (only part 0), --repeats=N (default 5), --slow (adds 40,000 blocks).
 */
import { spawnSync } from 'node:child_process';
import { PYTHON } from '../test/helpers/python.js';
import { fileURLToPath } from 'node:url';
import { solveSdp, matrixCoordinates, coordinateEntry, type SdpProblem, type Constraint, type Entry, type BlockTerm } from '../src/sdp/index.js';
import { adjoint, matrixPower, mul, scale, sub, toRows, zeros, type CMatrix } from '../src/linalg/index.js';

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

/** Deterministic standard normals (Park–Miller LCG + Box–Muller), so every run benchmarks the same data. */
function normals(seed: number): () => number {
  let s = seed;
  const u = () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647;
  };
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

/** A random full-rank density matrix G G† / tr(G G†) of size d. */
function randomState(d: number, g: () => number): CMatrix {
  const a = zeros(d, d);
  for (let k = 0; k < d * d; k++) {
    a.re[k] = g();
    a.im[k] = g();
  }
  const rho = mul(a, adjoint(a));
  let tr = 0;
  for (let i = 0; i < d; i++) tr += rho.re[i * d + i];
  return scale(rho, 1 / tr);
}

/** Coordinate rows X_block = target (or + Σ other blocks) of a d×d Hermitian matrix, one per real coordinate. */
function coordinateRows(d: number, blocks: readonly number[], target: (i: number, j: number, part: 're' | 'im') => number): Constraint[] {
  return matrixCoordinates(d, true).map((c) => {
    const e = coordinateEntry(c.i, c.j, c.part);
    return { terms: blocks.map((block) => ({ block, entries: [e] })), equals: target(c.i, c.j, c.part) };
  });
}

/**
 * Hypothesis-testing shape: minimize Tr σΛ s.t. Λ + W = 1, Tr ρΛ − t = 1 − ε; Λ, W ⪰ 0 (Hermitian
 * d×d), t ≥ 0. ρ, σ random full-rank states of size d, ε = 0.1.
 */
export function hypothesisTestingShape(d: number, seed = 31): SdpProblem {
  const g = normals(seed);
  const rho = randomState(d, g);
  const sigma = randomState(d, g);
  return {
    cones: [{ kind: 'hermitian', size: d }, { kind: 'hermitian', size: d }, { kind: 'nonnegative', size: 1 }],
    objective: [{ block: 0, matrix: toRows(sigma) }],
    constraints: [
      ...coordinateRows(d, [0, 1], (i, j, part) => (i === j && part === 're' ? 1 : 0)),
      { terms: [{ block: 0, matrix: toRows(rho) }, { block: 2, vector: [-1] }], equals: 0.9 },
    ],
  };
}

/** Guessing-probability shape: maximize Σ_x p_x Tr ρ_x M_x over POVMs {M_x} (Hermitian d×d blocks summing to 1). */
export function guessingShape(states: number, d: number, seed = 47): SdpProblem {
  const g = normals(seed);
  const blocks = Array.from({ length: states }, (_, x) => x);
  return {
    cones: blocks.map(() => ({ kind: 'hermitian' as const, size: d })),
    objective: blocks.map((x): BlockTerm => ({ block: x, matrix: toRows(scale(randomState(d, g), -1 / states)) })),
    constraints: coordinateRows(d, blocks, (i, j, part) => (i === j && part === 're' ? 1 : 0)),
  };
}

/** Choi matrix (input ⊗ output) of a random channel with `kraus` Kraus operators d_out × d_in. */
function randomChoi(din: number, dout: number, kraus: number, g: () => number): CMatrix {
  // Stack the Kraus operators into an isometry V (kraus·d_out × d_in): V = G (G†G)^(−1/2).
  const G = zeros(kraus * dout, din);
  for (let k = 0; k < G.re.length; k++) {
    G.re[k] = g();
    G.im[k] = g();
  }
  const V = mul(G, matrixPower(mul(adjoint(G), G), -0.5));
  const n = din * dout;
  const J = zeros(n, n);
  for (let k = 0; k < kraus; k++) {
    for (let a = 0; a < din; a++) for (let o = 0; o < dout; o++) {
      for (let a2 = 0; a2 < din; a2++) for (let o2 = 0; o2 < dout; o2++) {
        const p = (k * dout + o) * din + a;
        const q = (k * dout + o2) * din + a2;
        const idx = (a * dout + o) * n + a2 * dout + o2;
        J.re[idx] += V.re[p] * V.re[q] + V.im[p] * V.im[q];
        J.im[idx] += V.im[p] * V.re[q] - V.re[p] * V.im[q];
      }
    }
  }
  return J;
}

/**
 * Diamond-distance shape (Watrous's SDP for ½‖Φ − Ψ‖_⋄): maximize Tr J W s.t. W ⪯ σ ⊗ 1, Tr σ = 1,
 * W, σ ⪰ 0 with J the Choi difference of two random qubit channels; written with the slack
 * T = σ ⊗ 1 − W. Blocks W (4), σ (2), T (4), 17 rows.
 */
export function diamondShape(seed = 53): SdpProblem {
  const g = normals(seed);
  const din = 2;
  const dout = 2;
  const n = din * dout;
  const J = sub(randomChoi(din, dout, 2, g), randomChoi(din, dout, 2, g));
  const constraints: Constraint[] = [];
  for (const c of matrixCoordinates(n, true)) {
    const e = coordinateEntry(c.i, c.j, c.part);
    const terms: BlockTerm[] = [{ block: 0, entries: [e] }, { block: 2, entries: [e] }];
    if (c.i % dout === c.j % dout) {
      const s = coordinateEntry(Math.floor(c.i / dout), Math.floor(c.j / dout), c.part);
      const neg: Entry = s.length === 3 ? [s[0], s[1], -s[2]] : [s[0], s[1], -(s[2] as number), -(s[3] as number)];
      terms.push({ block: 1, entries: [neg] });
    }
    constraints.push({ terms, equals: 0 });
  }
  constraints.push({ terms: [{ block: 1, entries: Array.from({ length: din }, (_, i): Entry => [i, i, 1]) }], equals: 1 });
  return {
    cones: [{ kind: 'hermitian', size: n }, { kind: 'hermitian', size: din }, { kind: 'hermitian', size: n }],
    objective: [{ block: 0, matrix: toRows(scale(J, -1)) }],
    constraints,
  };
}

/** The shapes the one-shot quantities solve, by name (several seeds each). */
export function quantityShapes(): { shape: string; problem: SdpProblem }[] {
  const out: { shape: string; problem: SdpProblem }[] = [];
  for (const seed of [31, 32, 33]) out.push({ shape: 'hypothesis testing, d = 8', problem: hypothesisTestingShape(8, seed) });
  for (const seed of [31, 32, 33]) out.push({ shape: 'hypothesis testing, d = 16', problem: hypothesisTestingShape(16, seed) });
  for (const seed of [47, 48, 49]) out.push({ shape: 'guessing, 6 states, d = 4', problem: guessingShape(6, 4, seed) });
  for (const seed of [53, 54, 55]) out.push({ shape: 'diamond distance, qubit channels', problem: diamondShape(seed) });
  return out;
}

function cvxoptSolve(problems: SdpProblem[], repeats: number, tolerance?: number): { cvxopt: string; results: { optimal: number; seconds: number; iterations: number }[] } | null {
  const tol = tolerance === undefined ? [] : ['--timing-tolerance', String(tolerance)];
  const r = spawnSync(PYTHON, [script, '--solve-stdin', '--time', String(repeats), ...tol], {
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

/**
 * The shapes of the one-shot quantities (quantityShapes), ours against cvxopt at the same tolerance
 * (abstol = reltol = feastol = 1e-8, our gap and feasibility tolerances 1e-8). Per instance the
 * ratio of medians is taken in this run; the per-shape ratio is the median of those ratios. The
 * per-shape ms columns are medians over the shape's instances.
 */
function compareQuantityShapes(repeats: number): void {
  const cases = quantityShapes();
  const problems = cases.map((c) => c.problem);
  // Interleaved rounds (cvxopt on every case, then ours on every case) so that a change of machine
  // load between the two phases does not bias the ratio.
  const ours: number[][] = cases.map(() => []);
  const theirs: number[][] = cases.map(() => []);
  const last = cases.map((c) => {
    for (let w = 0; w < 3; w++) solveSdp(c.problem); // let the JIT settle
    return solveSdp(c.problem);
  });
  let ref: { cvxopt: string; results: { optimal: number; seconds: number; iterations: number }[] } | null = null;
  for (let r = 0; r < repeats; r++) {
    ref = cvxoptSolve(problems, 1, 1e-8);
    if (!ref) return;
    ref.results.forEach((t, i) => theirs[i].push(t.seconds * 1000));
    cases.forEach((c, i) => {
      const t0 = performance.now();
      last[i] = solveSdp(c.problem);
      ours[i].push(performance.now() - t0);
    });
  }
  console.log(`  one-shot quantity shapes, cvxopt ${ref!.cvxopt} at abstol = reltol = feastol = 1e-8 (time inside solvers.sdp only), ${repeats} interleaved rounds`);
  console.log('  shape'.padEnd(40) + 'ours ms'.padStart(10) + 'cvxopt ms'.padStart(11) + 'ratio'.padStart(8) + '  max rel diff' + '  iterations ours/cvxopt');
  const byShape = new Map<string, { ours: number[]; theirs: number[]; ratios: number[]; it: string[]; maxDiff: number }>();
  cases.forEach((c, i) => {
    const t = ref!.results[i];
    const o = last[i];
    const e = byShape.get(c.shape) ?? { ours: [], theirs: [], ratios: [], it: [], maxDiff: 0 };
    const a = median(ours[i]);
    const b = median(theirs[i]);
    e.ours.push(a);
    e.theirs.push(b);
    e.ratios.push(a / b);
    e.it.push(`${o.iterations}/${t.iterations}` + (o.status === 'optimal' ? '' : ` (${o.status})`));
    e.maxDiff = Math.max(e.maxDiff, Math.abs(o.primalObjective - t.optimal) / Math.max(1, Math.abs(t.optimal)));
    byShape.set(c.shape, e);
  });
  for (const [shape, e] of byShape) {
    console.log(
      `  ${shape}`.padEnd(40) + median(e.ours).toFixed(2).padStart(10) + median(e.theirs).toFixed(2).padStart(11) +
        median(e.ratios).toFixed(2).padStart(8) + `  ${e.maxDiff.toExponential(1)}`.padEnd(14) + '  ' + e.it.join(' '),
    );
  }
}

export default async function bench(argv: string[]): Promise<void> {
  const slow = argv.includes('--slow');
  const repeats = Number(argv.find((a) => a.startsWith('--repeats='))?.slice(10) ?? 5);

  console.log('SDP solver vs cvxopt.solvers.sdp (same machine, same run; OPENBLAS_NUM_THREADS=1), medians of ' + repeats);
  compareQuantityShapes(repeats);
  if (argv.includes('--quantities')) return;
  console.log('\nRandom feasible SDPs of scripts/reference/cvxopt_sdp.py (cvxopt at its 1e-10 → 1e-8 tolerance ladder)');
  const gen = spawnSync(PYTHON, [script, '--seed', '99', '--count', '18', '--time', String(repeats), '--out', '-'], {
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
