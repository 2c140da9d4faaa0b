/**
 * Complex dense matrices on typed arrays.
 *
 * A `CMatrix` is plain data: its shape and two row-major Float64Arrays holding the real and
 * imaginary parts. Every routine here is a free function, so a matrix crosses a worker boundary
 * or a structured clone unchanged. This module knows matrices only: no states, no physics, no
 * validation of quantum-mechanical conditions (that is `quantum`'s job).
 *
 * Small matrices' arrays are views into shared slabs (src/linalg/small-arrays.ts): a structured clone of
 * one copies its slab. Cost notes: `mul` is O(n^3) with a cache-friendly i-k-j loop over split real/imaginary
 * storage; everything else is O(size).
 */

import { float64 } from './small-arrays.js';

export interface CMatrix {
  readonly rows: number;
  readonly cols: number;
  /** Real parts, row-major: entry (i, j) at i * cols + j. */
  readonly re: Float64Array;
  /** Imaginary parts, row-major. */
  readonly im: Float64Array;
}

/** A complex scalar as a pair. */
export interface Complex {
  re: number;
  im: number;
}

export function zeros(rows: number, cols: number = rows): CMatrix {
  // Small ones are views into a shared slab (src/linalg/small-arrays.ts): several times cheaper to make.
  return { rows, cols, re: float64(rows * cols), im: float64(rows * cols) };
}

export function identity(n: number): CMatrix {
  const m = zeros(n, n);
  for (let i = 0; i < n; i++) m.re[i * n + i] = 1;
  return m;
}

/** Build from arrays of rows of real parts and (optionally) imaginary parts. */
export function fromRows(re: readonly (readonly number[])[], im?: readonly (readonly number[])[]): CMatrix {
  const rows = re.length;
  const cols = rows === 0 ? 0 : re[0].length;
  const m = zeros(rows, cols);
  for (let i = 0; i < rows; i++) {
    if (re[i].length !== cols) throw new RangeError(`row ${i} has ${re[i].length} entries, expected ${cols}`);
    for (let j = 0; j < cols; j++) {
      m.re[i * cols + j] = re[i][j];
      if (im) m.im[i * cols + j] = im[i][j];
    }
  }
  return m;
}

/** Arrays of rows: `{re, im}`. */
export function toRows(m: CMatrix): { re: number[][]; im: number[][] } {
  const re: number[][] = [];
  const im: number[][] = [];
  for (let i = 0; i < m.rows; i++) {
    re.push(Array.from(m.re.subarray(i * m.cols, (i + 1) * m.cols)));
    im.push(Array.from(m.im.subarray(i * m.cols, (i + 1) * m.cols)));
  }
  return { re, im };
}

/** Real diagonal matrix. */
export function diagonal(values: ArrayLike<number>): CMatrix {
  const n = values.length;
  const m = zeros(n, n);
  for (let i = 0; i < n; i++) m.re[i * n + i] = values[i];
  return m;
}

/** A column vector (n x 1) from real and imaginary parts. */
export function columnVector(re: ArrayLike<number>, im?: ArrayLike<number>): CMatrix {
  const n = re.length;
  const m = zeros(n, 1);
  for (let i = 0; i < n; i++) {
    m.re[i] = re[i];
    if (im) m.im[i] = im[i];
  }
  return m;
}

export function clone(a: CMatrix): CMatrix {
  return { rows: a.rows, cols: a.cols, re: a.re.slice(), im: a.im.slice() };
}

export function entry(a: CMatrix, i: number, j: number): Complex {
  const k = i * a.cols + j;
  return { re: a.re[k], im: a.im[k] };
}

export function isSquare(a: CMatrix): boolean {
  return a.rows === a.cols;
}

function sameShape(a: CMatrix, b: CMatrix, what: string): void {
  if (a.rows !== b.rows || a.cols !== b.cols) {
    throw new RangeError(`${what}: shapes ${a.rows}x${a.cols} and ${b.rows}x${b.cols} differ`);
  }
}

export function add(a: CMatrix, b: CMatrix): CMatrix {
  sameShape(a, b, 'add');
  const c = zeros(a.rows, a.cols);
  for (let k = 0; k < a.re.length; k++) {
    c.re[k] = a.re[k] + b.re[k];
    c.im[k] = a.im[k] + b.im[k];
  }
  return c;
}

