/**
 * Spectral helpers shared by the quantities: the eigen-data of a positive semidefinite operator with
 * its support decided, weighted support bases (√λ_k v_k), columns and diagonal scalings of matrices,
 * compressions to a subspace, double operator integrals T_φ(X) = Σ φ(λ_i, μ_j) P_i X Q_j with the
 * first divided differences that make them Fréchet derivatives of matrix functions (Daleckii–Krein),
 * and cancellation-free divided differences of exp and of powers.
 *
 * Support convention (the project's, DEVELOPERS.md): an eigenvalue λ counts as zero when
 * λ <= tol · λ_max with `tol` an explicit argument (default DEFAULT_SUPPORT_TOLERANCE = 1e-12); the
 * slightly negative eigenvalues that input validation lets through fall under this rule.
 *
 * Deliberately not here: any physics, validation of density matrices, or support decisions on
 * anything but the operator handed in. Cost: one Hermitian eigendecomposition (O(n³)) for `spectral`
 * and `weightedSupport`; a double operator integral four products (O(n³)) plus n² kernel values;
 * O(size) or one product for the rest.
 */
import { CMatrix, zeros, adjoint, mul } from './cmatrix.js';
import { eigh, EighResult } from './eigh.js';
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

/** U* X V for eigenvector matrices U, V (columns). */
function toEigenbases(u: CMatrix, x: CMatrix, v: CMatrix): CMatrix {
  return mul(mul(adjoint(u), x), v);
}

/**
 * T_φ(X) = Σ_ij φ(λ_i, μ_j) P_i X Q_j for Hermitian A = Σ λ_i P_i, B = Σ μ_j Q_j (square X of
 * matching shape). Eigendecompositions may be passed in to avoid recomputing them. The kernel is
 * evaluated eigenvalue by eigenvalue, which for repeated eigenvalues equals the projector form.
 */
export function doubleOperatorIntegral(
  kernel: (x: number, y: number) => number,
  a: CMatrix,
  b: CMatrix,
  x: CMatrix,
  eigA?: EighResult,
  eigB?: EighResult,
): CMatrix {
  if (x.rows !== a.rows || x.cols !== b.rows) {
    throw new RangeError(`doubleOperatorIntegral: X is ${x.rows}x${x.cols}, A is ${a.rows}x${a.cols}, B is ${b.rows}x${b.cols}`);
  }
  const ea = eigA ?? eigh(a, { vectors: true });
  const eb = eigB ?? (b === a && !eigB ? ea : eigh(b, { vectors: true }));
  const U = ea.vectors!;
  const V = eb.vectors!;
  const y = toEigenbases(U, x, V);
  const p = y.rows;
  const q = y.cols;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < q; j++) {
      const k = kernel(ea.values[i], eb.values[j]);
      y.re[i * q + j] *= k;
      y.im[i * q + j] *= k;
    }
  }
  return mul(mul(U, y), adjoint(V));
}

/**
 * The first divided difference f^[1](x, y) = (f(x) − f(y))/(x − y), and f'((x+y)/2) when
 * |x − y| ≤ 2e-5 · max(1, |x|, |y|) (there the quotient would lose about half the digits; the
 * midpoint derivative errs by |x − y|²·|f'''|/24). Without `df` the derivative is a central
 * difference with step ε^{1/3} · max(1, |x|) (error about 1e-11 relative for smooth f).
 */
export function dividedDifference(f: (x: number) => number, df?: (x: number) => number): (x: number, y: number) => number {
  const deriv =
    df ??
    ((x: number) => {
      const h = 6e-6 * Math.max(1, Math.abs(x));
      return (f(x + h) - f(x - h)) / (2 * h);
    });
  return (x, y) => {
    const d = x - y;
    if (Math.abs(d) <= 2e-5 * Math.max(1, Math.abs(x), Math.abs(y))) return deriv(0.5 * (x + y));
    return (f(x) - f(y)) / d;
  };
}

/** Fréchet derivative d/dt f(A + tX)|_{t=0} for Hermitian A and X (Daleckii–Krein). */
export function frechetDerivative(
  f: (x: number) => number,
  a: CMatrix,
  x: CMatrix,
  df?: (x: number) => number,
  eigA?: EighResult,
): CMatrix {
  const e = eigA ?? eigh(a, { vectors: true });
  return doubleOperatorIntegral(dividedDifference(f, df), a, a, x, e, e);
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
