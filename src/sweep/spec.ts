/**
 * The sweep specification, version 1: its JSON Schema, its reading (the schema with ajv, then the checks a
 * schema cannot express: names, references, ops and their fields), its hash, and the map from a point's
 * index to its parameter values and sample number.
 *
 * A spec (docs/sweeps.md has the full description):
 *   { "sweep": 1, "seed": 7, "samples": 100,
 *     "parameters": { "alpha": {"from": 0.1, "to": 0.9, "count": 9} },
 *     "draws":      { "rho": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [2, 2]} },
 *     "steps":      { "Nrho": {"op": "apply-channel", "channel": {"$": "N"}, "rho": {"$": "rho"}} },
 *     "quantity":   {"op": "divergence", "family": "sandwiched", "alpha": {"$": "alpha"}, ...},
 *     "inequality": {"left": SIDE, "relation": "<=", "right": SIDE, "tolerance": 1e-9},
 *     "record": ["rho"], "mode": "evaluate" }
 * A reference {"$": "name"} stands for a parameter's value or a draw's or step's answer value;
 * {"$": "name.field.sub"} for a field of that answer (e.g. "fid.root"; "rho.value.matrix").
 * Points: the Cartesian product of the parameter lists (the last varies fastest), each repeated `samples`
 * times; point index = combination · samples + sample.
 *
 * The schema's validator is precompiled (src/sweep/spec-validator.generated.ts, by `npm run schema`): reading a
 * spec compiles nothing at run time, here or in a browser's engine worker.
 *
 * Deliberately not here: evaluating points (src/sweep/point.ts) or any numerics.
 * Cost: reading is linear in the spec's size; pointAt is O(number of parameters).
 */
import { sha256 } from '@noble/hashes/sha2.js';
import { bytesToHex, utf8ToBytes } from '@noble/hashes/utils.js';
import type { ErrorObject, ValidateFunction } from 'ajv';
import { RhoError } from '../errors.js';
import { COMMON_FIELDS, closeOpNames, pointerToPath } from '../ops/handle.js';
import { getOp } from '../ops/registry.js';
import '../ops/all.js';
import precompiledSpecValidator from './spec-validator.generated.js';

/** The spec format this engine reads. */
export const SPEC_VERSION = 1;
/** Most points one sweep may have (indices stay exact integers, and counter words of the generator). */
export const MAX_POINTS = 2 ** 40;
/** Most values one parameter list may hold. */
export const MAX_VALUES = 1_000_000;

const NAME = '^[A-Za-z_][A-Za-z0-9_]*$';

const reference = {
  description: 'A reference {"$": "name"} or {"$": "name.field..."} to a parameter, a draw or a step.',
  type: 'object',
  properties: { $: { type: 'string', pattern: '^[A-Za-z_][A-Za-z0-9_]*(\\.[A-Za-z0-9_]+)*$' } },
  required: ['$'],
  additionalProperties: false,
};

const request = {
  description: 'A protocol request {"op": NAME, ...arguments}; any argument may be a reference {"$": "name"}.',
  type: 'object',
  properties: { op: { type: 'string', minLength: 1 } },
  required: ['op'],
};

const side = {
  $id: 'side',
  description:
    'One side of the inequality: a number, a reference {"$": "name"} to a number, a request whose value is a number, {"sum": [side, ...]} or {"times": number, "of": side}.',
  anyOf: [
    { type: 'number' },
    reference,
    request,
    { type: 'object', properties: { sum: { type: 'array', minItems: 1, items: { $ref: 'side' } } }, required: ['sum'], additionalProperties: false },
    {
      type: 'object',
      properties: { times: { type: 'number' }, of: { $ref: 'side' } },
      required: ['times', 'of'],
      additionalProperties: false,
    },
  ],
};

const parameter = {
  description:
    'A parameter: {"values": [...]} (any JSON values), {"from", "to", "count"} (evenly spaced, ends included; "scale": "log" for geometric spacing), or {"from", "to", "step"}.',
  anyOf: [
    { type: 'object', properties: { values: { type: 'array', minItems: 1, maxItems: MAX_VALUES } }, required: ['values'], additionalProperties: false },
    {
      type: 'object',
      properties: {
        from: { type: 'number' },
        to: { type: 'number' },
        count: { type: 'integer', minimum: 1, maximum: MAX_VALUES },
        scale: { enum: ['linear', 'log'] },
      },
      required: ['from', 'to', 'count'],
      additionalProperties: false,
    },
    {
      type: 'object',
      properties: { from: { type: 'number' }, to: { type: 'number' }, step: { type: 'number', exclusiveMinimum: 0 } },
      required: ['from', 'to', 'step'],
      additionalProperties: false,
    },
  ],
};

