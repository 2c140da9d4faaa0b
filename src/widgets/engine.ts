/**
 * The page's engine (docs/surfaces.md: one worker per page, shared by every component on it): the
 * `EngineClient` of src/worker, made on first use, behind `SharedRequests`. The engine runs in that web
 * worker, never on the page's main thread.
 *
 * Why `SharedRequests`: a calculator widget's model computes its request for the kernel, and its view
 * mounts the src/ui calculator, which asks the same request (and more) for the screen. Identical requests
 * in flight at the same time go to the worker once and every asker gets the answer; an SDP is not solved
 * twice. This is not a cache: once answered, a request is asked again the next time.
 *  - Stop (an asker's `signal`) stops the shared computation for everyone (the worker is restarted, as
 *    for any stop); the others get 'cancelled' too, which is the truth of what happened.
 *  - When the shared request is dropped because its first asker superseded it (latest wins by key), the
 *    other askers, who did not, ask again on their own.
 *  - Progress goes to every asker that listens.
 *
 * Deliberately not here: any numerics. Cost: one JSON text of each request (to recognise it).
 */
import { EngineClient } from '../worker/client.js';
import type { Answer, ComputeOptions, EngineLike, Progress } from '../worker/types.js';

interface Flight {
  answer: Promise<Answer>;
  listeners: Set<(p: Progress) => void>;
  stop: AbortController;
  stopped: boolean;
}

const cancelled = (a: Answer) => !a.ok && a.error.code === 'cancelled';

export class SharedRequests implements EngineLike {
  private flights = new Map<string, Flight>();
  /** Requests sent to the worker, and those answered by sharing (for tests and diagnostics). */
  counts = { sent: 0, shared: 0 };

  constructor(private readonly inner: EngineLike) {}

  compute(request: object, options: ComputeOptions = {}): Promise<Answer> {
    let text: string;
    try {
      text = JSON.stringify(request);
    } catch {
      return this.inner.compute(request, options);
    }
    const flight = this.flights.get(text);
    if (!flight) return this.send(text, request, options);
    this.counts.shared++;
    return this.join(flight, request, options);
  }

  private send(text: string, request: object, options: ComputeOptions): Promise<Answer> {
    const stop = new AbortController();
    const flight: Flight = { answer: Promise.resolve(null as never), listeners: new Set(), stop, stopped: false };
    if (options.onProgress) flight.listeners.add(options.onProgress);
    this.watch(flight, options.signal);
    this.counts.sent++;
    const fanOut = (p: Progress) => flight.listeners.forEach((cb) => cb(p));
    // Read when the job starts (EngineClient reads it then), so that askers who joined while it was
    // queued get progress too, and a request nobody watches carries no progress channel.
    const inner: ComputeOptions = {
      key: options.key,
      signal: stop.signal,
      priority: options.priority,
      long: options.long,
      get onProgress() {
        return flight.listeners.size ? fanOut : undefined;
      },
    };
    flight.answer = this.inner
      .compute(request, inner)
      .finally(() => {
        if (this.flights.get(text) === flight) this.flights.delete(text);
      });
    this.flights.set(text, flight);
    return flight.answer;
  }

  private join(flight: Flight, request: object, options: ComputeOptions): Promise<Answer> {
    if (options.onProgress) flight.listeners.add(options.onProgress);
    this.watch(flight, options.signal);
    return flight.answer.then((a) => {
      if (options.onProgress) flight.listeners.delete(options.onProgress);
      // Dropped by its first asker's newer request, not stopped: this asker still wants its answer.
      if (cancelled(a) && !flight.stopped && !options.signal?.aborted) return this.compute(request, options);
      return a;
    });
  }

  /** An asker's Stop stops the shared computation. */
  private watch(flight: Flight, signal: AbortSignal | undefined): void {
    if (!signal) return;
    const abort = () => {
      flight.stopped = true;
      flight.stop.abort();
    };
    if (signal.aborted) abort();
    else signal.addEventListener('abort', abort, { once: true });
  }
}

let client: EngineLike | null = null;

export function pageEngine(): EngineLike {
  client ??= new SharedRequests(new EngineClient());
  return client;
}

/** Tests and embedding pages may hand in their own engine (the same contract). */
export function setPageEngine(engine: EngineLike): void {
  client = engine;
}
