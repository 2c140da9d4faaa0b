/**
 * `EngineClient`: the page's side of the engine worker (docs/surfaces.md, "The engine client"). It
 * implements `EngineLike`: `compute(request, { onProgress, signal, key })` resolves with the protocol
 * answer, never rejects. One client per page, shared by every component on it.
 *
 * Two lanes, each a worker of its own with its own queue: requests asked with `long: true` (SDPs,
 * optimisations, re-checks of certificates) go to the long lane, whose worker starts on the first of them;
 * everything else to the quick lane. So a calculator's small requests after an edit are not held behind a
 * solve another component started (the page's two cores run both), and stopping a solve restarts only the
 * long lane. Within a lane, requests go to its worker in order, one at a time or, when several small ones
 * wait (an edit's divergences, a curve's points), as one batch in one message (see Lane.pump), so that
 * the client keeps its own queue:
 *  - `key`: latest wins. A queued request with the same key as a newer one is dropped and answered
 *    {ok:false, error:{code:'cancelled'}}; the running one finishes (its answer is still the truth for
 *    its request; the caller decides whether it is stale).
 *  - `priority: 'background'`: such a request starts only when no other request is queued (one already
 *    running is never interrupted), so that re-checks do not delay what a person waits for.
 *  - `signal`: abort a queued request → it is dropped; abort the running one → the worker is terminated
 *    and started again (`handle` is synchronous and cannot be interrupted otherwise); answered 'cancelled'.
 *  - A worker that dies (an error event, out of memory) answers its running request with
 *    'internal-error' and is started again; the queue goes on. After MAX_CRASHES deaths in a row with
 *    no answer between them the client gives up: every waiting and later request is answered
 *    'internal-error' saying so (`broken`), instead of restarting a worker that cannot run.
 * Comlink carries the calls and the progress callback (a comlink proxy).
 *
 * Deliberately not here: any numerics (the worker's), and any caching of answers.
 * Cost: one structured clone of each request and answer; a restart costs the worker's load (~100 ms); the
 * long lane, once started, a second engine's memory (its heap and WebAssembly memory) and warm-up.
 */
import { proxy, releaseProxy, wrap, type Remote } from 'comlink';
import type { Answer, ComputeOptions, EngineLike, Progress, WorkerApi } from './types.js';

export type { Answer, ComputeOptions, EngineLike, Progress };

export interface EngineClientOptions {
  /** Makes the worker (default: the engine worker module beside this file, which webpack bundles). */
  createWorker?: () => Worker;
  /** Or the URL of a prebuilt worker script (npm run build:worker writes dist/browser/engine-worker.js). */
  url?: string | URL;
}

interface Job {
  request: object;
  options: ComputeOptions;
  resolve: (a: Answer) => void;
  done: boolean;
  /** Sent alone, never in a batch (set after a batch could not reach the worker). */
  solo?: boolean;
  unlisten?: () => void;
}

function opOf(request: object): string | null {
  const op = (request as { op?: unknown }).op;
  return typeof op === 'string' ? op : null;
}

function failure(request: object, code: 'cancelled' | 'internal-error', message: string): Answer {
  const id = (request as { id?: unknown }).id;
  const a: Answer = { ok: false, op: opOf(request), error: { code, message } };
  if (typeof id === 'string' || typeof id === 'number') a.id = id;
  return a;
}

/** Most requests sent to a worker in one message (see Lane.pump). */
const MAX_BATCH = 32;

/** Worker deaths in a row (no answer between them) after which the client stops restarting it. */
export const MAX_CRASHES = 3;

/** One worker and its queue: the client's quick lane, or its long lane (see the header). */
class Lane {
  private worker!: Worker;
  private remote!: Remote<WorkerApi>;
  private queue: Job[] = [];
  /** The jobs the worker is answering: one, or a batch (see pump). */
  private running: Job[] = [];
  private generation = 0;
  private disposed = false;
  /** Times the worker was started (1 + restarts); for tests and diagnostics. */
  starts = 0;
  /** Messages sent to the worker (a batch is one); for tests and diagnostics. */
  messages = 0;
  private pumpQueued = false;
  /** Worker deaths since the last answer; at MAX_CRASHES the client gives up (`broken`). */
  private crashes = 0;
  /** Why the client gave up on its worker, or null. */
  broken: string | null = null;

  constructor(private readonly options: EngineClientOptions = {}) {
    this.start();
  }

