/**
 * Web worker entry for the real-browser test: the engine's plain-data door (`handle`, every op
 * registered) answering batches posted to it, so that compute stays off the page's main thread
 * (DESIGN.md). scripts/bundle-engine.mjs bundles this file for the browser.
 *
 * Message in: `{ batch: number, requests: unknown[] }`. Message out: `{ batch, answers, eigh }`, the
 * answers in request order and `eigh` the eigensolver's path as eighWasmStatus() reports it after the
 * batch (whether the WebAssembly SIMD kernels are in use, and if not, why).
 *
 * What it does not do: cancel a batch, report progress, or stand in for the production worker of the
 * widgets; it is the thinnest adapter over `handle` there can be. Cost: that of the requests.
 */
import { handleAsync } from '../../src/ops/index.js';
import { eighWasmStatus } from '../../src/linalg/eigh-wasm.js';

/** The parts of a dedicated worker's global scope used here (the project's TypeScript lib has no DOM types). */
interface WorkerScope {
  onmessage: ((event: { data: { batch: number; requests: unknown[] } }) => void | Promise<void>) | null;
  postMessage(message: unknown): void;
}

const scope = globalThis as unknown as WorkerScope;
scope.onmessage = async (event) => {
  const { batch, requests } = event.data;
  const answers = [];
  // handleAsync: in a browser the expression reader (mathjs) loads on first need, asynchronously.
  for (const r of requests) answers.push(await handleAsync(r));
  scope.postMessage({ batch, answers, eigh: eighWasmStatus() });
};
