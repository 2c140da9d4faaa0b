/**
 * The engine in a web worker (docs/surfaces.md): the ops layer's `handle` answering protocol requests
 * through comlink, one at a time, so that compute never runs on the page's main thread. Long solves
 * report progress (src/deadline.ts `withProgress`: the SDP solver's iterations, the measured divergence's
 * ascent, ...) to the callback the client passes as a comlink proxy. While idle the worker warms the
 * solver's hot paths (src/ops/warm-up.ts), one small step per macrotask, pausing while a request runs.
 *
 * The op `sweep-points` (src/sweep/op.ts) is loaded on its first request, as a chunk of its own.
 *
 * Deliberately not here: queueing, latest-wins and cancellation (client.ts: cancelling a running
 * request means terminating this worker, since `handle` is synchronous). Cost: that of the requests,
 * plus a few seconds of warm-up spread over idle time after start.
 */
import { expose } from 'comlink';
import { handle, mayNeedExpressions } from '../ops/handle.js';
import '../ops/all.js';
import { getOp } from '../ops/registry.js';
import { expressionReaderLoaded, loadExpressionReader } from '../ops/expressions.js';
import { warmUp } from '../ops/warm-up.js';
import { withProgress, type Progress } from '../deadline.js';
import { eighWasmStatus } from '../linalg/eigh-wasm.js';
import type { Answer, WorkerApi } from './types.js';

let busy = 0;

/**
 * Whether the idle warm-up loads the expression reader (mathjs). A build may set it with webpack's
 * DefinePlugin: the wiki embed sets false, since there mathjs is a chunk fetched over the network on first
 * need (webpack.embed.config.cjs); unset (the browser worker, the labextension), it is true.
 */
declare const __RHOSIGMA_WARM_EXPRESSIONS__: boolean | undefined;
const warmExpressions = typeof __RHOSIGMA_WARM_EXPRESSIONS__ === 'boolean' ? __RHOSIGMA_WARM_EXPRESSIONS__ : true;

/** One request: the expression reader or the sweep module loaded first when it needs them, then handle(). */
async function answer(request: unknown, onProgress?: (p: Progress) => void): Promise<Answer> {
  busy++;
  try {
    if (!expressionReaderLoaded() && mayNeedExpressions(request)) {
      try {
        await loadExpressionReader();
      } catch {
        // handle() answers with the reader's own error for the expression that needs it.
      }
    }
    if ((request as { op?: unknown } | null)?.op === 'sweep-points' && !getOp('sweep-points')) {
      const failed = await loadSweeps();
      if (failed) return { ok: false, op: 'sweep-points', error: { code: 'internal-error', message: `The sweep module could not be loaded in the engine worker: ${failed}` } } as Answer;
    }
    // The progress callback is a comlink proxy: calling it posts a message at once, even mid-solve.
    return withProgress(onProgress ? (p) => void onProgress(p) : undefined, () => handle(request));
  } finally {
    busy--;
  }
}

const api: WorkerApi = {
  compute: answer,
  async computeMany(requests: unknown[]): Promise<Answer[]> {
    const out: Answer[] = [];
    for (const request of requests) out.push(await answer(request));
    return out;
  },
  async ready() {
    return { eigh: eighWasmStatus() };
  },
};

/**
 * The sweep layer (src/sweep, with the op `sweep-points` that the sweep widget asks for chunks of points)
 * in a chunk of its own, loaded on the first sweep request: pages that never sweep (the wiki embed) never
 * load it ("lazy" also where a build makes dynamic imports eager, as the embed's does). Resolves with the reason when it cannot load (the request is then answered internal-error).
 */
async function loadSweeps(): Promise<string | undefined> {
  try {
    await import(/* webpackChunkName: "rhosigma-sweeps", webpackMode: "lazy" */ '../sweep/op.js');
    return undefined;
  } catch (e) {
    return e instanceof Error ? e.message : String(e);
  }
}

expose(api);

// Warm up once the page has had time to send its first requests (those go first: warming waits while busy).
setTimeout(() => {
  void warmUp({ busy: () => busy > 0, rounds: 2, expressions: warmExpressions });
}, 200);
