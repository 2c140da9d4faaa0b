/**
 * Random matrices: complex Ginibre matrices, Haar-random unitaries and isometries, and the complex
 * Householder QR decomposition they are made from. Matrices only, no physics (random states and channels are
 * in src/quantum/random.ts).
 *
 * - A Ginibre matrix has independent standard complex normal entries: real and imaginary parts independent
 *   N(0, 1/2), so E|G_ij|² = 1. Entries are drawn row-major, each as (real, imaginary) from two normals.
 * - A Haar unitary (or isometry, the first columns of one) is Q·Λ with G = QR the QR decomposition of a
 *   Ginibre matrix and Λ = diag(R_kk/|R_kk|): the phase correction of Mezzadri, "How to generate random
 *   matrices from the classical compact groups", Notices AMS 54 (2007) 592, which makes the decomposition
 *   unique (R with positive diagonal) and Q exactly Haar distributed whatever sign convention the QR uses.
 *
 * The QR is hand-written (Householder reflections, Golub & Van Loan §5.2) because ml-matrix's QR is for
 * real matrices only. Only exactly rounded operations (no `**`, `Math.hypot`: src/linalg/portable-math.ts), so
 * the matrices are the same bits in every JavaScript engine. Deliberately not here: the generator (src/linalg/philox.ts).
 * Cost: a Ginibre matrix takes 2·rows·cols normals; the QR of an m×n matrix O(m n²).
 */
import { zeros, type CMatrix } from './cmatrix.js';
import type { VariateSource } from './philox.js';
import { portableHypot } from './portable-math.js';

/** An m×n complex Ginibre matrix (E|G_ij|² = 1) from `source`. */
export function ginibre(rows: number, cols: number, source: VariateSource): CMatrix {
  const g = zeros(rows, cols);
  const s = Math.SQRT1_2;
  for (let k = 0; k < rows * cols; k++) {
    g.re[k] = s * source.normal();
    g.im[k] = s * source.normal();
  }
  return g;
}

/**
 * Thin QR of an m×n complex matrix (m ≥ n) by Householder reflections: Q (m×n, orthonormal columns) and the
 * diagonal of R (complex). A = Q R with R upper triangular.
 */
