/**
 * Benchmark of the Hermitian eigensolver (src/linalg/eigh.ts) against numpy and JavaScript routes.
 *
 * Compares, for n = 64, 128, 256 on random complex Hermitian matrices (values and vectors):
 *  - numpy.linalg.eigh (LAPACK zheevd through OpenBLAS, single thread), measured in the same run by
 *    scripts/reference/numpy_eigh_bench.py under .venv/bin/python with OPENBLAS_NUM_THREADS=1;
 *  - ml-matrix EigenvalueDecomposition of the real symmetric embedding [[Re, -Im], [Im, Re]] (2n);
 *  - mathjs `eigs` on the same real embedding (its complex route is slower still: about 49 s for a
 *    single n = 64 call on the development machine). mathjs is timed at n = 64 only unless `--slow`
 *    is given; for larger n the n = 64 time is a lower bound, printed as "> ratio".
 * Medians of several repetitions after warm-up; the machine is shared, so only medians and ratios.
 *
 * Results on the development machine (2-core AMD EPYC shared by several developers, load average
 * 9–15 during the runs; Node 20; numpy 1.24.2 with OpenBLAS 0.3.21, kernel "Cooperlake" as reported
 * by openblas_get_corename — threadpoolctl is not installed). Two runs of `npm run bench -- eigh`,
 * values and vectors, median ms:
 *     n   rhosigma        numpy        ours/numpy   ml-matrix (2n)   ml/ours   mathjs (2n)
 *    64   3.1 | 6.4      0.65 | 0.63   4.7 | 10     97 | 95          32 | 15   3381 | 1810 (≥280×)
 *   128    28 | 38       11.6 | 7.3    2.4 | 5.2    510 | 600        18 | 16   (≥ the n = 64 time)
 *   256   249 | 237        60 | 61     4.2 | 3.9   4534 | 4870       18 | 21
 * On a quieter moment earlier the same day numpy took 0.5 / 2.7 / 19–24 ms and rhosigma's best CPU
 * times were about 1.5 / 10 / 70 ms, i.e. roughly 3×, 3.5×, 3–3.5× numpy. The 2× goal against
 * LAPACK is NOT reached; the ≥10× goal against ml-matrix and mathjs is. Where the time goes at
 * n = 256: ~1/3 Householder reduction (5.3 n³ flops), ~1/3 back-transformation (8 n³ flops), the
 * rest divide and conquer (mostly its matrix products); all scalar JavaScript at 2.5–4 GFlop/s,
 * against OpenBLAS's AVX-512 BLAS-3 kernels running the same flop count.
 *
 * With the WebAssembly SIMD kernels (src/linalg/wasm/): the module also times rhosigma's two paths,
 * SIMD on and off, with calls interleaved, in wall clock and in CPU time of the process (numpy's
 * CPU time likewise), because on the shared machine the wall-clock ratio to numpy, measured
 * minutes apart, swings by 2–3× with the load. Two runs of `npm run bench -- eigh`, load 6–9,
 * values and vectors, CPU-time medians in ms:
 *     n   SIMD        TypeScript   numpy        TS/SIMD      SIMD/numpy   TS/numpy
 *    64   1.34 | 1.12  2.30 | 2.01  0.46 | 0.65  1.71 | 1.80  2.93 | 1.71  5.03 | 3.07
 *   128   4.64 | 5.09  10.9 | 12.1  2.39 | 3.24  2.34 | 2.38  1.94 | 1.57  4.55 | 3.74
 *   256   42.7 | 36.4   113 | 75.0  17.3 | 22.1  2.64 | 2.06  2.48 | 1.64  6.53 | 3.39
 * Eigenvalues only, SIMD/numpy: 1.87 | 1.43, 1.91 | 1.14, 1.73 | 1.32. The SIMD path is a steady
 * 1.7–2.6× faster than the TypeScript one; against numpy it is at 1.6–1.9× in the quieter run and
 * 1.9–2.9× in the other, so the 2× goal is met only some of the time. What remains at n = 64 is
 * mostly the O(n²) TypeScript around the kernels (divide and conquer's secular equation and data
 * movement, the small QL blocks); at n = 256 the kernels themselves, which run near the peak of
 * 128-bit SIMD without fused multiply-add (WebAssembly has none outside relaxed SIMD).
 *
 * After moving that TypeScript into the kernels too (whole reduction loop, merge numerics and
 * products, copies; dlaed4's start for the secular equation; leaves of 12 rows): three runs of
 * `npm run bench -- eigh`, load 2.5–3.3, CPU-time medians in ms, SIMD | numpy, ratio SIMD/numpy:
 *     n   values and vectors                                   eigenvalues only (ratio)
 *    64   0.93|0.77 1.22   0.90|0.79 1.14   0.84|0.62 1.35    0.71   1.12   1.08
 *   128   4.84|3.15 1.54   5.20|2.53 2.06   5.15|3.26 1.58    1.13   1.36   1.29
 *   256   33.7|20.7 1.62   35.0|23.4 1.50   34.0|21.0 1.61    1.41   1.38   1.19
 * TS/SIMD 2.6–3.1×. The 2× goal holds in 8 of these 9 values-and-vectors measurements; the
 * exception (n = 128, 2.06) is a run where numpy's own median was 20% below its other two.
 * A fourth run minutes later (load 1.9), in which numpy hit its quiet-machine times (0.44, 2.39,
 * 17.6 ms) while ours stayed at 0.87, 4.87, 33.4 ms, gave 1.99, 2.04, 1.90 (values only 1.17,
 * 1.61, 1.52). In a separate loop harness on a quieter moment rhosigma took 0.49–0.55 ms at
 * n = 64 and 3.0–3.1 ms at 128, so much of the spread is the load during our part versus during
 * numpy's part of the run, which are timed minutes apart; alternating the two in rounds would
 * make the ratio steadier (not done yet).
 */
