/**
 * Small argument checks shared by the quantum layer: numeric parameters in a range, dimensions,
 * subsystem index lists. Each failure is a RhoError ('invalid-argument' or 'dimension-mismatch')
 * naming the parameter, so the ops layer can pass it on unchanged.
 *
 * Deliberately not here: validation of density matrices (src/quantum/validate.ts) and of channels
 * (src/quantum/channels.ts). Cost: O(length of the argument).
 */
import { RhoError } from '../errors.js';

export interface Range {
  min?: number;
  max?: number;
  minExclusive?: boolean;
  maxExclusive?: boolean;
}

/** Throws unless x is a finite number inside the range; `name` is the parameter's name. */
export function checkNumber(x: unknown, name: string, range: Range = {}): number {
  if (typeof x !== 'number' || !Number.isFinite(x)) {
    throw new RhoError('invalid-argument', `The parameter ${name} must be a finite number.`, name);
  }
  const { min, max, minExclusive, maxExclusive } = range;
  const low = min !== undefined && (minExclusive ? x <= min : x < min);
  const high = max !== undefined && (maxExclusive ? x >= max : x > max);
  if (low || high) {
    const lo = min === undefined ? '(-∞' : `${minExclusive ? '(' : '['}${min}`;
    const hi = max === undefined ? '∞)' : `${max}${maxExclusive ? ')' : ']'}`;
    throw new RhoError('invalid-argument', `The parameter ${name} is ${x}; it must lie in ${lo}, ${hi}.`, name, { value: x });
  }
  return x;
}

/** Throws unless n is an integer >= min. */
export function checkInteger(n: unknown, name: string, min = 1): number {
  if (typeof n !== 'number' || !Number.isInteger(n) || n < min) {
    throw new RhoError('invalid-argument', `The parameter ${name} must be an integer of at least ${min}.`, name, { value: n });
  }
  return n;
}

/** Throws unless dims is a non-empty list of positive integers. */
export function checkDimList(dims: unknown, name: string): number[] {
  if (!Array.isArray(dims) || dims.length === 0 || dims.some((d) => typeof d !== 'number' || !Number.isInteger(d) || d < 1)) {
    throw new RhoError('invalid-argument', `The parameter ${name} must be a non-empty list of positive integers.`, name);
  }
  return dims as number[];
}

/** Throws unless `systems` lists distinct subsystem indices in 0..count-1 (and, unless allowEmpty, at least one). */
export function checkSystemList(systems: unknown, count: number, name: string, allowEmpty = false): number[] {
  if (!Array.isArray(systems) || (!allowEmpty && systems.length === 0)) {
    throw new RhoError('invalid-argument', `The parameter ${name} must be a non-empty list of subsystem indices.`, name);
  }
  const seen = new Set<number>();
  systems.forEach((s, k) => {
    if (typeof s !== 'number' || !Number.isInteger(s) || s < 0 || s >= count) {
      throw new RhoError('invalid-argument', `Subsystem ${String(s)} is out of range: there are ${count} subsystems (0..${count - 1}).`, `${name}[${k}]`);
    }
    if (seen.has(s)) throw new RhoError('invalid-argument', `Subsystem ${s} is listed twice.`, `${name}[${k}]`);
    seen.add(s);
  });
  return systems as number[];
}

/** Throws unless w is a probability vector (entries ≥ −tol, sum within tol of 1). */
export function checkProbabilities(w: readonly number[], name: string, tol: number): void {
  if (w.length === 0) throw new RhoError('invalid-argument', `The parameter ${name} must not be empty.`, name);
  let s = 0;
  w.forEach((x, k) => {
    if (typeof x !== 'number' || !Number.isFinite(x)) {
      throw new RhoError('invalid-argument', `The weight ${name}[${k}] must be a finite number.`, `${name}[${k}]`);
    }
    if (x < -tol) throw new RhoError('invalid-argument', `The weight ${name}[${k}] is ${x}; weights must be non-negative.`, `${name}[${k}]`);
    s += x;
  });
  if (Math.abs(s - 1) > tol * Math.max(1, w.length)) {
    throw new RhoError('invalid-argument', `The weights ${name} sum to ${s}, not 1.`, name, { sum: s });
  }
}
