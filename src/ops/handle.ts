/**
 * `handle(request)`: one plain-data request in, one plain-data answer out (PROTOCOL.md, "Requests and
 * answers"). Every surface (command, worker, embed, kernel bridge, sweeps) calls this and nothing else.
 *
 * Steps: check the request is an object with a known "op"; check the sizes of every matrix, ket and
 * the request's expression strings against the limits (sizes.ts: the same 'too-large' in every form);
 * validate it with ajv against the op's argument schema plus the common fields (matrices of numbers
 * given as rows, which the size walk has already read and checked, are seen by ajv as one-entry
 * stand-ins: withStandIns below; same verdicts and errors); estimate the op's cost
 * from the request's sizes (the op's `cost`, src/ops/cost.ts) and refuse it with 'too-large' above the
 * limits of src/limits.ts; run the op within its deadline (the request's "deadline" in milliseconds, or
 * the caller's default; src/deadline.ts); turn a RhoError into a failure answer and any other exception
 * into 'internal-error' (a short message, never a stack trace); walk the result so that ±Infinity
 * becomes "Infinity"/"-Infinity", typed arrays become lists, and a NaN anywhere turns the whole answer
 * into 'internal-error' (NaN must never reach a user). "id" is echoed back so batch users can match
 * answers to requests.
 *
 * Deliberately not here: numerics (ops do that), JSON text (callers parse and print), and any I/O.
 * Cost: schema compilation once per op (cached), then validation linear in the size of the request
 * outside its matrices of numbers given as rows.
 */
import type { ErrorObject, ValidateFunction } from 'ajv';
import { RhoError, type ErrorCode } from '../errors.js';
import { EigenSolverError } from '../linalg/eigh.js';
import { DEFAULT_TOLERANCE } from '../quantum/validate.js';
import { withDeadline } from '../deadline.js';
import { overLimits, type CostEstimate } from '../limits.js';
import { getOp, listOps, type OpContext, type OpDefinition } from './registry.js';
import { ADJUSTMENT_RULE, collectingAdjustments, isNumericRows, schemas, withAnswerMatrices, writeMatrix } from './codec.js';
import { checkRequestSizes, type RequestSizes } from './sizes.js';
import { dense } from './cost.js';
import { validators as precompiled } from './validators.generated.js';
import { expressionReaderLoaded, loadExpressionReader } from './expressions.js';

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

/** Deadline of a request that gives none and whose caller sets no other default, in milliseconds. */
export const DEFAULT_DEADLINE_MS = 60_000;
/** Largest deadline a request may ask for (one day), in milliseconds. */
export const MAX_DEADLINE_MS = 86_400_000;

/** What a caller of `handle` may set for the requests it passes on. */
export interface HandleOptions {
  /** Deadline in milliseconds for requests without a "deadline" field (default DEFAULT_DEADLINE_MS). */
  defaultDeadline?: number;
}

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
  answerMatrices: {
    description: 'How matrices in the answer are written: "rows" (the default: real rows, or {"re", "im"} rows) or "packed" ({"shape", "packed": "float64-le", "re", "im"?}, base64 of row-major little-endian float64, im left out when zero), for large matrices.',
    enum: ['rows', 'packed'],
  },
  deadline: {
    description: `Milliseconds the op may run; past it the op stops with 'deadline-exceeded' (iterative methods and the SDP solver say how far they got). Default ${DEFAULT_DEADLINE_MS} for the command and the engine, at most ${MAX_DEADLINE_MS}.`,
    type: 'number',
    exclusiveMinimum: 0,
    maximum: MAX_DEADLINE_MS,
  },
} as const;

/** The common fields an op accepts: "tolerance" unless it validates nothing, "base" only when it uses logarithms. */
export function commonFieldsOf(def: OpDefinition): Partial<typeof COMMON_FIELDS> {
  const { tolerance, base, ...always } = COMMON_FIELDS;
  return { ...(def.tolerance === false ? {} : { tolerance }), ...(def.base === true ? { base } : {}), ...always };
}

