/**
 * Conditional min- and max-entropy of a multipartite state, as semidefinite programs with their
 * certificates and optimisers (R. König, R. Renner & C. Schaffner, "The operational meaning of min-
 * and max-entropy", IEEE Trans. Inf. Theory 55, 4337 (2009)):
 *
 *   H_min(A|B)_ρ = −log min { Tr σ_B : I_A ⊗ σ_B ⪰ ρ_AB,  σ_B ⪰ 0 }
 *   H_max(A|B)_ρ =  log max { F(ρ_AB, I_A ⊗ σ_B) : σ_B a state },   F(ρ, τ) = ‖√ρ √τ‖₁² (squared)
 *
 * and the duality H_max(A|B)_ρ = −H_min(A|C)_ρ for a purification ρ_ABC (KRS 2009, Thm 3), which the
 * tests check. A and B are groups of subsystem indices (any order; the state's marginal on A ∪ B
 * is taken, A's factors first).
 *
 * THE SDPs handed to our solver (src/sdp, public API only):
 *  - H_min, solved in its dual ("guessing") form, which has only d_B² constraints:
 *      minimize ⟨−ρ_AB, X⟩  s.t.  tr_A X = I_B,  X ⪰ 0 (Hermitian, d_A d_B).
 *    The optimal value is −2^{−H_min}. The solver's dual is max Tr Y s.t. −ρ_AB − I_A ⊗ Y ⪰ 0, so
 *    the optimal σ_B of the definition is −Y, read from the multipliers of the partial-trace rows.
 *  - H_max, through the fidelity SDP ‖√P √Q‖₁ = max { Re Tr X : [[P, X], [X*, Q]] ⪰ 0 } (Watrous,
 *    "The Theory of Quantum Information", 2018, Thm 3.17), with Q = I_A ⊗ σ_B linear in σ_B:
 *      minimize −Re Tr Z₁₂  s.t.  Z₁₁ = ρ_AB,  Z₂₂ − I_A ⊗ σ_B = 0,  Tr σ_B = 1,  Z ⪰ 0, σ_B ⪰ 0,
 *    compressed to the support of ρ_AB (see maxEntropyProblem for why and how). The optimal value is
 *    −√F_max, so H_max = 2 log(−value).
 *
 * Values come from the solver's primal objective; the certificate carries both objectives and the
 * residuals (read them before trusting digits beyond ~1e-8 relative).
 *
 * Deliberately not here: smoothing (smooth-max.ts does the smooth max-relative entropy), validation
 * of ρ as a density matrix (the ops layer; ρ is divided by its trace here).
 * Cost: H_min: one (d_A d_B)-sized Hermitian block and d_B² constraints; H_max: a 2r-sized block
 * (r = rank ρ_AB ≤ d_A d_B), a d_B block and 2r² + 1 constraints — each interior-point iteration is dominated by the Schur
 * complement, O(m² n²) to form and O(m³) to factor.
 */
import {
  CMatrix, marginal, partialTrace, product, scale, trace, identity, mul, adjoint,
} from '../linalg/index.js';
import { RhoError } from '../errors.js';
import {
  solveSdp, partialTraceConstraints, matrixCoordinates, coordinateEntry,
  type SdpProblem, type Constraint, type Entry, type SdpAnswer,
} from '../sdp/index.js';
import { checkGroups } from '../quantities/conditional.js';
import { spectral, columns, DEFAULT_SUPPORT_TOLERANCE } from '../quantities/divergence-kit.js';
import {
  acceptAnswer, certificateOf, coordinateMatrix, lnBase, matrixBlock, multiplierMatrix, symmetrize,
  type OneShotSdpOptions, type LegacyCertificate,
} from '../sdp/support.js';

export interface ConditionalMinEntropyResult {
  /** H_min(A|B) in the chosen base. */
  value: number;
  base: number;
  /** The optimal σ_B of the definition (I_A ⊗ σ_B ⪰ ρ_AB), unnormalised: Tr σ_B = 2^{−H_min}. */
  sigma: CMatrix;
  /** The optimal X_AB of the dual form (X ⪰ 0, tr_A X = I_B): Tr ρ_AB X = 2^{−H_min}. */
  dualOperator: CMatrix;
  dims: { a: number; b: number };
  certificate: LegacyCertificate;
  note?: string;
}

