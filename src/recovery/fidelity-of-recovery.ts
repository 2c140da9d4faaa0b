/**
 * Fidelity of recovery (Seshadreesan & Wilde, Phys. Rev. A 92, 042321 (2015)):
 *
 *   F(A;C|B)_ρ = max over channels R: B → BC of F(ρ_ABC, (id_A ⊗ R)(ρ_AB)),
 *
 * squared fidelity as everywhere in this project. It is 1 exactly on quantum Markov chains, at least
 * the fidelity of the Petz map, and bounds the conditional mutual information from below:
 * I(A;C|B) ≥ −log F(A;C|B) (Fawzi & Renner, Commun. Math. Phys. 340, 575 (2015)).
 *
 * Method: one SDP over the Choi matrix J of R (convention J = Σ_ij |i⟩⟨j| ⊗ R(|i⟩⟨j|), input factor
 * first; J ⪰ 0 and Tr_out J = 1_B make R a channel), with the root fidelity in Watrous's form
 * (oneshot/fidelity-sdp.ts):
 *
 *   √F(A;C|B) = max Re Tr(V X′)  s.t.  [[Λ, X′], [X′*, σ(J)]] ⪰ 0,  J ⪰ 0,  Tr_out J = 1_B,
 *
 * where ρ_ABC = V Λ V* on its support (rank r, eigenvalues above tol·λ_max) and
 * σ(J) = (id_A ⊗ R_J)(ρ_AB), linear in J: σ_{(a,o),(a′,o′)} = Σ_{b,b′} (ρ_AB)_{(a,b),(a′,b′)} J_{(b,o),(b′,o′)}.
 * Restricting ρ_ABC to its support keeps a strictly feasible point for rank-deficient states.
 *
 * THE CERTIFICATE (the shape of src/sdp/support.ts). Primal point: the optimal channel, made exactly
 * trace preserving (Kraus operators K_k G^{−1/2}, G = Σ K_k*K_k, which is 1 up to the solver's residual),
 * as its Choi matrix J; its objective is √F(ρ_ABC, σ(J)) recomputed with the closed form
 * (quantities/fidelity.ts), a checkable lower bound on F(A;C|B). Dual point: (Y, Z). For every Y ≻ 0 on
 * supp ρ_ABC, √F(ρ, σ) ≤ √(Tr ρY · Tr σY⁻¹) (Alberti's theorem; the dual of Watrous's fidelity SDP), and
 * Tr σ(J)W = Tr K(W)J for the operator K of recoveryDualOperator, so for every channel
 * Tr σ(J)W ≤ Tr Z whenever Z ⊗ 1_BC ⪰ K(W) (weak duality of the channel SDP, Tr_out J = 1_B). With
 * W = Y⁻¹ on the support: √F(A;C|B) ≤ √(Tr ρ_ABC Y · Tr Z). Y and Z come from the solver's multipliers
 * (Y made positive definite, Z shifted by s·1 until Z ⊗ 1 ⪰ K(W)); the bracket of F is padded for
 * rounding, clipped to [0, 1] (the excess stated), and certified by `assess` (1e-5 relative).
 * kernel-bridge/rhosigma/certificates.py and the op verify-answer recompute all of it.
 *
 * Deliberately not here: the Petz map (petz.ts), other recoverability measures (relative entropy of
 * recovery, surprisal of measured recovery), optimisations over restricted channel classes.
 * Cost: N = d_A d_B d_C; one Hermitian block of size r + N and one of size d_B² d_C; r² + N² + d_B²
 * constraints, each σ-constraint with up to d_B² entries. The r² constraints fixing the ρ_ABC block are
 * eliminated from the Schur complement in closed form (src/sdp/elimination.ts), so it is (N² + d_B²)²:
 * 16(N² + d_B²)² bytes and (N² + d_B²)³/3 multiply-adds per iteration for its Cholesky factor, plus its
 * assembly, about N²·d_B·(d_B² d_C)² complex multiply-adds (each σ-constraint's W A W formed from its
 * d_B rows, schur.ts). Measured (bench/recovery.ts, bench/RESULTS.md): on a quiet machine (2,4,4) in 8.3 s
 * and (4,2,4) in 4.9 s (9–18 s and 7–12 s when the machine was shared), 8–40× faster than cvxopt on the dual SDP; N = 64
 * is accepted by the limits but takes minutes (the deadline stops it).
 */