import { spawnSync } from 'node:child_process';
import { PYTHON } from '../test/helpers/python.js';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { create, all } from 'mathjs';
import { Matrix, EigenvalueDecomposition } from 'ml-matrix';
import { eigh } from '../src/linalg/eigh.js';
import { setEighWasmEnabled, eighWasmStatus } from '../src/linalg/eigh-wasm.js';
import type { CMatrix } from '../src/linalg/cmatrix.js';
import { randomHermitian, rng } from '../test/helpers/random.js';

const math = create(all);
const root = join(dirname(fileURLToPath(import.meta.url)), '..');

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** CPU time of this process in milliseconds (user + system). */
function cpuNow(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

/**
 * Median wall and CPU times in milliseconds of the two eigh paths (SIMD kernels on, off), calls
 * interleaved so that both see the same background load.
 */
function timePaths(fn: () => unknown, reps: number, warmup: number): Record<'simd' | 'ts', { wall: number; cpu: number }> {
  const t = { simd: { wall: [] as number[], cpu: [] as number[] }, ts: { wall: [] as number[], cpu: [] as number[] } };
  for (let i = 0; i < warmup + reps; i++) {
    for (const on of [true, false]) {
      setEighWasmEnabled(on);
      const w0 = performance.now();
      const c0 = cpuNow();
      fn();
      const c1 = cpuNow();
      const w1 = performance.now();
      if (i >= warmup) {
        const s = on ? t.simd : t.ts;
        s.wall.push(w1 - w0);
        s.cpu.push(c1 - c0);
      }
    }
  }
  setEighWasmEnabled(true);
  return {
    simd: { wall: median(t.simd.wall), cpu: median(t.simd.cpu) },
    ts: { wall: median(t.ts.wall), cpu: median(t.ts.cpu) },
  };
}

/** Median wall time in milliseconds of fn over reps calls, after warmup calls. */
function time(fn: () => unknown, reps: number, warmup: number): number {
  for (let i = 0; i < warmup; i++) fn();
  const ts: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t = performance.now();
    fn();
    ts.push(performance.now() - t);
  }
  return median(ts);
}

function embedding(h: CMatrix): number[][] {
  const n = h.rows;
  const m: number[][] = Array.from({ length: 2 * n }, () => new Array<number>(2 * n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const re = h.re[i * n + j];
      const im = h.im[i * n + j];
      m[i][j] = re;
      m[i + n][j + n] = re;
      m[i][j + n] = -im;
      m[i + n][j] = im;
    }
  }
  return m;
}

interface NumpyTimes {
  numpy: string;
  openblas: { threadpoolctl: unknown; corename: string | null; config: string | null };
  sizes: Record<string, { eigh: number; eigvalsh: number; eigh_cpu?: number; eigvalsh_cpu?: number }>;
}

function runNumpy(sizes: number[]): NumpyTimes | string {
  const env: NodeJS.ProcessEnv = { ...process.env, OPENBLAS_NUM_THREADS: '1' };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const r = spawnSync(PYTHON, [join(root, 'scripts/reference/numpy_eigh_bench.py'), ...sizes.map(String)], {
    env,
    encoding: 'utf8',
  });
  if (r.status !== 0) return `numpy reference failed: ${r.error?.message ?? r.stderr}`;
  return JSON.parse(r.stdout) as NumpyTimes;
}

const fmt = (ms: number): string => (ms >= 100 ? ms.toFixed(0) : ms >= 10 ? ms.toFixed(1) : ms.toFixed(2));
const ratio = (a: number, b: number): string => (a / b).toFixed(2);

