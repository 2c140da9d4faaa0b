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
 *  - The largest fidelity with a subnormalised state on supp σ is p = Tr ρ_c = Tr Π_σ ρ, attained only by
 *    τ = Π_σρΠ_σ/p, so D_max^ε = +∞ exactly when p < 1 − ε² (a tolerance-dependent decision, reported in
 *    `reason`), and at p = 1 − ε² the ball meets supp σ in τ alone.
 *  - SCALED so that the objective is of order one at both ends of ε: with c = √(1 − ε²) (computed as
 *    √((1 − ε)(1 + ε)), exact for ε → 1), ρ̃ = c²ρ̄, X = cX̄, λ = c²λ̄ (a congruence of the fidelity block
 *    by diag(I, I/c)), the rows read Re Tr X̄ ≥ 1 and Tr ρ̄ ≤ 1/c². For c² ≤ ¼ the trace row is left out
 *    (its right side would be huge; a ρ̃ of trace above 1 is then repaired, or the problem solved again
 *    with the row), and σ is scaled to unit trace.
 *
 * THE DUAL (derived here from the Lagrangian of the SDP above, multipliers Y ⪰ 0 of λσ ⪰ ρ̃, the block
 * [[M₁₁, −μI/2], [−μI/2, M₂₂]] ⪰ 0 of the fidelity block, μ ≥ 0 of Re Tr X ≥ c and ν ≥ 0 of Tr ρ̃ ≤ 1,
 * after eliminating M₁₁ = μ²M₂₂⁻¹/4, M₂₂ = Y + νI and μ): for every Y ⪰ 0 with Tr σY ≤ 1 and ν ≥ 0,
 *
 *   2^{D_max^ε} ≥ c² / Tr[ρ (Y + νI)⁻¹] − ν,
 *
 * and Y may be taken +∞ on ker σ (it costs nothing in Tr σY): then Tr ρ(Y + νI)⁻¹ becomes
 * Tr[Π_σρΠ_σ (Y + νΠ_σ)⁺] with the inverse on supp σ. The dual point is that Y (on supp σ) and ν;
 * ν is chosen afresh for each Y (the bound is concave in ν, a one-dimensional search), from two
 * candidate Y: the solver's multipliers of λσ̂ − ρ̂ − S = 0, and σ^{−1/2}vv*σ^{−1/2} for the top
 * eigenvector v of σ^{−1/2}τσ^{−1/2} (tight at the boundary p = 1 − ε², as ν → ∞).
 *
 * THE PRIMAL POINT: the solver's ρ̂ (times c²) with negative eigenvalues clipped, divided by its trace
 * if that exceeds 1, and mixed with τ just enough that ‖√ρ√ρ̃‖₁ ≥ c (the root fidelity is concave, and
 * √F(ρ, τ) = √p ≥ c); τ itself is the other candidate. The better of the two gives the upper bound
 * λ(ρ̃) = λ_max(σ^{−1/2}ρ̃σ^{−1/2}) on supp σ, raised by its eigenvalue allowance; the answer reports
 * ρ̃ and that λ. Certificate, acceptance (a bracket up to 1e-5 relative or 1e-9 absolute, as for the other
 * fidelity-based SDPs) and the second tighter solve are those of src/sdp/support.ts.
 *
 * Deliberately not here: other smoothings (trace-distance balls, normalised-only balls), the smooth
 * min-entropy, validation of ρ (the ops layer; ρ is divided by its trace here).
 * Cost: a few eigendecompositions, O(n³); the SDP has blocks of sizes 2r, s, s and 2r² + s² + 2 rows.
 */
import { CMatrix, zeros, mul, adjoint, scale, trace, identity, eigh, hermitianPart, add } from '../linalg/index.js';
import { fromSpectrum } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import {
  solveSdp, matrixCoordinates, coordinateEntry, coordinateValue, type Constraint, type Entry, type SdpProblem, type SdpOptions, type SdpAnswer,
} from '../sdp/index.js';
import { spectral, columns, DEFAULT_SUPPORT_TOLERANCE } from '../quantities/divergence-kit.js';
import { fidelity } from '../quantities/fidelity.js';
import {
  ACCEPT_INACCURATE_LOOSE, assess, certifyRefined, clipPsd, coordinateMatrix, eigenvalueAllowance, frobenius, lnBase, matrixBlock, multiplierMatrix, roundingPad, symmetrize,
  type Assessed, type OneShotSdpOptions, type SdpCertificate,
} from '../sdp/support.js';

