/**
 * The size check every request passes before anything else looks at it (`handle`, src/ops/handle.ts):
 * one walk over the request's arrays that finds every matrix and ket in any of the protocol's forms
 * (rows, {"re", "im"}, the packed form, kets as lists) and refuses, with 'too-large' and the place in
 * the request, any side above MAX_DIMENSION, and counts the expression strings of the whole request
 * against MAX_REQUEST_EXPRESSIONS and MAX_REQUEST_EXPRESSION_CHARACTERS. So the same size gets the same
 * code in every form, and a request of expression strings is refused before the first one is parsed.
 *
 * It recognises values by shape, not by field name: a list whose first element is a list of numbers or
 * strings is a matrix given as rows; an object with "packed" or "shape" is a packed matrix; an object
 * with "re" holding rows is a complex matrix; a list of numbers or strings under the key "ket" is a ket.
 * Everything else is walked into (lists of states, Kraus lists, channels), to a depth of 16.
 *
 * On the way, a matrix given as rows of finite numbers (PRE_READ_ENTRIES or more), all rows as long as the first, is read into a
 * row-major Float64Array (codec.ts, rememberNumericRows): the request's validation then skips its rows
 * (handle's stand-ins) and the codec's readers take the array, so the entries are looked at once. Rows
 * that src/ops/json-matrices.ts already read from the request's bytes (recorded the same way) are not
 * looked at again.
 *
 * Deliberately not here: any other validation (the op's JSON Schema and the codec's readers do that,
 * and check the sizes again themselves). Cost: one look at each entry of rows and kets (to count the
 * strings, or to read the numbers; about a millisecond per million entries), O(1) for packed matrices;
 * one Float64Array per matrix of numbers given as rows (8 bytes per entry, less than the parsed rows).
 */
import { RhoError } from '../errors.js';
import { MAX_DIMENSION, forgetNumericRows, rememberNumericRows, takeLiftedRows } from './codec.js';

/** Matrices given as rows with at least this many entries are read into a typed array by the walk. */
export const PRE_READ_ENTRIES = 256;

/** Largest number of expression strings in one request (each costs a parse). */
export const MAX_REQUEST_EXPRESSIONS = 65536;
/** Largest total length of the expression strings of one request (a few seconds of parsing at worst). */
export const MAX_REQUEST_EXPRESSION_CHARACTERS = 1 << 20;

const MAX_DEPTH = 16;

/** What the walk found. */
export interface RequestSizes {
  /** Number of expression strings (entries of matrices and kets that are strings). */
  expressions: number;
  /** Their total length in characters. */
  expressionCharacters: number;
  /** The largest side of any matrix or ket found (0 when there is none). */
  largestSide: number;
}

function tooLarge(path: string, what: string, size: number, limit: number): RhoError {
  return new RhoError('too-large', `${what} is ${size}, above the limit of ${limit}.`, path, { size, limit });
}

function join(path: string, key: string): string {
  return path === '' ? key : `${path}.${key}`;
}

function isScalar(v: unknown): boolean {
  return typeof v === 'number' || typeof v === 'string';
}

function isRows(v: unknown[]): boolean {
  const first = v[0];
  return Array.isArray(first) && (first.length === 0 || isScalar(first[0]));
}

