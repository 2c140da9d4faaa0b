/**
 * Benchmark of the guessing probability and the diamond distance (not a test; asserts nothing).
 *
 * 1. p_guess(X|B) for 6 random states at d = 4 (equal priors).
 * 2. ½‖N − M‖_⋄ of two random qubit channels (amplitude damping against a random unitary mixed
 *    with dephasing, given by Kraus operators).
 *
 * Ours: performance.now() around the whole function (building the SDP, solving it, rebuilding the
 * dual and the bounds), after one warm-up call. cvxopt: scripts/reference/cvxopt_guessing.py
 * --solve-stdin --time R --tolerance 1e-8, which times only the call to cvxopt.solvers.sdp on the
 * dual problem it builds with numpy (building excluded), with abstol = reltol = feastol = 1e-8 to
 * match our solver's default gap and feasibility tolerances (and no loosening retries, which would
 * count a failed attempt), through /usr/bin/python3 with OPENBLAS_NUM_THREADS=1, in the same run. Medians of R repeats, their ratio, and the agreement of the values are printed. The
 * goal set for this code is at most half of cvxopt's time.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { adjoint, mul, scale, toRows, zeros, type CMatrix } from '../src/linalg/index.js';
import { amplitudeDamping } from '../src/quantum/presets.js';
import type { Channel } from '../src/quantum/types.js';
import { guessingProbability } from '../src/oneshot/guessing.js';
import { diamondDistance } from '../src/oneshot/diamond.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_guessing.py`;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

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

function time(fn: () => unknown, repeats: number): number {
  fn();
  const ts: number[] = [];
  for (let k = 0; k < repeats; k++) {
    const t0 = performance.now();
    fn();
    ts.push(performance.now() - t0);
  }
  return median(ts);
}

export default async function bench(argv: string[]): Promise<void> {
  const repeats = argv.includes('--slow') ? 21 : 7;
  const r = lcg(20240607);
  const states = Array.from({ length: 6 }, () => randomState(4, r));
  const probs = states.map(() => 1 / 6);
  // Qubit channels: amplitude damping γ = 0.3 against a rotation by 0.4 rad about y mixed with dephasing.
  const a = amplitudeDamping(0.3);
  const c = Math.cos(0.2);
  const s = Math.sin(0.2);
  const rot = { rows: 2, cols: 2, re: new Float64Array([c, -s, s, c]), im: new Float64Array(4) };
  const z = { rows: 2, cols: 2, re: new Float64Array([1, 0, 0, -1]), im: new Float64Array(4) };
  const b: Channel = { kraus: [scale(rot, Math.sqrt(0.8)), scale(mul(z, rot), Math.sqrt(0.2))], inputDims: [2], outputDims: [2] };

  const oursGuess = time(() => guessingProbability(probs, states), repeats);
  const g = guessingProbability(probs, states);
  const oursDiamond = time(() => diamondDistance(a, b), repeats);
  const d = diamondDistance(a, b);

  console.log(`guessing probability (6 states, d = 4) and diamond distance (qubit channels): ours vs cvxopt.solvers.sdp, medians of ${repeats}`);
  const plain = (ch: Channel) => ({ kraus: ch.kraus.map(toRows), inputDims: ch.inputDims, outputDims: ch.outputDims });
  const run = spawnSync('/usr/bin/python3', [script, '--solve-stdin', '--time', String(repeats), '--tolerance', '1e-8'], {
    input: JSON.stringify({ guessing: [{ probabilities: probs, states: states.map(toRows) }], diamond: [{ a: plain(a), b: plain(b) }] }),
    encoding: 'utf8',
    env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    maxBuffer: 1 << 26,
  });
  const header = '  problem'.padEnd(34) + 'ours ms'.padStart(10) + 'cvxopt ms'.padStart(11) + 'ratio'.padStart(8) + '  iterations (ours/cvxopt)  |Δvalue|';
  if (run.status !== 0) {
    console.log(`  cvxopt unavailable (${run.error?.message ?? run.stderr.split('\n').slice(-2).join(' ')}); ours only`);
    console.log(`  guessing: ${oursGuess.toFixed(2)} ms (${g.certificate.iterations} iterations); diamond: ${oursDiamond.toFixed(2)} ms (${d.certificate.iterations} iterations)`);
    return;
  }
  const ref = JSON.parse(run.stdout) as {
    cvxopt: string;
    guessing: { value: number; seconds: number; iterations: number }[];
    diamond: { value: number; seconds: number; iterations: number }[];
  };
  console.log(`  cvxopt ${ref.cvxopt}`);
  console.log(header);
  const row = (name: string, ours: number, theirs: { value: number; seconds: number; iterations: number }, oursIt: number, value: number) => {
    const t = theirs.seconds * 1000;
    console.log(
      `  ${name}`.padEnd(34) + ours.toFixed(2).padStart(10) + t.toFixed(2).padStart(11) + (ours / t).toFixed(2).padStart(8) +
        `  ${String(oursIt).padStart(4)} / ${String(theirs.iterations).padEnd(19)}` + Math.abs(value - theirs.value).toExponential(1),
    );
  };
  row('p_guess, 6 states, d = 4', oursGuess, ref.guessing[0], g.certificate.iterations, g.value);
  row('½‖N − M‖_⋄, qubit channels', oursDiamond, ref.diamond[0], d.certificate.iterations, d.value);
  console.log('  (goal: ratio ≤ 0.5; ours includes building the SDP and the post-processing, cvxopt only its solve)');
}