const U = 1.1102230246251565e-16;

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
  /** The least λ with ρ̃ ⪯ λσ for the returned ρ̃ (an upper bound on 2^{D_max^ε}, raised by its rounding allowance). */
  lambda: number;
  certificate: SdpCertificate;
  note?: string;
}

function checkEpsilon(epsilon: number): void {
  if (typeof epsilon !== 'number' || !(epsilon > 0 && epsilon < 1)) {
    throw new RhoError('invalid-argument', `ε must lie strictly between 0 and 1 (got ${epsilon}).`, 'epsilon');
  }
}

export const SMOOTH_MAX_PROBLEM =
  '2^{D_max^ε} = minimize λ s.t. ρ̃ ⪯ λσ, ρ̃ ⪰ 0, Tr ρ̃ ≤ 1, ‖√ρ√ρ̃‖₁ ≥ c = √(1 − ε²) (ρ divided by its trace; primal point ρ̃ ' +
  'and λ); dual: 2^{D_max^ε} ≥ c²/Tr[Π_σρΠ_σ (Y + νΠ_σ)⁺] − ν for Y ⪰ 0 on supp σ with Tr σY ≤ 1 and ν ≥ 0 (dual point Y, ν; ' +
  'Y is +∞ on ker σ, the support of σ decided with the support tolerance)';

/**
 * The compressed and scaled SDP (see the header). `sigmaHat` is the s×s compressed σ of unit trace
 * (any Hermitian positive definite), `v`/`d` the support of ρ_c = W*ρW. Variables ρ̄ = ρ̂/c², X̄ = X/c,
 * λ̄ = λ/c². Blocks: 0 Z (2r), 1 ρ̄ (s), 2 S (s), 3 [λ̄, t, u] (u only with the trace row). Rows: r² for
 * Z₁₁ = D, r² for Z₂₂ = V*ρ̄V, s² for λ̄σ̂ − ρ̄ − S = 0, Re Tr Z₁₂ − t = 1, and (withTrace)
 * Tr ρ̄ + u = 1/c².
 */
export function smoothMaxProblem(sigmaHat: CMatrix, v: CMatrix, d: readonly number[], epsilon: number, withTrace = true): SdpProblem {
  const s = sigmaHat.rows;
  const r = d.length;
  const c2 = (1 - epsilon) * (1 + epsilon);
  const constraints: Constraint[] = [];
  for (const c of matrixCoordinates(r, true)) {
    const value = c.i === c.j ? d[c.i] : 0;
    constraints.push({ terms: [{ block: 0, entries: [coordinateEntry(c.i, c.j, c.part)] }], equals: value });
  }
  const vAdj = adjoint(v);
  for (const c of matrixCoordinates(r, true)) {
    // coordinate c of V*ρ̄V is ⟨V E_c V*, ρ̄⟩.
    const m = symmetrize(mul(mul(v, coordinateMatrix(r, c)), vAdj));
    constraints.push({
      terms: [
        { block: 0, entries: [coordinateEntry(r + c.i, r + c.j, c.part)] },
        { block: 1, matrix: scale(m, -1) },
      ],
      equals: 0,
    });
  }
  const slack = withTrace ? 3 : 2;
  const lambdaOnly = (x: number) => (withTrace ? [x, 0, 0] : [x, 0]);
  for (const c of matrixCoordinates(s, true)) {
    const e = coordinateEntry(c.i, c.j, c.part);
    const neg: Entry = e.length === 3 ? [e[0], e[1], -e[2]] : [e[0], e[1], -(e[2] as number), -((e as readonly number[])[3] as number)];
    constraints.push({
      terms: [
        { block: 1, entries: [neg] },
        { block: 2, entries: [neg] },
        { block: 3, vector: lambdaOnly(coordinateValue(sigmaHat, c)) },
      ],
      equals: 0,
    });
  }
  const fid: Entry[] = [];
  for (let i = 0; i < r; i++) fid.push([i, r + i, 0.5]);
  constraints.push({ terms: [{ block: 0, entries: fid }, { block: 3, vector: withTrace ? [0, -1, 0] : [0, -1] }], equals: 1, label: 'fidelity' });
  if (withTrace) constraints.push({ terms: [{ block: 1, matrix: identity(s) }, { block: 3, vector: [0, 0, 1] }], equals: 1 / c2, label: 'Tr ρ̃ ≤ 1' });
  return {
    cones: [
      { kind: 'hermitian', size: 2 * r },
      { kind: 'hermitian', size: s },
      { kind: 'hermitian', size: s },
      { kind: 'nonnegative', size: slack },
    ],
    objective: [{ block: 3, vector: lambdaOnly(1) }],
    constraints,
  };
}