export function sub(a: CMatrix, b: CMatrix): CMatrix {
  sameShape(a, b, 'sub');
  const c = zeros(a.rows, a.cols);
  for (let k = 0; k < a.re.length; k++) {
    c.re[k] = a.re[k] - b.re[k];
    c.im[k] = a.im[k] - b.im[k];
  }
  return c;
}

/** Linear combination sum_k w_k A_k with real weights. */
export function combine(weights: readonly number[], mats: readonly CMatrix[]): CMatrix {
  if (mats.length === 0) throw new RangeError('combine: no matrices');
  const c = zeros(mats[0].rows, mats[0].cols);
  mats.forEach((m, idx) => {
    sameShape(c, m, 'combine');
    const w = weights[idx];
    for (let k = 0; k < c.re.length; k++) {
      c.re[k] += w * m.re[k];
      c.im[k] += w * m.im[k];
    }
  });
  return c;
}

/** Multiply by a real scalar. */
export function scale(a: CMatrix, s: number): CMatrix {
  const c = zeros(a.rows, a.cols);
  for (let k = 0; k < a.re.length; k++) {
    c.re[k] = s * a.re[k];
    c.im[k] = s * a.im[k];
  }
  return c;
}

/** Multiply by a complex scalar. */
export function scaleComplex(a: CMatrix, s: Complex): CMatrix {
  const c = zeros(a.rows, a.cols);
  for (let k = 0; k < a.re.length; k++) {
    c.re[k] = s.re * a.re[k] - s.im * a.im[k];
    c.im[k] = s.re * a.im[k] + s.im * a.re[k];
  }
  return c;
}

/** Matrix product A B. */
export function mul(a: CMatrix, b: CMatrix): CMatrix {
  if (a.cols !== b.rows) throw new RangeError(`mul: ${a.rows}x${a.cols} times ${b.rows}x${b.cols}`);
  const n = a.rows;
  const m = a.cols;
  const p = b.cols;
  const c = zeros(n, p);
  const are = a.re, aim = a.im, bre = b.re, bim = b.im, cre = c.re, cim = c.im;
  for (let i = 0; i < n; i++) {
    const ci = i * p;
    for (let k = 0; k < m; k++) {
      const xr = are[i * m + k];
      const xi = aim[i * m + k];
      if (xr === 0 && xi === 0) continue;
      const bk = k * p;
      for (let j = 0; j < p; j++) {
        const yr = bre[bk + j];
        const yi = bim[bk + j];
        cre[ci + j] += xr * yr - xi * yi;
        cim[ci + j] += xr * yi + xi * yr;
      }
    }
  }
  return c;
}

/** Product of several matrices, left to right. */
export function mulAll(...ms: CMatrix[]): CMatrix {
  if (ms.length === 0) throw new RangeError('mulAll: no matrices');
  let acc = ms[0];
  for (let k = 1; k < ms.length; k++) acc = mul(acc, ms[k]);
  return acc;
}

/** Conjugate transpose A*. */
export function adjoint(a: CMatrix): CMatrix {
  const c = zeros(a.cols, a.rows);
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      c.re[j * a.rows + i] = a.re[i * a.cols + j];
      c.im[j * a.rows + i] = -a.im[i * a.cols + j];
    }
  }
  return c;
}

/** Plain transpose A^T. */
export function transpose(a: CMatrix): CMatrix {
  const c = zeros(a.cols, a.rows);
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      c.re[j * a.rows + i] = a.re[i * a.cols + j];
      c.im[j * a.rows + i] = a.im[i * a.cols + j];
    }
  }
  return c;
}

/** Entrywise complex conjugate. */
export function conjugate(a: CMatrix): CMatrix {
  const c = clone(a);
  for (let k = 0; k < c.im.length; k++) c.im[k] = -c.im[k];
  return c;
}

/** Kronecker product A ⊗ B. */
export function kron(a: CMatrix, b: CMatrix): CMatrix {
  const rows = a.rows * b.rows;
  const cols = a.cols * b.cols;
  const c = zeros(rows, cols);
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      const xr = a.re[i * a.cols + j];
      const xi = a.im[i * a.cols + j];
      if (xr === 0 && xi === 0) continue;
      for (let k = 0; k < b.rows; k++) {
        const row = (i * b.rows + k) * cols + j * b.cols;
        for (let l = 0; l < b.cols; l++) {
          const yr = b.re[k * b.cols + l];
          const yi = b.im[k * b.cols + l];
          c.re[row + l] = xr * yr - xi * yi;
          c.im[row + l] = xr * yi + xi * yr;
        }
      }
    }
  }
  return c;
}

