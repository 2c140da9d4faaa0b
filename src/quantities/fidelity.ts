/**
 * Uhlmann fidelity of two positive semidefinite matrices, in the project's convention (DESIGN.md,
 * PROTOCOL.md): F(ρ,σ) = ‖√ρ √σ‖₁² (squared), with the root ‖√ρ √σ‖₁ returned alongside.
 *
 * Method: with ρ = Σ_k λ_k |v_k⟩⟨v_k| and σ = Σ_l μ_l |u_l⟩⟨u_l| restricted to their supports
 * (eigenvalues above tol · largest eigenvalue), √ρ√σ = V √Λ B' √M U* with unitary-like factors, so
 * ‖√ρ√σ‖₁ is the sum of the singular values of the small r x s matrix B = √Λ V* U √M, from the
 * relative-accuracy SVD of src/linalg/graded.ts (through norms.traceNorm). This avoids the usual
 * √(rounding) error: forming √ρ σ √ρ and taking square roots of its eigenvalues turns eigenvalues
 * that should be exactly 0 (rank-deficient σ) into ±1e-17 and their square roots into 3e-9 errors;
 * the SVD of B has error about ε·σ_k in each singular value instead.
 *
 * Support truncation is a tolerance-dependent decision: by Hölder's inequality, dropping
 * eigenvalues of total weight δρ from ρ and δσ from σ changes the root by at most
 * √(δρ·Tr σ) + √(δσ·Tr ρ). That bound is returned as `truncationBound`; it is 0 when nothing was
 * dropped and otherwise at most about √(n·tol).
 *
 * Also here: the generalized fidelity of subnormalised states (trace ≤ 1) used to define the
 * purified distance (Tomamichel, PhD thesis, ETH Zurich 2012, arXiv:1203.2142, Sec. 3.2; and
 * Tomamichel, Colbeck & Renner, IEEE Trans. Inf. Theory 56, 4674 (2010); recalled from memory):
 *   F̄(ρ,σ) = ( ‖√ρ√σ‖₁ + √((1 − Tr ρ)(1 − Tr σ)) )²   (squared, as everywhere in this project).
 *
 * Deliberately not here: input validation (the ops layer validates density matrices), other
 * "fidelities" (sub-/super-fidelity, Holevo's just-as-good fidelity), fidelity of channels.
 *
 * Cost: two Hermitian eigendecompositions (n x n), one product of size r x n x s, one complex SVD of
 * size r x s; O(n³).
 */
import { CMatrix, adjoint, mul, trace } from '../linalg/cmatrix.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { weightedSupport } from '../linalg/spectral.js';
import { traceNorm } from '../linalg/norms.js';

export interface FidelityResult {
  /** F = ‖√ρ√σ‖₁² (squared fidelity). */
  value: number;
  /** ‖√ρ√σ‖₁ (root fidelity). */
  root: number;
  /** Rank of ρ used (eigenvalues above tol · λ_max). */
  rankRho: number;
  /** Rank of σ used. */
  rankSigma: number;
  /** Upper bound on the change of `root` caused by dropping eigenvalues below the tolerance. */
  truncationBound: number;
}

/**
 * Root and squared fidelity of positive semidefinite ρ, σ (any trace).
 *
 * `tol` is the relative tolerance below which an eigenvalue counts as zero (default 1e-12); see
 * `truncationBound` for its effect. The root is clamped to the Cauchy–Schwarz bound √(Tr ρ · Tr σ),
 * so F ≤ 1 for states even after rounding.
 */
export function fidelity(rho: CMatrix, sigma: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): FidelityResult {
  if (rho.rows !== sigma.rows || rho.rows !== rho.cols || sigma.rows !== sigma.cols) {
    throw new RangeError(`fidelity: shapes ${rho.rows}x${rho.cols} and ${sigma.rows}x${sigma.cols} do not fit`);
  }
  const a = weightedSupport(rho, tol);
  const b = weightedSupport(sigma, tol);
  const trRho = Math.max(trace(rho).re, 0);
  const trSigma = Math.max(trace(sigma).re, 0);
  const truncationBound = Math.sqrt(a.dropped * trSigma) + Math.sqrt(b.dropped * trRho);
  let root = traceNorm(mul(adjoint(a.basis), b.basis));
  const bound = Math.sqrt(trRho * trSigma);
  if (root > bound) root = bound;
  return { value: root * root, root, rankRho: a.basis.cols, rankSigma: b.basis.cols, truncationBound };
}

export interface GeneralizedFidelityResult {
  /** F̄ = (‖√ρ√σ‖₁ + √((1 − Tr ρ)(1 − Tr σ)))², squared. */
  value: number;
  /** ‖√ρ√σ‖₁ + √((1 − Tr ρ)(1 − Tr σ)). */
  root: number;
  traceRho: number;
  traceSigma: number;
}

/**
 * Generalized fidelity of subnormalised states (Tr ρ ≤ 1, Tr σ ≤ 1), Tomamichel's thesis Sec. 3.2
 * (arXiv:1203.2142). Equals the ordinary fidelity when either state has unit trace. Traces within
 * `traceTol` of 1 (above or below) are treated as 1; traces above 1 + traceTol throw a RangeError.
 */
export function generalizedFidelity(
  rho: CMatrix,
  sigma: CMatrix,
  tol = DEFAULT_SUPPORT_TOLERANCE,
  traceTol = 1e-9,
): GeneralizedFidelityResult {
  const traceRho = trace(rho).re;
  const traceSigma = trace(sigma).re;
  for (const [name, t] of [['rho', traceRho], ['sigma', traceSigma]] as const) {
    if (t > 1 + traceTol) throw new RangeError(`generalizedFidelity: Tr ${name} = ${t} exceeds 1`);
  }
  const f = fidelity(rho, sigma, tol);
  // A trace within traceTol of 1 counts as exactly 1: otherwise a rounding-level 1 − Tr ρ ≈ 1e-16
  // would add √(1e-16 · (1 − Tr σ)) ≈ 1e-8 to the root.
  const gap = (t: number) => (1 - t <= traceTol ? 0 : 1 - t);
  const defect = Math.sqrt(gap(traceRho) * gap(traceSigma));
  const root = Math.min(f.root + defect, 1);
  return { value: root * root, root, traceRho, traceSigma };
}