export interface ConditionalMaxEntropyResult {
  /** H_max(A|B) in the chosen base. */
  value: number;
  base: number;
  /** The optimal state σ_B: F(ρ_AB, I_A ⊗ σ_B) = 2^{H_max}. */
  sigma: CMatrix;
  /** √F_max = ‖√ρ_AB √(I_A ⊗ σ_B)‖₁ at the optimum. */
  rootFidelity: number;
  dims: { a: number; b: number };
  certificate: LegacyCertificate;
  note?: string;
}

/** ρ_AB (A's factors first, divided by its trace) and the two group dimensions. */
export function bipartiteMarginal(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[],
): { rhoAB: CMatrix; dA: number; dB: number } {
  if (rho.rows !== rho.cols || product(dims) !== rho.rows) {
    throw new RhoError('dimension-mismatch', `The dimensions [${dims.join(', ')}] do not match the ${rho.rows}×${rho.cols} matrix.`, 'dims');
  }
  checkGroups(dims, { a, b });
  if (a.length === 0) throw new RhoError('invalid-argument', 'System A must contain at least one subsystem.', 'a');
  const m = marginal(rho, dims, [...a, ...b]);
  const tr = trace(m).re;
  if (!(tr > 0)) throw new RhoError('invalid-argument', 'ρ has zero trace.', 'rho');
  return {
    rhoAB: scale(m, 1 / tr),
    dA: product(a.map((s) => dims[s])),
    dB: product(b.map((s) => dims[s])),
  };
}

const MIN_PROBLEM = 'minimize ⟨−τ_AB, X⟩ s.t. tr_A X = I_B, X ⪰ 0 (Hermitian); optimal value −2^{−H_min}';

/** The H_min SDP (dual form) for an operator τ_AB ⪰ 0 on C^{dA} ⊗ C^{dB}. */
export function minEntropyProblem(tau: CMatrix, dA: number, dB: number): SdpProblem {
  return {
    cones: [{ kind: 'hermitian', size: dA * dB }],
    objective: [{ block: 0, matrix: scale(tau, -1) }],
    constraints: partialTraceConstraints({ block: 0, dims: [dA, dB], traceOut: [0], hermitian: true, equals: identity(dB) }),
  };
}

/**
 * Solve max { Tr τX : tr_A X = I_B, X ⪰ 0 } = min { Tr σ : I_A ⊗ σ ⪰ τ } for any τ ⪰ 0 (not
 * necessarily normalised). Shared with max-information.ts. Returns the optimal value, both optimisers,
 * the raw answer and the note of the acceptance rule.
 */
export function solveMinEntropySdp(
  tau: CMatrix, dA: number, dB: number, what: string, options: OneShotSdpOptions = {},
): { optimum: number; sigma: CMatrix; X: CMatrix; ans: SdpAnswer; note?: string; certificate: LegacyCertificate } {
  const ans = solveSdp(minEntropyProblem(tau, dA, dB), options.solver);
  const note = acceptAnswer(ans, what);
  const optimum = -ans.primalObjective;
  if (!(optimum > 0)) {
    throw new RhoError('solver-failed', `The SDP for ${what} returned a non-positive optimum ${optimum}.`, undefined, { status: ans.status });
  }
  const sigma = symmetrize(scale(multiplierMatrix(ans.y, 0, dB), -1));
  return { optimum, sigma, X: symmetrize(matrixBlock(ans, 0)), ans, note, certificate: certificateOf(ans, MIN_PROBLEM) };
}

/** H_min(A|B)_ρ (KRS 2009), with the optimal σ_B and the certificate. */
export function conditionalMinEntropy(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: OneShotSdpOptions = {},
): ConditionalMinEntropyResult {
  const lb = lnBase(options.base);
  const { rhoAB, dA, dB } = bipartiteMarginal(rho, dims, a, b);
  const r = solveMinEntropySdp(rhoAB, dA, dB, 'the conditional min-entropy', options);
  return {
    value: -Math.log(r.optimum) / lb,
    base: options.base ?? 2,
    sigma: r.sigma,
    dualOperator: r.X,
    dims: { a: dA, b: dB },
    certificate: r.certificate,
    ...(r.note ? { note: r.note } : {}),
  };
}

