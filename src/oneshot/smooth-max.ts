/**
 * Smooth max-relative entropy D_max^ε(ρ‖σ) as a semidefinite program, with the optimal smoothed
 * state and the certificate.
 *
 * DEFINITION (M. Tomamichel, "Quantum Information Processing with Finite Resources", SpringerBriefs
 * 2016, Sec. 6.1; PhD thesis ETH Zürich 2012): the minimum of D_max(ρ̃‖σ) = log min{λ : ρ̃ ⪯ λσ}
 * over subnormalised states ρ̃ (ρ̃ ⪰ 0, Tr ρ̃ ≤ 1) in the purified-distance ball
 * P(ρ, ρ̃) = √(1 − F̄(ρ, ρ̃)²) ≤ ε, with the generalised (root) fidelity
 * F̄(ρ, ρ̃) = ‖√ρ √ρ̃‖₁ + √((1 − Tr ρ)(1 − Tr ρ̃)).
 *
 * FROM THE BALL TO AN SDP (derived here). ρ is a normalised state, so the correction term
 * √((1 − Tr ρ)(1 − Tr ρ̃)) vanishes whatever Tr ρ̃ is, and P(ρ, ρ̃) ≤ ε ⟺ ‖√ρ √ρ̃‖₁ ≥ √(1 − ε²)
 * (equivalently F(ρ, ρ̃) = ‖√ρ√ρ̃‖₁² ≥ 1 − ε²). For a subnormalised ρ the correction term would not
 * vanish and the constraint would not be of this form; the ops layer only passes states. By the
 * fidelity SDP ‖√P √Q‖₁ = max{Re Tr X : [[P, X], [X*, Q]] ⪰ 0} (Watrous 2018, Thm 3.17), the ball is
 * {ρ̃ : ∃X, [[ρ, X], [X*, ρ̃]] ⪰ 0, Re Tr X ≥ √(1 − ε²)} ∩ {Tr ρ̃ ≤ 1}, jointly convex and semidefinite
 * representable in (ρ̃, X); with ρ̃ ⪯ λσ the whole problem is linear in (λ, ρ̃, X):
 *
 *   minimize λ  s.t.  λσ − ρ̃ ⪰ 0,  [[ρ, X], [X*, ρ̃]] ⪰ 0,  Re Tr X ≥ √(1 − ε²),  Tr ρ̃ ≤ 1.
 *
 * COMPRESSIONS (so that the problem has an interior, which interior-point methods need):
 *  - ρ̃ ⪯ λσ forces supp ρ̃ ⊆ supp σ: write ρ̃ = W ρ̂ W* with W (n×s) an isometry onto supp σ
 *    (decided with `tol`) and σ̂ = W*σW > 0. Then ‖√ρ √ρ̃‖₁ = ‖√(W*ρW) √ρ̂‖₁ (since ‖AB‖₁ depends on A
 *    only through A*A), so ρ enters only through ρ_c = W*ρW.
 *  - ρ_c = V D V* on its support (rank r), and ‖√ρ_c √ρ̂‖₁ = ‖√D √(V*ρ̂V)‖₁, so the fidelity block is
 *    [[D, X], [X*, V*ρ̂V]] of size 2r, positive definite at D ≻ 0, ρ̂ ≻ 0, X = 0.
 *  - The largest fidelity with a subnormalised state on supp σ is Tr ρ_c = Tr Π_σ ρ (attained by
 *    Π_σρΠ_σ/Tr Π_σρ), so D_max^ε = +∞ exactly when Tr Π_σ ρ < 1 − ε² (a tolerance-dependent
 *    decision, reported in `reason`). Near equality the feasible set shrinks to a point and the SDP
 *    loses its interior; the solver's status and residuals then say how far to trust the value.
 *  - σ is scaled to unit trace (log Tr σ subtracted back).
 *
 * Deliberately not here: other smoothings (trace-distance balls, normalised-only balls), the smooth
 * min-entropy, validation of ρ (the ops layer; ρ is divided by its trace here).
 * Cost: two eigendecompositions, O(n³); the SDP has blocks of sizes 2r, s, s and 2r² + s² + 2 rows.
 */
