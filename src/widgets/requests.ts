/**
 * The protocol request a calculator's state asks for (docs/protocol.md): the same rules as Python's
 * `rhosigma.widgets` (`_request` of each calculator class), so that the front end and the headless path
 * send the same request for the same state. Editors contribute their protocol state
 * (`{matrix | ket, dims, labels?}`); a field the op would not use for this request is left out (the
 * engine refuses unused fields: `alpha` on umegaki, `base` on a fidelity).
 *
 * Deliberately not here: any computing (the worker's), any DOM. Cost: none.
 */
import type { FieldValue } from './schema.js';

export type Fields = Record<string, FieldValue>;
export type Request = { op: string } & Fields;

/** Families of the op divergence that take α, and the one that takes z (docs/protocol.md). */
const ALPHA_FAMILIES = new Set(['petz', 'sandwiched', 'alpha-z', 'geometric']);

/** The protocol state of an editor's fields. */
export function stateOf(editor: Fields): Fields {
  const s: Fields = editor.ket !== null && editor.ket !== undefined ? { ket: editor.ket } : { matrix: editor.matrix };
  s.dims = editor.dims;
  if (Array.isArray(editor.labels) && editor.labels.length) s.labels = editor.labels;
  return s;
}

export function divergenceRequest(f: Fields, rho: Fields, sigma: Fields): Request {
  const family = String(f.family);
  const r: Request = { op: 'divergence', family, rho: stateOf(rho), sigma: stateOf(sigma), base: f.base };
  if (ALPHA_FAMILIES.has(family)) r.alpha = f.alpha;
  if (family === 'alpha-z') r.z = f.z;
  return r;
}

export function recoverabilityRequest(f: Fields, rho: Fields): Request {
  const op = String(f.quantity);
  const r: Request = { op, rho: stateOf(rho), a: f.a, b: f.b, c: f.c };
  if (op === 'conditional-mutual-information') r.base = f.base;
  return r;
}

export function guessingRequest(f: Fields, states: Fields[]): Request {
  const op = String(f.quantity);
  const r: Request = { op, probabilities: f.probabilities, states: states.map(stateOf) };
  if (op === 'guesswork') r.moment = f.moment;
  return r;
}

export function oneShotRequest(f: Fields, rho: Fields, sigma: Fields | null): Request {
  const q = String(f.quantity);
  if (q === 'hypothesis-testing') {
    return { op: 'divergence', family: 'hypothesis-testing', rho: stateOf(rho), sigma: stateOf(sigma ?? rho), epsilon: f.epsilon, base: f.base };
  }
  if (q === 'smooth-max-divergence') {
    return { op: q, rho: stateOf(rho), sigma: stateOf(sigma ?? rho), epsilon: f.epsilon, base: f.base };
  }
  return { op: q, rho: stateOf(rho), a: f.a, b: f.b, base: f.base };
}

/** Ops (and divergence families) that solve an SDP or an optimisation, as the src/ui calculators mark theirs `long`. */
const LONG_OPS = new Set([
  'fidelity-of-recovery', 'guessing-probability', 'guesswork', 'success-within-guesses',
  'conditional-min-entropy', 'conditional-max-entropy', 'smooth-max-divergence', 'max-information',
]);
const LONG_FAMILIES = new Set(['measured', 'hypothesis-testing']);

/**
 * Whether a calculator's request may run long: the page's engine client then runs it on its long lane
 * (src/worker/client.ts), beside the quick requests of other calculators, and a view asking the same
 * request joins it there (SharedRequests).
 */
export function mayRunLong(r: Request): boolean {
  return LONG_OPS.has(r.op) || (r.op === 'divergence' && LONG_FAMILIES.has(String(r.family)));
}