/** The full JSON Schema of a request for one op: its arguments, "op" and the common fields it accepts. */
export function requestSchema(def: OpDefinition): Record<string, unknown> {
  const { type: _type, properties, required, additionalProperties, ...rest } = def.args;
  return {
    title: def.name,
    description: def.summary,
    ...rest,
    type: 'object',
    properties: { op: { const: def.name }, ...properties, ...commonFieldsOf(def) },
    required: ['op', ...(required ?? [])],
    additionalProperties: additionalProperties ?? false,
  };
}

/**
 * ajv's options, for the precompiled validators (scripts/write-schema.ts) and the fallback compiler alike.
 * strict: unknown keywords in an op's schema are a programming error caught at generation (and by the
 * schema test); logger off so nothing is ever printed to the console.
 */
export const AJV_OPTIONS = {
  allErrors: false, strict: true, strictTypes: false, strictTuples: false, strictRequired: false, logger: false,
} as const;

const validators = new Map<string, ValidateFunction>();
let fallback: { compile(schema: object): ValidateFunction } | undefined;

/**
 * The validator of an op's requests: the precompiled one (src/ops/validators.generated.ts, written by
 * `npm run schema`), or, for an op registered after the file was generated (tests, an op not yet in the
 * file), one compiled by ajv, which is loaded only then and only in Node (ajv compiles with
 * `new Function`, which browsers under a strict CSP refuse; there every op is precompiled).
 */
function validatorFor(def: OpDefinition): ValidateFunction {
  let v = validators.get(def.name);
  if (v) return v;
  const ready = (precompiled as unknown as Record<string, ValidateFunction | undefined>)[def.name];
  if (ready) v = ready;
  else {
    fallback ??= loadAjv();
    v = fallback.compile(requestSchema(def));
  }
  validators.set(def.name, v);
  return v;
}

function loadAjv(): { compile(schema: object): ValidateFunction } {
  const nodeModule = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process?.getBuiltinModule?.('node:module') as
    | { createRequire(from: string): (id: string) => unknown }
    | undefined;
  if (!nodeModule) throw new Error('no precompiled validator for this op, and ajv cannot be loaded here; run `npm run schema`');
  const mod = nodeModule.createRequire(import.meta.url)('ajv/dist/2020.js') as { default?: unknown };
  const Ajv = (mod.default ?? mod) as new (options: object) => { compile(schema: object): ValidateFunction };
  return new Ajv(AJV_OPTIONS);
}

