/**
 * Evaluating one point of a sweep, through the protocol only: every draw, step, quantity and side of the
 * inequality is a request answered by `handle`, with the references replaced by plain data. The point's
 * result depends only on the spec and the point's index: draw k of point i is drawn from the stream
 * [i, k] of the spec's seed.
 *
 * The line a point writes (keys in this order; docs/sweeps.md):
 *   {"index", "parameters", "sample", "value"?, "left"?, "right"?, "gap"?, "violated"?, "recorded"?, "reproduce"?}
 *   or, when a request failed, {"index", "parameters", "sample", "failed": {"at", "request", "error"}}.
 * "reproduce" (on a violation) lists every request the point made, references resolved and each with "id" set
 * to its place ("draws.rho", "steps.Nrho", "quantity", "inequality.left", ...): given to `rhosigma compute`
 * it answers exactly as the sweep did.
 *
 * Deliberately not here: numerics (handle does them), files and threads (src/sweep/runner.ts).
 * Cost: one handle call per draw, step, quantity and request inside the inequality; plus copying the
 * referenced answers into the requests that use them.
 */
import { RhoError } from '../errors.js';
import { handle, type Answer, type ErrorInfo } from '../ops/handle.js';
import { pointAt, type Json, type Request, type Side, type Spec } from './spec.js';

/** What one evaluation of a point gave. */
export interface PointOutcome {
  index: number;
  parameters: Record<string, Json>;
  sample: number;
  value?: Json;
  left?: number;
  right?: number;
  gap?: number;
  violated?: boolean;
  recorded?: Record<string, Json>;
  failed?: { at: string; request?: Json; error: ErrorInfo };
  /** Every request made, resolved, in order (ids set to their places). */
  requests: Request[];
  /** Per draw, the coordinates it used (when asked for). */
  coordinates?: number[][];
}

export interface EvaluateOptions {
  /** Replay draw k from these coordinates instead of the seeded stream. */
  coordinates?: readonly (readonly number[])[];
  /** Ask every draw for its coordinates. */
  withCoordinates?: boolean;
}

class PointFailure extends Error {
  constructor(readonly at: string, readonly request: Json | undefined, readonly error: ErrorInfo) {
    super(error.message);
  }
}

/** JSON numbers from answers: "Infinity"/"-Infinity" strings back to numbers. */
function toNumber(v: unknown): number | undefined {
  if (typeof v === 'number') return v;
  if (v === 'Infinity') return Infinity;
  if (v === '-Infinity') return -Infinity;
  return undefined;
}

function writeNumber(x: number): Json {
  return x === Infinity ? 'Infinity' : x === -Infinity ? '-Infinity' : x;
}

type Scope = Map<string, { kind: 'parameter'; value: Json } | { kind: 'answer'; answer: Answer & { ok: true } }>;

function lookup(scope: Scope, ref: string, at: string): Json {
  const [name, ...fields] = ref.split('.');
  const entry = scope.get(name);
  if (!entry) throw new PointFailure(at, undefined, { code: 'invalid-argument', message: `The reference "${ref}" has no value here.`, path: at });
  let v: unknown = entry.kind === 'parameter' ? entry.value : fields.length ? entry.answer : entry.answer.value;
  for (const f of fields) {
    if (v === null || typeof v !== 'object' || !(f in (v as object))) {
      throw new PointFailure(at, undefined, { code: 'invalid-argument', message: `The reference "${ref}" names no field "${f}" of ${name}'s ${entry.kind === 'parameter' ? 'value' : 'answer'}.`, path: at });
    }
    v = (v as Record<string, unknown>)[f];
  }
  return v as Json;
}

/** A copy of `value` with every reference replaced by what it names (shared, not copied: answers are not mutated). */
function resolve(value: Json, scope: Scope, at: string): Json {
  if (Array.isArray(value)) return value.map((v, k) => resolve(v, scope, `${at}[${k}]`));
  if (value !== null && typeof value === 'object') {
    const keys = Object.keys(value);
    if (keys.length === 1 && keys[0] === '$' && typeof value.$ === 'string') return lookup(scope, value.$, at);
    const out: Record<string, Json> = {};
    for (const k of keys) out[k] = resolve(value[k], scope, `${at}.${k}`);
    return out;
  }
  return value;
}

class Evaluation {
  readonly scope: Scope = new Map();
  readonly requests: Request[] = [];

  /** Resolves a request, answers it, and returns the answer (a failure throws PointFailure). */
  ask(template: Request, at: string, extra: Record<string, Json> = {}): Answer & { ok: true } {
    const resolved = { ...(resolve(template, this.scope, at) as Request), ...extra, id: at } as Request;
    this.requests.push(resolved);
    const answer = handle(resolved);
    if (!answer.ok) throw new PointFailure(at, resolved, answer.error);
    return answer as Answer & { ok: true };
  }

