/**
 * Shared numerics for the entropies and divergences: spectra with an explicit support decision,
 * the joint analysis of a pair (ρ, σ) in their eigenbases, divided differences for Fréchet
 * derivatives (Daleckii–Krein formula), Gauss–Legendre nodes, and parameter checks.
 *
 * Support convention (used by every quantity in this folder): an eigenvalue λ of a positive
 * semidefinite operator counts as zero when λ <= tol · λ_max, with `tol` an explicit argument
 * (default DEFAULT_SUPPORT_TOLERANCE = 1e-12 from src/linalg/functions.ts). The slightly negative
 * eigenvalues that input validation lets through fall under this rule and are set to zero.
 * For a pair, "supp ρ ⊆ supp σ" is decided by the leakage Tr ρ(1 − Π_σ) <= tol (ρ of unit
 * trace), and "supp ρ ⊥ supp σ" by Tr ρ Π_σ <= tol. Both are numerical decisions: a genuine
 * leakage below tol is treated as zero, and the returned diagnostics carry its size.
 *
 * Deliberately not here: no physics beyond spectra, no validation of density matrices (the ops
 * layer does that). Cost: one Hermitian eigendecomposition per operand, O(n^3), plus O(n^3) for
 * the overlap matrix U*V.
 */
import { CMatrix, zeros, adjoint, mul } from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { RhoError } from '../errors.js';

export { DEFAULT_SUPPORT_TOLERANCE };

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
}

export function spectral(m: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): Spectral {
  const { values: raw, vectors } = eigh(m, { vectors: true });
  let max = 0;
  for (let i = 0; i < raw.length; i++) max = Math.max(max, raw[i]);
  const threshold = tol * max;
  const values = new Float64Array(raw.length);
  const support: number[] = [];
  for (let i = 0; i < raw.length; i++) {
    if (raw[i] > threshold && raw[i] > 0) {
      values[i] = raw[i];
      support.push(i);
    }
  }
  return { values, vectors: vectors!, support, threshold, max };
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

/** V X V*: the inverse of compress for an isometry V. */
export function expand(x: CMatrix, v: CMatrix): CMatrix {
  return mul(mul(v, x), adjoint(v));
}

/**
 * Joint data of ρ (normalised to unit trace) and σ (any trace) in their eigenbases:
 * r_i, s_j, the overlaps P_ij = |⟨u_i|v_j⟩|² for i ∈ supp ρ and all j, and the support decisions.
 */
export interface PairAnalysis {
  rho: Spectral;
  sigma: Spectral;
  /** Eigenvalues of ρ/Tr ρ on its support, in the order of rho.support. */
  r: number[];
  /** Eigenvalues of σ on its support, in the order of sigma.support. */
  s: number[];
  /** P[i][j] = |⟨u_i|v_j⟩|² for i over supp ρ and j over supp σ. */
  overlap: number[][];
  /** Tr ρ Π_σ (with ρ of unit trace). */
  inside: number;
  /** Tr ρ (1 − Π_σ), computed directly from the kernel of σ (no cancellation). */
  leakage: number;
  /** leakage <= tol: supp ρ ⊆ supp σ decided. */
  included: boolean;
  /** inside <= tol: supp ρ ⊥ supp σ decided. */
  orthogonal: boolean;
  tolerance: number;
  /** Trace of ρ before normalisation. */
  traceRho: number;
}

export function analysePair(rho: CMatrix, sigma: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): PairAnalysis {
  const R = spectral(rho, tol);
  const S = spectral(sigma, tol);
  let traceRho = 0;
  for (const i of R.support) traceRho += R.values[i];
  const r = R.support.map((i) => R.values[i] / traceRho);
  const s = S.support.map((j) => S.values[j]);
  // C = U_supp* V (all columns of V): rows over supp ρ, columns over the full basis of σ.
  const C = mul(adjoint(columns(R.vectors, R.support)), S.vectors);
  const n = S.vectors.cols;
  const inSupp = new Uint8Array(n);
  for (const j of S.support) inSupp[j] = 1;
  const overlap: number[][] = [];
  let inside = 0;
  let leakage = 0;
  for (let a = 0; a < R.support.length; a++) {
    const row: number[] = [];
    let inRow = 0;
    let outRow = 0;
    for (let j = 0; j < n; j++) {
      const p = C.re[a * n + j] ** 2 + C.im[a * n + j] ** 2;
      if (inSupp[j]) {
        row.push(p);
        inRow += p;
      } else outRow += p;
    }
    overlap.push(row);
    inside += r[a] * inRow;
    leakage += r[a] * outRow;
  }
  return {
    rho: R,
    sigma: S,
    r,
    s,
    overlap,
    inside,
    leakage,
    included: leakage <= tol,
    orthogonal: inside <= tol,
    tolerance: tol,
    traceRho,
  };
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

/** exp[a, b] = (e^a − e^b)/(a − b) without cancellation: e^{(a+b)/2} sinh(d)/d with d = (a−b)/2. */
export function expDivided(a: number, b: number): number {
  const d = 0.5 * (a - b);
  const m = Math.exp(0.5 * (a + b));
  if (Math.abs(d) < 1e-8) return m * (1 + (d * d) / 6);
  return (m * Math.sinh(d)) / d;
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

/** Gauss–Legendre nodes and weights on [0, 1] (8 points; exact for polynomials of degree 15). */
export const GAUSS_LEGENDRE_01: { nodes: number[]; weights: number[] } = (() => {
  // Nodes and weights on [−1, 1], from the standard table (Abramowitz & Stegun, Table 25.4).
  const x = [0.1834346424956498, 0.525532409916329, 0.7966664774136267, 0.9602898564975363];
  const w = [0.362683783378362, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763];
  const nodes: number[] = [];
  const weights: number[] = [];
  for (let k = 0; k < 4; k++) {
    nodes.push(0.5 * (1 - x[k]), 0.5 * (1 + x[k]));
    weights.push(0.5 * w[k], 0.5 * w[k]);
  }
  return { nodes, weights };
})();

/** ln Σ_k w_k e^{x_k} for positive weights, without overflow. */
export function logSumExp(weights: readonly number[], exponents: readonly number[]): number {
  let m = -Infinity;
  for (let k = 0; k < exponents.length; k++) if (weights[k] > 0) m = Math.max(m, exponents[k]);
  if (m === -Infinity) return -Infinity;
  let s = 0;
  for (let k = 0; k < exponents.length; k++) if (weights[k] > 0) s += weights[k] * Math.exp(exponents[k] - m);
  return m + Math.log(s);
}

/** Natural logarithm of the requested base, checked. */
export function logOfBase(base: number | undefined): number {
  const b = base ?? 2;
  if (!(b > 0) || b === 1 || !Number.isFinite(b)) {
    throw new RhoError('invalid-argument', `The logarithm base must be a positive number other than 1 (got ${b}).`, 'base');
  }
  return Math.log(b);
}

/** Check a Rényi order against a family's range; throws RhoError 'invalid-argument' naming the parameter. */
export function checkOrder(
  value: number | undefined,
  name: string,
  ok: (x: number) => boolean,
  range: string,
  family: string,
): number {
  if (value === undefined) throw new RhoError('missing-argument', `The ${family} family needs ${name}.`, name);
  if (typeof value !== 'number' || Number.isNaN(value) || !ok(value)) {
    throw new RhoError('invalid-argument', `${name} = ${value} is outside the range ${range} of the ${family} family.`, name);
  }
  return value;
}
