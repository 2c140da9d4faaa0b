/**
 * The codec between the protocol's plain data (PROTOCOL.md, "Values") and the engine's objects: matrices,
 * kets, states, channels, subsystem lists and numbers in; matrices, states, channels and numbers out.
 *
 * Every reader throws a RhoError whose path is the full place in the request ("rho.matrix[1][0]"), so op
 * modules pass the argument's name as `path` and rethrow nothing. Sizes are checked from array lengths
 * BEFORE anything is allocated (limits exported below), so a hostile request costs O(its length) at most.
 * States are validated (Hermitian, positive semidefinite, unit trace within the tolerance), never repaired.
 *
 * Deliberately not here: any physics beyond validation (no channel is checked for trace preservation —
 * `Channel` does not assume it), and no JSON parsing (callers hand over parsed values).
 * The JSON Schema fragments in `schemas` describe the same values for op argument schemas; the readers
 * re-check everything themselves, since engine code may call them on data that never met a schema.
 *
 * Cost: O(entries) to read a matrix (expression strings are parsed one by one, up to 500 characters each);
 * one Hermitian eigendecomposition, O(n^3), per state (positivity) and per Choi matrix (Kraus form).
 */
import {
  CMatrix, adjoint, frobeniusNorm, hermitianPart, hermiticityDefect, mul, scale, trace, zeros,
} from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { kernelSquareFacts } from '../linalg/eigh-wasm.js';
import { product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import type { Channel, State } from '../quantum/types.js';
import { choiToKraus } from '../quantum/channels.js';
import { checkDensityMatrix, checkDims, checkHermitian, checkPositive } from '../quantum/validate.js';
import { readExpression } from './expressions.js';

// The size limits live in src/limits.ts (the quantum layer's presets check them too); re-exported here.
export { MAX_DIMENSION, MAX_ENTRIES, MAX_KRAUS, MAX_CHANNEL_ENTRIES, MAX_SUBSYSTEMS } from '../limits.js';
import { MAX_DIMENSION, MAX_ENTRIES, MAX_KRAUS, MAX_CHANNEL_ENTRIES, MAX_SUBSYSTEMS } from '../limits.js';
/** Largest number of expression strings in one matrix or ket (each costs a parse; numbers are not counted). */
export const MAX_EXPRESSION_ENTRIES = 65536;

export interface NumberRange {
  min?: number;
  max?: number;
  minExclusive?: boolean;
  maxExclusive?: boolean;
}

// ---------------------------------------------------------------------------------------------------
// Small helpers

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function describe(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'an object';
  if (typeof v === 'string') return 'a string';
  return `a ${typeof v}`;
}

function refuseUnknownKeys(value: Record<string, unknown>, allowed: readonly string[], path: string, what: string): void {
  for (const key of Object.keys(value)) {
    if (!allowed.includes(key)) {
      throw new RhoError(
        'invalid-argument',
        `Unknown field "${key}" in ${what}; the fields are ${allowed.map((k) => `"${k}"`).join(', ')}.`,
        `${path}.${key}`,
      );
    }
  }
}

function tooLarge(path: string, what: string, size: number, limit: number): RhoError {
  return new RhoError('too-large', `${what} is ${size}, above the limit of ${limit}.`, path, { size, limit });
}

/** A finite real number at `path`. */
function realEntry(v: unknown, path: string): number {
  if (typeof v !== 'number') {
    throw new RhoError('invalid-argument', `Expected a number here, not ${describe(v)}.`, path);
  }
  if (!Number.isFinite(v)) throw new RhoError('invalid-argument', 'The entry is NaN or infinite; entries must be finite.', path);
  return v;
}

/** A number or an expression string at `path`, as a complex pair. */
function complexEntry(v: unknown, path: string): { re: number; im: number } {
  if (typeof v === 'string') return readExpression(v, path);
  if (typeof v === 'number') return { re: realEntry(v, path), im: 0 };
  throw new RhoError('invalid-argument', `Expected a number or an expression string here, not ${describe(v)}.`, path);
}

/** Shape of rows-of-arrays data, checked for emptiness and the size limits, without reading entries. */
function rowsShape(value: unknown, path: string): { rows: number; cols: number } {
  if (!Array.isArray(value)) {
    throw new RhoError('invalid-argument', `Expected a list of rows, not ${describe(value)}.`, path);
  }
  if (value.length === 0) throw new RhoError('invalid-argument', 'The matrix has no rows.', path);
  if (value.length > MAX_DIMENSION) throw tooLarge(path, 'The number of rows', value.length, MAX_DIMENSION);
  const first = value[0];
  if (!Array.isArray(first)) {
    throw new RhoError('invalid-argument', `Each row must be a list of entries, not ${describe(first)}.`, `${path}[0]`);
  }
  if (first.length === 0) throw new RhoError('invalid-argument', 'The row is empty.', `${path}[0]`);
  if (first.length > MAX_DIMENSION) throw tooLarge(`${path}[0]`, 'The number of columns', first.length, MAX_DIMENSION);
  return { rows: value.length, cols: first.length };
}

/** The shape a matrix value claims, from array lengths only (for size checks before reading). */
function peekShape(value: unknown, path: string): { rows: number; cols: number } {
  if (isPlainObject(value) && ('packed' in value || 'shape' in value)) {
    const shape = value.shape;
    if (Array.isArray(shape) && shape.length === 2 && shape.every((x) => Number.isInteger(x) && (x as number) >= 1)) {
      return { rows: shape[0] as number, cols: shape[1] as number };
    }
    throw new RhoError('invalid-argument', 'The shape of a packed matrix is [rows, columns], two positive integers.', `${path}.shape`);
  }
  if (isPlainObject(value) && 're' in value) return rowsShape(value.re, `${path}.re`);
  return rowsShape(value, path);
}

/**
 * Fill `target` (re or im storage) from rows, all of length `cols`, in one pass: finite numbers go
 * straight in; anything else goes to `other` with its path (built only then: a path string per entry
 * cost more than the reading itself).
 */
function fillRows(
  value: unknown[],
  path: string,
  cols: number,
  target: Float64Array,
  other: (v: unknown, p: string, k: number) => void,
): void {
  for (let i = 0; i < value.length; i++) {
    const row = value[i];
    if (!Array.isArray(row)) {
      throw new RhoError('invalid-argument', `Each row must be a list of entries, not ${describe(row)}.`, `${path}[${i}]`);
    }
    if (row.length !== cols) {
      throw new RhoError(
        'dimension-mismatch',
        `Row ${i} has ${row.length} entries but row 0 has ${cols}; all rows must have the same length.`,
        `${path}[${i}]`,
      );
    }
    const base = i * cols;
    for (let j = 0; j < cols; j++) {
      const v = row[j];
      if (typeof v === 'number' && v - v === 0) target[base + j] = v;
      else other(v, `${path}[${i}][${j}]`, base + j);
    }
  }
}

// ---------------------------------------------------------------------------------------------------
// Rows already read into typed arrays

/**
 * Matrices given as rows of finite numbers, all rows of the same length, read into a row-major
 * Float64Array by the size walk every request passes first (src/ops/sizes.ts), which looks at every
 * entry anyway: the request's validation then skips them (handle's stand-ins) and the readers below
 * take the array instead of reading the rows again. Keyed by the rows array itself (forgotten with
 * the request); a reader takes an entry out, so two readers of one array never share storage.
 */
const numericRows = new WeakMap<unknown[], Float64Array>();

/** Records `values` as the row-major entries of `rows` (all finite numbers, rows of equal length). */
export function rememberNumericRows(rows: unknown[], values: Float64Array): void {
  numericRows.set(rows, values);
}

/** Forgets what was recorded for `rows` (the size walk found them not to be numbers only this time). */
export function forgetNumericRows(rows: unknown[]): void {
  numericRows.delete(rows);
}

/** Rows recorded from a request's bytes (src/ops/json-matrices.ts), which the size walk need not look at. */
const liftedRows = new WeakSet<unknown[]>();

/** Records `values` for rows that src/ops/json-matrices.ts has just built from a request's bytes. */
export function rememberLiftedRows(rows: unknown[], values: Float64Array): void {
  numericRows.set(rows, values);
  liftedRows.add(rows);
}

/**
 * Whether `rows` were built from a request's bytes with their values recorded and not yet looked at
 * by a size walk; true once only (a request walked a second time, perhaps changed since, is read again).
 */
export function takeLiftedRows(rows: unknown[]): boolean {
  return liftedRows.delete(rows) && numericRows.has(rows);
}

/** Whether `rows` was read into a typed array by the size walk (rows of finite numbers, of equal length). */
export function isNumericRows(rows: unknown): boolean {
  return Array.isArray(rows) && numericRows.has(rows);
}

/** The entries of `rows` read by the size walk, when there are `count` of them; removed from the record. */
function takeNumericRows(rows: unknown[], count: number): Float64Array | undefined {
  const values = numericRows.get(rows);
  if (values === undefined) return undefined;
  numericRows.delete(rows);
  return values.length === count ? values : undefined;
}

// ---------------------------------------------------------------------------------------------------
// Matrices and kets

/** The encoding name of the packed matrix form (protocol 1.1). */
export const PACKED_ENCODING = 'float64-le';

// A search for one bad character (about 1 ms per megabyte); an anchored /^[...]*$/ backtracks ten times slower.
const NOT_BASE64 = /[^A-Za-z0-9+/=]/;
interface NodeBufferApi {
  from(text: string, encoding: 'base64'): Uint8Array;
  from(memory: ArrayBuffer, byteOffset: number, length: number): { write(text: string, offset: number, length: number, encoding: 'base64'): number };
  byteLength(text: string, encoding: 'base64'): number;
}
const NodeBuffer = (globalThis as { Buffer?: NodeBufferApi }).Buffer;

/** Bytes of `b64` (standard base64, padded), checked to be exactly `bytes` long before decoding. */
function decodeBase64(b64: unknown, bytes: number, path: string): Uint8Array {
  if (typeof b64 !== 'string') throw new RhoError('invalid-argument', `Expected a base64 string, not ${describe(b64)}.`, path);
  const want = 4 * Math.ceil(bytes / 3);
  if (b64.length !== want) {
    throw new RhoError('dimension-mismatch', `The base64 text has ${b64.length} characters; ${bytes} bytes of float64 need ${want}.`, path);
  }
  const invalid = (): boolean => {
    const pad = b64.indexOf('=');
    return NOT_BASE64.test(b64) || (pad >= 0 && b64.slice(pad) !== '=' && b64.slice(pad) !== '==');
  };
  // Node's Buffer decodes natively (several times faster than atob and a loop). It skips characters
  // outside base64 instead of refusing them, which the byte count below then catches; the character
  // check runs only then, to tell bad base64 from a wrong length. (It also reads the URL-safe alphabet.)
  // atob elsewhere (browsers, workers), which rejects characters outside base64 itself.
  let out: Uint8Array;
  if (NodeBuffer) {
    out = NodeBuffer.from(b64, 'base64');
    if (out.length !== bytes && invalid()) throw new RhoError('parse-error', 'The packed data is not valid base64.', path);
  } else {
    let text: string;
    try {
      text = atob(b64.replace(/-/g, '+').replace(/_/g, '/'));
    } catch {
      throw new RhoError('parse-error', 'The packed data is not valid base64.', path);
    }
    out = new Uint8Array(text.length);
    for (let k = 0; k < text.length; k++) out[k] = text.charCodeAt(k);
  }
  if (out.length !== bytes) throw new RhoError('dimension-mismatch', `The packed data holds ${out.length} bytes, not ${bytes}.`, path);
  return out;
}

const LITTLE_ENDIAN = new Uint8Array(new Float64Array([1]).buffer)[7] === 0x3f;

/** Float64 values from little-endian bytes into `target`; every value must be finite. */
function fillPacked(bytes: Uint8Array, target: Float64Array, path: string): void {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (LITTLE_ENDIAN && bytes.byteOffset % 8 === 0) target.set(new Float64Array(bytes.buffer, bytes.byteOffset, target.length));
  else if (LITTLE_ENDIAN) new Uint8Array(target.buffer, target.byteOffset, bytes.length).set(bytes);
  else for (let k = 0; k < target.length; k++) target[k] = view.getFloat64(8 * k, true);
  checkFinite(target, path);
}

/** Refuses a packed matrix with a NaN or infinite entry, naming the first. */
function checkFinite(target: Float64Array, path: string): void {
  for (let k = 0; k < target.length; k++) {
    if (!Number.isFinite(target[k])) {
      throw new RhoError('invalid-argument', `Entry ${k} (row-major) of the packed matrix is NaN or infinite; entries must be finite.`, path);
    }
  }
}

/**
 * The packed matrix form {"shape": [n, m], "packed": "float64-le", "re": BASE64, "im": BASE64} (im
 * optional): row-major little-endian float64. The shape is checked against the size limits and the
 * text lengths against the shape before anything is decoded.
 */
function readPackedMatrix(value: Record<string, unknown>, path: string): CMatrix {
  refuseUnknownKeys(value, ['shape', 'packed', 're', 'im'], path, 'a packed matrix');
  if (value.packed !== PACKED_ENCODING) {
    throw new RhoError('invalid-argument', `The only packed encoding is "${PACKED_ENCODING}" (row-major little-endian float64, base64).`, `${path}.packed`);
  }
  const shape = value.shape;
  if (!Array.isArray(shape) || shape.length !== 2 || !shape.every((x) => Number.isInteger(x) && (x as number) >= 1)) {
    throw new RhoError('invalid-argument', 'The shape of a packed matrix is [rows, columns], two positive integers.', `${path}.shape`);
  }
  const [rows, cols] = shape as [number, number];
  if (rows > MAX_DIMENSION) throw tooLarge(`${path}.shape[0]`, 'The number of rows', rows, MAX_DIMENSION);
  if (cols > MAX_DIMENSION) throw tooLarge(`${path}.shape[1]`, 'The number of columns', cols, MAX_DIMENSION);
  if (value.re === undefined) throw new RhoError('missing-argument', 'A packed matrix needs "re".', `${path}.re`);
  const m = zeros(rows, cols);
  const part = (text: unknown, target: Float64Array, at: string): void => {
    // In Node, well-formed text of the right length is decoded straight into the matrix's storage (no
    // buffer of its own, no copy); anything else takes decodeBase64's path, which names the fault.
    const bytes = target.byteLength;
    if (NodeBuffer && LITTLE_ENDIAN && typeof text === 'string' && text.length === 4 * Math.ceil(bytes / 3) && NodeBuffer.byteLength(text, 'base64') === bytes) {
      if (NodeBuffer.from(target.buffer as ArrayBuffer, target.byteOffset, bytes).write(text, 0, bytes, 'base64') === bytes) {
        checkFinite(target, at);
        return;
      }
    }
    fillPacked(decodeBase64(text, bytes, at), target, at);
  };
  part(value.re, m.re, `${path}.re`);
  if (value.im !== undefined) part(value.im, m.im, `${path}.im`);
  return m;
}

/**
 * A complex matrix from any of the protocol's forms: rows of numbers, rows mixing numbers and expression
 * strings, {"re": rows, "im": rows} (im optional; both numbers only), or the packed form (above).
 * Rectangular matrices are allowed.
 */
export function readMatrix(value: unknown, path: string): CMatrix {
  if (isPlainObject(value)) {
    if ('packed' in value || 'shape' in value) return readPackedMatrix(value, path);
    if (!('re' in value)) {
      const hint = 'matrix' in value || 'ket' in value ? ' (this looks like a state; give its matrix here)' : '';
      throw new RhoError(
        'invalid-argument',
        `Expected a matrix: rows of numbers or expression strings, or {"re": rows, "im": rows}${hint}.`,
        path,
      );
    }
    refuseUnknownKeys(value, ['re', 'im'], path, 'a complex matrix');
    const { rows, cols } = rowsShape(value.re, `${path}.re`);
    // Each part: the size walk's typed array when it made one, else read here.
    const part = (rowsValue: unknown[], at: string): Float64Array => {
      const ready = takeNumericRows(rowsValue, rows * cols);
      if (ready) return ready;
      const target = new Float64Array(rows * cols);
      fillRows(rowsValue, at, cols, target, (v, p, k) => {
        target[k] = realEntry(v, p);
      });
      return target;
    };
    const re = part(value.re as unknown[], `${path}.re`);
    if (value.im === undefined) return { rows, cols, re, im: new Float64Array(rows * cols) };
    const shape = rowsShape(value.im, `${path}.im`);
    if (shape.rows !== rows || shape.cols !== cols) {
      throw new RhoError(
        'dimension-mismatch',
        `The imaginary part is ${shape.rows}x${shape.cols} but the real part is ${rows}x${cols}.`,
        `${path}.im`,
      );
    }
    return { rows, cols, re, im: part(value.im as unknown[], `${path}.im`) };
  }
  if (!Array.isArray(value)) {
    throw new RhoError(
      'invalid-argument',
      `Expected a matrix (rows of numbers or expression strings, or {"re", "im"}), not ${describe(value)}.`,
      path,
    );
  }
  const { rows, cols } = rowsShape(value, path);
  const re = takeNumericRows(value, rows * cols);
  if (re) return { rows, cols, re, im: new Float64Array(rows * cols) };
  const m = zeros(rows, cols);
  let expressions = 0;
  fillRows(value, path, cols, m.re, (v, p, k) => {
    if (typeof v === 'string' && ++expressions > MAX_EXPRESSION_ENTRIES) {
      throw tooLarge(p, 'The number of expression entries', expressions, MAX_EXPRESSION_ENTRIES);
    }
    const z = complexEntry(v, p);
    m.re[k] = z.re;
    m.im[k] = z.im;
  });
  return m;
}

/**
 * Largest magnitude of a matrix entry: above it the squares that norms and products are made of
 * overflow double precision (about 1.3e154), and the answers would be NaN instead of numbers.
 */
export const MAX_ENTRY_MAGNITUDE = 1e150;

/**
 * One pass over a square matrix (the checks that used to walk it five times): every entry finite and of
 * magnitude at most MAX_ENTRY_MAGNITUDE, the Frobenius norm, and the Hermiticity defect
 * max|M_ij − conj(M_ji)| with its place. Throws for a bad entry, naming it.
 */
function squareFacts(m: CMatrix, path: string): { norm: number; defect: { size: number; row: number; col: number } } {
  const n = m.rows;
  const re = m.re;
  const im = m.im;
  // From order 16 in the eigensolver's kernels (the same loops); a bad entry is named by the loops below.
  const fast = n >= 16 ? kernelSquareFacts(re, im, n, MAX_ENTRY_MAGNITUDE) : null;
  if (fast && fast.bad < 0) return { norm: Math.sqrt(fast.sum), defect: { size: Math.sqrt(fast.worst), row: fast.row, col: fast.col } };
  let sum = 0;
  for (let k = 0; k < n * n; k++) {
    const x = re[k];
    const y = im[k];
    if (!(Math.abs(x) <= MAX_ENTRY_MAGNITUDE && Math.abs(y) <= MAX_ENTRY_MAGNITUDE)) {
      const [i, j] = [Math.floor(k / n), k % n];
      if (!Number.isFinite(x) || !Number.isFinite(y)) throw new RhoError('invalid-argument', 'The matrix has a NaN or infinite entry.', `${path}[${i}][${j}]`);
      throw new RhoError(
        'invalid-argument',
        `Entry [${i}][${j}] has magnitude ${Math.max(Math.abs(x), Math.abs(y)).toExponential(3)}, above ${MAX_ENTRY_MAGNITUDE}: its square would overflow double precision. Rescale the matrix (and a parameter it multiplies, such as β).`,
        `${path}[${i}][${j}]`,
      );
    }
    sum += x * x + y * y;
  }
  // The defect compares M_ij with M_ji: in tiles of 32 × 32, so that the transposed reads stay in cache.
  let worst = 0;
  let row = 0;
  let col = 0;
  const T = 32;
  for (let ib = 0; ib < n; ib += T) {
    for (let jb = ib; jb < n; jb += T) {
      const iEnd = Math.min(ib + T, n);
      const jEnd = Math.min(jb + T, n);
      for (let i = ib; i < iEnd; i++) {
        for (let j = Math.max(jb, i); j < jEnd; j++) {
          const dr = re[i * n + j] - re[j * n + i];
          const di = im[i * n + j] + im[j * n + i]; // on the diagonal: 2 Im M_ii
          const d2 = dr * dr + di * di;
          if (d2 > worst) {
            worst = d2;
            row = j;
            col = i;
          }
        }
      }
    }
  }
  return { norm: Math.sqrt(sum), defect: { size: Math.sqrt(worst), row, col } };
}

/** A square matrix (finite, non-empty, entries of magnitude at most MAX_ENTRY_MAGNITUDE). */
export function readSquareMatrix(value: unknown, path: string): CMatrix {
  const m = readMatrix(value, path);
  if (m.rows !== m.cols) throw new RhoError('dimension-mismatch', `The matrix is ${m.rows}x${m.cols}; it must be square.`, path);
  squareFacts(m, path);
  return m;
}

/**
 * A Hermitian matrix within the tolerance (defect relative to its Frobenius norm, as in
 * quantum/validate.ts), with its Hermiticity defect; read and checked in one pass after decoding.
 */
export function readHermitianWithDefect(value: unknown, path: string, tol: number): { matrix: CMatrix; defect: number } {
  const m = readMatrix(value, path);
  if (m.rows !== m.cols) throw new RhoError('dimension-mismatch', `The matrix is ${m.rows}x${m.cols}; it must be square.`, path);
  const { norm, defect } = squareFacts(m, path);
  if (defect.size > tol * Math.max(norm, 1e-300)) {
    throw new RhoError(
      'not-hermitian',
      `The matrix is not Hermitian: entry [${defect.row}][${defect.col}] differs from the conjugate of [${defect.col}][${defect.row}] by ${defect.size.toExponential(3)}.`,
      `${path}[${defect.row}][${defect.col}]`,
      { defect: defect.size },
    );
  }
  return { matrix: m, defect: defect.size };
}

/** A Hermitian matrix within the tolerance (relative to its Frobenius norm; see quantum/validate.ts). */
export function readHermitian(value: unknown, path: string, tol: number): CMatrix {
  return readHermitianWithDefect(value, path, tol).matrix;
}

/** A ket as an n×1 column: a list of numbers or expression strings, or {"re": list, "im": list}. */
export function readKet(value: unknown, path: string): CMatrix {
  const list = (v: unknown, p: string): unknown[] => {
    if (!Array.isArray(v)) throw new RhoError('invalid-argument', `Expected a list of amplitudes, not ${describe(v)}.`, p);
    if (v.length === 0) throw new RhoError('invalid-argument', 'The ket has no amplitudes.', p);
    if (v.length > MAX_DIMENSION) throw tooLarge(p, 'The length of the ket', v.length, MAX_DIMENSION);
    return v;
  };
  if (isPlainObject(value)) {
    refuseUnknownKeys(value, ['re', 'im'], path, 'a complex ket');
    if (value.re === undefined) throw new RhoError('missing-argument', 'A complex ket needs its real part "re".', `${path}.re`);
    const re = list(value.re, `${path}.re`);
    const v = zeros(re.length, 1);
    re.forEach((x, k) => {
      v.re[k] = realEntry(x, `${path}.re[${k}]`);
    });
    if (value.im !== undefined) {
      const im = list(value.im, `${path}.im`);
      if (im.length !== re.length) {
        throw new RhoError('dimension-mismatch', `The imaginary part has ${im.length} amplitudes, the real part ${re.length}.`, `${path}.im`);
      }
      im.forEach((x, k) => {
        v.im[k] = realEntry(x, `${path}.im[${k}]`);
      });
    }
    return v;
  }
  const entries = list(value, path);
  const v = zeros(entries.length, 1);
  entries.forEach((x, k) => {
    const z = complexEntry(x, `${path}[${k}]`);
    v.re[k] = z.re;
    v.im[k] = z.im;
  });
  return v;
}

// ---------------------------------------------------------------------------------------------------
// Dimensions, labels, subsystems, numbers

/** A list of subsystem dimensions; when `size` is given they must multiply to it. */
export function readDims(value: unknown, path: string, size?: number): number[] {
  if (!Array.isArray(value)) {
    throw new RhoError('invalid-argument', `Subsystem dimensions must be a list of positive integers, not ${describe(value)}.`, path);
  }
  if (value.length === 0) throw new RhoError('invalid-argument', 'Subsystem dimensions must not be empty.', path);
  if (value.length > MAX_SUBSYSTEMS) throw tooLarge(path, 'The number of subsystems', value.length, MAX_SUBSYSTEMS);
  value.forEach((d, k) => {
    if (typeof d !== 'number' || !Number.isInteger(d) || d < 1) {
      throw new RhoError('invalid-argument', `A subsystem dimension must be a positive integer, not ${JSON.stringify(d) ?? describe(d)}.`, `${path}[${k}]`);
    }
  });
  const dims = value as number[];
  if (size !== undefined && product(dims) !== size) {
    throw new RhoError(
      'dimension-mismatch',
      `The subsystem dimensions [${dims.join(', ')}] multiply to ${product(dims)}, but the matrix side is ${size}.`,
      path,
    );
  }
  return [...dims];
}

/** Subsystem labels: distinct non-empty strings, one per subsystem. */
export function readLabels(value: unknown, path: string, count: number): string[] {
  if (!Array.isArray(value)) throw new RhoError('invalid-argument', `Labels must be a list of strings, not ${describe(value)}.`, path);
  if (value.length !== count) {
    throw new RhoError('dimension-mismatch', `There are ${value.length} labels for ${count} subsystems.`, path);
  }
  const seen = new Set<string>();
  value.forEach((l, k) => {
    if (typeof l !== 'string' || l.length === 0) throw new RhoError('invalid-argument', 'A label must be a non-empty string.', `${path}[${k}]`);
    if (seen.has(l)) throw new RhoError('invalid-argument', `The label "${l}" is used twice.`, `${path}[${k}]`);
    seen.add(l);
  });
  return [...(value as string[])];
}

/**
 * A list of distinct subsystem indices in 0..count−1 (an empty list is allowed; callers that need one
 * subsystem at least say so). With `labels`, entries may also be label strings, resolved to indices.
 */
export function readSystems(
  value: unknown,
  path: string,
  count: number,
  options: { labels?: readonly string[]; allowEmpty?: boolean } = {},
): number[] {
  if (!Array.isArray(value)) {
    throw new RhoError('invalid-argument', `Expected a list of subsystem indices, not ${describe(value)}.`, path);
  }
  if (value.length === 0 && options.allowEmpty === false) {
    throw new RhoError('invalid-argument', 'The list of subsystems must not be empty.', path);
  }
  if (value.length > count) {
    throw new RhoError('invalid-argument', `${value.length} subsystems are listed but there are only ${count}.`, path);
  }
  const seen = new Set<number>();
  return value.map((s, k) => {
    const p = `${path}[${k}]`;
    let index: number;
    if (typeof s === 'string' && options.labels) {
      index = options.labels.indexOf(s);
      if (index < 0) throw new RhoError('invalid-argument', `No subsystem is labelled "${s}" (labels: ${options.labels.join(', ')}).`, p);
    } else if (typeof s === 'number' && Number.isInteger(s)) {
      index = s;
      if (index < 0 || index >= count) {
        throw new RhoError('invalid-argument', `Subsystem ${s} does not exist: the subsystems are numbered 0..${count - 1}.`, p);
      }
    } else {
      throw new RhoError('invalid-argument', `A subsystem is given by its index (an integer from 0)${options.labels ? ' or its label' : ''}.`, p);
    }
    if (seen.has(index)) throw new RhoError('invalid-argument', `Subsystem ${JSON.stringify(s)} is listed twice.`, p);
    seen.add(index);
    return index;
  });
}

/** A finite number, optionally inside a range. */
export function readNumber(value: unknown, path: string, range: NumberRange = {}): number {
  if (typeof value !== 'number') throw new RhoError('invalid-argument', `Expected a number, not ${describe(value)}.`, path);
  if (!Number.isFinite(value)) throw new RhoError('invalid-argument', 'The number must be finite.', path);
  const { min, max, minExclusive, maxExclusive } = range;
  const low = min !== undefined && (minExclusive ? value <= min : value < min);
  const high = max !== undefined && (maxExclusive ? value >= max : value > max);
  if (low || high) {
    const lo = min === undefined ? '(-∞' : `${minExclusive ? '(' : '['}${min}`;
    const hi = max === undefined ? '∞)' : `${max}${maxExclusive ? ')' : ']'}`;
    throw new RhoError('invalid-argument', `The value ${value} is outside the allowed range ${lo}, ${hi}.`, path, { value });
  }
  return value;
}

// ---------------------------------------------------------------------------------------------------
// States

const STATE_KEYS = ['matrix', 'ket', 'dims', 'labels'] as const;

/**
 * How an accepted state was made exact before use, when that changed it by more than rounding (the one
 * rule for inputs accepted within a loose "tolerance"; docs/protocol.md, "Values"): the Hermitian part,
 * negative eigenvalues set to zero, and, for density matrices and kets, divided by the trace (norm²).
 */
export interface Adjustment {
  /** The input's place in the request ("rho", "states[2]"). */
  path: string;
  /** Its trace (a ket: its squared norm) before the division, when that was not 1 to within 1e-12. */
  trace?: number;
  /** Its most negative eigenvalue before it was set to zero, when below −1e-12 · ‖M‖_F. */
  smallestEigenvalue?: number;
  /** Its Hermiticity defect max|M_ij − conj(M_ji)|, when above 1e-12 · ‖M‖_F. */
  hermiticityDefect?: number;
}

/** What is done to an accepted input, in words (the answer's note beside its list of adjustments). */
export const ADJUSTMENT_RULE =
  'Inputs accepted within the tolerance are used made exact: their Hermitian part, negative eigenvalues set to zero, and density matrices (and kets) divided by their trace (squared norm); the inputs listed here changed by more than rounding.';

/** Changes below this (relative to the norm; absolute for traces) count as rounding and are not reported. */
const ROUNDING = 1e-12;

let adjustments: Adjustment[] | undefined;

/** Runs `f`, collecting the adjustments made to the states it reads (handle reports them in the answer). */
export function collectingAdjustments<T>(f: () => T): { result: T; adjustments: Adjustment[] } {
  const saved = adjustments;
  const mine: Adjustment[] = [];
  adjustments = mine;
  try {
    return { result: f(), adjustments: mine };
  } finally {
    adjustments = saved;
  }
}

/**
 * The exact version of an accepted matrix (see Adjustment): Hermitian part, negative eigenvalues (given
 * ascending in `values`) set to zero, divided by the trace when `normalise`.
 */
function madeExact(m: CMatrix, values: Float64Array, normalise: boolean, path: string): CMatrix {
  const norm = Math.max(frobeniusNorm(m), 1e-300);
  const note: Adjustment = { path };
  const defect = hermiticityDefect(m).size;
  let out = m;
  if (defect > 0) {
    out = hermitianPart(m);
    if (defect > ROUNDING * norm) note.hermiticityDefect = defect;
  }
  if (values[0] < 0) {
    if (values[0] < -ROUNDING * norm) {
      note.smallestEigenvalue = values[0];
      const { values: w, vectors } = eigh(out, { vectors: true });
      const n = out.rows;
      const clipped = zeros(n, n);
      for (let k = 0; k < n; k++) {
        const lam = w[k];
        if (!(lam > 0)) continue;
        for (let i = 0; i < n; i++) {
          const ar = vectors!.re[i * n + k] * lam;
          const ai = vectors!.im[i * n + k] * lam;
          for (let j = 0; j < n; j++) {
            const br = vectors!.re[j * n + k];
            const bi = vectors!.im[j * n + k];
            clipped.re[i * n + j] += ar * br + ai * bi;
            clipped.im[i * n + j] += ai * br - ar * bi;
          }
        }
      }
      out = hermitianPart(clipped);
    }
  }
  if (normalise) {
    const tr = trace(out).re;
    if (tr !== 1 && tr > 0) {
      if (Math.abs(tr - 1) > ROUNDING) note.trace = trace(m).re;
      out = scale(out, 1 / tr);
    }
  }
  if (adjustments && (note.trace !== undefined || note.smallestEigenvalue !== undefined || note.hermiticityDefect !== undefined)) {
    adjustments.push(note);
  }
  return out;
}

function readStateWith(value: unknown, path: string, tol: number, check: 'density' | 'positive'): State {
  // A bare matrix stands for {"matrix": M} (one system).
  const obj: Record<string, unknown> = Array.isArray(value) || (isPlainObject(value) && 're' in value) ? { matrix: value } : (value as Record<string, unknown>);
  const bare = obj !== value;
  const at = (key: string) => (bare ? path : `${path}.${key}`);
  if (!isPlainObject(obj)) {
    throw new RhoError(
      'invalid-argument',
      `Expected a state: {"matrix": M, "dims"?, "labels"?} or {"ket": v, "dims"?, "labels"?}, not ${describe(value)}.`,
      path,
    );
  }
  refuseUnknownKeys(obj, STATE_KEYS, path, 'a state');
  if (obj.matrix !== undefined && obj.ket !== undefined) {
    throw new RhoError('invalid-argument', 'Give a state either as "matrix" or as "ket", not both.', path);
  }
  if (obj.matrix === undefined && obj.ket === undefined) {
    throw new RhoError('missing-argument', 'A state needs a "matrix" (or a "ket").', `${path}.matrix`);
  }
  let matrix: CMatrix;
  if (obj.ket !== undefined) {
    const v = readKet(obj.ket, at('ket'));
    const norm2 = frobeniusNorm(v) ** 2;
    if (Math.abs(norm2 - 1) > tol) {
      throw new RhoError(
        'trace-not-one',
        `The ket has squared norm ${norm2}, not 1 (tolerance ${tol}); kets are not normalised for you.`,
        at('ket'),
        { norm: Math.sqrt(norm2) },
      );
    }
    matrix = mul(v, adjoint(v));
    if (norm2 !== 1) {
      if (Math.abs(norm2 - 1) > ROUNDING && adjustments) adjustments.push({ path: at('ket'), trace: norm2 });
      matrix = scale(matrix, 1 / norm2);
    }
  } else {
    matrix = readSquareMatrix(obj.matrix, at('matrix'));
  }
  const n = matrix.rows;
  const dims = obj.dims === undefined ? [n] : readDims(obj.dims, at('dims'), n);
  checkDims(matrix, dims, at('dims'));
  const labels = obj.labels === undefined ? undefined : readLabels(obj.labels, at('labels'), dims.length);
  if (obj.ket === undefined) {
    const values = check === 'density' ? checkDensityMatrix(matrix, tol, at('matrix')) : checkPositive(matrix, tol, at('matrix'));
    matrix = madeExact(matrix, values, check === 'density', bare ? path : path);
  }
  return labels ? { matrix, dims, labels } : { matrix, dims };
}

/**
 * A density matrix (Hermitian, positive semidefinite, unit trace within `tol`); dims default [n]. It is
 * returned made exact (Hermitian part, negative eigenvalues set to zero, unit trace; see Adjustment).
 */
export function readState(value: unknown, path: string, tol: number): State {
  return readStateWith(value, path, tol, 'density');
}

/** A positive semidefinite operator of any trace (the σ of a divergence), in the state's form; made exact but not normalised. */
export function readOperatorState(value: unknown, path: string, tol: number): State {
  return readStateWith(value, path, tol, 'positive');
}

// ---------------------------------------------------------------------------------------------------
// Channels

const CHANNEL_KEYS = ['kraus', 'choi', 'from', 'to'] as const;

/**
 * A channel from Kraus operators or a Choi matrix (convention J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input factor
 * first). Kraus operators must share one shape prod(to) × prod(from), "from" and "to" being the input and
 * output dims; they default to [cols] and [rows]. A Choi matrix needs "from" or "to" (the other one
 * follows from its side) and must be Hermitian and positive semidefinite within `tol`, else
 * 'not-completely-positive'; the Kraus form comes from its eigendecomposition (quantum/channels.ts,
 * choiToKraus: eigenvalues at or below tol·λ_max are dropped, a tolerance-dependent rank decision).
 * Trace preservation is not checked here.
 */
export function readChannel(value: unknown, path: string, tol: number): Channel {
  if (!isPlainObject(value)) {
    throw new RhoError('invalid-argument', `Expected a channel: {"kraus": [...]} or {"choi": M}, with "from" (the input dims) and "to" (the output dims); not ${describe(value)}.`, path);
  }
  for (const [old, now] of [['inputDims', 'from'], ['outputDims', 'to']] as const) {
    if (old in value) {
      throw new RhoError('invalid-argument', `The channel field "${old}" is now "${now}" (protocol 1.1: "from" the input dims, "to" the output dims).`, `${path}.${old}`);
    }
  }
  refuseUnknownKeys(value, CHANNEL_KEYS, path, 'a channel');
  if (value.kraus !== undefined && value.choi !== undefined) {
    throw new RhoError('invalid-argument', 'Give a channel either by "kraus" or by "choi", not both.', path);
  }
  if (value.kraus === undefined && value.choi === undefined) {
    throw new RhoError('missing-argument', 'A channel needs "kraus" operators (or a "choi" matrix).', `${path}.kraus`);
  }
  if (value.kraus !== undefined) return readKrausChannel(value, path);
  return readChoiChannel(value, path, tol);
}

function readKrausChannel(value: Record<string, unknown>, path: string): Channel {
  const list = value.kraus;
  const p = `${path}.kraus`;
  if (!Array.isArray(list)) throw new RhoError('invalid-argument', `"kraus" must be a list of matrices, not ${describe(list)}.`, p);
  if (list.length === 0) throw new RhoError('invalid-argument', 'The list of Kraus operators is empty.', p);
  if (list.length > MAX_KRAUS) throw tooLarge(p, 'The number of Kraus operators', list.length, MAX_KRAUS);
  // Size check over all operators before reading any.
  let total = 0;
  list.forEach((k, idx) => {
    const { rows, cols } = peekShape(k, `${p}[${idx}]`);
    total += rows * cols;
  });
  if (total > MAX_CHANNEL_ENTRIES) throw tooLarge(p, 'The total number of Kraus entries', total, MAX_CHANNEL_ENTRIES);
  const kraus = list.map((k, idx) => readMatrix(k, `${p}[${idx}]`));
  const { rows, cols } = kraus[0];
  kraus.forEach((k, idx) => {
    if (k.rows !== rows || k.cols !== cols) {
      throw new RhoError(
        'dimension-mismatch',
        `Kraus operator ${idx} is ${k.rows}x${k.cols} but operator 0 is ${rows}x${cols}; all must have one shape.`,
        `${p}[${idx}]`,
      );
    }
  });
  const fromDims = value.from === undefined ? [cols] : readDims(value.from, `${path}.from`);
  const toDims = value.to === undefined ? [rows] : readDims(value.to, `${path}.to`);
  if (product(fromDims) !== cols) {
    throw new RhoError('dimension-mismatch', `The input dims (from) multiply to ${product(fromDims)} but the Kraus operators have ${cols} columns.`, `${path}.from`);
  }
  if (product(toDims) !== rows) {
    throw new RhoError('dimension-mismatch', `The output dims (to) multiply to ${product(toDims)} but the Kraus operators have ${rows} rows.`, `${path}.to`);
  }
  return { kraus, fromDims, toDims };
}

function readChoiChannel(value: Record<string, unknown>, path: string, tol: number): Channel {
  const p = `${path}.choi`;
  const J = readSquareMatrix(value.choi, p);
  const n = J.rows;
  let fromDims: number[];
  let toDims: number[];
  if (value.from === undefined && value.to === undefined) {
    throw new RhoError('missing-argument', 'A Choi matrix needs "from" (or "to") to tell the input and output apart.', `${path}.from`);
  }
  if (value.from !== undefined) {
    fromDims = readDims(value.from, `${path}.from`);
    const din = product(fromDims);
    if (n % din !== 0) {
      throw new RhoError('dimension-mismatch', `The Choi matrix side ${n} is not a multiple of the input dimension ${din}.`, `${path}.from`);
    }
    toDims = value.to === undefined ? [n / din] : readDims(value.to, `${path}.to`);
  } else {
    toDims = readDims(value.to, `${path}.to`);
    const dout = product(toDims);
    if (n % dout !== 0) {
      throw new RhoError('dimension-mismatch', `The Choi matrix side ${n} is not a multiple of the output dimension ${dout}.`, `${path}.to`);
    }
    fromDims = [n / dout];
  }
  if (product(fromDims) * product(toDims) !== n) {
    throw new RhoError(
      'dimension-mismatch',
      `The Choi matrix is ${n}x${n} but input and output dimensions multiply to ${product(fromDims) * product(toDims)}.`,
      p,
    );
  }
  checkHermitian(J, tol, p);
  try {
    return choiToKraus(J, fromDims, toDims, tol);
  } catch (err) {
    // quantum/channels.ts names its argument "choi"; put the request's path in front.
    if (err instanceof RhoError && err.path !== undefined && err.path.startsWith('choi')) {
      throw new RhoError(err.code, err.message, `${path}.${err.path}`, err.detail);
    }
    throw err;
  }
}

// ---------------------------------------------------------------------------------------------------
// Writers

function cleanZero(x: number): number {
  return x === 0 ? 0 : x; // no -0 in answers
}

/** How answers write matrices: as rows (the default) or packed (the request's "answerMatrices"). */
let answerForm: 'rows' | 'packed' = 'rows';

/** Runs `f` with matrices in answers written in `form` (handle sets this from the request). */
export function withAnswerMatrices<T>(form: 'rows' | 'packed', f: () => T): T {
  const saved = answerForm;
  answerForm = form;
  try {
    return f();
  } finally {
    answerForm = saved;
  }
}

/** A packed matrix in an answer (the protocol's packed form): row-major little-endian float64, base64. */
export interface PackedMatrix {
  shape: [number, number];
  packed: typeof PACKED_ENCODING;
  re: string;
  im?: string;
}

const NodeBufferOut = (globalThis as { Buffer?: { from(b: ArrayBuffer, offset: number, length: number): { toString(e: 'base64'): string } } }).Buffer;

/** Base64 of the little-endian bytes of `values`, with −0 written as 0 (answers carry no signed zeros). */
function encodeFloat64(values: Float64Array): string {
  const copy = new Float64Array(values.length);
  for (let k = 0; k < values.length; k++) copy[k] = values[k] === 0 ? 0 : values[k];
  if (!LITTLE_ENDIAN) {
    const view = new DataView(copy.buffer);
    for (let k = 0; k < copy.length; k++) view.setFloat64(8 * k, values[k] === 0 ? 0 : values[k], true);
  }
  if (NodeBufferOut) return NodeBufferOut.from(copy.buffer, 0, copy.byteLength).toString('base64');
  const bytes = new Uint8Array(copy.buffer);
  let text = '';
  for (let k = 0; k < bytes.length; k += 0x8000) text += String.fromCharCode(...bytes.subarray(k, k + 0x8000));
  return btoa(text);
}

/** A matrix in the packed form; `im` left out when `withIm` is false. */
export function writePackedMatrix(m: CMatrix, withIm: boolean): PackedMatrix {
  const out: PackedMatrix = { shape: [m.rows, m.cols], packed: PACKED_ENCODING, re: encodeFloat64(m.re) };
  if (withIm) out.im = encodeFloat64(m.im);
  return out;
}

/**
 * A matrix as plain data: real rows when every imaginary part is zero, else {re, im}; in the packed form
 * (im left out when zero) when the request asked for packed answer matrices.
 */
export function writeMatrix(m: CMatrix): number[][] | { re: number[][]; im: number[][] } {
  let complex = false;
  for (let k = 0; k < m.im.length; k++) {
    if (m.im[k] !== 0) {
      complex = true;
      break;
    }
  }
  // (Typed as rows for the ops that build answers; a packed matrix is plain data as well.)
  if (answerForm === 'packed') return writePackedMatrix(m, complex) as unknown as number[][];
  const re: number[][] = [];
  const im: number[][] = [];
  for (let i = 0; i < m.rows; i++) {
    const r = new Array<number>(m.cols);
    for (let j = 0; j < m.cols; j++) r[j] = cleanZero(m.re[i * m.cols + j]);
    re.push(r);
    if (complex) {
      const s = new Array<number>(m.cols);
      for (let j = 0; j < m.cols; j++) s[j] = cleanZero(m.im[i * m.cols + j]);
      im.push(s);
    }
  }
  return complex ? { re, im } : re;
}

/** A matrix always as {re, im} (for answers whose shape should not depend on the data). */
export function writeComplexMatrix(m: CMatrix): { re: number[][]; im: number[][] } {
  if (answerForm === 'packed') return writePackedMatrix(m, true) as unknown as { re: number[][]; im: number[][] };
  const re: number[][] = [];
  const im: number[][] = [];
  for (let i = 0; i < m.rows; i++) {
    re.push(Array.from(m.re.subarray(i * m.cols, (i + 1) * m.cols), cleanZero));
    im.push(Array.from(m.im.subarray(i * m.cols, (i + 1) * m.cols), cleanZero));
  }
  return { re, im };
}

/** A number as plain data: ±Infinity become "Infinity"/"-Infinity"; NaN is a programming error and throws. */
export function writeNumber(x: number): number | 'Infinity' | '-Infinity' {
  if (x === Infinity) return 'Infinity';
  if (x === -Infinity) return '-Infinity';
  if (Number.isNaN(x)) throw new Error('writeNumber: NaN reached the ops layer');
  return cleanZero(x);
}

/** Default of every op's "supportTolerance" (relative eigenvalue threshold for support decisions). */
export const DEFAULT_SUPPORT_TOLERANCE = 1e-12;

/**
 * The JSON Schema of an op's "supportTolerance": a number in (0, 0.1]. `description` says what the
 * op decides with it (default: the plain eigenvalue threshold).
 */
export function supportToleranceProperty(
  description = 'Relative tolerance below which an eigenvalue counts as zero (default 1e-12); separate from "tolerance", which validates inputs.',
): { type: 'number'; exclusiveMinimum: number; maximum: number; description: string } {
  return { type: 'number', exclusiveMinimum: 0, maximum: 0.1, description };
}

/** The request's "supportTolerance", checked against supportToleranceProperty's range, or the default. */
export function readSupportTolerance(req: Record<string, any>): number {
  return req.supportTolerance === undefined
    ? DEFAULT_SUPPORT_TOLERANCE
    : readNumber(req.supportTolerance, 'supportTolerance', { min: 0, minExclusive: true, max: 0.1 });
}

/**
 * An SDP certificate (src/sdp/support.ts) as plain data, recursively: numbers through writeNumber (an
 * infinite objective becomes "Infinity"), matrices (its primal and dual points) through writeMatrix,
 * lists and objects element by element, strings copied, key order kept.
 */
export function writeCertificate(c: object): Record<string, unknown> {
  return writePlain(c) as Record<string, unknown>;
}

function writePlain(v: unknown): unknown {
  if (typeof v === 'number') return writeNumber(v);
  if (Array.isArray(v)) return v.map(writePlain);
  if (v && typeof v === 'object') {
    const m = v as Partial<CMatrix>;
    if (m.re instanceof Float64Array && m.im instanceof Float64Array && typeof m.rows === 'number') return writeMatrix(v as CMatrix);
    const out: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) out[k] = writePlain(x);
    return out;
  }
  return v;
}

