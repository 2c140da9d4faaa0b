/**
 * `handle(request)`: one plain-data request in, one plain-data answer out (PROTOCOL.md, "Requests and
 * answers"). Every surface (command, worker, embed, kernel bridge, sweeps) calls this and nothing else.
 *
 * Steps: check the request is an object with a known "op"; validate it with ajv against the op's argument
 * schema plus the common fields ("tolerance", "base", "id"); run the op; turn a RhoError into a failure
 * answer and any other exception into 'internal-error' (a short message, never a stack trace); walk the
 * result so that ±Infinity becomes "Infinity"/"-Infinity", typed arrays become lists, and a NaN anywhere
 * turns the whole answer into 'internal-error' (NaN must never reach a user). "id" is echoed back so batch
 * users can match answers to requests.
 *
 * Deliberately not here: numerics (ops do that), JSON text (callers parse and print), and any I/O.
 * Cost: schema compilation once per op (cached), then validation linear in the size of the request.
 */
import Ajv2020Module from 'ajv/dist/2020.js';
import type { ErrorObject, ValidateFunction } from 'ajv';
import { RhoError, type ErrorCode } from '../errors.js';
import { EigenSolverError } from '../linalg/eigh.js';
import { DEFAULT_TOLERANCE } from '../quantum/validate.js';
import { getOp, listOps, type OpContext, type OpDefinition } from './registry.js';
import { writeMatrix } from './codec.js';

// ajv is CommonJS; under NodeNext its default export arrives as the module object.
const Ajv2020 = ((Ajv2020Module as unknown as { default?: unknown }).default ?? Ajv2020Module) as typeof Ajv2020Module.default;

/** Every error code an answer can carry (kept equal to ErrorCode in src/errors.ts by the type check below). */
export const ERROR_CODES = [
  'not-hermitian', 'not-positive', 'trace-not-one', 'dimension-mismatch', 'parse-error', 'unknown-op', 'unknown-family',
  'invalid-argument', 'missing-argument', 'too-large', 'not-completely-positive', 'not-trace-preserving', 'solver-failed',
  'deadline-exceeded', 'cancelled', 'internal-error',
] as const satisfies readonly ErrorCode[];
// Compile-time: fails if src/errors.ts gains a code that is not listed above.
const _allCodesListed: Exclude<ErrorCode, (typeof ERROR_CODES)[number]> extends never ? true : never = true;
void _allCodesListed;

/** Default logarithm base (bits). */
export const DEFAULT_BASE = 2;

export interface ErrorInfo {
  code: ErrorCode;
  message: string;
  path?: string;
  detail?: Record<string, unknown>;
}

export type Answer =
  | ({ ok: true; op: string; id?: string | number; value: unknown } & Record<string, unknown>)
  | { ok: false; op: string | null; id?: string | number; error: ErrorInfo };

/** JSON Schemas of the fields every request may carry besides its op's arguments. */
export const COMMON_FIELDS = {
  tolerance: {
    description: `Relative tolerance for validating inputs (Hermiticity, positivity, unit trace); default ${DEFAULT_TOLERANCE}.`,
    type: 'number',
    exclusiveMinimum: 0,
    maximum: 1,
  },
  base: {
    description: 'Logarithm base: a positive number other than 1, or "e" for nats; default 2 (bits).',
    anyOf: [{ const: 'e' }, { type: 'number', exclusiveMinimum: 0, not: { const: 1 } }],
  },
  id: {
    description: 'Any string or number; echoed back in the answer so batch users can match answers to requests.',
    type: ['string', 'number'],
  },
} as const;

/** The full JSON Schema of a request for one op: its arguments, "op" and the common fields. */
export function requestSchema(def: OpDefinition): Record<string, unknown> {
  const { type: _type, properties, required, additionalProperties, ...rest } = def.args;
  return {
    title: def.name,
    description: def.summary,
    ...rest,
    type: 'object',
    properties: { op: { const: def.name }, ...properties, ...COMMON_FIELDS },
    required: ['op', ...(required ?? [])],
    additionalProperties: additionalProperties ?? false,
  };
}