  private makeWorker(): Worker {
    if (this.options.createWorker) return this.options.createWorker();
    if (this.options.url !== undefined) return new Worker(this.options.url);
    // webpack recognises this pattern and bundles the worker as its own file.
    return new Worker(new URL('./engine-worker.js', import.meta.url));
  }

  private start(): void {
    this.worker = this.makeWorker();
    this.remote = wrap<WorkerApi>(this.worker);
    this.starts++;
    const gen = ++this.generation;
    this.worker.addEventListener('error', (e) => {
      if (gen !== this.generation) return;
      e.preventDefault?.();
      const jobs = this.running;
      this.crashes++;
      const why = e.message || 'unknown error';
      if (this.crashes >= MAX_CRASHES) {
        // A worker that dies again and again without answering (a script that does not load, a
        // request that kills it each time) is not restarted for ever: everything waiting is answered.
        this.broken = `The engine worker stopped ${this.crashes} times in a row without answering (last: ${why}); it is not restarted again. Reload the page.`;
        this.dispose(this.broken);
        return;
      }
      this.restart();
      for (const job of jobs) this.finish(job, failure(job.request, 'internal-error', `The engine worker stopped: ${why}; it has been restarted.`));
      this.pump();
    });
  }

  private restart(): void {
    this.remote[releaseProxy]?.();
    this.worker.terminate();
    this.running = [];
    if (!this.disposed) this.start();
  }

  ready(): Promise<{ eigh: { active: boolean; reason: string } }> {
    return this.remote.ready();
  }

  compute(request: object, options: ComputeOptions = {}): Promise<Answer> {
    return new Promise<Answer>((resolve) => {
      if (this.broken) return resolve(failure(request, 'internal-error', this.broken));
      if (this.disposed) return resolve(failure(request, 'cancelled', 'The engine client has been disposed.'));
      if (options.signal?.aborted) return resolve(failure(request, 'cancelled', 'The request was cancelled before it started.'));
      const job: Job = { request, options, resolve, done: false };
      if (options.key !== undefined) {
        for (const old of this.queue.filter((j) => j.options.key === options.key)) {
          this.finish(old, failure(old.request, 'cancelled', 'A newer request with the same key replaced this one before it started.'));
        }
      }
      if (options.signal) {
        const onAbort = () => this.abort(job);
        options.signal.addEventListener('abort', onAbort, { once: true });
        job.unlisten = () => options.signal!.removeEventListener('abort', onAbort);
      }
      this.queue.push(job);
      this.pumpSoon();
    });
  }

  /**
   * Pumps once the current task's synchronous code has asked everything it will (a microtask later), so
   * that the requests a component asks together (an edit's divergences and state check) leave in one batch.
   */
  private pumpSoon(): void {
    if (this.pumpQueued) return;
    this.pumpQueued = true;
    queueMicrotask(() => {
      this.pumpQueued = false;
      this.pump();
    });
  }

  private abort(job: Job): void {
    if (job.done) return;
    if (this.running.includes(job)) {
      const others = this.running.filter((j) => j !== job && !j.done);
      if (others.length) {
        // One request of a batch: answered now; the worker finishes the batch for the others (quick requests).
        this.finish(job, failure(job.request, 'cancelled', 'The computation was cancelled; its answer will be ignored.'));
        return;
      }
      const batch = this.running;
      this.restart();
      for (const j of batch) this.finish(j, failure(j.request, 'cancelled', 'The computation was cancelled; the engine worker was restarted.'));
      this.pump();
    } else {
      this.finish(job, failure(job.request, 'cancelled', 'The request was cancelled before it started.'));
    }
  }

  private finish(job: Job, answer: Answer): void {
    if (job.done) return;
    job.done = true;
    job.unlisten?.();
    const k = this.queue.indexOf(job);
    if (k >= 0) this.queue.splice(k, 1);
    job.resolve(answer);
  }

