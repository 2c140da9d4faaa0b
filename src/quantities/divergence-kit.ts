/**
 * Shared numerics for the entropies and divergences: the joint analysis of a pair (ρ, σ) in their
 * eigenbases with the support decisions, a log-sum-exp, and parameter checks. (Spectra with a support
 * decision, divided differences and the other spectral helpers are in src/linalg/spectral.ts.)
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
import { CMatrix, adjoint, mul } from '../linalg/cmatrix.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { spectral, columns, Spectral } from '../linalg/spectral.js';
import { RhoError } from '../errors.js';

// The spectral helpers live in src/linalg/spectral.ts; re-exported for the one-shot modules that
// import them from here.
export { DEFAULT_SUPPORT_TOLERANCE, spectral, columns };

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
  /** Tr σ as the sum of σ's diagonal (the given matrix's trace up to the rounding of one sum). */
  traceSigma: number;
  /** U₁* V: ρ's support eigenvectors (rows, in the order of rho.support) against all of σ's. */
  cross: CMatrix;
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
    traceSigma: diagonalSum(sigma),
    cross: C,
  };
}

function diagonalSum(m: CMatrix): number {
  let t = 0;
  for (let i = 0; i < m.rows; i++) t += m.re[i * m.cols + i];
  return t;
}

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