export function writeState(s: State): { matrix: number[][] | { re: number[][]; im: number[][] }; dims: number[]; labels?: string[] } {
  const out: { matrix: number[][] | { re: number[][]; im: number[][] }; dims: number[]; labels?: string[] } = {
    matrix: writeMatrix(s.matrix),
    dims: [...s.dims],
  };
  if (s.labels) out.labels = [...s.labels];
  return out;
}

export function writeChannel(c: Channel): {
  kraus: (number[][] | { re: number[][]; im: number[][] })[];
  from: number[];
  to: number[];
} {
  return { kraus: c.kraus.map(writeMatrix), from: [...c.fromDims], to: [...c.toDims] };
}

// ---------------------------------------------------------------------------------------------------
// JSON Schema fragments for op argument schemas (the readers above re-check everything).

const realRows = {
  type: 'array',
  minItems: 1,
  maxItems: MAX_DIMENSION,
  items: { type: 'array', minItems: 1, maxItems: MAX_DIMENSION, items: { type: 'number' } },
};
const packedMatrixSchema = {
  description: 'A packed matrix: row-major little-endian float64, base64 (protocol 1.1), for large matrices.',
  type: 'object',
  properties: {
    shape: { type: 'array', minItems: 2, maxItems: 2, items: { type: 'integer', minimum: 1, maximum: MAX_DIMENSION } },
    packed: { const: PACKED_ENCODING },
    re: { type: 'string', contentEncoding: 'base64' },
    im: { type: 'string', contentEncoding: 'base64' },
  },
  required: ['shape', 'packed', 're'],
  additionalProperties: false,
};
const matrixSchema = {
  description:
    'A matrix: rows of numbers, rows of numbers and expression strings ("1/2", "i/sqrt(2)"), {"re": rows, "im": rows} with im optional, or the packed form {"shape", "packed": "float64-le", "re", "im"}.',
  anyOf: [
    {
      type: 'array',
      minItems: 1,
      maxItems: MAX_DIMENSION,
      items: { type: 'array', minItems: 1, maxItems: MAX_DIMENSION, items: { type: ['number', 'string'] } },
    },
    { type: 'object', properties: { re: realRows, im: realRows }, required: ['re'], additionalProperties: false },
    packedMatrixSchema,
  ],
};
const realList = { type: 'array', minItems: 1, maxItems: MAX_DIMENSION, items: { type: 'number' } };
const ketSchema = {
  description: 'A ket of unit norm: a list of numbers or expression strings, or {"re": list, "im": list}.',
  anyOf: [
    { type: 'array', minItems: 1, maxItems: MAX_DIMENSION, items: { type: ['number', 'string'] } },
    { type: 'object', properties: { re: realList, im: realList }, required: ['re'], additionalProperties: false },
  ],
};
const dimsSchema = {
  description: 'Subsystem dimensions, first subsystem most significant (as in the Kronecker product).',
  type: 'array',
  minItems: 1,
  maxItems: MAX_SUBSYSTEMS,
  items: { type: 'integer', minimum: 1 },
};
const labelsSchema = { description: 'One distinct name per subsystem.', type: 'array', items: { type: 'string', minLength: 1 } };
const stateSchema = {
  description:
    'A state: {"matrix": M, "dims"?, "labels"?} or {"ket": v, "dims"?, "labels"?}; a bare matrix stands for {"matrix": M}.',
  anyOf: [
    {
      type: 'object',
      properties: { matrix: matrixSchema, dims: dimsSchema, labels: labelsSchema },
      required: ['matrix'],
    },
    { type: 'object', properties: { ket: ketSchema, dims: dimsSchema, labels: labelsSchema }, required: ['ket'] },
    matrixSchema,
  ],
};
const channelSchema = {
  description:
    'A channel: {"kraus": [M, ...]} or {"choi": J} with "from" and "to"; Choi convention J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input factor first.',
  anyOf: [
    {
      type: 'object',
      properties: { kraus: { type: 'array', minItems: 1, maxItems: MAX_KRAUS, items: matrixSchema }, from: dimsSchema, to: dimsSchema },
      required: ['kraus'],
    },
    { type: 'object', properties: { choi: matrixSchema, from: dimsSchema, to: dimsSchema }, required: ['choi'] },
  ],
};
const systemsSchema = {
  description: 'Subsystem indices counted from 0 (or labels, where the state has them), each at most once.',
  type: 'array',
  maxItems: MAX_SUBSYSTEMS,
  items: { type: ['integer', 'string'] },
};

/** JSON Schema fragments for the protocol's values, to use inside op argument schemas. Do not mutate. */
export const schemas = {
  matrix: matrixSchema,
  ket: ketSchema,
  dims: dimsSchema,
  labels: labelsSchema,
  state: stateSchema,
  channel: channelSchema,
  systems: systemsSchema,
  number: { type: 'number' },
} as const;
