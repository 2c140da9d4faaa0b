/**
 * Sweep rates (issue 12, speed goals): points per second of `rhosigma sweep` with one and with two worker
 * threads on sandwiched Rényi divergences of random two-qubit states (Hilbert–Schmidt ρ and σ, α = 0.75 and 2),
 * beside numpy's rate for the same evaluations (the same ensembles and formula D̃_α = log Tr[(σ^{(1−α)/2α} ρ
 * σ^{(1−α)/2α})^α]/(α − 1) with numpy.linalg.eigh, OPENBLAS_NUM_THREADS=1, in its own process); then the same
 * sweep through rhosigma.sweep on a Dask LocalCluster (127.0.0.1) with one and with two worker processes.
 * Goals: two workers ≥ 1.8× one, our rate ≥ numpy's, Dask two workers ≥ 1.8× one. Rounds alternate; medians.
 *
 * Deliberately not a test: it asserts nothing. Needs the build (`npm run build`). Cost: about a minute
 * (`npm run bench -- sweep`; `--quick` for less).
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { median } from './timing.js';
import { runPython } from '../test/helpers/python.js';

const numpyScript = fileURLToPath(new URL('./sweep/numpy_rate.py', import.meta.url));
const daskScript = fileURLToPath(new URL('./sweep/dask_rate.py', import.meta.url));

export function rateSpec(samples: number, seed = 1) {
  return {
    sweep: 1,
    seed,
    samples,
    parameters: { alpha: { values: [0.75, 2] } },
    draws: {
      rho: { op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 2] },
      sigma: { op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 2] },
    },
    quantity: { op: 'divergence', family: 'sandwiched', alpha: { $: 'alpha' }, rho: { $: 'rho' }, sigma: { $: 'sigma' } },
  };
}

/**
 * The built sweep modules (dist/, `npm run build`): the command's code, whose worker threads start from
 * dist/sweep/worker.js. From source, each worker thread would compile the TypeScript again under tsx: not
 * the code users run, and a start-up (about a second of CPU per thread) that the long − short difference
 * must cancel.
 */
async function builtSweep(): Promise<{ readSpec: typeof import('../src/sweep/spec.js').readSpec; runSweep: typeof import('../src/sweep/runner.js').runSweep }> {
  const dist = new URL('../dist/sweep/', import.meta.url);
  if (!existsSync(new URL('runner.js', dist))) throw new Error('bench/sweep.ts measures the built command: run `npm run build` first.');
  const spec = (await import(new URL('spec.js', dist).href)) as typeof import('../src/sweep/spec.js');
  const runner = (await import(new URL('runner.js', dist).href)) as typeof import('../src/sweep/runner.js');
  return { readSpec: spec.readSpec, runSweep: runner.runSweep };
}

export default async function main(flags: string[]): Promise<void> {
  const { readSpec, runSweep } = await builtSweep();
  const quick = flags.includes('--quick');
  // Long enough that each worker thread reaches the optimised code of its own isolate well inside the short run
  // (a thread compiles on its own): at 4000 samples the marginal rate of two threads was still warm-up.
  const samples = quick ? 800 : 16000;
  const rounds = quick ? 1 : 3;
  const dir = mkdtempSync(join(tmpdir(), 'rhosigma-bench-sweep-'));
  const rates: Record<string, number[]> = { one: [], two: [], numpy: [] };
  // CPU time per point (µs) of the whole process (main thread, worker threads, V8's helper threads), from the
  // same long and short runs: evidence that does not depend on what else the shared machine runs.
  const cpu: Record<string, number[]> = { one: [], two: [] };
  const cpuNow = () => {
    const c = process.cpuUsage();
    return (c.user + c.system) / 1e6;
  };
  try {
    for (let r = 0; r < rounds; r++) {
      for (const [key, workers] of [['one', 1], ['two', 2]] as const) {
        // The marginal rate of a long and a short run: starting the worker threads cancels out.
        const c0 = cpuNow();
        const short = await runSweep(readSpec(rateSpec(samples / 4, 100 + r)), { output: join(dir, `${key}-${r}-short.jsonl`), workers });
        const c1 = cpuNow();
        const long = await runSweep(readSpec(rateSpec(samples, 200 + r)), { output: join(dir, `${key}-${r}-long.jsonl`), workers });
        const c2 = cpuNow();
        rates[key].push((long.points - short.points) / (long.seconds - short.seconds));
        cpu[key].push((((c2 - c1) - (c1 - c0)) / (long.points - short.points)) * 1e6);
      }
      const np = runPython<{ rate: number }>([numpyScript], { input: { samples, alphas: [0.75, 2] }, timeout: 600_000 });
      rates.numpy.push(np.rate);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  const m = Object.fromEntries(Object.entries(rates).map(([k, v]) => [k, median(v)]));
  const mc = Object.fromEntries(Object.entries(cpu).map(([k, v]) => [k, median(v)]));
  const n = 2 * samples;
  console.log(`sandwiched Rényi of random two-qubit states, up to ${n} points per run, ${rounds} rounds (medians, points/s):`);
  console.log(`  rhosigma sweep, 1 worker thread   ${m.one.toFixed(0).padStart(7)}`);
  console.log(`  rhosigma sweep, 2 worker threads  ${m.two.toFixed(0).padStart(7)}   ratio 2/1 = ${(m.two / m.one).toFixed(2)} (goal ≥ 1.8)`);
  console.log(`  numpy (one process, 1 thread)     ${m.numpy.toFixed(0).padStart(7)}   ours(2)/numpy = ${(m.two / m.numpy).toFixed(2)}, ours(1)/numpy = ${(m.one / m.numpy).toFixed(2)} (goal ≥ 1)`);
  console.log('  (marginal rates: a long run minus a short one, so starting the threads does not count; numpy excludes its import)');
  console.log(`  CPU time per point, whole process: 1 thread ${mc.one.toFixed(0)} µs, 2 threads ${mc.two.toFixed(0)} µs (ratio ${(mc.two / mc.one).toFixed(2)}; 1.00 = no parallel overhead), numpy ${(1e6 / m.numpy).toFixed(0)} µs wall (one thread)`);
  console.log(`  load average at the end: ${loadavg().map((x) => x.toFixed(2)).join(' ')} on ${cpus().length} cores`);
  const dask = runPython<{ one: number; two: number; points: number; cpuOne: number; cpuTwo: number }>([daskScript], { input: { spec: rateSpec(samples, 7) }, timeout: 900_000 });
  console.log(`rhosigma.sweep on a Dask LocalCluster, ${dask.points} points (engines warm):`);
  console.log(`  1 worker process   ${dask.one.toFixed(0).padStart(7)}`);
  console.log(`  2 worker processes ${dask.two.toFixed(0).padStart(7)}   ratio 2/1 = ${(dask.two / dask.one).toFixed(2)} (goal ≥ 1.8)`);
  console.log(`  engine CPU time per point: 1 worker ${dask.cpuOne.toFixed(0)} µs, 2 workers ${dask.cpuTwo.toFixed(0)} µs (ratio ${(dask.cpuTwo / dask.cpuOne).toFixed(2)})`);
  console.log(`  load average at the end: ${loadavg().map((x) => x.toFixed(2)).join(' ')}`);
}