let ajv: InstanceType<typeof Ajv2020> | undefined;
const validators = new Map<string, ValidateFunction>();

function validatorFor(def: OpDefinition): ValidateFunction {
  let v = validators.get(def.name);
  if (!v) {
    // strict: unknown keywords in an op's schema are a programming error caught at first use (and by the
    // schema test, which compiles every op); logger off so nothing is ever printed to the console.
    ajv ??= new Ajv2020({ allErrors: false, verbose: true, strict: true, strictTypes: false, strictTuples: false, strictRequired: false, logger: false });
    v = ajv.compile(requestSchema(def));
    validators.set(def.name, v);
  }
  return v;
}

/** Compile every registered op's schema (throws on an invalid schema); for tests and the schema script. */
export function compileAll(): void {
  for (const def of listOps()) validatorFor(def);
}

// ---------------------------------------------------------------------------------------------------

/** JSON pointer "/rho/matrix/1/0" → protocol path "rho.matrix[1][0]". */
export function pointerToPath(pointer: string): string {
  if (pointer === '') return '';
  let out = '';
  for (const raw of pointer.slice(1).split('/')) {
    const seg = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (/^(0|[1-9][0-9]*)$/.test(seg)) out += `[${seg}]`;
    else out += out === '' ? seg : `.${seg}`;
  }
  return out;
}

function join(base: string, key: string): string {
  return base === '' ? key : `${base}.${key}`;
}

function typeWords(t: unknown): string {
  const words: Record<string, string> = {
    number: 'a number', integer: 'an integer', string: 'a string', boolean: 'true or false',
    array: 'a list', object: 'an object', null: 'null',
  };
  const list = Array.isArray(t) ? t : [t];
  return list.map((x) => words[String(x)] ?? String(x)).join(' or ');
}

function schemaError(errors: ErrorObject[], def: OpDefinition): RhoError {
  // Within anyOf, ajv reports every branch's failure; the deepest one is nearly always the one meant.
  let best = errors[0];
  for (const e of errors) if (e.instancePath.split('/').length > best.instancePath.split('/').length) best = e;
  const at = pointerToPath(best.instancePath);
  const where = at === '' ? 'The request' : `The field ${at}`;
  const p = best.params as Record<string, any>;
  // When no branch of an anyOf got deeper than the anyOf itself, its description says best what is wanted.
  // (ajv reports an enclosing anyOf after the ones nested in it, so the last one is the outermost.)
  const alternatives = [...errors].reverse().find((e) => (e.keyword === 'anyOf' || e.keyword === 'oneOf') && e.instancePath === best.instancePath);
  const wanted = (alternatives?.parentSchema as { description?: string } | undefined)?.description;
  if (alternatives && wanted && best.keyword !== 'required' && best.keyword !== 'additionalProperties' && best.keyword !== 'maxItems') {
    const data = alternatives.data;
    const got = data === null ? 'null' : Array.isArray(data) ? 'a list' : typeof data === 'object' ? 'an object' : `the ${typeof data} ${clip(JSON.stringify(data), 40)}`;
    return new RhoError('invalid-argument', `${where} is not valid (it is ${got}). Expected: ${wanted}`, at);
  }
  switch (best.keyword) {
    case 'required': {
      const path = join(at, String(p.missingProperty));
      return new RhoError('missing-argument', `The field ${path} is required${at === '' ? ` by the op ${def.name}` : ''}.`, path);
    }
    case 'additionalProperties': {
      const path = join(at, String(p.additionalProperty));
      const known = at === '' ? [...Object.keys(def.args.properties), ...Object.keys(COMMON_FIELDS)] : [];
      const hint = known.length ? ` The op ${def.name} takes: ${known.join(', ')}.` : '';
      return new RhoError('invalid-argument', `Unknown field ${path}.${hint}`, path);
    }
    case 'maxItems':
      return new RhoError('too-large', `${where} has more than ${p.limit} items.`, at, { limit: p.limit });
    case 'type':
      return new RhoError('invalid-argument', `${where} must be ${typeWords(p.type)}.`, at);
    case 'const':
      return new RhoError('invalid-argument', `${where} must be ${JSON.stringify(p.allowedValue)}.`, at);
    case 'enum':
      return new RhoError(
        'invalid-argument',
        `${where} must be one of ${(p.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(', ')}.`,
        at,
      );
    default:
      return new RhoError('invalid-argument', `${where} ${best.message ?? 'is not valid'}.`, at);
  }
}