const MAX_PROBLEM =
  'minimize −Re Tr Z₁₂ s.t. Z₁₁ = D, Z₂₂ − V*(I_A ⊗ σ_B)V = 0, Tr σ_B = 1; Z ⪰ 0 (2r×2r Hermitian), σ_B ⪰ 0, ' +
  'where ρ_AB = V D V* on its support (rank r); optimal value −√F_max';

/**
 * The H_max fidelity SDP for ρ_AB on C^{dA} ⊗ C^{dB}, compressed to the support of ρ_AB.
 *
 * Why compressed: with Z₁₁ = ρ_AB rank-deficient no feasible Z is positive definite, the problem has
 * no interior and interior-point iterates converge slowly and inaccurately (pure states lose ~5
 * digits). Writing ρ_AB = V D V* with V (n×r) an isometry onto the support (decided with `tol`),
 * √ρ τ √ρ = V √D (V*τV) √D V* has the nonzero spectrum of √D (V*τV) √D, so
 * ‖√ρ √τ‖₁ = ‖√D √(V*τV)‖₁ and the block becomes [[D, X], [X*, V*(I_A ⊗ σ_B)V]] of size 2r, which has
 * an interior (D ≻ 0, σ_B ≻ 0, X = 0). The coordinate c of V*(I_A ⊗ σ_B)V is ⟨tr_A(V E_c V*), σ_B⟩,
 * which gives the dense σ_B term of each row.
 */
export function maxEntropyProblem(rhoAB: CMatrix, dA: number, dB: number, tol = DEFAULT_SUPPORT_TOLERANCE): SdpProblem {
  const S = spectral(rhoAB, tol);
  const r = S.support.length;
  const V = columns(S.vectors, S.support);
  const objective: Entry[] = [];
  for (let i = 0; i < r; i++) objective.push([i, r + i, -0.5]);
  const constraints: Constraint[] = [];
  for (const c of matrixCoordinates(r, true)) {
    const value = c.i === c.j && c.part === 're' ? S.values[S.support[c.i]] : 0;
    constraints.push({ terms: [{ block: 0, entries: [coordinateEntry(c.i, c.j, c.part)] }], equals: value });
  }
  for (const c of matrixCoordinates(r, true)) {
    // V E_c V* for the Hermitian coefficient E_c of coordinate c (see sdp/build.ts, coordinateEntry).
    const m = partialTrace(mul(mul(V, coordinateMatrix(r, c)), adjoint(V)), [dA, dB], [0]);
    constraints.push({
      terms: [
        { block: 0, entries: [coordinateEntry(r + c.i, r + c.j, c.part)] },
        { block: 1, matrix: symmetrize(scale(m, -1)) },
      ],
      equals: 0,
    });
  }
  constraints.push({ terms: [{ block: 1, matrix: identity(dB) }], equals: 1, label: 'Tr σ_B = 1' });
  return {
    cones: [{ kind: 'hermitian', size: 2 * r }, { kind: 'hermitian', size: dB }],
    objective: [{ block: 0, entries: objective }],
    constraints,
  };
}

/** H_max(A|B)_ρ (KRS 2009) through the fidelity SDP, with the optimal σ_B and the certificate. */
export function conditionalMaxEntropy(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: OneShotSdpOptions = {},
): ConditionalMaxEntropyResult {
  const lb = lnBase(options.base);
  const { rhoAB, dA, dB } = bipartiteMarginal(rho, dims, a, b);
  const ans = solveSdp(maxEntropyProblem(rhoAB, dA, dB, options.tol), options.solver);
  const note = acceptAnswer(ans, 'the conditional max-entropy');
  const root = -ans.primalObjective;
  if (!(root > 0)) {
    throw new RhoError('solver-failed', `The fidelity SDP returned a non-positive optimum ${root}.`, undefined, { status: ans.status });
  }
  return {
    value: (2 * Math.log(root)) / lb,
    base: options.base ?? 2,
    sigma: symmetrize(matrixBlock(ans, 1)),
    rootFidelity: root,
    dims: { a: dA, b: dB },
    certificate: certificateOf(ans, MAX_PROBLEM),
    ...(note ? { note } : {}),
  };
}