import {
  CMatrix, adjoint, eigh, hermitianPart, identity, kron, mul, partialTrace, scale, trace, zeros,
} from '../linalg/index.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import type { Channel, State } from '../quantum/types.js';
import { applyChannel, choiToKraus, krausSum, krausToChoi } from '../quantum/channels.js';
import { fidelity } from '../quantities/fidelity.js';
import {
  solveSdp, partialTraceConstraints, matrixCoordinates, coordinateEntry, type BlockTerm, type Constraint, type SdpOptions,
} from '../sdp/index.js';
import {
  ACCEPT_INACCURATE_LOOSE, assess, certifyRefined, inverseRootOnSupport, multiplierMatrix, psdShift, realPartEntries, roundingPad,
  type Assessed, type SdpCertificate,
} from '../sdp/support.js';
import { supportOf, diagonalBlockConstraints, positiveDefinite } from '../oneshot/fidelity-sdp.js';
import { tripartite, type Tripartite } from './tripartite.js';

export interface FidelityOfRecoveryResult {
  /** F(A;C|B) from the SDP (squared). */
  value: number;
  /** √F(A;C|B) = the solver's primal objective (as a maximum). */
  root: number;
  /** An optimal recovery channel B → BC (fromDims: B's dims, toDims: B's then C's), trace preserving. */
  channel: Channel;
  /** Its Choi matrix (input factor first). */
  choi: CMatrix;
  /** F(ρ_ABC, (id_A ⊗ R)(ρ_AB)) for the returned channel, by the closed form: a checkable lower bound. */
  achieved: number;
  /** Certificate of the SDP (src/sdp/support.ts): objectives are those of the ROOT fidelity √F, bounds of F. */
  certificate: SdpCertificate;
  parts: Tripartite;
  diagnostics: {
    /** Rank of ρ_ABC used to restrict the SDP to its support. */
    rankRho: number;
    /** ‖Σ K*K − 1‖ of the solver's channel before it was made trace preserving (operator norm). */
    traceDefect: number;
    supportTolerance: number;
  };
  warning?: string;
}

export interface FidelityOfRecoveryOptions {
  /** Relative support tolerance for ρ_ABC and for the Kraus form of the optimal Choi matrix (default 1e-12). */
  tol?: number;
  sdp?: SdpOptions;
}

