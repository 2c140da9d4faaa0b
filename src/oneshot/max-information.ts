/**
 * Max-information I_max(A:B)_ρ = min over states σ_B of D_max(ρ_AB ‖ ρ_A ⊗ σ_B) (M. Berta,
 * M. Christandl & R. Renner, "The quantum reverse Shannon theorem based on one-shot information
 * theory", Commun. Math. Phys. 306, 579 (2011)), as a semidefinite program with the optimal σ_B and
 * the certificate.
 *
 * THE SDP. With σ' = λσ_B unnormalised, 2^{I_max} = min { Tr σ' : ρ_AB ⪯ ρ_A ⊗ σ' }. ρ_A may be
 * rank-deficient: since supp ρ_AB ⊆ supp ρ_A ⊗ H_B for every state, the constraint lives on
 * supp ρ_A ⊗ H_B (on its complement both sides vanish, and keeping it would leave the SDP without
 * an interior). There, with ρ_A = V D V* (V: d_A×r isometry onto the support, decided with `tol`),
 * the congruence by K = D^{−1/2}V* ⊗ I_B (invertible on that subspace, so it preserves the operator
 * order) turns it into
 *
 *   τ_AB := K ρ_AB K* ⪯ I_r ⊗ σ',
 *
 * i.e. 2^{I_max} = min{Tr σ' : I ⊗ σ' ⪰ τ} = 2^{−H_min(A|B)} of the unnormalised operator τ. We solve
 * that problem in its small dual form (max Tr τX s.t. tr_A X = I_B, X ⪰ 0; shared with
 * conditional-min-max.ts), read σ' from the multipliers and return σ_B = σ'/Tr σ'.
 *
 * Diagnostics: `droppedWeight` = Tr ρ_A(I − Π_A), the weight of ρ outside the kept support (zero for
 * an exact state; numerically at most about r·tol·λ_max), and `rankA`. Small eigenvalues of ρ_A kept
 * in the support are inverted: a near-rank-deficient ρ_A makes τ large and the value sensitive to
 * the support tolerance.
 *
 * Deliberately not here: the smooth max-information, other variants (e.g. σ_B fixed to ρ_B, or the
 * order of the arguments swapped). Cost: an eigendecomposition of ρ_A and an SDP with one
 * (r d_B)-sized block and d_B² constraints.
 */
import { CMatrix, kron, identity, mul, adjoint, scale, zeros, partialTrace, trace } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import { spectral, columns, DEFAULT_SUPPORT_TOLERANCE } from '../quantities/divergence-kit.js';
import { bipartiteMarginal, solveMinEntropySdp } from './conditional-min-max.js';
import { assess, certifyRefined, lnBase, symmetrize, type Assessed, type OneShotSdpOptions, type SdpCertificate } from '../sdp/support.js';
import type { SdpOptions } from '../sdp/index.js';

export interface MaxInformationResult {
  /** I_max(A:B) in the chosen base. */
  value: number;
  base: number;
  /** The optimal state σ_B: ρ_AB ⪯ 2^{I_max} ρ_A ⊗ σ_B. */
  sigma: CMatrix;
  /** Rank of ρ_A kept (support decided with the tolerance). */
  rankA: number;
  /** Tr ρ_A (I − Π_A): weight of ρ outside the kept support. */
  droppedWeight: number;
  dims: { a: number; b: number };
  certificate: SdpCertificate;
  note?: string;
}