/** The JSON Schema of a sweep spec (schema/sweep.schema.json is written from it by `npm run schema`). */
export const SPEC_SCHEMA = {
  $schema: 'https://json-schema.org/draft/2020-12/schema',
  title: 'rhosigma sweep specification, version 1',
  description: 'A reproducible sweep or counterexample search over protocol ops (docs/sweeps.md).',
  type: 'object',
  properties: {
    sweep: { const: SPEC_VERSION, description: 'The spec format version: 1.' },
    title: { type: 'string', description: 'A title for reports and plots.' },
    seed: { type: 'integer', minimum: 0, maximum: Number.MAX_SAFE_INTEGER, description: 'The generator seed; every draw of point i uses the stream [i, draw number] of it.' },
    samples: { type: 'integer', minimum: 1, description: 'Points per combination of parameter values (each with its own draws); default 1.' },
    parameters: { type: 'object', propertyNames: { pattern: NAME }, additionalProperties: parameter, description: 'Named parameters, in order; the last varies fastest.' },
    draws: {
      type: 'object',
      propertyNames: { pattern: NAME },
      additionalProperties: request,
      description: 'Named random draws: requests of the random-* ops without seed, stream or coordinates (the runner adds them).',
    },
    steps: { type: 'object', propertyNames: { pattern: NAME }, additionalProperties: request, description: 'Named intermediate requests, evaluated in order.' },
    quantity: { ...request, description: 'The request whose value each point records.' },
    inequality: {
      type: 'object',
      description: 'An inequality left ≤ right (or ≥) checked at every point; its gap (right − left for ≤) is recorded.',
      properties: {
        left: { $ref: 'side' },
        relation: { enum: ['<=', '>='] },
        right: { $ref: 'side' },
        tolerance: { type: 'number', minimum: 0, description: 'A point violates the inequality when gap < −tolerance·max(1, |left|, |right|); default 1e-9.' },
      },
      required: ['left', 'relation', 'right'],
      additionalProperties: false,
    },
    record: { type: 'array', items: reference.properties.$, description: 'References whose values are written on every point line.' },
    mode: {
      description: '"evaluate" (default), "first-violation", or {"search": {"refine": K, "evaluations": E, "step": s}}.',
      anyOf: [
        { enum: ['evaluate', 'first-violation'] },
        {
          type: 'object',
          properties: {
            search: {
              type: 'object',
              properties: {
                refine: { type: 'integer', minimum: 1, maximum: 10000, description: 'How many of the points with the smallest gaps are refined; default 5.' },
                evaluations: { type: 'integer', minimum: 1, maximum: 1_000_000, description: 'Evaluations per refined point; default 200.' },
                step: { type: 'number', exclusiveMinimum: 0, description: 'Initial step in the draws\' coordinates (standard normals); default 0.3.' },
                objective: {
                  enum: ['gap', 'relative'],
                  description: '"gap" (default) minimises right − left; "relative" minimises (right − left)/max(|left|, |right|, floor), which does not reward shrinking both sides towards 0.',
                },
                floor: { type: 'number', exclusiveMinimum: 0, description: 'The floor of the relative objective; default 1e-6.' },
              },
              additionalProperties: false,
            },
          },
          required: ['search'],
          additionalProperties: false,
        },
      ],
    },
  },
  required: ['sweep', 'seed'],
  additionalProperties: false,
  $defs: { side },
} as const;

export type Json = null | boolean | number | string | Json[] | { [k: string]: Json };
export type Request = { op: string } & Record<string, Json>;
export type Side = number | { $: string } | Request | { sum: Side[] } | { times: number; of: Side };

export interface SearchSettings {
  refine: number;
  evaluations: number;
  step: number;
  objective: 'gap' | 'relative';
  floor: number;
}