import { CMatrix, zeros, mul, adjoint, scale, trace, identity } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import {
  solveSdp, matrixCoordinates, coordinateEntry, coordinateValue, type Constraint, type Entry, type SdpProblem,
} from '../sdp/index.js';
import { spectral, columns, DEFAULT_SUPPORT_TOLERANCE } from '../quantities/divergence-kit.js';
import { fidelity } from '../quantities/fidelity.js';
import {
  acceptAnswer, certificateOf, coordinateMatrix, lnBase, matrixBlock, symmetrize, type OneShotSdpOptions, type LegacyCertificate,
} from '../sdp/support.js';

export interface SmoothMaxResult {
  /** D_max^ε(ρ‖σ) in the chosen base; +Infinity when no state of the ball fits under σ. */
  value: number;
  reason?: string;
  epsilon: number;
  base: number;
  /** The optimal smoothed state ρ̃ (subnormalised: Tr ρ̃ ≤ 1), n×n. */
  smoothed: CMatrix;
  /** ‖√ρ √ρ̃‖₁ of the returned ρ̃, computed afresh (≥ √(1 − ε²) up to the solver's residuals). */
  rootFidelity: number;
  /** Tr Π_σ ρ: the largest fidelity any subnormalised state on supp σ can have with ρ. */
  insideSupport: number;
  certificate: LegacyCertificate;
  note?: string;
}

function checkEpsilon(epsilon: number): void {
  if (typeof epsilon !== 'number' || !(epsilon > 0 && epsilon < 1)) {
    throw new RhoError('invalid-argument', `ε must lie strictly between 0 and 1 (got ${epsilon}).`, 'epsilon');
  }
}

const PROBLEM =
  'minimize λ s.t. Z₁₁ = D, Z₂₂ − V*ρ̂V = 0, λσ̂ − ρ̂ − S = 0, Re Tr Z₁₂ − t = √(1−ε²), Tr ρ̂ + u = 1; ' +
  'Z ⪰ 0 (2r×2r), ρ̂, S ⪰ 0 (s×s), λ, t, u ≥ 0 — on supp σ (σ̂ = W*σW/Tr σ), with W*ρW = V D V* (rank r)';

/**
 * The compressed SDP (see the header). `rhoC` is W*ρW (s×s), `sigmaHat` the s×s compressed σ of unit
 * trace (any Hermitian positive definite), `v`/`d` the support of rhoC. Blocks: 0 Z (2r), 1 ρ̂ (s),
 * 2 S (s), 3 [λ, t, u].
 */
export function smoothMaxProblem(sigmaHat: CMatrix, v: CMatrix, d: readonly number[], epsilon: number): SdpProblem {
  const s = sigmaHat.rows;
  const r = d.length;
  const constraints: Constraint[] = [];
  for (const c of matrixCoordinates(r, true)) {
    const value = c.i === c.j ? d[c.i] : 0;
    constraints.push({ terms: [{ block: 0, entries: [coordinateEntry(c.i, c.j, c.part)] }], equals: value });
  }
  const vAdj = adjoint(v);
  for (const c of matrixCoordinates(r, true)) {
    // coordinate c of V*ρ̂V is ⟨V E_c V*, ρ̂⟩.
    const m = symmetrize(mul(mul(v, coordinateMatrix(r, c)), vAdj));
    constraints.push({
      terms: [
        { block: 0, entries: [coordinateEntry(r + c.i, r + c.j, c.part)] },
        { block: 1, matrix: scale(m, -1) },
      ],
      equals: 0,
    });
  }
  for (const c of matrixCoordinates(s, true)) {
    const e = coordinateEntry(c.i, c.j, c.part);
    const neg: Entry = e.length === 3 ? [e[0], e[1], -e[2]] : [e[0], e[1], -(e[2] as number), -((e as readonly number[])[3] as number)];
    constraints.push({
      terms: [
        { block: 1, entries: [neg] },
        { block: 2, entries: [neg] },
        { block: 3, vector: [coordinateValue(sigmaHat, c), 0, 0] },
      ],
      equals: 0,
    });
  }
  const fid: Entry[] = [];
  for (let i = 0; i < r; i++) fid.push([i, r + i, 0.5]);
  constraints.push({ terms: [{ block: 0, entries: fid }, { block: 3, vector: [0, -1, 0] }], equals: Math.sqrt(1 - epsilon * epsilon), label: 'fidelity' });
  constraints.push({ terms: [{ block: 1, matrix: identity(s) }, { block: 3, vector: [0, 0, 1] }], equals: 1, label: 'Tr ρ̃ ≤ 1' });
  return {
    cones: [
      { kind: 'hermitian', size: 2 * r },
      { kind: 'hermitian', size: s },
      { kind: 'hermitian', size: s },
      { kind: 'nonnegative', size: 3 },
    ],
    objective: [{ block: 3, vector: [1, 0, 0] }],
    constraints,
  };
}

