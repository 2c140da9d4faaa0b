/**
 * Benchmark of start-up and transport through the `rhosigma` command (issue 6 §3), every figure against
 * its reference measured in the same run, in alternating rounds:
 *
 *  - start-up: a one-line request (`spectrum` of a 2 × 2 matrix) through `node bin/rhosigma.js compute
 *    FILE` from a cold process, against a bare `node -e 0`; goal ≤ 2×. The same through the Python wheel's
 *    engine (scripts/bundle-cli.mjs bundleWheelEngine, built into a temporary folder outside the checkout,
 *    its code cache written by a first run).
 *  - transport: `spectrum` at n = 256, values only, per matrix in a batch through `compute --lines`,
 *    transport included (JSON text in, parsing, checks, the eigensolver, the answer out): the batch of K
 *    matrices minus a batch of one, divided by K − 1 (so start-up cancels), in the packed form and with
 *    {"re", "im"} rows; against numpy.linalg.eigvalsh of a random complex Hermitian 256 × 256 matrix
 *    (LAPACK through OpenBLAS, OPENBLAS_NUM_THREADS=1 set in its own process: scripts/reference/
 *    numpy_eigh_bench.py). Goals ≤ 2× packed, ≤ 3× rows.
 *
 * Needs the build (`npm run build`: bin/rhosigma.js runs dist/cli/bundle.cjs with its code cache) and .venv (numpy).
 * The rows are also timed (CPU only) with the reader of matrices from bytes switched off
 * (RHOSIGMA_LIFT_MATRICES=0, src/ops/json-matrices.ts), the ordinary path of JSON.parse and the size walk.
 * Also in CPU time (user + system of the command, read by .venv's Python as its child's rusage, against
 * numpy's process time), which other load on a shared machine disturbs much less than wall time.
 * Prints medians and ratios only; asserts nothing (not a test). Cost: about a minute and three quarters.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { median } from './timing.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const PYTHON = join(root, '.venv/bin/python');
const BIN = join(root, 'bin/rhosigma.js');
const N = 256;
const K = 13;

/** Wall-clock milliseconds of one run of a command (its whole process). */
function wall(cmd: string, args: string[], env?: NodeJS.ProcessEnv): number {
  const t0 = performance.now();
  const r = spawnSync(cmd, args, { encoding: 'utf8', env: env ?? process.env, maxBuffer: 1 << 28 });
  const ms = performance.now() - t0;
  if (r.status !== 0 && r.status !== 1) throw new Error(`${cmd} ${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  return ms;
}

/** A deterministic random complex Hermitian n × n matrix (row-major re, im). */
function hermitian(n: number, seed: number): { re: Float64Array; im: Float64Array } {
  let s = seed >>> 0;
  const rand = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32) - 0.5;
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const a = rand();
      const b = i === j ? 0 : rand();
      re[i * n + j] = a;
      re[j * n + i] = a;
      im[i * n + j] = b;
      im[j * n + i] = -b;
    }
  }
  return { re, im };
}

function packedForm(m: { re: Float64Array; im: Float64Array }, n: number) {
  const b64 = (a: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('base64');
  return { shape: [n, n], packed: 'float64-le', re: b64(m.re), im: b64(m.im) };
}

function rowsForm(m: { re: Float64Array; im: Float64Array }, n: number) {
  const rows = (a: Float64Array) => Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, (i + 1) * n)));
  return { re: rows(m.re), im: rows(m.im) };
}

/**
 * CPU milliseconds (user + system) of one run of a command, measured by .venv's Python as the rusage
 * of its child: much less disturbed than wall time by other load on a shared machine.
 */
function cpu(cmd: string, args: string[], env?: NodeJS.ProcessEnv): number {
  const code = 'import resource, subprocess, sys\nsubprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL)\nr = resource.getrusage(resource.RUSAGE_CHILDREN)\nprint(r.ru_utime + r.ru_stime)';
  const r = spawnSync(PYTHON, ['-c', code, cmd, ...args], { encoding: 'utf8', maxBuffer: 1 << 20, env: env ?? process.env });
  if (r.status !== 0) throw new Error(`cpu(${cmd}) failed: ${r.stderr}`);
  return 1000 * Number(r.stdout.trim());
}

/** numpy.linalg.eigvalsh at n = N: wall-clock and CPU milliseconds (medians of its own repetitions). */
function numpyEigvalshTimes(): { wall: number; cpu: number } {
  const env: NodeJS.ProcessEnv = { ...process.env, OPENBLAS_NUM_THREADS: '1' };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const r = spawnSync(PYTHON, [join(root, 'scripts/reference/numpy_eigh_bench.py'), String(N), '--reps', '15'], { encoding: 'utf8', env });
  if (r.status !== 0) throw new Error(`numpy_eigh_bench.py failed: ${r.stderr}`);
  const t = (JSON.parse(r.stdout) as { sizes: Record<string, { eigvalsh: number; eigvalsh_cpu: number }> }).sizes[String(N)];
  return { wall: 1000 * t.eigvalsh, cpu: 1000 * t.eigvalsh_cpu };
}

export default async function transport(): Promise<void> {
  if (!existsSync(join(root, 'dist/cli/bundle.cjs'))) throw new Error('bench/transport.ts needs `npm run build` first');
  if (!existsSync(PYTHON)) throw new Error('bench/transport.ts needs .venv (bash scripts/setup.sh)');
  const dir = mkdtempSync(join(tmpdir(), 'rhosigma-transport-'));
  const one = join(dir, 'one.json');
  writeFileSync(one, JSON.stringify({ op: 'spectrum', matrix: [[2, 1], [1, 2]] }));
  const matrices = Array.from({ length: K }, (_, k) => hermitian(N, 1000 + k));
  const files: Record<'packed' | 'rows', { batch: string; single: string }> = { packed: { batch: '', single: '' }, rows: { batch: '', single: '' } };
  for (const form of ['packed', 'rows'] as const) {
    const lines = matrices.map((m) => JSON.stringify({ op: 'spectrum', matrix: form === 'packed' ? packedForm(m, N) : rowsForm(m, N) }));
    files[form].batch = join(dir, `${form}-batch.jsonl`);
    files[form].single = join(dir, `${form}-single.jsonl`);
    writeFileSync(files[form].batch, `${lines.join('\n')}\n`);
    writeFileSync(files[form].single, `${lines[0]}\n`);
  }

  const rounds = 5;
  const start: number[] = [];
  const bare: number[] = [];
  const perMatrix: Record<'packed' | 'rows', number[]> = { packed: [], rows: [] };
  const numpy: number[] = [];
  const numpyCpu: number[] = [];
  const cpuPerMatrix: Record<'packed' | 'rows', number[]> = { packed: [], rows: [] };
  const ratios = { start: [] as number[], packed: [] as number[], rows: [] as number[] };
  const cpuRatios = { packed: [] as number[], rows: [] as number[] };
  const { bundleWheelEngine } = (await import(new URL('../scripts/bundle-cli.mjs', import.meta.url).href)) as { bundleWheelEngine(dir: string): Promise<void> };
  await bundleWheelEngine(join(dir, '_bundle'));
  const WHEEL = join(dir, '_bundle/bin/rhosigma.js');
  const wheel: number[] = [];
  const wheelRatios: number[] = [];
  const cpuRowsOff: number[] = [];
  const cpuRatiosRowsOff: number[] = [];
  wall('node', [BIN, 'compute', one]); // fills the file cache
  wall('node', [WHEEL, 'compute', one]); // writes the wheel engine's code cache
  for (let r = 0; r < rounds; r++) {
    // Start-up: pairs of (bare node, our command), alternating, medians of the pairs.
    const b: number[] = [];
    const s: number[] = [];
    const w: number[] = [];
    for (let k = 0; k < 5; k++) {
      b.push(wall('node', ['-e', '0']));
      s.push(wall('node', [BIN, 'compute', one]));
      w.push(wall('node', [WHEEL, 'compute', one]));
    }
    bare.push(median(b));
    start.push(median(s));
    ratios.start.push(median(s) / median(b));
    wheel.push(median(w));
    wheelRatios.push(median(w) / median(b));
    const { wall: np, cpu: npCpu } = numpyEigvalshTimes();
    numpy.push(np);
    numpyCpu.push(npCpu);
    for (const form of ['packed', 'rows'] as const) {
      const batch = wall('node', [BIN, 'compute', '--lines', files[form].batch]);
      const single = wall('node', [BIN, 'compute', '--lines', files[form].single]);
      const per = (batch - single) / (K - 1);
      perMatrix[form].push(per);
      ratios[form].push(per / np);
      const perCpu = (cpu('node', [BIN, 'compute', '--lines', files[form].batch]) - cpu('node', [BIN, 'compute', '--lines', files[form].single])) / (K - 1);
      cpuPerMatrix[form].push(perCpu);
      cpuRatios[form].push(perCpu / npCpu);
    }
    // Rows again with the reader of matrices from bytes switched off (src/ops/json-matrices.ts): what it saves.
    const off = { ...process.env, RHOSIGMA_LIFT_MATRICES: '0' };
    const offCpu = (cpu('node', [BIN, 'compute', '--lines', files.rows.batch], off) - cpu('node', [BIN, 'compute', '--lines', files.rows.single], off)) / (K - 1);
    cpuRowsOff.push(offCpu);
    cpuRatiosRowsOff.push(offCpu / npCpu);
  }
  const f = (x: number) => x.toFixed(1);
  const g = (x: number) => x.toFixed(2);
  console.log(`Start-up (median of ${rounds} rounds, 5 pairs each), ms:`);
  console.log(`  node -e 0 ${f(median(bare))}   rhosigma compute (one request) ${f(median(start))}   ratio ${g(median(ratios.start))} (goal ≤ 2)`);
  console.log(`  the Python wheel's engine (one request) ${f(median(wheel))}   ratio ${g(median(wheelRatios))} (goal ≤ 2; per round ${wheelRatios.map(g).join(' ')})`);
  console.log(`spectrum n = ${N}, values only, per matrix in a batch of ${K} through compute --lines, ms (median of ${rounds} rounds):`);
  console.log(`  numpy.linalg.eigvalsh (1 thread) ${f(median(numpy))}`);
  console.log(`  packed          ${f(median(perMatrix.packed))}   ratio ${g(median(ratios.packed))} (goal ≤ 2)`);
  console.log(`  {re, im} rows   ${f(median(perMatrix.rows))}   ratio ${g(median(ratios.rows))} (goal ≤ 3)`);
  console.log(`  per-round ratios: start ${ratios.start.map(g).join(' ')}; packed ${ratios.packed.map(g).join(' ')}; rows ${ratios.rows.map(g).join(' ')}`);
  console.log('The same in CPU time (user + system of the command per matrix; numpy\'s process time), less disturbed by other load:');
  console.log(`  numpy ${f(median(numpyCpu))}   packed ${f(median(cpuPerMatrix.packed))} ratio ${g(median(cpuRatios.packed))}   rows ${f(median(cpuPerMatrix.rows))} ratio ${g(median(cpuRatios.rows))}`);
  console.log(`  per-round CPU ratios: packed ${cpuRatios.packed.map(g).join(' ')}; rows ${cpuRatios.rows.map(g).join(' ')}`);
  console.log(`  rows with the reader of matrices from bytes off (RHOSIGMA_LIFT_MATRICES=0): ${f(median(cpuRowsOff))} ratio ${g(median(cpuRatiosRowsOff))}`);
}