/** Edit distance, for suggesting op names. */
function distance(a: string, b: string): number {
  const d = Array.from({ length: a.length + 1 }, (_, i) => [i, ...new Array<number>(b.length).fill(0)]);
  for (let j = 1; j <= b.length; j++) d[0][j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    }
  }
  return d[a.length][b.length];
}

/** Registered op names close to `name` (edit distance or containment), closest first. */
export function closeOpNames(name: string): string[] {
  const lower = name.toLowerCase().slice(0, 100);
  return listOps()
    .map((o) => ({ name: o.name, d: distance(lower, o.name) }))
    .filter(({ name: n, d }) => d <= Math.max(2, Math.floor(n.length / 3)) || (lower.length >= 3 && (n.includes(lower) || lower.includes(n))))
    .sort((x, y) => x.d - y.d)
    .map((x) => x.name);
}

// ---------------------------------------------------------------------------------------------------

class NotPlain extends Error {
  constructor(readonly where: string, readonly what: string) {
    super(what);
  }
}

const MAX_DEPTH = 64;

function isCMatrixLike(v: Record<string, unknown>): boolean {
  return typeof v.rows === 'number' && typeof v.cols === 'number' && v.re instanceof Float64Array && v.im instanceof Float64Array;
}

/** Plain JSON data from an op's result: ±Infinity → strings, typed arrays → lists, NaN/functions → NotPlain. */
function toPlain(v: unknown, where: string, depth: number): unknown {
  if (depth > MAX_DEPTH) throw new NotPlain(where, 'nesting too deep (a cycle?)');
  switch (typeof v) {
    case 'number':
      if (Number.isNaN(v)) throw new NotPlain(where, 'NaN');
      if (v === Infinity) return 'Infinity';
      if (v === -Infinity) return '-Infinity';
      return v === 0 ? 0 : v;
    case 'string':
    case 'boolean':
      return v;
    case 'object': {
      if (v === null) return null;
      if (Array.isArray(v)) {
        return v.map((x, k) => {
          if (x === undefined) throw new NotPlain(`${where}[${k}]`, 'undefined');
          return toPlain(x, `${where}[${k}]`, depth + 1);
        });
      }
      if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
        return Array.from(v as unknown as ArrayLike<number>, (x, k) => toPlain(Number(x), `${where}[${k}]`, depth + 1));
      }
      const proto = Object.getPrototypeOf(v);
      if (proto !== Object.prototype && proto !== null) throw new NotPlain(where, `an instance of ${proto?.constructor?.name ?? 'a class'}`);
      const obj = v as Record<string, unknown>;
      if (isCMatrixLike(obj)) return writeMatrix(obj as never);
      const out: Record<string, unknown> = {};
      for (const [key, x] of Object.entries(obj)) {
        if (x === undefined) continue;
        out[key] = toPlain(x, `${where}.${key}`, depth + 1);
      }
      return out;
    }
    default:
      throw new NotPlain(where, `a ${typeof v}`);
  }
}

function failure(op: string | null, id: string | number | undefined, error: ErrorInfo): Answer {
  return id === undefined ? { ok: false, op, error } : { ok: false, op, id, error };
}

