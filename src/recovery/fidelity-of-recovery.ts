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
 * What is returned beside the SDP value: the optimal channel, made exactly trace preserving
 * (Kraus operators K_k G^{−1/2}, G = Σ K_k*K_k, which is 1 up to the solver's residual), and the
 * fidelity that channel achieves recomputed with the closed form (quantities/fidelity.ts) — a
 * checkable lower bound on F(A;C|B). The dual objective is an upper bound to within the dual residual.
 *
 * Deliberately not here: the Petz map (petz.ts), other recoverability measures (relative entropy of
 * recovery, surprisal of measured recovery), optimisations over restricted channel classes.
 * Cost: N = d_A d_B d_C; one Hermitian block of size r + N and one of size d_B² d_C; r² + N² + d_B²
 * constraints, each σ-constraint with up to d_B² entries; the Schur complement is O((N²)²) memory
 * and O(N⁶) time per iteration — fine for three qubits (N = 8), slow around N = 27.
 */
import {
  CMatrix, eigh, hermitianPart, identity, mul, partialTrace,
} from '../linalg/index.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import type { Channel, State } from '../quantum/types.js';
import { applyChannel, choiToKraus, krausSum, krausToChoi } from '../quantum/channels.js';
import { fidelity } from '../quantities/fidelity.js';
import {
  solveSdp, partialTraceConstraints, matrixCoordinates, coordinateEntry, type BlockTerm, type Constraint, type SdpOptions,
} from '../sdp/index.js';
import {
  ACCEPT_INACCURATE_LOOSE, acceptAnswer, inverseRootOnSupport, realPartEntries, solverCertificate, type SolverCertificate,
} from '../sdp/support.js';
import { supportOf, diagonalBlockConstraints } from '../oneshot/fidelity-sdp.js';
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
  /** Certificate of the SDP; objectives are those of the ROOT fidelity. */
  certificate: SolverCertificate;
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

  const answer = solveSdp(
    { cones: [{ kind: 'hermitian', size }, { kind: 'hermitian', size: dJ }], objective, constraints },
    options.sdp,
  );
  const warning = acceptAnswer(answer, 'the fidelity of recovery', ACCEPT_INACCURATE_LOOSE);

  // The optimal channel, made trace preserving.
  const bDims = b.map((s) => dims[s]);
  const cDims = c.map((s) => dims[s]);
  const fromDims = bDims.length ? bDims : [1];
  const toDims = [...bDims, ...cDims].length ? [...bDims, ...cDims] : [1];
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
  const state: State = { matrix: rhoAB, dims: [dA, dB] };
  const recovered = hermitianPart(applyChannel(flat, state, [1]).matrix);
  const achieved = fidelity(rhoABC, recovered, tol).value;

  const root = -answer.primalObjective;
  const out: FidelityOfRecoveryResult = {
    value: root * root,
    root,
    channel,
    choi: krausToChoi(flat),
    achieved,
    certificate: solverCertificate(answer, true),
    parts,
    diagnostics: { rankRho: r, traceDefect, supportTolerance: tol },
  };
  if (warning) out.warning = warning;
  return out;
}
