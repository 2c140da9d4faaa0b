/**
 * Spectral helpers shared by the quantities: the eigen-data of a positive semidefinite operator with
 * its support decided, weighted support bases (√λ_k v_k), columns and diagonal scalings of matrices,
 * compressions to a subspace, and the first divided differences of a scalar function on a spectrum
 * (for Fréchet derivatives of matrix functions by the Daleckii–Krein formula).
 *
 * Support convention (the project's, DEVELOPERS.md): an eigenvalue λ counts as zero when
 * λ <= tol · λ_max with `tol` an explicit argument (default DEFAULT_SUPPORT_TOLERANCE = 1e-12); the
 * slightly negative eigenvalues that input validation lets through fall under this rule.
 *
 * Deliberately not here: any physics, validation of density matrices, or support decisions on
 * anything but the operator handed in. Cost: one Hermitian eigendecomposition (O(n³)) for `spectral`
 * and `weightedSupport`; O(size) or one product for the rest; divided differences O(n²).
 */
import { CMatrix, zeros, adjoint, mul } from './cmatrix.js';
import { eigh } from './eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE } from './functions.js';

/** Eigen-data of a positive semidefinite operator with the support decided. */
export interface Spectral {
  /** Eigenvalues, ascending, with those at or below the threshold set to exactly 0. */
  values: Float64Array;
  /** Eigenvectors as columns. */
  vectors: CMatrix;
  /** Indices of the eigenvalues kept (the support). */
  support: number[];
  /** Absolute threshold tol · λ_max used. */
  threshold: number;
  /** Largest eigenvalue (0 for the zero operator). */
  max: number;
  /** Sum of the positive eigenvalues at or below the threshold (the weight the decision dropped). */
  dropped: number;
}

export function spectral(m: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): Spectral {
  const { values: raw, vectors } = eigh(m, { vectors: true });
  let max = 0;
  for (let i = 0; i < raw.length; i++) max = Math.max(max, raw[i]);
  const threshold = tol * max;
  const values = new Float64Array(raw.length);
  const support: number[] = [];
  let dropped = 0;
  for (let i = 0; i < raw.length; i++) {
    if (raw[i] > threshold && raw[i] > 0) {
      values[i] = raw[i];
      support.push(i);
    } else if (raw[i] > 0) dropped += raw[i];
  }
  return { values, vectors: vectors!, support, threshold, max, dropped };
}

/** Support of a positive semidefinite matrix as the n × r matrix of columns √λ_k v_k. */
export interface WeightedSupport {
  basis: CMatrix;
  /** Total weight of the positive eigenvalues left out (at or below the threshold). */
  dropped: number;
}

export function weightedSupport(m: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): WeightedSupport {
  const s = spectral(m, tol);
  const roots = s.support.map((k) => Math.sqrt(s.values[k]));
  return { basis: scaleRowsCols(columns(s.vectors, s.support), ones(m.rows), roots), dropped: s.dropped };
}

/** Columns `cols` of a matrix. */
export function columns(m: CMatrix, cols: readonly number[]): CMatrix {
  const out = zeros(m.rows, cols.length);
  for (let i = 0; i < m.rows; i++) {
    for (let k = 0; k < cols.length; k++) {
      out.re[i * cols.length + k] = m.re[i * m.cols + cols[k]];
      out.im[i * cols.length + k] = m.im[i * m.cols + cols[k]];
    }
  }
  return out;
}

/** diag(a) X diag(b) for real vectors a, b. */
export function scaleRowsCols(x: CMatrix, a: ArrayLike<number>, b: ArrayLike<number>): CMatrix {
  const out = zeros(x.rows, x.cols);
  for (let i = 0; i < x.rows; i++) {
    for (let j = 0; j < x.cols; j++) {
      const f = a[i] * b[j];
      out.re[i * x.cols + j] = f * x.re[i * x.cols + j];
      out.im[i * x.cols + j] = f * x.im[i * x.cols + j];
    }
  }
  return out;
}

/** V* X V: X written in the basis of the columns of V. */
export function compress(x: CMatrix, v: CMatrix): CMatrix {
  return mul(mul(adjoint(v), x), v);
}

/** A vector of n ones. */
export function ones(n: number): number[] {
  return new Array<number>(n).fill(1);
}

/**
 * The matrix of first divided differences f[λ_k, λ_l] = (f(λ_k) − f(λ_l))/(λ_k − λ_l), with f'(λ_k)
 * on (near-)coincident pairs. The Fréchet derivative of the matrix function f at H = V diag(λ) V*
 * in the direction X is V (f[λ_k,λ_l] ∘ V* X V) V* (Daleckii–Krein). `divided(a, b)` may supply a
 * cancellation-free formula; it is used whenever given.
 */
export function dividedDifferences(
  lambda: ArrayLike<number>,
  f: (x: number) => number,
  fprime: (x: number) => number,
  divided?: (a: number, b: number) => number,
): Float64Array {
  const n = lambda.length;
  const out = new Float64Array(n * n);
  for (let k = 0; k < n; k++) {
    for (let l = 0; l < n; l++) {
      const a = lambda[k];
      const b = lambda[l];
      let v: number;
      if (divided) v = divided(a, b);
      else if (Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b), 1e-300)) v = fprime(0.5 * (a + b));
      else v = (f(a) - f(b)) / (a - b);
      out[k * n + l] = v;
    }
  }
  return out;
}

/** Entrywise (Hadamard) product of a complex matrix with a real kernel. */
export function hadamardReal(x: CMatrix, kernel: ArrayLike<number>): CMatrix {
  const out = zeros(x.rows, x.cols);
  for (let k = 0; k < x.re.length; k++) {
    out.re[k] = x.re[k] * kernel[k];
    out.im[k] = x.im[k] * kernel[k];
  }
  return out;
}

/**
 * exp[a, b] = (e^a − e^b)/(a − b) without cancellation or overflow of the intermediate terms:
 * e^{max(a,b)} · (1 − e^{−|a−b|})/|a − b|, and e^{(a+b)/2}(1 + (a−b)²/24) for |a − b| < 1e-8.
 */
export function expDivided(a: number, b: number): number {
  const d = Math.abs(a - b);
  if (d < 1e-8) return Math.exp(0.5 * (a + b)) * (1 + (d * d) / 24);
  return (Math.exp(Math.max(a, b)) * -Math.expm1(-d)) / d;
}

/**
 * x^p divided differences for positive a, b without cancellation:
 * (a^p − b^p)/(a − b) = b^{p−1} · expm1(p ln(a/b)) / (a/b − 1).
 */
export function powerDivided(p: number): (a: number, b: number) => number {
  return (a, b) => {
    if (a === b) return p * Math.pow(a, p - 1);
    const lr = Math.log(a / b);
    // expm1 keeps the ratio accurate however close a and b are.
    return (Math.pow(b, p - 1) * Math.expm1(p * lr)) / Math.expm1(lr);
  };
}