/** I_max(A:B)_ρ (Berta, Christandl & Renner 2011). See the header. */
export function maxInformation(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: OneShotSdpOptions = {},
): MaxInformationResult {
  const lb = lnBase(options.base);
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  if (b.length === 0) throw new RhoError('invalid-argument', 'System B must contain at least one subsystem.', 'b');
  const { rhoAB, dA, dB } = bipartiteMarginal(rho, dims, a, b);
  const rhoA = partialTrace(rhoAB, [dA, dB], [1]);
  const S = spectral(rhoA, tol);
  const r = S.support.length;
  const V = columns(S.vectors, S.support);
  let dropped = 0;
  for (let k = 0; k < dA; k++) if (!S.support.includes(k)) dropped += Math.max(0, S.values[k]);
  // (D^{-1/2} V*) ⊗ I_B
  const left = zeros(r, dA);
  const vAdj = adjoint(V);
  S.support.forEach((idx, row) => {
    const w = 1 / Math.sqrt(S.values[idx]);
    for (let j = 0; j < dA; j++) {
      left.re[row * dA + j] = w * vAdj.re[row * dA + j];
      left.im[row * dA + j] = w * vAdj.im[row * dA + j];
    }
  });
  const K = kron(left, identity(dB));
  const tau = symmetrize(mul(mul(K, rhoAB), adjoint(K)));
  const smallest = Math.min(...S.support.map((k) => S.values[k]));
  // Back to the original coordinates: Z = (V D^{−1/2} ⊗ I) X (D^{−1/2} V* ⊗ I) is the dual point of
  // min{Tr σ' : ρ_A ⊗ σ' ⪰ ρ_AB}: Z ⪰ 0, tr_A((ρ_A ⊗ I) Z) = I_B, Tr ρ_AB Z = Tr τX.
  const back = adjoint(K);
  // ρ_A is inverted on its support: the rounding of ρ_AB (about n·u) reaches τ magnified by the condition
  // number of ρ_A, and moves the optimum min{Tr σ' : I ⊗ σ' ⪰ τ} by at most d_B times that (σ' + ‖E‖·I stays
  // feasible). The bracket is padded by it: a 1e-8 eigenvalue of ρ_A costs about 1e-8·d relative accuracy.
  const conditioning = r > 0 ? 4 * dA * dB * dB * 1.1102230246251565e-16 * (S.max / smallest) : 0;
  const attempt = (solver: SdpOptions | undefined): Assessed => {
    const res = solveMinEntropySdp(tau, r, dB, solver);
    const h = (x: number) => (x > 0 ? Math.log(x) / lb : -Infinity);
    const sigma = scale(res.sigma, 1 / trace(res.sigma).re);
    return assess({
      what: 'the max-information', solve: res.ans, problem: MAX_INFORMATION_PROBLEM, sense: 'minimize',
      primal: { sigma }, primalObjective: trace(res.sigma).re,
      dual: { Z: symmetrize(mul(mul(back, res.X), K)) }, dualObjective: res.lower,
      bounds: { lower: h(res.lower - conditioning), upper: h(res.upper + conditioning) },
      estimate: h(res.optimum),
      // 0 ≤ I_max(A:B) ≤ 2 log min(d_A, d_B) (Berta, Christandl, Renner 2011, as recalled from memory;
      // 0 because both sides of the D_max are states, the upper end at maximally entangled states).
      range: [0, (2 * Math.log(Math.min(dA, dB))) / lb],
    });
  };
  const c = certifyRefined(attempt, options.solver);
  const notes: string[] = [];
  if (c.note) notes.push(c.note);
  if (r > 0 && smallest < 1e-6 * S.max) {
    notes.push(
      `ρ_A has an eigenvalue ${smallest.toExponential(2)} (relative ${(smallest / S.max).toExponential(2)}) kept in its support and inverted; ` +
        `the value is sensitive to the support tolerance ${tol}.`,
    );
  }
  return {
    value: c.value,
    base: options.base ?? 2,
    sigma: c.certificate.primal.sigma as CMatrix,
    rankA: r,
    droppedWeight: dropped,
    dims: { a: dA, b: dB },
    certificate: c.certificate,
    ...(notes.length ? { note: notes.join(' ') } : {}),
  };
}

const MAX_INFORMATION_PROBLEM =
  '2^{I_max} = minimize Tr σ′ s.t. ρ_A ⊗ σ′ ⪰ ρ_AB (primal point: σ_B = σ′/Tr σ′, for which the least λ with ρ_AB ⪯ λ ρ_A ⊗ σ_B ' +
  'bounds 2^{I_max}; ρ_A inverted on its support, decided with the support tolerance); dual: maximize Tr ρ_AB Z s.t. Z ⪰ 0, ' +
  'tr_A((ρ_A ⊗ I_B) Z) = I_B';