/** D_max^ε(ρ‖σ) for a state ρ and σ ⪰ 0 of any trace; ε ∈ (0, 1). See the header. */
export function smoothMaxRelativeEntropy(
  rho: CMatrix, sigma: CMatrix, epsilon: number, options: OneShotSdpOptions = {},
): SmoothMaxResult {
  checkEpsilon(epsilon);
  if (rho.rows !== rho.cols || sigma.rows !== sigma.cols || rho.rows !== sigma.rows) {
    throw new RhoError('dimension-mismatch', `ρ is ${rho.rows}×${rho.cols} but σ is ${sigma.rows}×${sigma.cols}.`, 'sigma');
  }
  const lb = lnBase(options.base);
  const base = options.base ?? 2;
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const n = rho.rows;
  const trRho = trace(rho).re;
  if (!(trRho > 0)) throw new RhoError('invalid-argument', 'ρ has zero trace.', 'rho');
  const rhoN = scale(rho, 1 / trRho);
  const trSigma = trace(sigma).re;
  const S = spectral(sigma, tol);
  const W = columns(S.vectors, S.support);
  const s = S.support.length;
  const rhoC = s > 0 ? symmetrize(mul(mul(adjoint(W), rhoN), W)) : zeros(0, 0);
  const inside = s > 0 ? trace(rhoC).re : 0;
  const threshold = 1 - epsilon * epsilon;
  if (!(trSigma > 0) || s === 0 || inside < threshold) {
    return {
      value: Infinity,
      reason:
        `Every state in the ε-ball around ρ has weight outside supp σ: the largest fidelity of ρ with a subnormalised ` +
        `state on supp σ is Tr Π_σ ρ = ${inside.toPrecision(6)} < 1 − ε² = ${threshold.toPrecision(6)}. supp σ was decided ` +
        `with the relative support tolerance ${tol}.`,
      epsilon,
      base,
      smoothed: zeros(n, n),
      rootFidelity: 0,
      insideSupport: inside,
      certificate: {
        status: 'primal-infeasible', primalObjective: Infinity, dualObjective: Infinity, gap: 0, relativeGap: 0,
        primalResidual: 0, dualResidual: 0, iterations: 0,
        problem: 'closed form: no feasible ρ̃ (Tr Π_σ ρ < 1 − ε²); no SDP solved',
      },
    };
  }
  const sigmaHat = zeros(s, s);
  for (let k = 0; k < s; k++) sigmaHat.re[k * s + k] = S.values[S.support[k]] / trSigma;
  const C = spectral(rhoC, tol);
  const V = columns(C.vectors, C.support);
  const d = C.support.map((k) => C.values[k]);
  const ans = solveSdp(smoothMaxProblem(sigmaHat, V, d, epsilon), options.solver);
  const notes: string[] = [];
  const statusNote = acceptAnswer(ans, 'the smooth max-relative entropy');
  if (statusNote) notes.push(statusNote);
  if (inside - threshold <= 1e-6) {
    notes.push(
      `Tr Π_σ ρ = ${inside.toPrecision(8)} is within 1e-6 of 1 − ε²: the feasible set is nearly a single state and the ` +
        `value is sensitive to the support decision and to rounding.`,
    );
  }
  const lambda = ans.primalObjective;
  if (!(lambda > 0)) {
    throw new RhoError('solver-failed', `The smooth max-relative entropy SDP returned λ = ${lambda}.`, undefined, { status: ans.status });
  }
  const rhoHat = symmetrize(matrixBlock(ans, 1));
  const smoothed = symmetrize(mul(mul(W, rhoHat), adjoint(W)));
  return {
    value: (Math.log(lambda) - Math.log(trSigma)) / lb,
    epsilon,
    base,
    smoothed,
    rootFidelity: fidelity(rhoN, smoothed, tol).root,
    insideSupport: inside,
    certificate: certificateOf(ans, PROBLEM),
    ...(notes.length ? { note: notes.join(' ') } : {}),
  };
}