/** F(A;C|B) of ρ on `dims` with groups a, b, c, with the optimal channel and the certificate. */
export function fidelityOfRecovery(
  rho: CMatrix,
  dims: readonly number[],
  a: readonly number[],
  b: readonly number[],
  c: readonly number[],
  options: FidelityOfRecoveryOptions = {},
): FidelityOfRecoveryResult {
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const parts = tripartite(rho, dims, a, b, c);
  const { dA, dB, dC } = parts;
  const N = dA * dB * dC;
  const dO = dB * dC;
  const dJ = dB * dO;
  const rhoABC = hermitianPart(parts.rho);
  const rhoAB = hermitianPart(partialTrace(rhoABC, [dA * dB, dC], [1]));
  const sup = supportOf(rhoABC, tol);
  const r = sup.values.length;
  const V = sup.basis; // N × r
  const size = r + N;

  // Objective: minimise −Re Tr(V X′) = −Re Σ_{i<r, j<N} X′_ij V_ji, X′_ij = Z[i, r + j].
  const objTerms: [number, number, number, number][] = [];
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < N; j++) objTerms.push([i, r + j, -V.re[j * r + i], -V.im[j * r + i]]);
  }
  const objective: BlockTerm[] = [{ block: 0, entries: realPartEntries(objTerms) }];

  const constraints: Constraint[] = diagonalBlockConstraints(0, 0, sup.values, 'ρ_ABC block');
  // Bottom-right block of Z equals σ(J), coordinate by coordinate.
  for (const co of matrixCoordinates(N, true)) {
    const p = co.i;
    const q = co.j;
    const ap = Math.floor(p / dO);
    const op = p % dO;
    const aq = Math.floor(q / dO);
    const oq = q % dO;
    // coordinate of Σ_{b,b′} c_{bb′} J_{(b,op),(b′,oq)} with c = ρ_AB[(ap,b),(aq,b′)]; Im part: Re of (−i c).
    const jTerms: [number, number, number, number][] = [];
    for (let bb = 0; bb < dB; bb++) {
      for (let bq = 0; bq < dB; bq++) {
        const k = (ap * dB + bb) * (dA * dB) + (aq * dB + bq);
        const cr = rhoAB.re[k];
        const ci = rhoAB.im[k];
        const [tr, ti] = co.part === 're' ? [cr, ci] : [ci, -cr];
        jTerms.push([bb * dO + op, bq * dO + oq, -tr, -ti]);
      }
    }
    constraints.push({
      terms: [
        { block: 0, entries: [coordinateEntry(r + p, r + q, co.part)] },
        { block: 1, entries: realPartEntries(jTerms) },
      ],
      equals: 0,
      label: `σ block (${p}, ${q}) ${co.part}`,
    });
  }
  constraints.push(...partialTraceConstraints({ block: 1, dims: [dB, dO], traceOut: [1], hermitian: true, equals: identity(dB) }));

  const problem = { cones: [{ kind: 'hermitian' as const, size }, { kind: 'hermitian' as const, size: dJ }], objective, constraints };
  const bDims = b.map((s) => dims[s]);
  const cDims = c.map((s) => dims[s]);
  const fromDims = bDims.length ? bDims : [1];
  const toDims = [...bDims, ...cDims].length ? [...bDims, ...cDims] : [1];
  const state: State = { matrix: rhoAB, dims: [dA, dB] };
  const extras = new Map<SdpCertificate, { channel: Channel; choi: CMatrix; achieved: number; traceDefect: number }>();
  const attempt = (solver: SdpOptions | undefined): Assessed => {
    const answer = solveSdp(problem, solver);
    // The primal point: the solver's channel, made trace preserving (K_k G^{−1/2}), and its fidelity by the closed form.
    const J = hermitianPart(answer.x[1] as CMatrix);
    const raw = choiToKraus(J, [dB], [dO], tol);
    const G = hermitianPart(krausSum(raw, 'KstarK'));
    let traceDefect = 0;
    eigh(G, { vectors: false }).values.forEach((v) => {
      traceDefect = Math.max(traceDefect, Math.abs(v - 1));
    });
    const invRoot = inverseRootOnSupport(G);
    const channel: Channel = { kraus: raw.kraus.map((K) => mul(K, invRoot)), fromDims, toDims };
    const flat: Channel = { kraus: channel.kraus, fromDims: [dB], toDims: [dO] };
    const choi = krausToChoi(flat);
    const recovered = hermitianPart(applyChannel(flat, state, [1]).matrix);
    const achieved = fidelity(rhoABC, recovered, tol).value;
    // The dual point (see the header): Y₀ = −2·(multipliers of the ρ_ABC block), made positive definite; Z = −2·(multipliers
    // of Tr_out J = 1_B), shifted by s·1 until (Z + s·1) ⊗ 1_BC ⪰ K(V Y₀⁻¹ V*).
    const { pd, inverse } = positiveDefinite(scale(multiplierMatrix(answer.y, 0, r), -2));
    const Z = scale(multiplierMatrix(answer.y, r * r + N * N, dB), -2);
    const W = mul(mul(V, inverse), adjoint(V));
    const shift = psdShift(kron(Z, identity(dO)), recoveryDualOperator(rhoAB, W, dA, dB, dO));
    let trLY = 0;
    for (let i = 0; i < r; i++) trLY += sup.values[i] * pd.re[i * r + i];
    const mu = trace(Z).re + dB * shift;
    const rootUpper = Math.sqrt(Math.max(0, trLY) * Math.max(0, mu));
    const pad = roundingPad(N * N, 1);
    const assessed = assess({
      what: 'the fidelity of recovery', solve: answer, problem: RECOVERY_PROBLEM, sense: 'maximize',
      primal: { choi }, primalObjective: Math.sqrt(achieved),
      dual: { Y: mul(mul(V, pd), adjoint(V)), Z: shift > 0 ? addIdentity(Z, shift) : Z }, dualObjective: rootUpper,
      bounds: { lower: Math.max(0, achieved * (1 - 4e-15) - pad), upper: (rootUpper * (1 + 1e-14) + pad) ** 2 },
      estimate: answer.primalObjective < 0 ? answer.primalObjective ** 2 : undefined,
      range: [0, 1],
      limit: ACCEPT_INACCURATE_LOOSE,
    });
    extras.set(assessed.certificate, { channel, choi, achieved, traceDefect });
    return assessed;
  };
  const cert = certifyRefined(attempt, options.sdp);
  const chosen = extras.get(cert.certificate)!;
  const out: FidelityOfRecoveryResult = {
    value: cert.value,
    root: Math.sqrt(cert.value),
    channel: chosen.channel,
    choi: chosen.choi,
    achieved: chosen.achieved,
    certificate: cert.certificate,
    parts,
    diagnostics: { rankRho: r, traceDefect: chosen.traceDefect, supportTolerance: tol },
  };
  if (cert.note) out.warning = cert.note;
  return out;
}

