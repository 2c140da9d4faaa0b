/**
 * Entropies of a density matrix from its spectrum: von Neumann H(ρ) = −Tr ρ log ρ and the Rényi
 * entropies H_α(ρ) = log(Tr ρ^α)/(1 − α) for α ∈ [0, ∞], with H_0 = log rank ρ (Hartley) and
 * H_∞ = −log λ_max (min-entropy).
 *
 * Numerics: ρ is divided by its trace (the ops layer has checked it is 1 within its tolerance; the
 * division removes that residual so the α → 1 limit stays continuous). Near α = 1 the entropy is
 * computed as −log1p(Σ p (p^{α−1} − 1))/(α − 1) with expm1, which has no cancellation, so
 * H_α → H continuously from both sides; far from 1 through a log-sum-exp that cannot overflow.
 * Support: eigenvalues at or below tol · λ_max are zero (tol default DEFAULT_SUPPORT_TOLERANCE);
 * this decides the rank for H_0 and drops noise that would otherwise count for small α
 * (p^α of a rounding error 1e-17 is 2e-9 at α = 1/2). The returned `rank` shows the decision.
 *
 * Deliberately not here: validation of ρ (ops layer), conditional entropies (conditional.ts).
 * Cost: one eigenvalue decomposition, O(n^3).
 */
import { CMatrix } from '../linalg/cmatrix.js';
import { eigvalsh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import { logOfBase } from './divergence-kit.js';

export interface EntropyOptions {
  /** Logarithm base (default 2). */
  base?: number;
  /** Relative support tolerance (default DEFAULT_SUPPORT_TOLERANCE = 1e-12). */
  tol?: number;
}

export interface EntropyResult {
  value: number;
  alpha: number;
  /** Number of eigenvalues above tol · λ_max. */
  rank: number;
  tolerance: number;
  base: number;
}

/** Probabilities from a spectrum: values at or below tol · max set to zero, the rest normalised. */
export function probabilitiesFromSpectrum(values: ArrayLike<number>, tol = DEFAULT_SUPPORT_TOLERANCE): number[] {
  let max = 0;
  for (let i = 0; i < values.length; i++) max = Math.max(max, values[i]);
  const thr = tol * max;
  const p: number[] = [];
  let total = 0;
  for (let i = 0; i < values.length; i++) {
    if (values[i] > thr && values[i] > 0) {
      p.push(values[i]);
      total += values[i];
    }
  }
  return p.map((x) => x / total);
}

/** Check a Rényi order for entropies: α ∈ [0, ∞] (Infinity allowed). */
export function checkEntropyOrder(alpha: number, path = 'alpha'): number {
  if (typeof alpha !== 'number' || Number.isNaN(alpha) || alpha < 0) {
    throw new RhoError('invalid-argument', `The Rényi order alpha must be in [0, Infinity] (got ${alpha}).`, path);
  }
  return alpha;
}

/**
 * Rényi entropy (natural log) of a probability vector with strictly positive entries summing to 1.
 * α = 1 is the Shannon entropy; the limit is continuous.
 */
export function renyiEntropyOfProbabilities(p: readonly number[], alpha: number): number {
  if (p.length === 0) return 0;
  if (alpha === 0) return Math.log(p.length);
  if (alpha === Infinity) return -Math.log(Math.max(...p));
  if (alpha === 1) {
    let h = 0;
    for (const x of p) h -= x * Math.log(x);
    return h;
  }
  const t = alpha - 1;
  if (Math.abs(t) <= 0.5) {
    // Σ p^α − 1 = Σ p (p^t − 1), computed without cancellation.
    let s = 0;
    for (const x of p) s += x * Math.expm1(t * Math.log(x));
    return -Math.log1p(s) / t;
  }
  let m = 0;
  for (const x of p) m = Math.max(m, x);
  let s = 0;
  for (const x of p) s += Math.pow(x / m, alpha);
  return (alpha * Math.log(m) + Math.log(s)) / (1 - alpha);
}

/** Entropy of order α (default 1: von Neumann) of a density matrix. */
export function entropy(rho: CMatrix, alpha = 1, options: EntropyOptions = {}): EntropyResult {
  checkEntropyOrder(alpha);
  const lb = logOfBase(options.base);
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const p = probabilitiesFromSpectrum(eigvalsh(rho), tol);
  const h = renyiEntropyOfProbabilities(p, alpha) / lb;
  return { value: h === 0 ? 0 : h, alpha, rank: p.length, tolerance: tol, base: options.base ?? 2 };
}

/** H(ρ) = −Tr ρ log ρ. */
export function vonNeumannEntropy(rho: CMatrix, options: EntropyOptions = {}): number {
  return entropy(rho, 1, options).value;
}

/** H_α(ρ) = log(Tr ρ^α)/(1 − α); α = 0, 1, ∞ as the limits. */
export function renyiEntropy(rho: CMatrix, alpha: number, options: EntropyOptions = {}): number {
  return entropy(rho, alpha, options).value;
}
