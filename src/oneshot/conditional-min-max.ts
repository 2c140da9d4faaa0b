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
  CMatrix, marginal, partialTrace, product, scale, trace, identity, mul, adjoint, kron, traceOfProductRe, hermitianPart, eigh, fromSpectrum,
} from '../linalg/index.js';
import { RhoError } from '../errors.js';
import {
  solveSdp, partialTraceConstraints, matrixCoordinates, coordinateEntry,
  type SdpProblem, type Constraint, type Entry, type SdpAnswer,
} from '../sdp/index.js';
import { checkGroups } from '../quantities/conditional.js';
import { spectral, columns, DEFAULT_SUPPORT_TOLERANCE } from '../quantities/divergence-kit.js';
import {
  assess, certifyRefined, clipPsd, coordinateMatrix, inverseRootOnSupport, lnBase, matrixBlock, maxEigenvalueUpper, multiplierMatrix, psdShift,
  roundingPad, symmetrize, type Assessed, type OneShotSdpOptions, type SdpCertificate,
} from '../sdp/support.js';
import type { SdpOptions } from '../sdp/index.js';
import { fidelity } from '../quantities/fidelity.js';
import { positiveDefinite } from './fidelity-sdp.js';

export interface ConditionalMinEntropyResult {
  /** H_min(A|B) in the chosen base. */
  value: number;
  base: number;
  /** The optimal σ_B of the definition (I_A ⊗ σ_B ⪰ ρ_AB), unnormalised: Tr σ_B = 2^{−H_min}. */
  sigma: CMatrix;
  /** The optimal X_AB of the dual form (X ⪰ 0, tr_A X = I_B): Tr ρ_AB X = 2^{−H_min}. */
  dualOperator: CMatrix;
  dims: { a: number; b: number };
  certificate: SdpCertificate;
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
  certificate: SdpCertificate;
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

/** One solve of the H_min SDP for τ with its certified bracket of the optimum min{Tr σ : I_A ⊗ σ ⪰ τ}. */
export interface MinEntropySolve {
  /** The solver's estimate of the optimum, and the certified bracket [lower, upper] (padded). */
  optimum: number;
  lower: number;
  upper: number;
  /** The repaired primal point σ (+ s·I: I_A ⊗ σ ⪰ τ) and dual point X (X ⪰ 0, tr_A X = I_B). */
  sigma: CMatrix;
  X: CMatrix;
  ans: SdpAnswer;
}

/**
 * Solve max { Tr τX : tr_A X = I_B, X ⪰ 0 } = min { Tr σ : I_A ⊗ σ ⪰ τ } for any τ ⪰ 0 (not
 * necessarily normalised), and bracket the optimum by the repaired points: σ from the multipliers,
 * shifted by s·I until I_A ⊗ σ ⪰ τ (upper: Tr σ); X from the solver, its negative eigenvalues clipped
 * and renormalised X' = (I ⊗ G^{−1/2}) X (I ⊗ G^{−1/2}), G = tr_A X, so that tr_A X' = I_B (lower:
 * Tr τX'). Shared with max-information.ts.
 */
export function solveMinEntropySdp(tau: CMatrix, dA: number, dB: number, solver?: SdpOptions): MinEntropySolve {
  const ans = solveSdp(minEntropyProblem(tau, dA, dB), solver);
  const raw = symmetrize(scale(multiplierMatrix(ans.y, 0, dB), -1));
  const shift = psdShift(kron(identity(dA), raw), tau);
  const sigma = hermitianPart(raw);
  for (let i = 0; i < dB; i++) sigma.re[i * dB + i] += shift;
  const upper = trace(sigma).re;
  const Xc = clipPsd(symmetrize(matrixBlock(ans, 0)));
  const g = partialTrace(Xc, [dA, dB], [0]);
  const k = kron(identity(dA), inverseRootOnSupport(g));
  const X = hermitianPart(mul(mul(k, Xc), k));
  const lower = traceOfProductRe(tau, X);
  const pad = roundingPad(dA * dA * dB * dB, Math.max(Math.abs(upper), Math.abs(lower)));
  return { optimum: -ans.primalObjective, lower: lower - pad, upper: upper + pad, sigma, X, ans };
}

const MIN_ENTROPY_PROBLEM =
  '2^{−H_min} = minimize Tr σ_B s.t. I_A ⊗ σ_B ⪰ ρ_AB (ρ divided by its trace; the marginal on A ∪ B, A first); ' +
  'dual: maximize Tr ρ_AB X s.t. tr_A X = I_B, X ⪰ 0';

/** H_min(A|B)_ρ (KRS 2009), with the optimal σ_B, the dual operator and the certificate. */
export function conditionalMinEntropy(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: OneShotSdpOptions = {},
): ConditionalMinEntropyResult {
  const lb = lnBase(options.base);
  const { rhoAB, dA, dB } = bipartiteMarginal(rho, dims, a, b);
  const attempt = (solver: SdpOptions | undefined): Assessed => {
    const r = solveMinEntropySdp(rhoAB, dA, dB, solver);
    const h = (x: number) => (x > 0 ? -Math.log(x) / lb : Infinity);
    return assess({
      what: 'the conditional min-entropy', solve: r.ans, problem: MIN_ENTROPY_PROBLEM, sense: 'minimize',
      primal: { sigma: r.sigma }, primalObjective: trace(r.sigma).re,
      dual: { X: r.X }, dualObjective: traceOfProductRe(rhoAB, r.X),
      bounds: { lower: h(r.upper), upper: h(r.lower) },
      estimate: h(r.optimum),
      // −log d_A ≤ H_min(A|B) ≤ log d_A (Tomamichel, "Quantum Information Processing with Finite
      // Resources", 2016, Lemma 6.4 as recalled from memory; the ends are the maximally entangled and the
      // maximally mixed product states).
      range: [-Math.log(dA) / lb, Math.log(dA) / lb],
    });
  };
  const c = certifyRefined(attempt, options.solver);
  return {
    value: c.value,
    base: options.base ?? 2,
    sigma: c.certificate.primal.sigma as CMatrix,
    dualOperator: c.certificate.dual.X as CMatrix,
    dims: { a: dA, b: dB },
    certificate: c.certificate,
    ...(c.note ? { note: c.note } : {}),
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

/**
 * A state rounded onto the span of its eigenvalues above t·λ_max (renormalised), for t = 1e-4, 1e-7,
 * 1e-10: candidates for the optimal face of an interior-point iterate.
 */
export function faceRoundings(state: CMatrix): CMatrix[] {
  const { values, vectors } = eigh(hermitianPart(state), { vectors: true });
  const top = values[values.length - 1];
  const out: CMatrix[] = [];
  for (const t of [1e-4, 1e-7, 1e-10]) {
    const kept = Array.from(values, (v) => (v > t * top ? v : 0));
    if (kept.every((v, i) => v === Math.max(0, values[i]))) continue;
    const m = fromSpectrum(vectors!, kept);
    out.push(scale(m, 1 / trace(m).re));
  }
  return out;
}

const MAX_ENTROPY_PROBLEM =
  '2^{H_max} = maximize F(ρ_AB, I_A ⊗ σ_B) over states σ_B (F the squared fidelity; ρ divided by its trace, A first); ' +
  'dual: √F ≤ √(Tr ρ_AB Y · λ_max(tr_A Y⁺)) for Y ⪰ 0 positive definite on supp ρ_AB (Y⁺ its inverse there; the support ' +
  'decided with the support tolerance), from the fidelity SDP of Watrous (2018, Thm 3.17)';

/** H_max(A|B)_ρ (KRS 2009) through the fidelity SDP, with the optimal σ_B, a dual point and the certificate. */
export function conditionalMaxEntropy(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: OneShotSdpOptions = {},
): ConditionalMaxEntropyResult {
  const lb = lnBase(options.base);
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const { rhoAB, dA, dB } = bipartiteMarginal(rho, dims, a, b);
  const S = spectral(rhoAB, tol);
  const r = S.support.length;
  const V = columns(S.vectors, S.support);
  const D = S.support.map((k) => S.values[k]);
  const problem = maxEntropyProblem(rhoAB, dA, dB, tol);
  const attempt = (solver: SdpOptions | undefined): Assessed => {
    const ans = solveSdp(problem, solver);
    // Primal: σ_B clipped and normalised; its fidelity recomputed in closed form.
    // (An interior-point σ_B is full rank; when the optimum is on a face of the state space, rounding
    // σ_B onto its dominant eigenspace gains the O(barrier) part lost, so the best candidate is kept.)
    const sc = clipPsd(symmetrize(matrixBlock(ans, 1)));
    let sigma = scale(sc, 1 / trace(sc).re);
    let f = fidelity(rhoAB, kron(identity(dA), sigma), tol);
    for (const cand of faceRoundings(sigma)) {
      const fc = fidelity(rhoAB, kron(identity(dA), cand), tol);
      if (fc.value > f.value) {
        f = fc;
        sigma = cand;
      }
    }
    // Dual: P = −2·(multipliers of the Z₁₁ = D rows) in ρ_AB's eigenbasis, made positive definite.
    const { pd, inverse } = positiveDefinite(scale(multiplierMatrix(ans.y, 0, r), -2));
    let trDP = 0;
    for (let i = 0; i < r; i++) trDP += D[i] * pd.re[i * r + i];
    const lam = maxEigenvalueUpper(partialTrace(mul(mul(V, inverse), adjoint(V)), [dA, dB], [0]));
    const rootUpper = Math.sqrt(Math.max(0, trDP) * Math.max(0, lam)) * (1 + 1e-14);
    const pad = roundingPad(r * r, 1);
    const h = (x: number) => (x > 0 ? Math.log(x) / lb : -Infinity);
    return assess({
      what: 'the conditional max-entropy', solve: ans, problem: MAX_ENTROPY_PROBLEM, sense: 'maximize',
      primal: { sigma }, primalObjective: f.value,
      dual: { Y: mul(mul(V, pd), adjoint(V)) }, dualObjective: rootUpper * rootUpper,
      bounds: { lower: h(f.value * (1 - 4e-15) - pad), upper: h((rootUpper + pad) ** 2) },
      estimate: -ans.primalObjective > 0 ? (2 * Math.log(-ans.primalObjective)) / lb : undefined,
      // −log d_A ≤ H_max(A|B) ≤ log d_A (the same ends as H_min; Tomamichel 2016, as recalled from memory).
      range: [-Math.log(dA) / lb, Math.log(dA) / lb],
    });
  };
  const c = certifyRefined(attempt, options.solver);
  const sigma = c.certificate.primal.sigma as CMatrix;
  return {
    value: c.value,
    base: options.base ?? 2,
    sigma,
    rootFidelity: Math.pow(options.base ?? 2, c.value / 2),
    dims: { a: dA, b: dB },
    certificate: c.certificate,
    ...(c.note ? { note: c.note } : {}),
  };
}
