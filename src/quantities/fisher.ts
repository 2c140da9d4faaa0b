/**
 * Quantum Fisher information of a one-parameter family of states ρ(θ) at a point, from ρ and its
 * derivative ∂ρ = dρ/dθ there.
 *
 * - SLD (Helstrom; Braunstein & Caves, Phys. Rev. Lett. 72, 3439 (1994)):
 *     F_Q = Tr ∂ρ L = 2 Σ_{λ_i+λ_j>0} |⟨i|∂ρ|j⟩|² / (λ_i + λ_j),
 *   where L is the symmetric logarithmic derivative, ∂ρ = (ρL + Lρ)/2, and |i⟩, λ_i the eigenvectors
 *   and eigenvalues of ρ.
 * - General monotone metric: F_f = γ_ρ^f(∂ρ, ∂ρ) with γ^f as in metrics.ts, f(1) = 1. Normalisation
 *   stated: with f(1) = 1 every F_f equals the classical Fisher information Σ (∂p)²/p for commuting
 *   families, and F_SLD equals the Braunstein–Caves F_Q above (since m_SLD(x, y) = (x + y)/2). Some
 *   authors scale the non-SLD ones differently (e.g. the Wigner–Yanase F_WY = γ^WY(∂ρ,∂ρ) equals
 *   8 times the skew information for unitary families); we do not rescale.
 *
 * Support: for a smooth family of states the derivative vanishes on the kernel–kernel block of ρ
 * (ρ(θ) ≥ 0 has a minimum there), so that block is dropped, as in the Braunstein–Caves sum; its
 * size is reported (`kernelBlock`) and a warning is added when it is not negligible, since such a
 * ∂ρ cannot come from a family of states. Weight between support and kernel is finite for SLD and
 * Wigner–Yanase but infinite for Kubo–Mori and the harmonic metric (their means vanish there): the
 * value is then Infinity with a reason. The rank at which the family sits is a tolerance decision
 * (relative tolerance `tol` on eigenvalues, default 1e-12); at points where the rank changes the
 * QFI can be discontinuous in θ (a known property, e.g. Šafránek, PRA 95, 052320 (2017)).
 *
 * Deliberately not here: multi-parameter QFI matrices beyond the bilinear form (call
 * monotoneMetric with two derivatives), the RLD (not symmetric), estimation bounds.
 *
 * Cost: one eigendecomposition, O(n³).
 */
import { CMatrix, adjoint, maxAbs, mul } from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE, zeroThreshold } from '../linalg/functions.js';
import { MetricFunction, SLD_METRIC, monotoneMetric } from './metrics.js';

export interface FisherOptions {
  /** Which monotone metric (default SLD). */
  metric?: MetricFunction;
  /** Relative tolerance for the support of ρ (default 1e-12). */
  tol?: number;
  /** Entries of ∂ρ (in ρ's eigenbasis) at most vectorTol · max|entry| count as zero (default 1e-12). */
  vectorTol?: number;
}

export interface FisherResult {
  /** F_f(θ) = γ_ρ^f(∂ρ, ∂ρ); Infinity with a reason when ∂ρ leaves the domain of the metric. */
  value: number;
  metric: string;
  rank: number;
  /** Frobenius norm of ∂ρ's kernel–kernel block (in ρ's eigenbasis), which was dropped. */
  kernelBlock: number;
  reason?: string;
  warnings: string[];
}

export function quantumFisherInformation(rho: CMatrix, derivative: CMatrix, options: FisherOptions = {}): FisherResult {
  const metric = options.metric ?? SLD_METRIC;
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const vectorTol = options.vectorTol ?? 1e-12;
  const r = monotoneMetric(rho, derivative, derivative, metric, { tol, vectorTol, dropKernelBlock: true });
  const warnings = [...r.warnings];
  const scale = maxAbs(derivative);
  if (r.kernelBlock > 1e3 * vectorTol * Math.max(scale, Number.MIN_VALUE)) {
    warnings.push(
      `The derivative has a kernel–kernel block of norm ${r.kernelBlock.toExponential(3)} in rho's eigenbasis; a smooth family of states has none there, so that block was dropped.`,
    );
  }
  const out: FisherResult = { value: r.value, metric: r.metric, rank: r.rank, kernelBlock: r.kernelBlock, warnings };
  if (r.reason) out.reason = r.reason;
  return out;
}

/**
 * The symmetric logarithmic derivative L with ∂ρ = (ρL + Lρ)/2 on the entries with λ_i + λ_j > 0
 * (L_ij = 2 ∂ρ_ij / (λ_i + λ_j) in ρ's eigenbasis; set to 0 on the kernel–kernel block, the usual
 * choice that makes L unique).
 */
export function symmetricLogarithmicDerivative(rho: CMatrix, derivative: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): CMatrix {
  const { values, vectors } = eigh(rho, { vectors: true });
  const V = vectors!;
  const thr = zeroThreshold(values, tol);
  const lam = Array.from(values, (v) => (v > thr ? v : 0));
  const y = mul(mul(adjoint(V), derivative), V);
  const n = rho.rows;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const s = lam[i] + lam[j];
      const k = s > 0 ? 2 / s : 0;
      y.re[i * n + j] *= k;
      y.im[i * n + j] *= k;
    }
  }
  return mul(mul(V, y), adjoint(V));
}
