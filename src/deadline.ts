/**
 * The deadline of the request being answered: `handle` (src/ops/handle.ts) runs each op inside
 * `withDeadline(ms, run)`, and the long loops below it (the SDP solver's iterations, the ascent of the
 * measured relative entropy, the optimised conditional Rényi iteration) call `deadlinePassed()` or
 * `checkDeadline()` once per iteration, so that no request runs much past its deadline. A loop that
 * stops there throws RhoError 'deadline-exceeded' with what it had so far (status, iterations, the best
 * bounds) in `detail`.
 *
 * Why ambient state and not an argument: the deadline crosses every layer (ops → oneshot → sdp), and
 * threading an option through each quantity's signature would touch every module for one number.
 * `handle` is synchronous, so at most one deadline is active at a time; nested `withDeadline` calls keep
 * the earlier (tighter) of the two. Outside `withDeadline` (library calls, tests) there is no deadline.
 *
 * Deliberately not here: any numerics, any timer (nothing is interrupted; loops poll). The one callback is
 * the optional progress listener at the end of this file.
 * Cost: one `performance.now()` per poll (tens of nanoseconds).
 */
import { RhoError } from './errors.js';

let until = Infinity;
let started = 0;
let allowed = Infinity;

/** Milliseconds since an arbitrary origin (performance.now() in Node, browsers and workers). */
function now(): number {
  return performance.now();
}

/**
 * Run `f` with a deadline `ms` milliseconds from now (Infinity: none). The earlier deadline wins when
 * one is already active. The previous deadline is restored afterwards, also when `f` throws.
 */
export function withDeadline<T>(ms: number, f: () => T): T {
  const saved = { until, started, allowed };
  const t = now();
  const mine = t + ms;
  if (mine < until) {
    until = mine;
    started = t;
    allowed = ms;
  }
  try {
    return f();
  } finally {
    ({ until, started, allowed } = saved);
  }
}

/** True once the active deadline has passed (never outside withDeadline). */
export function deadlinePassed(): boolean {
  return until !== Infinity && now() > until;
}

/** Milliseconds left before the active deadline (Infinity when there is none; 0 once it has passed). */
export function remainingMs(): number {
  return until === Infinity ? Infinity : Math.max(0, until - now());
}

/**
 * The error of a computation stopped at the deadline: `what` names it ("the SDP for the diamond
 * distance"), `progress` says how far it got (iterations, best bounds so far), in the answer's detail.
 */
export function deadlineError(what: string, progress: Record<string, unknown> = {}, summary = ''): RhoError {
  const elapsed = Math.round(now() - started);
  return new RhoError(
    'deadline-exceeded',
    `${what[0].toUpperCase()}${what.slice(1)} was stopped at the deadline of ${allowed} ms (after ${elapsed} ms)${summary ? `: ${summary}` : ''}. Give a larger "deadline" (milliseconds) to let it run longer.`,
    'deadline',
    { deadline: allowed, elapsed, ...progress },
  );
}

/** Throws deadlineError(what, progress()) once the deadline has passed; `progress` is only called then. */
export function checkDeadline(what: string, progress?: () => Record<string, unknown>, summary?: () => string): void {
  reportProgress(what, progress);
  if (deadlinePassed()) throw deadlineError(what, progress?.() ?? {}, summary?.() ?? '');
}

// ---------------------------------------------------------------------------------------------------
// Progress of long loops, for engines that can pass it on (the web worker, src/worker/engine-worker.ts).
// The same polls that check the deadline report progress: `checkDeadline(what, progress)` and the SDP
// solver's iterations call `reportProgress`, which calls the listener set by `withProgress` at most once
// per `PROGRESS_INTERVAL_MS` (the first poll after that much time), so a tight loop pays one clock read.

/** What a listener receives: what is running, milliseconds since `withProgress` began, and its numbers. */
export interface Progress {
  what: string;
  elapsedMs: number;
  [key: string]: unknown;
}

/** Least time between two reports to the listener, in milliseconds. */
export const PROGRESS_INTERVAL_MS = 100;

let listener: ((p: Progress) => void) | null = null;
let progressStarted = 0;
let lastReport = 0;

/** Run `f` with `onProgress` receiving the progress of its long loops (nested calls: the inner listener wins). */
export function withProgress<T>(onProgress: ((p: Progress) => void) | undefined, f: () => T): T {
  if (!onProgress) return f();
  const saved = { listener, progressStarted, lastReport };
  listener = onProgress;
  progressStarted = now();
  lastReport = progressStarted;
  try {
    return f();
  } finally {
    ({ listener, progressStarted, lastReport } = saved);
  }
}

/** Report progress (`info` is only called when the report is due); a listener's exception is ignored. */
export function reportProgress(what: string, info?: () => Record<string, unknown>): void {
  if (listener === null) return;
  const t = now();
  if (t - lastReport < PROGRESS_INTERVAL_MS) return;
  lastReport = t;
  try {
    listener({ ...(info?.() ?? {}), what, elapsedMs: Math.round(t - progressStarted) });
  } catch {
    // Progress is advisory: a failing listener must not change the answer.
  }
}