export function qrThin(a: CMatrix): { q: CMatrix; rDiagonal: { re: Float64Array; im: Float64Array } } {
  const m = a.rows, n = a.cols;
  if (m < n) throw new RangeError(`qrThin needs at least as many rows as columns (${m}×${n})`);
  const re = Float64Array.from(a.re), im = Float64Array.from(a.im);
  const vs: ({ re: Float64Array; im: Float64Array } | null)[] = [];
  const dRe = new Float64Array(n), dIm = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let norm2 = 0;
    for (let i = k; i < m; i++) norm2 += re[i * n + k] * re[i * n + k] + im[i * n + k] * im[i * n + k];
    const norm = Math.sqrt(norm2);
    if (norm === 0) {
      vs.push(null); // a zero column: no reflection (H = I), R_kk = 0
      continue;
    }
    const vRe = new Float64Array(m - k), vIm = new Float64Array(m - k);
    const x0r = re[k * n + k], x0i = im[k * n + k];
    const x0abs = portableHypot(x0r, x0i);
    // α = −e^{i arg x0} ‖x‖ avoids cancellation in v = x − α e1.
    const pr = x0abs === 0 ? 1 : x0r / x0abs, pi = x0abs === 0 ? 0 : x0i / x0abs;
    const alphaRe = -pr * norm, alphaIm = -pi * norm;
    for (let i = k; i < m; i++) {
      vRe[i - k] = re[i * n + k];
      vIm[i - k] = im[i * n + k];
    }
    vRe[0] -= alphaRe;
    vIm[0] -= alphaIm;
    let vn2 = 0;
    for (let i = 0; i < m - k; i++) vn2 += vRe[i] * vRe[i] + vIm[i] * vIm[i];
    const vn = Math.sqrt(vn2);
    for (let i = 0; i < m - k; i++) {
      vRe[i] /= vn;
      vIm[i] /= vn;
    }
    // A[k:, k:] ← A − 2 v (v* A)
    for (let j = k; j < n; j++) {
      let sr = 0, si = 0;
      for (let i = k; i < m; i++) {
        const ar = re[i * n + j], ai = im[i * n + j], br = vRe[i - k], bi = -vIm[i - k];
        sr += br * ar - bi * ai;
        si += br * ai + bi * ar;
      }
      for (let i = k; i < m; i++) {
        const br = vRe[i - k], bi = vIm[i - k];
        re[i * n + j] -= 2 * (br * sr - bi * si);
        im[i * n + j] -= 2 * (br * si + bi * sr);
      }
    }
    dRe[k] = alphaRe;
    dIm[k] = alphaIm;
    vs.push({ re: vRe, im: vIm });
  }
  // Q = H_0 H_1 ... H_{n−1} applied to the first n columns of the identity (back to front).
  const q = zeros(m, n);
  for (let j = 0; j < n; j++) q.re[j * n + j] = 1;
  for (let k = n - 1; k >= 0; k--) {
    const v = vs[k];
    if (v === null) continue;
    for (let j = 0; j < n; j++) {
      let sr = 0, si = 0;
      for (let i = k; i < m; i++) {
        const ar = q.re[i * n + j], ai = q.im[i * n + j], br = v.re[i - k], bi = -v.im[i - k];
        sr += br * ar - bi * ai;
        si += br * ai + bi * ar;
      }
      for (let i = k; i < m; i++) {
        const br = v.re[i - k], bi = v.im[i - k];
        q.re[i * n + j] -= 2 * (br * sr - bi * si);
        q.im[i * n + j] -= 2 * (br * si + bi * sr);
      }
    }
  }
  return { q, rDiagonal: { re: dRe, im: dIm } };
}

/**
 * A Haar-random isometry: an m×n matrix with orthonormal columns, distributed as the first n columns of a
 * Haar unitary of order m (Mezzadri 2007: QR of a Ginibre matrix with the phases of R's diagonal moved into Q).
 */
export function haarIsometry(m: number, n: number, source: VariateSource): CMatrix {
  const { q, rDiagonal } = qrThin(ginibre(m, n, source));
  for (let j = 0; j < n; j++) {
    const r = rDiagonal.re[j], s = rDiagonal.im[j];
    const abs = portableHypot(r, s);
    const pr = abs === 0 ? 1 : r / abs, pi = abs === 0 ? 0 : s / abs;
    for (let i = 0; i < m; i++) {
      const a = q.re[i * n + j], b = q.im[i * n + j];
      q.re[i * n + j] = a * pr - b * pi;
      q.im[i * n + j] = a * pi + b * pr;
    }
  }
  return q;
}

/** A Haar-random unitary of order d. */
export function haarUnitary(d: number, source: VariateSource): CMatrix {
  return haarIsometry(d, d, source);
}

/**
 * A point uniform on the probability simplex with n vertices (the flat Dirichlet distribution): the squared
 * moduli of a normalised complex Gaussian vector, since |g|² of a standard complex normal is exponential
 * (Devroye, "Non-Uniform Random Variate Generation", 1986, §V.2 on exponential spacings). Takes 2n normals.
 */
export function simplexPoint(n: number, source: VariateSource): Float64Array {
  const g = ginibre(n, 1, source);
  const p = new Float64Array(n);
  let sum = 0;
  for (let k = 0; k < n; k++) {
    p[k] = g.re[k] * g.re[k] + g.im[k] * g.im[k];
    sum += p[k];
  }
  for (let k = 0; k < n; k++) p[k] = sum === 0 ? 1 / n : p[k] / sum;
  return p;
}
