/**
 * The types the engine client and its users share (docs/surfaces.md, "The engine client"): plain
 * protocol requests and answers, progress reports, and `EngineLike`, the one thing a UI component needs
 * from an engine. Types only: importing this file from the UI pulls no engine code into a bundle.
 *
 * Deliberately not here: any behaviour (client.ts, engine-worker.ts).
 */
import type { Answer } from '../ops/handle.js';
import type { Progress } from '../deadline.js';

export type { Answer, Progress };

/** A protocol request: `{ op, ...fields }` (docs/protocol.md). */
export type Request = { op: string } & Record<string, unknown>;

export interface ComputeOptions {
  /** Iterations of long solves (SDP, measured divergence, ...), at most every 100 ms. */
  onProgress?: (p: Progress) => void;
  /** Abort → the worker is stopped and restarted; the answer is {ok:false, error:{code:'cancelled'}}. */
  signal?: AbortSignal;
  /** Latest wins: a queued request with the same key is dropped (answered 'cancelled') when a newer one arrives. */
  key?: string;
  /** 'background': started only when no other request waits (a re-check, a prefetch); default 'normal'. */
  priority?: 'normal' | 'background';
  /**
   * May run long (an SDP, an optimisation, a certificate's re-check): the client runs it on its long lane,
   * a second worker, so that quick requests are not held behind it (src/worker/client.ts). Default false.
   */
  long?: boolean;
}

export interface EngineLike {
  compute(request: object, options?: ComputeOptions): Promise<Answer>;
}

/** What the worker exposes through comlink (engine-worker.ts). */
export interface WorkerApi {
  compute(request: unknown, onProgress?: (p: Progress) => void): Promise<Answer>;
  /** Several requests answered one after another, in order, in one message (answers in the same order). */
  computeMany(requests: unknown[]): Promise<Answer[]>;
  /** Resolves once the worker has loaded; says whether the eigensolver's WebAssembly kernels are active. */
  ready(): Promise<{ eigh: { active: boolean; reason: string } }>;
}