/** A spec that has been read: the original (for the hash and the header) and what the runner needs. */
export interface Spec {
  source: Record<string, Json>;
  seed: number;
  samples: number;
  parameterNames: string[];
  parameterValues: Json[][];
  draws: [string, Request][];
  steps: [string, Request][];
  quantity?: Request;
  inequality?: { left: Side; relation: '<=' | '>='; right: Side; tolerance: number };
  record: string[];
  mode: 'evaluate' | 'first-violation' | 'search';
  search: SearchSettings;
  /** Number of points. */
  total: number;
  /** "sha256:" + hex of the spec's compact JSON text. */
  hash: string;
}

/** ajv's options for the spec's validator (precompiled by scripts/write-schema.ts with these). */
export const SPEC_AJV_OPTIONS = { allErrors: false, verbose: true, strict: true, strictTypes: false, logger: false } as const;

const validator = precompiledSpecValidator as unknown as ValidateFunction;

function specError(errors: ErrorObject[]): RhoError {
  let best = errors[0];
  for (const e of errors) if (e.instancePath.split('/').length > best.instancePath.split('/').length) best = e;
  const at = pointerToPath(best.instancePath);
  const where = at === '' ? 'The sweep spec' : `The field ${at} of the sweep spec`;
  const p = best.params as Record<string, any>;
  const alternatives = [...errors].reverse().find((e) => e.keyword === 'anyOf' && e.instancePath === best.instancePath);
  const wanted = (alternatives?.parentSchema as { description?: string } | undefined)?.description;
  // No branch of an anyOf got deeper than the anyOf itself: its description says best what is wanted.
  if (wanted) return new RhoError('invalid-argument', `${where} is not valid. Expected: ${wanted}`, at);
  if (best.keyword === 'required') {
    const path = at === '' ? String(p.missingProperty) : `${at}.${p.missingProperty}`;
    return new RhoError('missing-argument', `The field ${path} is required in a sweep spec.`, path);
  }
  if (best.keyword === 'additionalProperties') {
    const path = at === '' ? String(p.additionalProperty) : `${at}.${p.additionalProperty}`;
    const hint = at === '' ? ` A spec has: ${Object.keys(SPEC_SCHEMA.properties).join(', ')}.` : '';
    return new RhoError('invalid-argument', `Unknown field ${path} in the sweep spec.${hint}`, path);
  }
  const badName = errors.find((e) => e.keyword === 'propertyNames') ?? errors.find((e) => (e as { propertyName?: string }).propertyName !== undefined);
  if (badName || best.keyword === 'pattern') {
    const name = badName ? String((badName.params as { propertyName?: string }).propertyName ?? (badName as { propertyName?: string }).propertyName) : '';
    const base = badName ? pointerToPath(badName.instancePath) : at;
    const path = name ? (base === '' ? name : `${base}.${name}`) : at;
    return new RhoError('invalid-argument', `${name ? `The name "${name}"` : where} must start with a letter or "_" and hold only letters, digits and "_" (dots separate fields in references).`, path);
  }
  if (best.keyword === 'const' && at === 'sweep') {
    return new RhoError('invalid-argument', `This engine reads sweep specs of version ${SPEC_VERSION} ("sweep": ${SPEC_VERSION}).`, at);
  }
  if (best.keyword === 'enum') {
    return new RhoError('invalid-argument', `${where} must be one of ${(p.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(', ')}.`, at);
  }
  return new RhoError('invalid-argument', `${where} ${best.message ?? 'is not valid'}.`, at);
}

/** The values of one parameter, from its spec entry. */
function parameterList(p: Record<string, any>, path: string): Json[] {
  if (p.values !== undefined) return p.values as Json[];
  const { from, to } = p as { from: number; to: number };
  if (p.count !== undefined) {
    const n = p.count as number;
    if (p.scale === 'log') {
      if (!(from > 0 && to > 0)) throw new RhoError('invalid-argument', 'A log-spaced parameter needs from > 0 and to > 0.', `${path}.from`);
      return Array.from({ length: n }, (_, k) => (n === 1 ? from : k === n - 1 ? to : from * (to / from) ** (k / (n - 1))));
    }
    return Array.from({ length: n }, (_, k) => (n === 1 ? from : k === n - 1 ? to : from + ((to - from) * k) / (n - 1)));
  }
  const step = p.step as number;
  if (to < from) throw new RhoError('invalid-argument', `"to" (${to}) must not be below "from" (${from}).`, `${path}.to`);
  const n = Math.floor((to - from) / step + 1e-9) + 1;
  if (n > MAX_VALUES) throw new RhoError('too-large', `The range has ${n} values, more than ${MAX_VALUES}.`, `${path}.step`, { limit: MAX_VALUES });
  return Array.from({ length: n }, (_, k) => from + k * step);
}

