/**
 * The registry of ops: the only door into the engine from outside (DESIGN.md, "ops").
 *
 * Each op declares its name, a one-sentence summary, a JSON Schema for its arguments (the request's
 * properties other than "op") and one function from plain data to plain data. Op modules call
 * `defineOp` at import time; `src/ops/all.ts` imports every op module. This file holds no numerics and
 * no I/O; dispatch, validation and error wrapping live in `src/ops/handle.ts`.
 *
 * Every op also declares `cost`: its estimated work and memory from the request's sizes (helpers in
 * src/ops/cost.ts), which `handle` checks against the engine's limits before `run` (a test checks
 * that every registered op has one), and says whether it reads the common fields "base" and
 * "tolerance", so that a request giving a field the op does not use is refused.
 */
import type { CostEstimate } from '../limits.js';

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
  /**
   * The estimated cost of a request that passed the schema, from its sizes alone (nothing is read or
   * allocated): see src/ops/cost.ts. Above the limits of src/limits.ts the request is refused with
   * 'too-large' naming the estimate. Required in practice: test/ops/cost.test.ts checks every op has one.
   */
  cost?(request: Record<string, any>): CostEstimate;
  /** Whether the answer depends on the logarithm base; only then is the common field "base" accepted (default false). */
  base?: boolean;
  /** Whether the op validates inputs, so that the common field "tolerance" means something (default true). */
  tolerance?: boolean;
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