/** λ_max(σ_s^{−1/2} ρ̂ σ_s^{−1/2}) for σ_s = diag(sv) > 0, raised by its eigenvalue allowance. */
function lambdaUpper(rhoHat: CMatrix, sv: readonly number[]): number {
  const s = sv.length;
  const m = zeros(s, s);
  for (let i = 0; i < s; i++) {
    for (let j = 0; j < s; j++) {
      const f = 1 / Math.sqrt(sv[i] * sv[j]);
      m.re[i * s + j] = rhoHat.re[i * s + j] * f;
      m.im[i * s + j] = rhoHat.im[i * s + j] * f;
    }
  }
  const h = hermitianPart(m);
  const vals = eigh(h, { vectors: false }).values;
  return Math.max(0, vals[s - 1]) + eigenvalueAllowance(s, frobenius(h));
}

/**
 * The dual bound c²/Tr[ρ_c (Y + ν)⁻¹] − ν (see the header) for a Hermitian Y on supp σ: negative
 * eigenvalues clipped, Y divided by Tr σ_sY, then the best ν ≥ 0 (the bound is concave in ν: bisection on
 * its derivative). Eigenvalues of Y are lowered by their allowance. Returns the bound, the normalised Y
 * and ν; −∞ when ρ_c has weight where Y + ν vanishes.
 */
