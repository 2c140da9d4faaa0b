/**
 * The registry of ops: the only door into the engine from outside (DESIGN.md, "ops").
 *
 * Each op declares its name, a one-sentence summary, a JSON Schema for its arguments (the request's
 * properties other than "op") and one function from plain data to plain data. Op modules call
 * `defineOp` at import time; `src/ops/all.ts` imports every op module. This file holds no numerics and
 * no I/O; dispatch, validation and error wrapping live in `src/ops/handle.ts`.
 */

/** Settings every op receives, read from the request's common fields. */
export interface OpContext {
  /** Relative tolerance for validating inputs (request field "tolerance", default 1e-9). */
  tolerance: number;
  /** Logarithm base (request field "base": a positive number or "e"; default 2). */
  base: number;
}

/** What an op returns: `value` is the headline result; other fields are extras. Plain data only. */
export type OpResult = { value: unknown } & Record<string, unknown>;

export interface OpDefinition {
  name: string;
  summary: string;
  /** JSON Schema (draft 2020-12 subset that ajv understands) for the request object, without "op". */
  args: { type: 'object'; properties: Record<string, unknown>; required?: string[]; [key: string]: unknown };
  run(request: Record<string, any>, context: OpContext): OpResult;
}

const ops = new Map<string, OpDefinition>();

export function defineOp(def: OpDefinition): OpDefinition {
  if (ops.has(def.name)) throw new Error(`op ${def.name} defined twice`);
  ops.set(def.name, def);
  return def;
}

export function getOp(name: string): OpDefinition | undefined {
  return ops.get(name);
}

export function listOps(): OpDefinition[] {
  return [...ops.values()].sort((a, b) => a.name.localeCompare(b.name));
}