export const RECOVERY_PROBLEM =
  '√F(A;C|B) = maximize ‖√ρ_ABC √σ(J)‖₁ over Choi matrices J ⪰ 0 with Tr_out J = 1_B (σ(J) = (id_A ⊗ R_J)(ρ_AB); Watrous\'s fidelity SDP with ' +
  'σ a variable); bounds are of F = (√F)². Primal point: the recovery channel\'s Choi matrix (input B first, output B then C), its value ' +
  'recomputed by the closed-form fidelity. Dual: √F(A;C|B) ≤ √(Tr ρ_ABC Y · Tr Z) for Y ≻ 0 on supp ρ_ABC and Z on B with ' +
  'Z ⊗ 1_BC ⪰ K(Y⁺), K(W)_{(b′,o′),(b,o)} = Σ_{a,a′} (ρ_AB)_{(a,b),(a′,b′)} W_{(a′,o′),(a,o)} (so that Tr σ(J) W = Tr K(W) J)';

/**
 * K(W) on B ⊗ BC with Tr σ(J)W = Tr K(W)J for every J (σ(J) = (id_A ⊗ R_J)(ρ_AB)):
 * K(W)_{(b′,o′),(b,o)} = Σ_{a,a′} (ρ_AB)_{(a,b),(a′,b′)} W_{(a′,o′),(a,o)}. Then max over channels of Tr σ(J)W ≤ Tr Z
 * whenever Z ⊗ 1 ⪰ K(W) (weak duality of max{⟨K, J⟩ : J ⪰ 0, Tr_out J = 1}).
 */
export function recoveryDualOperator(rhoAB: CMatrix, W: CMatrix, dA: number, dB: number, dO: number): CMatrix {
  const dJ = dB * dO;
  const N = dA * dO;
  const nAB = dA * dB;
  const out = zeros(dJ, dJ);
  for (let bq = 0; bq < dB; bq++) {
    for (let oq = 0; oq < dO; oq++) {
      const row = bq * dO + oq;
      for (let bb = 0; bb < dB; bb++) {
        for (let o = 0; o < dO; o++) {
          let sr = 0;
          let si = 0;
          for (let a = 0; a < dA; a++) {
            for (let aq = 0; aq < dA; aq++) {
              const k = (a * dB + bb) * nAB + (aq * dB + bq);
              const w = (aq * dO + oq) * N + (a * dO + o);
              sr += rhoAB.re[k] * W.re[w] - rhoAB.im[k] * W.im[w];
              si += rhoAB.re[k] * W.im[w] + rhoAB.im[k] * W.re[w];
            }
          }
          out.re[row * dJ + bb * dO + o] = sr;
          out.im[row * dJ + bb * dO + o] = si;
        }
      }
    }
  }
  return hermitianPart(out);
}

function addIdentity(m: CMatrix, s: number): CMatrix {
  const out = scale(m, 1);
  for (let i = 0; i < m.rows; i++) out.re[i * m.rows + i] += s;
  return out;
}