/** Kronecker product of several matrices. */
export function kronAll(...ms: CMatrix[]): CMatrix {
  if (ms.length === 0) return identity(1);
  let acc = ms[0];
  for (let k = 1; k < ms.length; k++) acc = kron(acc, ms[k]);
  return acc;
}

export function trace(a: CMatrix): Complex {
  let re = 0;
  let im = 0;
  const n = Math.min(a.rows, a.cols);
  for (let i = 0; i < n; i++) {
    re += a.re[i * a.cols + i];
    im += a.im[i * a.cols + i];
  }
  return { re, im };
}

/**
 * Tr M (real part) by compensated (Neumaier) summation of the diagonal, as an unevaluated sum hi + lo
 * (hi the rounded trace, lo what the rounding left out): for quantities such as −log(Tr σ − small)
 * that need the trace to better than an ulp.
 */
export function traceParts(m: CMatrix): { hi: number; lo: number } {
  let sum = 0;
  let comp = 0;
  for (let i = 0; i < m.rows; i++) {
    const x = m.re[i * m.cols + i];
    const t = sum + x;
    comp += Math.abs(sum) >= Math.abs(x) ? sum - t + x : x - t + sum;
    sum = t;
  }
  const hi = sum + comp;
  return { hi, lo: comp - (hi - sum) };
}

/** Tr(A* B), the Hilbert–Schmidt inner product. */
export function innerProduct(a: CMatrix, b: CMatrix): Complex {
  sameShape(a, b, 'innerProduct');
  let re = 0;
  let im = 0;
  for (let k = 0; k < a.re.length; k++) {
    re += a.re[k] * b.re[k] + a.im[k] * b.im[k];
    im += a.re[k] * b.im[k] - a.im[k] * b.re[k];
  }
  return { re, im };
}

/** Real part of Tr(A B) for square A, B, without forming the product. */
export function traceOfProductRe(a: CMatrix, b: CMatrix): number {
  if (a.cols !== b.rows || a.rows !== b.cols) throw new RangeError('traceOfProduct: shapes do not fit');
  let s = 0;
  for (let i = 0; i < a.rows; i++) {
    for (let k = 0; k < a.cols; k++) {
      s += a.re[i * a.cols + k] * b.re[k * b.cols + i] - a.im[i * a.cols + k] * b.im[k * b.cols + i];
    }
  }
  return s;
}

/** (A + A*) / 2. */
export function hermitianPart(a: CMatrix): CMatrix {
  if (!isSquare(a)) throw new RangeError('hermitianPart: matrix is not square');
  const n = a.rows;
  const c = zeros(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      c.re[i * n + j] = 0.5 * (a.re[i * n + j] + a.re[j * n + i]);
      c.im[i * n + j] = 0.5 * (a.im[i * n + j] - a.im[j * n + i]);
    }
  }
  return c;
}

export function frobeniusNorm(a: CMatrix): number {
  let s = 0;
  for (let k = 0; k < a.re.length; k++) s += a.re[k] * a.re[k] + a.im[k] * a.im[k];
  return Math.sqrt(s);
}

/** Largest entry modulus. */
export function maxAbs(a: CMatrix): number {
  let s = 0;
  for (let k = 0; k < a.re.length; k++) s = Math.max(s, Math.hypot(a.re[k], a.im[k]));
  return s;
}

/** Largest |A_ij - conj(A_ji)| and where it is. */
export function hermiticityDefect(a: CMatrix): { size: number; row: number; col: number } {
  const n = a.rows;
  let size = 0;
  let row = 0;
  let col = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const dr = a.re[i * n + j] - a.re[j * n + i];
      const di = a.im[i * n + j] + a.im[j * n + i];
      const d = Math.hypot(dr, di);
      if (d > size) {
        size = d;
        row = j;
        col = i;
      }
    }
  }
  return { size, row, col };
}

/** Whether every entry is a finite number. */
export function isFinite(a: CMatrix): boolean {
  for (let k = 0; k < a.re.length; k++) {
    if (!Number.isFinite(a.re[k]) || !Number.isFinite(a.im[k])) return false;
  }
  return true;
}

/** Outer product |u><v| of column vectors (n x 1). */
export function outer(u: CMatrix, v: CMatrix): CMatrix {
  return mul(u, adjoint(v));
}