/** Compile every registered op's schema with ajv (throws on an invalid schema); for tests and the schema script. */
export function compileAll(): void {
  fallback ??= loadAjv();
  for (const def of listOps()) fallback.compile(requestSchema(def));
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

function schemaError(errors: ErrorObject[], def: OpDefinition, request: unknown): RhoError {
  // Within anyOf, ajv reports every branch's failure; the deepest one is nearly always the one meant.
  let best = errors[0];
  for (const e of errors) if (e.instancePath.split('/').length > best.instancePath.split('/').length) best = e;
  const at = pointerToPath(best.instancePath);
  const where = at === '' ? 'The request' : `The field ${at}`;
  const p = best.params as Record<string, any>;
  // When no branch of an anyOf got deeper than the anyOf itself, its description says best what is wanted.
  // (ajv reports an enclosing anyOf after the ones nested in it, so the last one is the outermost.)
  const alternatives = [...errors].reverse().find((e) => (e.keyword === 'anyOf' || e.keyword === 'oneOf') && e.instancePath === best.instancePath);
  const wanted = alternatives ? descriptionAt(requestSchema(def), request, best.instancePath) : undefined;
  if (alternatives && wanted && best.keyword !== 'required' && best.keyword !== 'additionalProperties' && best.keyword !== 'maxItems') {
    const data = dataAt(request, best.instancePath);
    const got = data === null ? 'null' : Array.isArray(data) ? 'a list' : typeof data === 'object' ? 'an object' : `the ${typeof data} ${clip(JSON.stringify(data), 40)}`;
    return new RhoError('invalid-argument', `${where} is not valid (it is ${got}). Expected: ${wanted}`, at);
  }
  switch (best.keyword) {
    case 'required': {
      const path = join(at, String(p.missingProperty));
      return new RhoError('missing-argument', `The field ${path} is required${at === '' ? ` by the op ${def.name}` : ''}.`, path);
    }
    case 'additionalProperties': {
      const field = String(p.additionalProperty);
      const path = join(at, field);
      const known = at === '' ? [...Object.keys(def.args.properties), ...Object.keys(commonFieldsOf(def))] : [];
      const hint = known.length ? ` The op ${def.name} takes: ${known.join(', ')}.` : '';
      if (at === '' && field === 'base' && def.base !== true) {
        return new RhoError('invalid-argument', `The op ${def.name} does not use "base": its answer has no logarithm.${hint}`, path);
      }
      if (at === '' && field === 'tolerance' && def.tolerance === false) {
        return new RhoError('invalid-argument', `The op ${def.name} does not use "tolerance": it validates no state or channel.${hint}`, path);
      }
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

function segments(pointer: string): string[] {
  return pointer === '' ? [] : pointer.slice(1).split('/').map((seg) => seg.replace(/~1/g, '/').replace(/~0/g, '~'));
}

/** The value at a JSON pointer of the request (undefined when there is none). */
function dataAt(request: unknown, pointer: string): unknown {
  let v: unknown = request;
  for (const seg of segments(pointer)) v = typeof v === 'object' && v !== null ? (v as Record<string, unknown>)[seg] : undefined;
  return v;
}

/**
 * The description of the alternatives (anyOf) that the schema offers at a JSON pointer of the request,
 * found by walking the op's schema along the request (the precompiled validators carry no schemas): at
 * each anyOf, the branch that fits the data's kind (list or object) and has the next segment is taken.
 */
function descriptionAt(schema: unknown, request: unknown, pointer: string): string | undefined {
  type Node = { description?: string; anyOf?: Node[]; properties?: Record<string, Node>; items?: Node; type?: unknown };
  let node = schema as Node | undefined;
  let data: unknown = request;
  const fits = (n: Node, seg: string | undefined, v: unknown): boolean => {
    if (seg === undefined) return true;
    if (Array.isArray(v)) return n.items !== undefined;
    return n.properties !== undefined && seg in n.properties;
  };
  for (const seg of segments(pointer)) {
    while (node?.anyOf) node = node.anyOf.find((n) => fits(n, seg, data));
    if (!node) return undefined;
    node = Array.isArray(data) ? node.items : node.properties?.[seg];
    data = typeof data === 'object' && data !== null ? (data as Record<string, unknown>)[seg] : undefined;
  }
  return node?.anyOf ? node.description : undefined;
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

/**
 * Plain JSON data from an op's result: ±Infinity → strings, typed arrays → lists, NaN/functions → NotPlain.
 * The place of a NotPlain (`where` plus the keys below it) is built only when one is thrown: building the
 * path of every entry of every answer cost a sweep point about a tenth of its time (bench/sweep.ts).
 */
function toPlain(v: unknown, where: string, depth: number): unknown {
  try {
    return plainOf(v, depth);
  } catch (err) {
    if (err instanceof PlainPath) throw new NotPlain(where + err.path.reverse().join(''), err.what);
    throw err;
  }
}

/** Thrown by plainOf; the keys of the path are pushed innermost first while it unwinds. */
class PlainPath {
  readonly path: string[] = [];
  constructor(readonly what: string) {}
}

function plainOf(v: unknown, depth: number): unknown {
  if (depth > MAX_DEPTH) throw new PlainPath('nesting too deep (a cycle?)');
  switch (typeof v) {
    case 'number':
      if (Number.isNaN(v)) throw new PlainPath('NaN');
      if (v === Infinity) return 'Infinity';
      if (v === -Infinity) return '-Infinity';
      return v === 0 ? 0 : v;
    case 'string':
    case 'boolean':
      return v;
    case 'object': {
      if (v === null) return null;
      if (Array.isArray(v)) {
        const out = new Array<unknown>(v.length);
        for (let k = 0; k < v.length; k++) {
          const x = v[k];
          try {
            if (x === undefined) throw new PlainPath('undefined');
            out[k] = plainOf(x, depth + 1);
          } catch (err) {
            if (err instanceof PlainPath) err.path.push(`[${k}]`);
            throw err;
          }
        }
        return out;
      }
      if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
        const a = v as unknown as ArrayLike<number>;
        const out = new Array<unknown>(a.length);
        for (let k = 0; k < a.length; k++) {
          try {
            out[k] = plainOf(Number(a[k]), depth + 1);
          } catch (err) {
            if (err instanceof PlainPath) err.path.push(`[${k}]`);
            throw err;
          }
        }
        return out;
      }
      const proto = Object.getPrototypeOf(v);
      if (proto !== Object.prototype && proto !== null) throw new PlainPath(`an instance of ${proto?.constructor?.name ?? 'a class'}`);
      const obj = v as Record<string, unknown>;
      if (isCMatrixLike(obj)) return writeMatrix(obj as never);
      const out: Record<string, unknown> = {};
      for (const key in obj) {
        if (!Object.prototype.hasOwnProperty.call(obj, key)) continue;
        const x = obj[key];
        if (x === undefined) continue;
        try {
          out[key] = plainOf(x, depth + 1);
        } catch (err) {
          if (err instanceof PlainPath) err.path.push(`.${key}`);
          throw err;
        }
      }
      return out;
    }
    default:
      throw new PlainPath(`a ${typeof v}`);
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

/** A matrix of one number in each form of rows: valid wherever rows of finite numbers are. */
const ROWS_STAND_IN = [[0]];

/** A matrix value with its rows of numbers (read by the size walk) replaced by stand-ins; itself when none was. */
function matrixStandIn(v: unknown): unknown {
  if (isNumericRows(v)) return ROWS_STAND_IN;
  if (typeof v !== 'object' || v === null || Array.isArray(v)) return v;
  const m = v as Record<string, unknown>;
  const re = isNumericRows(m.re);
  const im = isNumericRows(m.im);
  if (!re && !im) return v;
  return { ...m, re: re ? ROWS_STAND_IN : m.re, ...(im ? { im: ROWS_STAND_IN } : {}) };
}

/**
 * The request as its validator should see it: each top-level matrix or state field (schemas.matrix,
 * schemas.state) whose rows of numbers the size walk has already read and checked (finite numbers,
 * rows of equal length within the limits: everything the schema asks of them) gets a one-entry stand-in
 * in their place, so that ajv does not walk tens of thousands of numbers again. The stand-in is valid
 * exactly where the rows were, so the verdict and every error (code, path) are the same as for the
 * request itself, which the error messages are built from. A shallow copy, or the request itself.
 */
function withStandIns(def: OpDefinition, req: Record<string, unknown>): Record<string, unknown> {
  let out: Record<string, unknown> | undefined;
  const props = def.args.properties as Record<string, { anyOf?: unknown } | undefined>;
  for (const key in props) {
    const v = req[key];
    if (typeof v !== 'object' || v === null) continue;
    const anyOf = props[key]?.anyOf;
    let w: unknown = v;
    if (anyOf === schemas.matrix.anyOf) w = matrixStandIn(v);
    else if (anyOf === schemas.state.anyOf) {
      const s = v as Record<string, unknown>;
      if (Array.isArray(v) || !('matrix' in s)) w = matrixStandIn(v);
      else {
        const m = matrixStandIn(s.matrix);
        if (m !== s.matrix) w = { ...s, matrix: m };
      }
    }
    if (w !== v) (out ??= { ...req })[key] = w;
  }
  return out ?? req;
}

/** The estimate of an op without its own `cost`: a few dense steps on its largest matrix. */
function fallbackCost(sizes: RequestSizes): CostEstimate {
  return dense(Math.max(1, sizes.largestSide), 4, 'four dense steps (this op declares no cost of its own)');
}

/** A RangeError from an allocation the estimates did not foresee: the request was too large after all. */
function isAllocationFailure(err: unknown): boolean {
  return err instanceof RangeError && /Invalid typed array length|Array buffer allocation failed|Invalid array length|allocation/i.test(err.message);
}

/**
 * Answer one request. Never throws: every failure, including a bug in an op, becomes a failure answer.
 * The answer is plain data (JSON.stringify-safe, no NaN).
 */
export function handle(request: unknown, options: HandleOptions = {}): Answer {
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
    const sizes = sizesOf(req);
    lastSizes = undefined; // do not keep the request alive
    const validate = validatorFor(def);
    if (!validate(withStandIns(def, req))) throw schemaError(validate.errors ?? [], def, req);
    if (req.base === 1) throw new RhoError('invalid-argument', 'The logarithm base must not be 1.', 'base');
    const estimate = def.cost ? def.cost(req) : fallbackCost(sizes);
    const refusal = overLimits(estimate);
    if (refusal) throw refusal;
    const context: OpContext = {
      tolerance: typeof req.tolerance === 'number' ? req.tolerance : DEFAULT_TOLERANCE,
      base: req.base === 'e' ? Math.E : typeof req.base === 'number' ? req.base : DEFAULT_BASE,
    };
    const deadline = typeof req.deadline === 'number' ? req.deadline : (options.defaultDeadline ?? DEFAULT_DEADLINE_MS);
    const form = req.answerMatrices === 'packed' ? 'packed' : 'rows';
    const { result: plain, adjustments } = collectingAdjustments(() =>
      withAnswerMatrices(form, () => {
        const result = withDeadline(deadline, () => def.run(req, context));
        if (typeof result !== 'object' || result === null || !('value' in result)) {
          throw new NotPlain('', 'a result without "value"');
        }
        return toPlain(result, '', 0) as Record<string, unknown>;
      }),
    );
    const { ok: _ok, op: _op, id: _id, value, ...extras } = plain;
    const answer: Record<string, unknown> = { ok: true, op: opName };
    if (id !== undefined) answer.id = id;
    answer.value = value ?? null;
    Object.assign(answer, extras);
    if (adjustments.length) answer.inputsAdjusted = { note: ADJUSTMENT_RULE, inputs: toPlain(adjustments, 'inputsAdjusted', 0) };
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
    if (isAllocationFailure(err)) {
      return failure(opName, id, {
        code: 'too-large',
        message: `The op ${opName} needed more memory than could be allocated (${clip((err as Error).message)}); the request is too large for this engine, although its estimate was within the limits.`,
      });
    }
    const what = err instanceof Error ? `${err.name}: ${clip(err.message)}` : clip(String(err));
    return failure(opName, id, {
      code: 'internal-error',
      message: `The op ${opName} failed unexpectedly (${what}); this is a bug in the engine.`,
    });
  }
}

/** The size check of the last request looked at (handleAsync checks first; handle need not walk it again). */
let lastSizes: { request: object; sizes: RequestSizes } | undefined;

function sizesOf(req: Record<string, unknown>): RequestSizes {
  if (lastSizes?.request === req) return lastSizes.sizes;
  const sizes = checkRequestSizes(req);
  lastSizes = { request: req, sizes };
  return sizes;
}

/** Fields whose strings are names or choices, never expressions. */
const NAME_FIELDS = new Set(['op', 'id', 'name', 'family', 'form']);

/**
 * Whether a request may need the expression reader: expression strings in its matrices or kets (the
 * size check counts them; the base64 text of packed matrices is not among them), or a top-level
 * string field that may hold an expression (such as a metric function).
 */
export function mayNeedExpressions(request: unknown): boolean {
  if (typeof request !== 'object' || request === null || Array.isArray(request)) return false;
  const req = request as Record<string, unknown>;
  for (const [k, v] of Object.entries(req)) if (typeof v === 'string' && !NAME_FIELDS.has(k)) return true;
  try {
    return sizesOf(req).expressions > 0;
  } catch {
    return false; // too large: handle() refuses it without reading anything
  }
}

/**
 * `handle` for engines where the expression reader cannot load synchronously (browsers, workers): loads
 * it first when the request holds a string that may be an expression, then answers. In Node `handle`
 * alone is enough.
 */
export async function handleAsync(request: unknown, options: HandleOptions = {}): Promise<Answer> {
  if (!expressionReaderLoaded() && mayNeedExpressions(request)) {
    try {
      await loadExpressionReader();
    } catch {
      // handle() then answers with the reader's own error for the expression that needs it.
    }
  }
  return handle(request, options);
}