function fromRhoError(err: RhoError): ErrorInfo {
  const info: ErrorInfo = { code: err.code, message: err.message };
  if (err.path !== undefined && err.path !== '') info.path = err.path;
  if (err.detail !== undefined) {
    try {
      info.detail = toPlain(err.detail, 'detail', 0) as Record<string, unknown>;
    } catch {
      // A detail that is not plain data is dropped rather than spoiling the answer.
    }
  }
  return info;
}

function clip(s: string, n = 200): string {
  return s.length > n ? `${s.slice(0, n)}…` : s;
}

/**
 * Answer one request. Never throws: every failure, including a bug in an op, becomes a failure answer.
 * The answer is plain data (JSON.stringify-safe, no NaN).
 */
export function handle(request: unknown): Answer {
  if (typeof request !== 'object' || request === null || Array.isArray(request)) {
    return failure(null, undefined, {
      code: 'invalid-argument',
      message: `A request must be a JSON object like {"op": "spectrum", "matrix": [[1, 0], [0, 1]]}, not ${Array.isArray(request) ? 'a list' : request === null ? 'null' : `a ${typeof request}`}.`,
    });
  }
  const req = request as Record<string, unknown>;
  const id = typeof req.id === 'string' || (typeof req.id === 'number' && Number.isFinite(req.id)) ? req.id : undefined;
  if (req.op === undefined) {
    return failure(null, id, { code: 'missing-argument', message: 'The request has no "op" field naming the computation.', path: 'op' });
  }
  if (typeof req.op !== 'string') {
    return failure(null, id, { code: 'invalid-argument', message: 'The field "op" must be a string naming the computation.', path: 'op' });
  }
  const opName = req.op;
  const def = getOp(opName);
  if (!def) {
    const close = closeOpNames(opName);
    const all = listOps().map((o) => o.name);
    const hint = close.length
      ? `Did you mean ${close.slice(0, 3).map((n) => `"${n}"`).join(' or ')}?`
      : `The ops are: ${all.join(', ')}.`;
    return failure(opName.slice(0, 100), id, { code: 'unknown-op', message: `There is no op "${clip(opName, 100)}". ${hint}`, path: 'op' });
  }
  try {
    const validate = validatorFor(def);
    if (!validate(req)) throw schemaError(validate.errors ?? [], def);
    if (req.base === 1) throw new RhoError('invalid-argument', 'The logarithm base must not be 1.', 'base');
    const context: OpContext = {
      tolerance: typeof req.tolerance === 'number' ? req.tolerance : DEFAULT_TOLERANCE,
      base: req.base === 'e' ? Math.E : typeof req.base === 'number' ? req.base : DEFAULT_BASE,
    };
    const result = def.run(req, context);
    if (typeof result !== 'object' || result === null || !('value' in result)) {
      throw new NotPlain('', 'a result without "value"');
    }
    const plain = toPlain(result, '', 0) as Record<string, unknown>;
    const { ok: _ok, op: _op, id: _id, value, ...extras } = plain;
    const answer: Record<string, unknown> = { ok: true, op: opName };
    if (id !== undefined) answer.id = id;
    answer.value = value ?? null;
    Object.assign(answer, extras);
    return answer as Answer;
  } catch (err) {
    if (err instanceof RhoError) return failure(opName, id, fromRhoError(err));
    if (err instanceof NotPlain) {
      return failure(opName, id, {
        code: 'internal-error',
        message: `The op ${opName} produced ${err.what}${err.where ? ` at ${err.where.replace(/^\./, '')}` : ''}, which cannot be answered; this is a bug in the engine.`,
      });
    }
    if (err instanceof EigenSolverError) {
      return failure(opName, id, { code: 'solver-failed', message: `The eigensolver failed: ${clip(err.message)}.` });
    }
    const what = err instanceof Error ? `${err.name}: ${clip(err.message)}` : clip(String(err));
    return failure(opName, id, {
      code: 'internal-error',
      message: `The op ${opName} failed unexpectedly (${what}); this is a bug in the engine.`,
    });
  }
}