  /**
   * Starts the next request, or a batch: the first waiting request in order (background ones only when
   * nothing else waits) and, when it reports no progress, the requests queued behind it that report none
   * either, up to MAX_BATCH, in one message (`computeMany`). A calculator's edit asks several small
   * requests in one task; one message for them all saves a round trip between threads per request (and
   * the main thread's wait for each reply behind the page's rendering). A request that asks for progress
   * (a long solve) always goes alone, so that stopping it can restart the worker.
   */
  private pump(): void {
    if (this.running.length || this.disposed) return;
    let k = this.queue.findIndex((j) => j.options.priority !== 'background');
    if (k < 0) k = 0;
    const job = this.queue[k];
    if (!job) return;
    const batch = [job];
    if (!job.options.onProgress && !job.solo && job.options.priority !== 'background') {
      for (let i = k + 1; i < this.queue.length && batch.length < MAX_BATCH; i++) {
        const next = this.queue[i];
        if (next.options.priority === 'background') continue;
        if (next.options.onProgress || next.solo) break;
        batch.push(next);
      }
    }
    this.queue = this.queue.filter((j) => !batch.includes(j));
    this.running = batch;
    this.messages++;
    const gen = this.generation;
    const settle = (answers: Answer[]) => {
      if (gen !== this.generation) return;
      this.crashes = 0;
      this.running = [];
      batch.forEach((j, i) => this.finish(j, answers[i]));
      this.pump();
    };
    const unreachable = (err: unknown) => {
      if (gen !== this.generation) return;
      this.running = [];
      if (batch.length > 1) {
        // One of them cannot be cloned to the worker: ask each alone, so that only that one fails.
        for (const j of batch) j.solo = true;
        this.queue.unshift(...batch.filter((j) => !j.done));
      } else {
        // A request that cannot be cloned to the worker (a function, a DOM node inside) lands here.
        this.finish(job, failure(job.request, 'internal-error', `The request could not reach the engine worker: ${err instanceof Error ? err.message : String(err)}`));
      }
      this.pump();
    };
    if (batch.length > 1) {
      this.remote.computeMany(batch.map((j) => j.request)).then(settle, unreachable);
    } else {
      const onProgress = job.options.onProgress;
      this.remote.compute(job.request, onProgress ? proxy((p: Progress) => onProgress(p)) : undefined).then((a) => settle([a]), unreachable);
    }
  }

  /** Stops the worker; every queued or running request is answered 'cancelled' (or, when the client
   * gives up on a failing worker, 'internal-error' with `reason`). */
  dispose(reason?: string): void {
    if (this.disposed) return;
    this.disposed = true;
    const pending = [...this.running, ...this.queue];
    this.remote[releaseProxy]?.();
    this.worker.terminate();
    this.generation++;
    for (const job of pending) {
      this.finish(job, reason ? failure(job.request, 'internal-error', reason) : failure(job.request, 'cancelled', 'The engine client has been disposed.'));
    }
  }
}

/**
 * The client: a quick lane (its worker starts with the client) and a long lane, whose worker starts on
 * the first request asked with `long: true` (an SDP, an optimisation, a re-check). Each lane keeps the
 * rules above on its own queue; the two run side by side, so an edit's small requests are answered while
 * a solve runs, and stopping a solve restarts only the long lane's worker.
 */
export class EngineClient implements EngineLike {
  private readonly quick: Lane;
  private slow: Lane | null = null;
  private disposed = false;

  constructor(private readonly options: EngineClientOptions = {}) {
    this.quick = new Lane(options);
  }

  private lanes(): Lane[] {
    return this.slow ? [this.quick, this.slow] : [this.quick];
  }

  /** Workers started over both lanes (1 + restarts, + the long lane's); for tests and diagnostics. */
  get starts(): number {
    return this.lanes().reduce((n, l) => n + l.starts, 0);
  }

  /** Messages sent to the workers of both lanes (a batch of requests is one). */
  get messages(): number {
    return this.lanes().reduce((n, l) => n + l.messages, 0);
  }

  /** Workers started by each lane (the long lane's 0 until its first request). */
  get laneStarts(): { quick: number; long: number } {
    return { quick: this.quick.starts, long: this.slow?.starts ?? 0 };
  }

  /** Why the client gave up on a worker (either lane), or null. */
  get broken(): string | null {
    return this.quick.broken ?? this.slow?.broken ?? null;
  }

  /** Resolves once the quick lane's worker answers; with the eigensolver's path (WebAssembly kernels or not). */
  ready(): Promise<{ eigh: { active: boolean; reason: string } }> {
    return this.quick.ready();
  }

  compute(request: object, options: ComputeOptions = {}): Promise<Answer> {
    if (!options.long || this.disposed) return this.quick.compute(request, options);
    this.slow ??= new Lane(this.options);
    return this.slow.compute(request, options);
  }

  /** Stops both lanes' workers; every queued or running request is answered 'cancelled' (see Lane.dispose). */
  dispose(reason?: string): void {
    this.disposed = true;
    for (const lane of this.lanes()) lane.dispose(reason);
  }
}