  side(s: Side, at: string): number {
    let x: number | undefined;
    if (typeof s === 'number') x = s;
    else if ('$' in s && typeof s.$ === 'string') x = toNumber(lookup(this.scope, s.$, at));
    else if ('sum' in s) x = (s.sum as Side[]).reduce((t: number, term: Side, k: number) => t + this.side(term, `${at}.sum[${k}]`), 0);
    else if ('times' in s) x = (s.times as number) * this.side(s.of as Side, `${at}.of`);
    else x = toNumber(this.ask(s as Request, at).value);
    if (x === undefined) {
      throw new PointFailure(at, undefined, { code: 'invalid-argument', message: `The side ${at} is not a number.`, path: at });
    }
    if (Number.isNaN(x)) {
      throw new PointFailure(at, undefined, { code: 'invalid-argument', message: `The side ${at} is undefined (∞ − ∞ or 0·∞).`, path: at });
    }
    return x;
  }
}

/** Evaluates point `index` of `spec`. Never throws for a failing request: the outcome records it. */
export function evaluatePoint(spec: Spec, index: number, options: EvaluateOptions = {}): PointOutcome {
  const { parameters, sample } = pointAt(spec, index);
  const ev = new Evaluation();
  for (const [n, v] of Object.entries(parameters)) ev.scope.set(n, { kind: 'parameter', value: v });
  const outcome: PointOutcome = { index, parameters, sample, requests: ev.requests };
  try {
    const coordinates: number[][] = [];
    spec.draws.forEach(([name, req], k) => {
      const given = options.coordinates?.[k];
      const extra: Record<string, Json> = given ? { coordinates: [...given] } : { seed: spec.seed, stream: [index, k] };
      if (options.withCoordinates) extra.withCoordinates = true;
      const answer = ev.ask(req, `draws.${name}`, extra);
      if (options.withCoordinates) coordinates.push(answer.coordinates as number[]);
      ev.scope.set(name, { kind: 'answer', answer });
    });
    if (options.withCoordinates) outcome.coordinates = coordinates;
    for (const [name, req] of spec.steps) ev.scope.set(name, { kind: 'answer', answer: ev.ask(req, `steps.${name}`) });
    if (spec.quantity) outcome.value = ev.ask(spec.quantity, 'quantity').value as Json;
    if (spec.inequality) {
      const { left, right, relation, tolerance } = spec.inequality;
      const l = ev.side(left, 'inequality.left');
      const r = ev.side(right, 'inequality.right');
      const gap = relation === '<=' ? r - l : l - r;
      if (Number.isNaN(gap)) {
        throw new PointFailure('inequality', undefined, { code: 'invalid-argument', message: 'Both sides are infinite with the same sign: the gap is undefined.' });
      }
      outcome.left = l;
      outcome.right = r;
      outcome.gap = gap;
      const scale = Math.max(1, Number.isFinite(l) ? Math.abs(l) : 0, Number.isFinite(r) ? Math.abs(r) : 0);
      outcome.violated = gap < -tolerance * scale;
    }
    if (spec.record.length) {
      outcome.recorded = {};
      for (const ref of spec.record) outcome.recorded[ref] = lookup(ev.scope, ref, `record`);
    }
  } catch (err) {
    if (err instanceof PointFailure) outcome.failed = { at: err.at, ...(err.request !== undefined ? { request: err.request } : {}), error: err.error };
    else if (err instanceof RhoError) outcome.failed = { at: 'point', error: { code: err.code, message: err.message } };
    else outcome.failed = { at: 'point', error: { code: 'internal-error', message: `The sweep failed unexpectedly at this point (${String(err).slice(0, 200)}); this is a bug.` } };
  }
  return outcome;
}

/** The point's line (without the newline): the keys in the documented order. */
export function pointLine(o: PointOutcome): string {
  const line: Record<string, Json> = { index: o.index, parameters: o.parameters, sample: o.sample };
  if (o.failed) {
    line.failed = o.failed as unknown as Json;
    return JSON.stringify(line);
  }
  if (o.value !== undefined) line.value = o.value;
  if (o.gap !== undefined) {
    line.left = writeNumber(o.left!);
    line.right = writeNumber(o.right!);
    line.gap = writeNumber(o.gap);
    line.violated = o.violated!;
  }
  if (o.recorded) line.recorded = o.recorded;
  if (o.violated) line.reproduce = o.requests as unknown as Json;
  return JSON.stringify(line);
}