/** Checks the request's matrices and kets against the size limits and counts its expression strings. */
export function checkRequestSizes(request: Record<string, unknown>): RequestSizes {
  const sizes: RequestSizes = { expressions: 0, expressionCharacters: 0, largestSide: 0 };
  const side = (n: number): void => {
    if (n > sizes.largestSide) sizes.largestSide = n;
  };

  const countStrings = (list: unknown[], path: string): void => {
    for (let j = 0; j < list.length; j++) {
      const x = list[j];
      if (typeof x !== 'string') continue;
      sizes.expressions++;
      sizes.expressionCharacters += x.length;
      if (sizes.expressions > MAX_REQUEST_EXPRESSIONS) {
        throw tooLarge(`${path}[${j}]`, 'The number of expression strings in the request', sizes.expressions, MAX_REQUEST_EXPRESSIONS);
      }
      if (sizes.expressionCharacters > MAX_REQUEST_EXPRESSION_CHARACTERS) {
        throw tooLarge(`${path}[${j}]`, 'The total length of the expression strings in the request', sizes.expressionCharacters, MAX_REQUEST_EXPRESSION_CHARACTERS);
      }
    }
  };

  const rows = (v: unknown[], path: string): void => {
    if (v.length > MAX_DIMENSION) throw tooLarge(path, 'The number of rows', v.length, MAX_DIMENSION);
    side(v.length);
    const cols = (v[0] as unknown[]).length;
    // Rows already read into a typed array (src/ops/json-matrices.ts, from the request's bytes):
    // finite numbers, all rows as long as the first, sides within the limit; nothing more to look at.
    if (takeLiftedRows(v)) return side(cols);
    // Rows of finite numbers, all as long as the first, are read into a typed array on the way (the
    // codec's readers and handle's validation then use it instead of walking the rows again).
    // Small matrices are left to ajv and the codec (a fresh typed array costs more than their walk).
    const big = cols >= 1 && cols <= MAX_DIMENSION && v.length * cols >= PRE_READ_ENTRIES;
    let values: Float64Array | undefined = big ? new Float64Array(v.length * cols) : undefined;
    for (let i = 0; i < v.length; i++) {
      const row = v[i];
      if (!Array.isArray(row)) {
        values = undefined;
        continue;
      }
      if (row.length > MAX_DIMENSION) throw tooLarge(`${path}[${i}]`, 'The number of columns', row.length, MAX_DIMENSION);
      side(row.length);
      if (values !== undefined && row.length === cols) {
        const base = i * cols;
        let j = 0;
        for (; j < cols; j++) {
          const x = row[j];
          if (typeof x !== 'number' || x - x !== 0) break;
          values[base + j] = x;
        }
        if (j === cols) continue;
      }
      values = undefined;
      countStrings(row, `${path}[${i}]`);
    }
    if (values !== undefined) rememberNumericRows(v, values);
    else forgetNumericRows(v); // nothing recorded by an earlier walk of the same rows may outlive a change to them
  };

  const ket = (v: unknown[], path: string): void => {
    if (v.length > MAX_DIMENSION) throw tooLarge(path, 'The length of the ket', v.length, MAX_DIMENSION);
    side(v.length);
    countStrings(v, path);
  };

  const walk = (v: unknown, path: string, key: string, depth: number): void => {
    if (depth > MAX_DEPTH || typeof v !== 'object' || v === null) return;
    if (Array.isArray(v)) {
      if (v.length === 0) return;
      if (isRows(v)) return rows(v, path);
      if (key === 'ket' && isScalar(v[0])) return ket(v, path);
      if (!v.some((x) => typeof x === 'object' && x !== null)) return;
      for (let k = 0; k < v.length; k++) walk(v[k], `${path}[${k}]`, '', depth + 1);
      return;
    }
    const obj = v as Record<string, unknown>;
    if ('packed' in obj || 'shape' in obj) {
      const shape = obj.shape;
      if (Array.isArray(shape) && shape.length === 2) {
        shape.forEach((s, k) => {
          if (typeof s === 'number' && s > MAX_DIMENSION) {
            throw tooLarge(`${join(path, 'shape')}[${k}]`, k === 0 ? 'The number of rows' : 'The number of columns', s, MAX_DIMENSION);
          }
          if (typeof s === 'number') side(s);
        });
      }
      return;
    }
    for (const [k, x] of Object.entries(obj)) {
      if (k === 'id') continue;
      // {"re": ..., "im": ...} of a ket keeps the ket's rule; of a matrix, the rows rule applies by shape.
      walk(x, join(path, k), (k === 're' || k === 'im') && key === 'ket' ? 'ket' : k, depth + 1);
    }
  };

  walk(request, '', '', 0);
  return sizes;
}
