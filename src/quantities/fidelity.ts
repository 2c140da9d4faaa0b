/**
 * Uhlmann fidelity of two positive semidefinite matrices, in the project's convention (DESIGN.md,
 * PROTOCOL.md): F(ρ,σ) = ‖√ρ √σ‖₁² (squared), with the root ‖√ρ √σ‖₁ returned alongside.
 *
 * Method: with ρ = Σ_k λ_k |v_k⟩⟨v_k| and σ = Σ_l μ_l |u_l⟩⟨u_l| restricted to their supports
 * (eigenvalues above tol · largest eigenvalue), √ρ√σ = V √Λ B' √M U* with unitary-like factors, so
 * ‖√ρ√σ‖₁ is the sum of the singular values of the small r x s matrix B = √Λ V* U √M. The singular
 * values come from a Golub–Kahan SVD (ml-matrix) of the real 2r x 2s embedding [[Re B, −Im B],
 * [Im B, Re B]], whose singular values are those of B, each twice. This avoids the usual
 * √(rounding) error: forming √ρ σ √ρ and taking square roots of its eigenvalues turns eigenvalues
 * that should be exactly 0 (rank-deficient σ) into ±1e-17 and their square roots into 3e-9 errors;
 * the SVD of B has absolute error about ε·‖B‖ instead.
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
 * Cost: two Hermitian eigendecompositions (n x n), one product of size r x n x s, one real SVD of
 * size 2r x 2s; O(n³).
 */
import { SVD, Matrix } from 'ml-matrix';
import { CMatrix, trace, zeros } from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE, zeroThreshold } from '../linalg/functions.js';

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

/** Support of a positive semidefinite matrix: columns √λ_k v_k for eigenvalues above tol·λ_max. */
export interface WeightedSupport {
  /** n x r matrix of the columns √λ_k v_k. */
  basis: CMatrix;
  /** Total weight of the eigenvalues left out (positive ones below the threshold). */
  dropped: number;
}

export function weightedSupport(m: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): WeightedSupport {
  const { values, vectors } = eigh(m, { vectors: true });
  const V = vectors!;
  const n = m.rows;
  const thr = zeroThreshold(values, tol);
  const keep: number[] = [];
  let dropped = 0;
  for (let k = 0; k < n; k++) {
    if (values[k] > thr) keep.push(k);
    else if (values[k] > 0) dropped += values[k];
  }
  const r = keep.length;
  const W = zeros(n, r);
  keep.forEach((k, c) => {
    const s = Math.sqrt(values[k]);
    for (let i = 0; i < n; i++) {
      W.re[i * r + c] = s * V.re[i * n + k];
      W.im[i * r + c] = s * V.im[i * n + k];
    }
  });
  return { basis: W, dropped };
}

/** Sum of the singular values of a complex matrix (its trace norm), via a real SVD of the embedding. */
export function traceNormBySvd(b: CMatrix): number {
  const r = b.rows;
  const s = b.cols;
  if (r === 0 || s === 0) return 0;
  const real = Matrix.zeros(2 * r, 2 * s);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < s; j++) {
      const x = b.re[i * s + j];
      const y = b.im[i * s + j];
      real.set(i, j, x);
      real.set(i, j + s, -y);
      real.set(i + r, j, y);
      real.set(i + r, j + s, x);
    }
  }
  const svd = new SVD(real, { computeLeftSingularVectors: false, computeRightSingularVectors: false, autoTranspose: true });
  let sum = 0;
  for (const x of svd.diagonal) sum += Math.abs(x);
  return 0.5 * sum;
}

/** W1* W2 for n x r and n x s matrices, without forming the adjoint. */
function crossGram(w1: CMatrix, w2: CMatrix): CMatrix {
  const n = w1.rows;
  const r = w1.cols;
  const s = w2.cols;
  const out = zeros(r, s);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < s; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const ar = w1.re[k * r + i];
        const ai = -w1.im[k * r + i];
        const br = w2.re[k * s + j];
        const bi = w2.im[k * s + j];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      out.re[i * s + j] = re;
      out.im[i * s + j] = im;
    }
  }
  return out;
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
  let root = traceNormBySvd(crossGram(a.basis, b.basis));
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