export default async function benchEigh(flags: string[] = []): Promise<void> {
  const slow = flags.includes('--slow');
  const sizes = [64, 128, 256];
  const reps: Record<number, number> = { 64: 31, 128: 15, 256: 9 };
  const mats = new Map(sizes.map((n) => [n, randomHermitian(n, rng(1000 + n))]));

  // Warm the JIT on small problems first.
  for (let i = 0; i < 20; i++) eigh(randomHermitian(24, rng(i)));

  const ours = new Map<number, { eigh: number; eigvalsh: number }>();
  const paths = new Map<number, { eigh: ReturnType<typeof timePaths>; eigvalsh: ReturnType<typeof timePaths> }>();
  for (const n of sizes) {
    const h = mats.get(n)!;
    const p = { eigh: timePaths(() => eigh(h), reps[n], 3), eigvalsh: timePaths(() => eigh(h, { vectors: false }), reps[n], 3) };
    paths.set(n, p);
    // The default path (SIMD kernels where available) for the comparison with the JS libraries.
    const def = eighWasmStatus().active ? 'simd' : 'ts';
    ours.set(n, { eigh: p.eigh[def].wall, eigvalsh: p.eigvalsh[def].wall });
  }

  const np = runNumpy(sizes);

  const ml = new Map<number, number>();
  for (const n of sizes) {
    const a = new Matrix(embedding(mats.get(n)!));
    ml.set(n, time(() => new EigenvalueDecomposition(a, { assumeSymmetric: true }), n === 256 ? 3 : 5, 1));
  }

  const mj = new Map<number, number>();
  for (const n of slow ? sizes : [64]) {
    const a = embedding(mats.get(n)!);
    math.eigs(embedding(randomHermitian(8, rng(7))));
    mj.set(n, time(() => math.eigs(a), n === 64 ? 3 : 1, 0));
  }

  if (typeof np === 'string') console.log(np);
  else {
    const tp = np.openblas.threadpoolctl;
    console.log(
      `numpy ${np.numpy}; OpenBLAS kernel: ${typeof tp === 'object' && tp !== null ? JSON.stringify(tp) : `threadpoolctl ${String(tp)}`}` +
        `; openblas_get_corename: ${np.openblas.corename ?? 'n/a'} (${np.openblas.config ?? ''})`,
    );
  }
  console.log('eigh, values and vectors: median ms and ratios (>1 means rhosigma is slower than the reference)');
  console.log('   n  rhosigma     numpy  ours/numpy   ml-matrix  ml/ours      mathjs  mathjs/ours');
  for (const n of sizes) {
    const o = ours.get(n)!.eigh;
    const npT = typeof np === 'string' ? NaN : np.sizes[String(n)].eigh * 1000;
    const mlT = ml.get(n)!;
    const mjT = mj.get(n) ?? mj.get(64)!;
    const mjExact = mj.has(n);
    console.log(
      `${String(n).padStart(4)} ${fmt(o).padStart(9)} ${fmt(npT).padStart(9)} ${ratio(o, npT).padStart(11)} ` +
        `${fmt(mlT).padStart(11)} ${ratio(mlT, o).padStart(8)} ${(mjExact ? fmt(mjT) : `>${fmt(mjT)}`).padStart(11)} ` +
        `${((mjExact ? '' : '>') + ratio(mjT, o)).padStart(12)}`,
    );
  }
  console.log('eigenvalues only: median ms');
  console.log('   n  rhosigma     numpy  ours/numpy');
  for (const n of sizes) {
    const o = ours.get(n)!.eigvalsh;
    const npT = typeof np === 'string' ? NaN : np.sizes[String(n)].eigvalsh * 1000;
    console.log(`${String(n).padStart(4)} ${fmt(o).padStart(9)} ${fmt(npT).padStart(9)} ${ratio(o, npT).padStart(11)}`);
  }
  const st = eighWasmStatus();
  console.log(`\nrhosigma's two paths, calls interleaved: WebAssembly SIMD kernels (${st.active ? 'available' : `unavailable: ${st.reason}`}) and pure TypeScript;`);
  console.log('median ms, wall clock and CPU time of the process (CPU time is less disturbed by other load on a shared machine)');
  for (const kind of ['eigh', 'eigvalsh'] as const) {
    console.log(kind === 'eigh' ? 'values and vectors:' : 'eigenvalues only:');
    console.log('   n   simd wall    ts wall  numpy wall   simd cpu     ts cpu  numpy cpu  ts/simd(cpu)  simd/numpy(cpu)  ts/numpy(cpu)');
    for (const n of sizes) {
      const p = paths.get(n)![kind];
      const ref = typeof np === 'string' ? undefined : np.sizes[String(n)];
      const npWall = ref ? ref[kind] * 1000 : NaN;
      const npCpu = ref?.[`${kind}_cpu`] !== undefined ? ref[`${kind}_cpu`]! * 1000 : NaN;
      console.log(
        `${String(n).padStart(4)} ${fmt(p.simd.wall).padStart(11)} ${fmt(p.ts.wall).padStart(10)} ${fmt(npWall).padStart(11)} ` +
          `${fmt(p.simd.cpu).padStart(10)} ${fmt(p.ts.cpu).padStart(10)} ${fmt(npCpu).padStart(10)} ` +
          `${ratio(p.ts.cpu, p.simd.cpu).padStart(13)} ${ratio(p.simd.cpu, npCpu).padStart(16)} ${ratio(p.ts.cpu, npCpu).padStart(14)}`,
      );
    }
  }
}
