/**
 * The worker-thread side of `rhosigma sweep --workers N`: reads the spec once, then answers batches of jobs
 * with their lines (src/sweep/jobs.ts). Messages in: {spec} then {batch, jobs}; out: {batch, results, ms}.
 * Deliberately not here: scheduling and writing (src/sweep/pool.ts, src/sweep/runner.ts).
 * Cost: one engine per thread (the op modules load once per thread).
 */
import { parentPort } from 'node:worker_threads';
import { runJob, type Job } from './jobs.js';
import { readSpec, type Spec } from './spec.js';

let spec: Spec | undefined;
parentPort!.on('message', (msg: { spec?: unknown; batch?: number; jobs?: Job[] }) => {
  if (msg.spec !== undefined) {
    spec = readSpec(msg.spec);
    return;
  }
  const t0 = performance.now();
  const results = msg.jobs!.map((job) => runJob(spec!, job));
  parentPort!.postMessage({ batch: msg.batch, results, ms: performance.now() - t0 });
});
