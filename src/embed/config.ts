/**
 * Reading an embed's configuration: the text of the JSON block inside a `<rhosigma-calculator>` element
 * (or of a shared link) into a checked `EmbedConfig`, or a `ConfigError` that names the field at fault.
 *
 * Safe by construction: the text goes through `JSON.parse` only (never eval), keys that could reach an
 * object's prototype (`__proto__`, `constructor`, `prototype`) are refused wherever they appear, the
 * result is checked by the precompiled validator (config-validator.generated.ts, ajv's standalone code:
 * nothing is compiled at run time), and strings are only ever shown as text by the element.
 *
 * What it does not do: check the numbers of states (the engine does, when the calculator asks), or read
 * anything from the page. Cost: linear in the text.
 */
import { validateConfig } from './config-validator.generated.js';
import type { CalculatorName, ControlName } from './config-schema.js';
import { CONTROLS } from './config-schema.js';

/** A state in the protocol's forms (docs/protocol.md, "Values"); checked by the engine, not here. */
export type PlainState = unknown;
export type Systems = (number | string)[];
export type Base = number | 'e';

export interface DivergenceInputs { rho: PlainState; sigma: PlainState; family?: string; alpha?: number; z?: number; base?: Base }
export interface RecoverabilityInputs { rho: PlainState; a: Systems; b: Systems; c: Systems; quantity?: string; base?: Base }
export interface GuessingInputs { probabilities: number[]; states?: PlainState[]; quantity?: string; moment?: number }
export interface OneShotInputs { quantity: string; rho: PlainState; sigma?: PlainState; a?: Systems; b?: Systems; epsilon?: number; base?: Base }

export interface InputsOf {
  divergence: DivergenceInputs;
  recoverability: RecoverabilityInputs;
  guessing: GuessingInputs;
  'one-shot': OneShotInputs;
}

export interface EmbedConfig<C extends CalculatorName = CalculatorName> {
  version?: 1;
  calculator: C;
  title?: string;
  description?: string;
  controls?: ControlName[];
  theme?: 'auto' | 'light' | 'dark';
  inputs: InputsOf[C];
}

/** A configuration that cannot be used: `field` is where (dotted, "inputs.rho.matrix[1]"), `message` why. */
export class ConfigError extends Error {
  constructor(readonly field: string, readonly reason: string) {
    super(field ? `${field}: ${reason}` : reason);
    this.name = 'ConfigError';
  }
}

const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype']);

/** The path of a JSON pointer ("/inputs/rho/matrix/1") in dotted form ("inputs.rho.matrix[1]"). */
export function dotted(pointer: string): string {
  if (!pointer) return '';
  return pointer
    .split('/')
    .slice(1)
    .map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~'))
    .reduce((acc, p) => (/^\d+$/.test(p) ? `${acc}[${p}]` : acc ? `${acc}.${p}` : p), '');
}

/** Walks parsed JSON and refuses any key that could reach a prototype; returns the offending path. */
function forbiddenKey(value: unknown, path: string): string | null {
  if (Array.isArray(value)) {
    for (let k = 0; k < value.length; k++) {
      const hit = forbiddenKey(value[k], `${path}[${k}]`);
      if (hit !== null) return hit;
    }
    return null;
  }
  if (value !== null && typeof value === 'object') {
    for (const key of Object.keys(value)) {
      const here = path ? `${path}.${key}` : key;
      if (FORBIDDEN_KEYS.has(key)) return here;
      const hit = forbiddenKey((value as Record<string, unknown>)[key], here);
      if (hit !== null) return hit;
    }
  }
  return null;
}

interface AjvError { instancePath: string; keyword: string; message?: string; params: Record<string, unknown> }

/** One sentence for ajv's first error, naming what was expected in words. */
function describe(e: AjvError): { field: string; reason: string } {
  const field = dotted(e.instancePath);
  const p = e.params;
  switch (e.keyword) {
    case 'required':
      return { field: field ? `${field}.${p.missingProperty}` : String(p.missingProperty), reason: 'is required but missing' };
    case 'additionalProperties':
      return { field: field ? `${field}.${p.additionalProperty}` : String(p.additionalProperty), reason: 'is not a field of this configuration' };
    case 'enum':
      return { field, reason: `must be one of ${(p.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(', ')}` };
    case 'type':
      return { field, reason: `must be ${String(p.type).split(',').map((t) => (t === 'array' || t === 'object' || t === 'integer' ? `an ${t}` : `a ${t}`)).join(' or ')}` };
    case 'const':
      return { field, reason: `must be ${JSON.stringify(p.allowedValue)}` };
    default:
      return { field, reason: e.message ?? `fails the check "${e.keyword}"` };
  }
}

/**
 * The error a person should see: the deepest one (ajv reports an enclosing anyOf or if/then after the
 * failures inside it, and the innermost place is nearly always the one meant).
 */
function firstError(errors: AjvError[]): AjvError {
  const useful = errors.filter((e) => e.keyword !== 'if' && e.keyword !== 'anyOf');
  const pool = useful.length ? useful : errors;
  return pool.reduce((best, e) => (e.instancePath.split('/').length > best.instancePath.split('/').length ? e : best), pool[0]);
}

/** Checks parsed data as a configuration; throws ConfigError naming the field. */
export function checkConfig(data: unknown): EmbedConfig {
  const bad = forbiddenKey(data, '');
  if (bad !== null) throw new ConfigError(bad, 'is a key that is not allowed (it could reach an object prototype)');
  if (data === null || typeof data !== 'object' || Array.isArray(data)) {
    throw new ConfigError('', 'the configuration must be a JSON object such as {"calculator": "divergence", "inputs": {...}}');
  }
  const validate = validateConfig as unknown as ((d: unknown) => boolean) & { errors?: AjvError[] | null };
  if (!validate(data)) {
    const { field, reason } = describe(firstError(validate.errors ?? []));
    throw new ConfigError(field, reason);
  }
  return data as EmbedConfig;
}

/** Parses and checks the text of a configuration block; throws ConfigError naming the field. */
export function readConfig(textOfBlock: string): EmbedConfig {
  if (textOfBlock.length > 4_000_000) throw new ConfigError('', 'the configuration is longer than 4 MB');
  let data: unknown;
  try {
    data = JSON.parse(textOfBlock);
  } catch (err) {
    throw new ConfigError('', `the configuration is not valid JSON (${(err as Error).message})`);
  }
  return checkConfig(data);
}

/** The controls to show: those listed, or all. */
export function controlsOf(config: EmbedConfig): Set<ControlName> {
  return new Set(config.controls ?? CONTROLS);
}