/** Every reference inside a value, with its path. */
function references(value: unknown, path: string, out: { name: string; path: string }[] = []): { name: string; path: string }[] {
  if (Array.isArray(value)) value.forEach((v, k) => references(v, `${path}[${k}]`, out));
  else if (value !== null && typeof value === 'object') {
    const obj = value as Record<string, unknown>;
    if (typeof obj.$ === 'string' && Object.keys(obj).length === 1) out.push({ name: obj.$.split('.')[0], path: `${path}.$` });
    else for (const [k, v] of Object.entries(obj)) references(v, `${path}.${k}`, out);
  }
  return out;
}

const DRAW_FIELDS = ['seed', 'stream', 'coordinates', 'withCoordinates'];

/** Checks a request's op and top-level fields against the registry; `draw` requests must be of a seeded op. */
function checkRequest(req: Request, path: string, draw: boolean): void {
  const def = getOp(req.op);
  if (!def) {
    const close = closeOpNames(req.op);
    const hint = close.length ? ` Did you mean ${close.slice(0, 3).map((n) => `"${n}"`).join(' or ')}?` : ' `rhosigma ops` lists them.';
    throw new RhoError('unknown-op', `There is no op "${req.op}".${hint}`, `${path}.op`);
  }
  const known = new Set([...Object.keys(def.args.properties), ...Object.keys(COMMON_FIELDS)]);
  if (draw && !known.has('seed')) {
    throw new RhoError('invalid-argument', `A draw must be a request of a random op (random-state, random-channel, ...); "${req.op}" takes no seed.`, `${path}.op`);
  }
  for (const key of Object.keys(req)) {
    if (key === 'op') continue;
    if (!known.has(key)) {
      throw new RhoError('invalid-argument', `Unknown field ${path}.${key}: the op ${req.op} takes ${Object.keys(def.args.properties).join(', ')}.`, `${path}.${key}`);
    }
    if (draw && DRAW_FIELDS.includes(key)) {
      throw new RhoError('invalid-argument', `A draw gets its seed and stream from the sweep; leave "${key}" out.`, `${path}.${key}`);
    }
  }
}

/** Checks the requests inside an inequality side. */
function checkSide(s: Side, path: string): void {
  if (typeof s === 'number' || '$' in s) return;
  if ('sum' in s) (s.sum as Side[]).forEach((x, k) => checkSide(x, `${path}.sum[${k}]`));
  else if ('times' in s) checkSide(s.of as Side, `${path}.of`);
  else checkRequest(s as Request, path, false);
}

