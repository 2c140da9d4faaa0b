/**
 * Helpers that write common constraint families in the solver's plain-data format: matrix
 * coordinates of a block, and partial-trace equalities tr_T(X) = target (− other blocks).
 *
 * A d×d Hermitian matrix has d² real coordinates: Re M_ii (d of them), Re M_ij and Im M_ij for
 * i < j. A real symmetric one has d(d+1)/2 (no imaginary parts). "Matrix equality" constraints
 * are one scalar constraint per coordinate.
 *
 * Does not: solve anything or check that the resulting problem is feasible.
 * Cost: the partial-trace family on a block of size d_keep·d_traced has d_keep² constraints with
 * d_traced entries each, O(d_keep² d_traced) in all.
 */
import { offsets, product, type CMatrix } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import type { BlockTerm, Constraint, Entry } from './types.js';

/** One real coordinate of a square matrix. */
export interface Coordinate {
  i: number;
  j: number;
  part: 're' | 'im';
}

/** The real coordinates of a d×d matrix: all of them for Hermitian, no imaginary parts for symmetric. */
export function matrixCoordinates(d: number, hermitian: boolean): Coordinate[] {
  const out: Coordinate[] = [];
  for (let i = 0; i < d; i++) {
    for (let j = i; j < d; j++) {
      out.push({ i, j, part: 're' });
      if (hermitian && j > i) out.push({ i, j, part: 'im' });
    }
  }
  return out;
}

/** The entry E with ⟨E, X⟩ = (Re or Im) X_ij, for (row, col) of a block. */
export function coordinateEntry(row: number, col: number, part: 're' | 'im'): Entry {
  if (row === col) {
    if (part === 'im') throw new RangeError('a diagonal entry of a Hermitian matrix has no imaginary part');
    return [row, row, 1];
  }
  return part === 're' ? [row, col, 0.5] : [row, col, 0, 0.5];
}

/** Value of one coordinate of a matrix. */
export function coordinateValue(m: CMatrix, c: Coordinate): number {
  const k = c.i * m.cols + c.j;
  return c.part === 're' ? m.re[k] : m.im[k];
}

export interface PartialTraceSpec {
  /** The block X (its size must be the product of dims). */
  block: number;
  /** Subsystem dimensions of X, first subsystem most significant (as in linalg's kron). */
  dims: readonly number[];
  /** Subsystems traced out; the others keep their order. */
  traceOut: readonly number[];
  /** true for a Hermitian block (imaginary coordinates constrained too). */
  hermitian: boolean;
  /** Right-hand side: a d_keep×d_keep matrix (Hermitian), or omitted for zero. */
  equals?: CMatrix;
  /** Blocks of size d_keep subtracted on the left: tr_T(X) − Σ Y = equals. */
  subtract?: readonly number[];
  /** Blocks of size d_keep added on the left: tr_T(X) + Σ Y = equals. */
  add?: readonly number[];
}

/**
 * The constraints tr_T(X) (− Σ Y_sub + Σ Y_add) = equals, one per real coordinate of the kept
 * d_keep×d_keep matrix (d_keep² for Hermitian, d_keep(d_keep+1)/2 for symmetric blocks).
 */
export function partialTraceConstraints(spec: PartialTraceSpec): Constraint[] {
  const dims = spec.dims;
  const out = new Set(spec.traceOut);
  for (const s of spec.traceOut) {
    if (!Number.isInteger(s) || s < 0 || s >= dims.length) throw new RhoError('invalid-argument', `subsystem ${s} out of range`, 'traceOut');
  }
  const keep = dims.map((_, k) => k).filter((k) => !out.has(k));
  const offK = offsets(dims, keep);
  const offT = offsets(dims, [...out].sort((a, b) => a - b));
  const dk = product(keep.map((k) => dims[k]));
  if (spec.equals && (spec.equals.rows !== dk || spec.equals.cols !== dk)) {
    throw new RhoError('dimension-mismatch', `right-hand side is ${spec.equals.rows}×${spec.equals.cols}, the partial trace is ${dk}×${dk}`, 'equals');
  }
  const constraints: Constraint[] = [];
  for (const c of matrixCoordinates(dk, spec.hermitian)) {
    const entries: Entry[] = [];
    for (let t = 0; t < offT.length; t++) {
      entries.push(coordinateEntry(offK[c.i] + offT[t], offK[c.j] + offT[t], c.part));
    }
    const terms: BlockTerm[] = [{ block: spec.block, entries }];
    const e = coordinateEntry(c.i, c.j, c.part);
    for (const y of spec.subtract ?? []) terms.push({ block: y, entries: [[e[0], e[1], -(e[2] ?? 0), -((e as readonly number[])[3] ?? 0)]] });
    for (const y of spec.add ?? []) terms.push({ block: y, entries: [e] });
    constraints.push({ terms, equals: spec.equals ? coordinateValue(spec.equals, c) : 0, label: `partial trace (${c.i}, ${c.j}) ${c.part}` });
  }
  return constraints;
}