export function smoothMaxDual(y: CMatrix, rhoC: CMatrix, sv: readonly number[], c2: number): { bound: number; Y: CMatrix; nu: number } {
  const s = sv.length;
  const { values, vectors } = eigh(hermitianPart(y), { vectors: true });
  const V = vectors!;
  // Tr σ_s Y = Σ_k y_k Σ_i sv_i |V_ik|², with y clipped at 0.
  const yk = Array.from(values, (v) => Math.max(0, v));
  let norm = 0;
  for (let k = 0; k < s; k++) {
    let q = 0;
    for (let i = 0; i < s; i++) q += sv[i] * (V.re[i * s + k] ** 2 + V.im[i * s + k] ** 2);
    norm += yk[k] * q;
  }
  if (!(norm > 0)) return { bound: -Infinity, Y: zeros(s, s), nu: 0 };
  const f = 1 / (norm * (1 + 8 * s * U));
  const ys = yk.map((v) => v * f);
  const pad = eigenvalueAllowance(s, Math.hypot(...ys));
  const yl = ys.map((v) => Math.max(0, v - pad));
  // w_k = v_k* ρ_c v_k
  const w = new Float64Array(s);
  for (let k = 0; k < s; k++) {
    let acc = 0;
    for (let i = 0; i < s; i++) {
      for (let j = 0; j < s; j++) {
        // conj(V_ik) ρ_ij V_jk
        const ar = V.re[i * s + k], ai = -V.im[i * s + k];
        const br = V.re[j * s + k], bi = V.im[j * s + k];
        const rr = rhoC.re[i * s + j], ri = rhoC.im[i * s + j];
        const tr = rr * br - ri * bi, ti = rr * bi + ri * br;
        acc += ar * tr - ai * ti;
      }
    }
    w[k] = Math.max(0, acc);
  }
  // h(ν) = c²/S(ν) − ν with S(ν) = Σ w_k/(y_k + ν), written as [(c² − Σw) + Σ w_k y_k/(y_k + ν)]/S(ν) so that
  // large ν (ε → 0, where the optimum runs off to ν ~ 1/ε) does not cancel; what remains is the rounding of
  // c² − Σw, about ν·s·u, charged as the pad κν (κ = 32su) that the search maximises against.
  const kappa = 32 * s * U;
  let wsum = 0;
  for (let k = 0; k < s; k++) wsum += w[k];
  const h = (nu: number) => {
    let t = 0;
    let num = c2 - wsum;
    for (let k = 0; k < s; k++) {
      if (!(w[k] > 0)) continue;
      const z = yl[k] + nu;
      if (!(z > 0)) return -Infinity;
      t += w[k] / z;
      num += (w[k] * yl[k]) / z;
    }
    return t > 0 ? num / t : -Infinity;
  };
  const slope = (nu: number) => {
    let t = 0;
    let t2 = 0;
    for (let k = 0; k < s; k++) {
      if (!(w[k] > 0)) continue;
      const z = yl[k] + nu;
      t += w[k] / z;
      t2 += w[k] / (z * z);
    }
    return (c2 * t2) / (t * t) - 1 - kappa;
  };
  let nu = 0;
  const top = Math.max(...yl, 1e-300);
  if (!Number.isFinite(h(0)) || slope(0) > 0) {
    let lo = 0;
    let hi = top;
    while (slope(hi) > 0 && hi < 1e30 * top) {
      lo = hi;
      hi *= 4;
    }
    for (let it = 0; it < 200 && hi - lo > 1e-15 * hi; it++) {
      const mid = lo === 0 ? hi / 2 : Math.sqrt(lo * hi);
      if (slope(mid) > 0) lo = mid;
      else hi = mid;
    }
    nu = hi;
  }
  const b = h(nu);
  const Y = fromSpectrum(V, ys);
  return { bound: b - roundingPad(4 * s, Math.abs(b) + nu + 1), Y, nu };
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
  // Tr Π_σ ρ; exactly 1 when σ has full rank (its rounding would otherwise decide ε = 1e-9, where 1 − ε² = 1).
  const inside = s === n ? 1 : s > 0 ? Math.min(1, trace(rhoC).re) : 0;
  const c2 = (1 - epsilon) * (1 + epsilon);
  const c = Math.sqrt(c2);
  if (!(trSigma > 0) || s === 0 || inside < c2 - 4 * n * U) {
    const message =
      `no feasible ρ̃: a subnormalised state on supp σ has fidelity at most Tr Π_σ ρ = ${inside.toPrecision(17)} with ρ, below 1 − ε² = ` +
      `${c2.toPrecision(17)} (supp σ decided with the support tolerance); no SDP solved`;
    return {
      value: Infinity,
      reason:
        `Every state in the ε-ball around ρ has weight outside supp σ: the largest fidelity of ρ with a subnormalised ` +
        `state on supp σ is Tr Π_σ ρ = ${inside.toPrecision(6)} < 1 − ε² = ${c2.toPrecision(6)}. supp σ was decided ` +
        `with the relative support tolerance ${tol}.`,
      epsilon,
      base,
      smoothed: zeros(n, n),
      rootFidelity: 0,
      insideSupport: inside,
      lambda: Infinity,
      certificate: {
        status: 'exact', problem: SMOOTH_MAX_PROBLEM, sense: 'minimize',
        primal: {}, primalObjective: Infinity, dual: { insideSupport: inside }, dualObjective: Infinity, gap: 0, relativeGap: 0,
        bounds: { lower: Infinity, upper: Infinity }, accuracy: { absolute: 0, relative: 0 }, iterations: 0, primalResidual: 0, dualResidual: 0,
        message,
      },
    };
  }
  const sv = S.support.map((k) => S.values[k]);
  const sigmaHat = zeros(s, s);
  for (let k = 0; k < s; k++) sigmaHat.re[k * s + k] = sv[k] / trSigma;
  const C = spectral(rhoC, tol);
  const V = columns(C.vectors, C.support);
  const d = C.support.map((k) => C.values[k]);
  // τ = ρ_c/p: the state on supp σ closest to ρ (√F = √p ≥ c), the mixing partner and a candidate.
  const tauHat = scale(rhoC, 1 / inside);
  const rootP = Math.sqrt(inside);
  const lift = (m: CMatrix) => symmetrize(mul(mul(W, m), adjoint(W)));
  const rootFid = (m: CMatrix) => fidelity(rhoC, m, tol).root;
  const target = Math.min(c * (1 + 16 * s * U), rootP);
  const tauLambda = lambdaUpper(tauHat, sv);
  // Y for τ: σ^{−1/2} v v* σ^{−1/2}, v the top eigenvector of σ^{−1/2}τσ^{−1/2} (σ_s diagonal).
  const yTau = (() => {
    const m = zeros(s, s);
    for (let i = 0; i < s; i++) for (let j = 0; j < s; j++) {
      const f = 1 / Math.sqrt(sv[i] * sv[j]);
      m.re[i * s + j] = tauHat.re[i * s + j] * f;
      m.im[i * s + j] = tauHat.im[i * s + j] * f;
    }
    const e = eigh(hermitianPart(m), { vectors: true });
    const y = zeros(s, s);
    const k = s - 1;
    for (let i = 0; i < s; i++) for (let j = 0; j < s; j++) {
      const ar = e.vectors!.re[i * s + k] / Math.sqrt(sv[i]), ai = e.vectors!.im[i * s + k] / Math.sqrt(sv[i]);
      const br = e.vectors!.re[j * s + k] / Math.sqrt(sv[j]), bi = e.vectors!.im[j * s + k] / Math.sqrt(sv[j]);
      y.re[i * s + j] = ar * br + ai * bi;
      y.im[i * s + j] = ai * br - ar * bi;
    }
    return y;
  })();
  // Candidates kept beside the solver's points: Y_τ and Y = I (the optimum for ρ ∝ σ); ρ̃ = c²ρ when supp ρ ⊆ supp σ.
  const extraDuals = [smoothMaxDual(yTau, rhoC, sv, c2), smoothMaxDual(identity(s), rhoC, sv, c2)];
  const extraPrimals: CMatrix[] = [tauHat];
  if (inside === 1 || 1 - inside <= 4 * n * U) extraPrimals.push(scale(tauHat, c2));
  const withTrace = c2 > 0.25;
  const problems = new Map<boolean, SdpProblem>();
  const problemOf = (t: boolean) => {
    if (!problems.has(t)) problems.set(t, smoothMaxProblem(sigmaHat, V, d, epsilon, t));
    return problems.get(t)!;
  };
  const notes: string[] = [];
  const attempt = (solver: SdpOptions | undefined): Assessed => {
    let ans: SdpAnswer = solveSdp(problemOf(withTrace), solver);
    let raw = clipPsd(scale(symmetrize(matrixBlock(ans, 1)), c2));
    if (!withTrace && trace(raw).re > 1 + 1e-9) {
      ans = solveSdp(problemOf(true), solver);
      raw = clipPsd(scale(symmetrize(matrixBlock(ans, 1)), c2));
    }
    // Primal: into the ball (trace at most 1, mixed with τ up to the root fidelity c).
    const tr = trace(raw).re;
    if (tr > 1) raw = scale(raw, 1 / tr);
    const f0 = rootFid(raw);
    if (f0 < target) {
      const t = Math.min(1, Math.max(0, (target - f0) / (rootP - f0)));
      raw = t >= 1 ? tauHat : add(scale(raw, 1 - t), scale(tauHat, t));
    }
    let rhoHat = raw;
    let lambda = lambdaUpper(raw, sv);
    for (const cand of extraPrimals) {
      const l = cand === tauHat ? tauLambda : lambdaUpper(cand, sv);
      if (l < lambda) {
        rhoHat = cand;
        lambda = l;
      }
    }
    // Dual: the solver's multipliers of λ̄σ̂ − ρ̄ − S = 0 (the slack of block 2 is Σ y_c E_c = Y), or Y_τ.
    let dual = smoothMaxDual(multiplierMatrix(ans.y, 2 * d.length * d.length, s), rhoC, sv, c2);
    for (const e of extraDuals) if (!(dual.bound >= e.bound)) dual = e;
    const log = (x: number) => (x > 0 ? Math.log(x) / lb : -Infinity);
    const estimate = (c2 * ans.primalObjective) / trSigma;
    return assess({
      what: 'the smooth max-relative entropy', solve: ans, problem: SMOOTH_MAX_PROBLEM, sense: 'minimize',
      primal: { smoothed: lift(rhoHat), lambda }, primalObjective: lambda,
      dual: { Y: lift(dual.Y), nu: dual.nu }, dualObjective: dual.bound,
      bounds: { lower: log(dual.bound), upper: log(lambda) },
      estimate: estimate > 0 ? log(estimate) : undefined,
      limit: ACCEPT_INACCURATE_LOOSE,
    });
  };
  const cert = certifyRefined(attempt, options.solver);
  if (cert.note) notes.push(cert.note);
  if (inside < 1 && inside - c2 <= 1e-6) {
    notes.push(
      `Tr Π_σ ρ = ${inside.toPrecision(8)} is within 1e-6 of 1 − ε²: the feasible set is nearly the single state Π_σρΠ_σ/Tr Π_σρ and the ` +
        `value is sensitive to the support decision and to rounding.`,
    );
  }
  const smoothed = cert.certificate.primal.smoothed as CMatrix;
  return {
    value: cert.value,
    epsilon,
    base,
    smoothed,
    rootFidelity: fidelity(rhoN, smoothed, tol).root,
    insideSupport: inside,
    lambda: cert.certificate.primal.lambda as number,
    certificate: cert.certificate,
    ...(notes.length ? { note: notes.join(' ') } : {}),
  };
}