/** Reads and checks a spec; throws RhoError naming the field at fault. */
export function readSpec(value: unknown): Spec {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    throw new RhoError('invalid-argument', 'A sweep spec must be a JSON object like {"sweep": 1, "seed": 1, ...}.', '');
  }
  if (!validator(value)) throw specError(validator.errors ?? []);
  const src = value as Record<string, any>;

  const parameterNames = Object.keys(src.parameters ?? {});
  const parameterValues = parameterNames.map((n) => parameterList(src.parameters[n], `parameters.${n}`));
  const draws = Object.entries((src.draws ?? {}) as Record<string, Request>);
  const steps = Object.entries((src.steps ?? {}) as Record<string, Request>);
  const inequality = src.inequality
    ? { left: src.inequality.left, relation: src.inequality.relation, right: src.inequality.right, tolerance: src.inequality.tolerance ?? 1e-9 }
    : undefined;
  if (src.quantity === undefined && inequality === undefined) {
    throw new RhoError('missing-argument', 'A sweep spec needs a "quantity" or an "inequality" (or both).', 'quantity');
  }
  const modeValue = src.mode ?? 'evaluate';
  const mode = (typeof modeValue === 'string' ? modeValue : 'search') as Spec['mode'];
  if (mode !== 'evaluate' && !inequality) {
    throw new RhoError('invalid-argument', `The mode ${JSON.stringify(modeValue)} looks at an inequality's gap; the spec has no "inequality".`, 'mode');
  }
  if (mode === 'search' && draws.length === 0) {
    throw new RhoError('invalid-argument', 'A search refines the draws of the best points; the spec has no "draws".', 'mode');
  }
  const search: SearchSettings = { refine: 5, evaluations: 200, step: 0.3, objective: 'gap', floor: 1e-6, ...(typeof modeValue === 'object' ? modeValue.search : {}) };

  // Names: one namespace for parameters, draws and steps.
  const seen = new Map<string, string>();
  for (const [group, names] of [['parameters', parameterNames], ['draws', draws.map(([n]) => n)], ['steps', steps.map(([n]) => n)]] as const) {
    for (const n of names) {
      if (seen.has(n)) throw new RhoError('invalid-argument', `The name "${n}" is used twice (in ${seen.get(n)} and ${group}).`, `${group}.${n}`);
      seen.set(n, group);
    }
  }
  // References: a draw may use parameters; a step parameters, draws and earlier steps; the rest anything.
  const available = new Set(parameterNames);
  const checkRefs = (v: unknown, path: string) => {
    for (const r of references(v, path)) {
      if (!available.has(r.name)) {
        const known = seen.has(r.name) ? ` ("${r.name}" is defined later or cannot be used here)` : '';
        throw new RhoError('invalid-argument', `The reference "${r.name}" names no parameter, draw or earlier step${known}.`, r.path);
      }
    }
  };
  for (const [n, req] of draws) {
    checkRequest(req, `draws.${n}`, true);
    checkRefs(req, `draws.${n}`);
  }
  for (const [n] of draws) available.add(n);
  for (const [n, req] of steps) {
    checkRequest(req, `steps.${n}`, false);
    checkRefs(req, `steps.${n}`);
    available.add(n);
  }
  if (src.quantity) {
    checkRequest(src.quantity, 'quantity', false);
    checkRefs(src.quantity, 'quantity');
  }
  if (inequality) {
    checkSide(inequality.left, 'inequality.left');
    checkSide(inequality.right, 'inequality.right');
    checkRefs(inequality.left, 'inequality.left');
    checkRefs(inequality.right, 'inequality.right');
  }
  (src.record ?? []).forEach((r: string, k: number) => checkRefs({ $: r }, `record[${k}]`));

  const samples = src.samples ?? 1;
  const total = parameterValues.reduce((t, v) => t * v.length, samples);
  if (total > MAX_POINTS) throw new RhoError('too-large', `The sweep has ${total} points, more than ${MAX_POINTS}.`, 'samples', { limit: MAX_POINTS });
  return {
    source: src,
    seed: src.seed,
    samples,
    parameterNames,
    parameterValues,
    draws,
    steps,
    quantity: src.quantity,
    inequality,
    record: src.record ?? [],
    mode,
    search,
    total,
    hash: specHash(src),
  };
}

/** "sha256:" + the hex digest of the spec's compact JSON text (key order as written; whitespace does not count). */
export function specHash(source: unknown): string {
  // @noble/hashes rather than node:crypto, so that specs are also read in the browser's engine worker.
  return `sha256:${bytesToHex(sha256(utf8ToBytes(JSON.stringify(source))))}`;
}

/** The parameter values and sample number of point `index`. */
export function pointAt(spec: Spec, index: number): { parameters: Record<string, Json>; sample: number } {
  if (!Number.isInteger(index) || index < 0 || index >= spec.total) throw new RangeError(`point ${index} is outside 0..${spec.total - 1}`);
  const sample = index % spec.samples;
  let combo = (index - sample) / spec.samples;
  const parameters: Record<string, Json> = {};
  const values: Json[] = new Array(spec.parameterNames.length);
  for (let p = spec.parameterNames.length - 1; p >= 0; p--) {
    const list = spec.parameterValues[p];
    const k = combo % list.length;
    combo = (combo - k) / list.length;
    values[p] = list[k];
  }
  spec.parameterNames.forEach((n, p) => (parameters[n] = values[p]));
  return { parameters, sample };
}

/** The JSON Schema as a file's text (schema/sweep.schema.json). */
export function specSchemaText(): string {
  return `${JSON.stringify(SPEC_SCHEMA, null, 2)}\n`;
}
