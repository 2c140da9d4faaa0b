/**
 * Running sweep jobs in order: in the calling thread (`workers: 0`) or on N worker threads, handing each
 * finished result to `consume` strictly in job order, so what is written never depends on the number of
 * workers or on which finished first. `consume` returning false stops the run (first violation); jobs
 * already running are finished and their results dropped.
 *
 * Batches: each worker has at most two batches in flight; a batch holds as many jobs as take about 20 ms
 * (from the measured time per job), so messages cost little next to the work. At most `lookahead` jobs are
 * dispatched beyond the first unconsumed one, which bounds memory when one job is slow.
 *
 * Deliberately not here: what a job computes (src/sweep/jobs.ts), files (src/sweep/runner.ts).
 * Cost: one structured-clone message per batch each way.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Worker as ThreadWorker } from 'node:worker_threads';
import { runJob, type Job, type JobResult } from './jobs.js';
import type { Spec } from './spec.js';

export interface PoolOptions {
  workers: number;
  /** Checked between results: true stops dispatching (Ctrl-C); what is in flight is still consumed in order. */
  stopping?: () => boolean;
  lookahead?: number;
}

/**
 * A worker thread running worker.js next to this module; from source (tests, under tsx) worker.ts, loaded
 * after registering tsx in the thread (module hooks of the main thread do not reach workers in Node 20);
 * from the command's one-file bundle (dist/cli/bundle.cjs), the compiled dist/sweep/worker.js.
 * The paths are built at run time so that bundlers leave them alone (webpack 5 mis-rewrites
 * `new Worker(new URL(...))` for Node targets); where no worker file exists (a copy of the bundle without
 * dist/sweep/), undefined: the caller then runs the jobs in its own thread. The Python wheel's engine has one.
 */
function workerStarter(): (() => ThreadWorker) | undefined {
  const here = import.meta.url;
  if (here.endsWith('.ts')) {
    const url = here.replace(/pool\.ts$/, 'worker.ts');
    const tsx = import.meta.resolve(['tsx', 'esm', 'api'].join('/'));
    const code = `import(${JSON.stringify(tsx)}).then((m) => { m.register(); return import(${JSON.stringify(url)}); });`;
    return () => new ThreadWorker(code, { eval: true });
  }
  const file = sweepWorkerFile(here);
  if (!file) return undefined;
  return () => new ThreadWorker(file);
}

/**
 * The compiled worker module for a pool module at `moduleUrl`: worker.js beside it (dist/sweep/pool.js), or,
 * from the command's one-file bundle (dist/cli/bundle.cjs), dist/sweep/worker.js beside the bundle's folder;
 * undefined when neither exists.
 */
export function sweepWorkerFile(moduleUrl: string): string | undefined {
  if (!moduleUrl.startsWith('file:')) return undefined;
  const candidates = [moduleUrl.replace(/pool\.js$/, ['worker', 'js'].join('.')), new URL(['..', 'sweep', 'worker.js'].join('/'), moduleUrl).href];
  return candidates.map((u) => fileURLToPath(u)).find((f) => f.endsWith('worker.js') && existsSync(f));
}

/** Runs jobs 0..count−1 (`jobAt` builds each) and hands the results to `consume` in order. */
export async function runInOrder(
  spec: Spec,
  count: number,
  jobAt: (position: number) => Job,
  consume: (result: JobResult, position: number) => boolean,
  options: PoolOptions,
): Promise<{ consumed: number; stopped: boolean }> {
  const start = options.workers > 0 ? workerStarter() : undefined;
  if (!start) {
    let position = 0;
    let last = performance.now();
    for (; position < count; position++) {
      if (options.stopping?.()) return { consumed: position, stopped: true };
      if (!consume(runJob(spec, jobAt(position)), position)) return { consumed: position + 1, stopped: true };
      // Let signals and timers run now and then.
      if (performance.now() - last > 50) {
        await new Promise((r) => setImmediate(r));
        last = performance.now();
      }
    }
    return { consumed: count, stopped: false };
  }
  const lookahead = options.lookahead ?? 10000;
  const workers = Array.from({ length: options.workers }, () => {
    const w = start();
    w.postMessage({ spec: spec.source });
    return w;
  });
  const results = new Map<number, JobResult>();
  let next = 0; // next position to dispatch
  let consumed = 0; // next position to consume
  let msPerJob = 5;
  let batchId = 0;
  let stop = false;
  const inflight = new Map<ThreadWorker, number>();
  const batches = new Map<number, number[]>();
  try {
    await new Promise<void>((resolve, reject) => {
      const dispatch = (w: ThreadWorker) => {
        while (!stop && (inflight.get(w) ?? 0) < 2 && next < count && next < consumed + lookahead) {
          const size = Math.max(1, Math.min(256, Math.round(20 / msPerJob), count - next, consumed + lookahead - next));
          const positions = Array.from({ length: size }, (_, k) => next + k);
          next += size;
          const id = batchId++;
          batches.set(id, positions);
          inflight.set(w, (inflight.get(w) ?? 0) + 1);
          w.postMessage({ batch: id, jobs: positions.map(jobAt) });
        }
      };
      const finishIfDone = () => {
        const busy = [...inflight.values()].some((n) => n > 0);
        if ((stop || consumed >= count) && !busy) resolve();
      };
      for (const w of workers) {
        w.on('message', (msg: { batch: number; results: JobResult[]; ms: number }) => {
          inflight.set(w, (inflight.get(w) ?? 1) - 1);
          const positions = batches.get(msg.batch)!;
          batches.delete(msg.batch);
          msPerJob = 0.8 * msPerJob + 0.2 * Math.max(0.01, msg.ms / positions.length);
          if (!stop) {
            positions.forEach((p, k) => results.set(p, msg.results[k]));
            while (!stop && results.has(consumed)) {
              const r = results.get(consumed)!;
              results.delete(consumed);
              if (!consume(r, consumed)) stop = true;
              consumed++;
            }
            if (options.stopping?.()) stop = true;
          }
          for (const other of workers) dispatch(other);
          finishIfDone();
        });
        w.on('error', (err) => {
          stop = true;
          reject(err);
        });
      }
      for (const w of workers) dispatch(w);
      finishIfDone();
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return { consumed, stopped: stop && consumed < count ? true : stop };
}
