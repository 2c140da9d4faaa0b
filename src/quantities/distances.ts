/**
 * Distances between quantum states: trace distance, Bures distance, Bures angle and purified distance.
 *
 * - Trace distance T(ρ,σ) = ½‖ρ − σ‖₁, from the eigenvalues of the Hermitian difference ρ − σ
 *   (one eigenvalue decomposition, no singular values needed). For subnormalised states the
 *   generalized trace distance ½‖ρ−σ‖₁ + ½|Tr ρ − Tr σ| is also offered (Tomamichel, PhD thesis,
 *   arXiv:1203.2142, Sec. 3.2; recalled from memory).
 * - Bures distance B(ρ,σ) = √(Tr ρ + Tr σ − 2‖√ρ√σ‖₁), which is √(2(1 − √F)) for states
 *   (F squared fidelity, so √F is the root fidelity).
 * - Bures angle A(ρ,σ) = arccos √F.
 * - Purified distance P(ρ,σ) = √(1 − F̄(ρ,σ)) with F̄ the generalized fidelity (equal to F for
 *   normalised states); Tomamichel, Colbeck & Renner 2010 and Tomamichel's thesis Sec. 3.2.
 *
 * Deliberately not here: validation of the inputs (the ops layer does it), distances of channels
 * (diamond norm needs an SDP), Hilbert–Schmidt distance (a one-liner with frobeniusNorm).
 *
 * Cost: one eigendecomposition for the trace distance, two for the fidelity-based ones, O(n³).
 */
import { CMatrix, sub, trace } from '../linalg/cmatrix.js';
import { eigvalsh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { fidelity, generalizedFidelity } from './fidelity.js';

/** ½‖ρ − σ‖₁ for Hermitian ρ, σ (eigenvalues of the difference). */
export function traceDistance(rho: CMatrix, sigma: CMatrix): number {
  const d = eigvalsh(sub(rho, sigma));
  let s = 0;
  for (let i = 0; i < d.length; i++) s += Math.abs(d[i]);
  return 0.5 * s;
}

/** ½‖ρ − σ‖₁ + ½|Tr ρ − Tr σ| (generalized trace distance of subnormalised states). */
export function generalizedTraceDistance(rho: CMatrix, sigma: CMatrix): number {
  return traceDistance(rho, sigma) + 0.5 * Math.abs(trace(rho).re - trace(sigma).re);
}

/** √(Tr ρ + Tr σ − 2‖√ρ√σ‖₁); equals √(2(1 − √F)) for density matrices. Clamped at 0 against rounding. */
export function buresDistance(rho: CMatrix, sigma: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): number {
  const { root } = fidelity(rho, sigma, tol);
  const b2 = trace(rho).re + trace(sigma).re - 2 * root;
  return Math.sqrt(Math.max(b2, 0));
}

/** arccos √F (the Bures angle, also called the quantum angle), for density matrices. */
export function buresAngle(rho: CMatrix, sigma: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): number {
  const { root } = fidelity(rho, sigma, tol);
  return Math.acos(Math.min(Math.max(root, 0), 1));
}

/**
 * √(1 − F̄(ρ,σ)) with F̄ the generalized (squared) fidelity; for normalised states √(1 − F).
 * Subnormalised inputs (trace ≤ 1) are allowed; traces above 1 + traceTol throw a RangeError.
 */
export function purifiedDistance(rho: CMatrix, sigma: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE, traceTol = 1e-9): number {
  const { value } = generalizedFidelity(rho, sigma, tol, traceTol);
  return Math.sqrt(Math.max(1 - value, 0));
}
