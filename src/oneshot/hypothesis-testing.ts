/**
 * Hypothesis-testing relative entropy with an explicit optimal test, an explicit dual point and a
 * certified bracket, through the one-dimensional quantum Neyman–Pearson dual (neyman-pearson.ts); the
 * generic SDP stays available (method "sdp") as a cross-check.
 *
 * CONVENTION (stated because the literature has two). We use the un-normalised form
 *
 *     D_H^ε(ρ‖σ) = −log β_ε(ρ‖σ),   β_ε(ρ‖σ) = min { Tr σΛ : 0 ⪯ Λ ⪯ I, Tr ρΛ ≥ 1 − ε },   ε ∈ [0, 1],
 *
 * as in L. Wang and R. Renner, "One-shot classical-quantum capacity and hypothesis testing",
 * Phys. Rev. Lett. 108, 200501 (2012): ε bounds the type-I error Tr ρ(I − Λ), β is the type-II error.
 * The other convention in use (e.g. Buscemi & Datta; Dupuis, Kraemer, Faist, Renes & Renner 2012)
 * writes ε for the success probability Tr ρΛ ≥ ε and divides β by ε:
 * D^ε_other(ρ‖σ) = −log(β_{1−ε}(ρ‖σ)/ε) = D_H^{1−ε}(ρ‖σ) + log ε in our notation. (Attributions
 * recalled from memory.) In our convention the Wang–Renner converse reads
 * D_H^ε(ρ‖σ) ≤ (D(ρ‖σ) + h(ε)) / (1 − ε), h the binary entropy (test/oneshot checks it).
 *
 * METHODS.
 *  - 'neyman-pearson-dual' (0 < ε < 1): β = max_{μ≥0} μ(1 − ε) − Tr(μρ − σ)₊; the optimal test is the
 *    positive part of μ*ρ − σ plus a fraction of its boundary eigenvectors. The answer is carried by
 *    the smaller of β and Tr σ − β (ε → 0: D_H ≈ (Tr σ − β)/Tr σ/ln 2 is computed from the small part,
 *    the rejection M = I − Λ, so that it keeps its relative accuracy).
 *  - 'support': β = 0 exactly when the kernel of σ carries enough of ρ, Tr ρ(I − Π_σ) ≥ 1 − ε; then
 *    D_H^ε = +∞ and Λ = (1 − ε) Π_ker σ / Tr ρ Π_ker σ. Decided with the support tolerance: a
 *    numerical decision, reported in `reason`.
 *  - 'closed-form': ε = 1 (Λ = 0, β = 0, D_H = +∞) and ε = 0 (Λ = Π_ρ, β = Tr σΠ_ρ, D_H^0 = D_min,
 *    with the support of ρ decided by the tolerance).
 *  - 'sdp' (on request only): our interior-point solver on
 *        minimize ⟨σ/Tr σ, Λ⟩  s.t.  Λ + W = I,  ⟨ρ, Λ⟩ − t = 1 − ε,  Λ, W ⪰ 0 (Hermitian),  t ≥ 0,
 *    whose test (repaired into [0, I] and onto the acceptance) and multiplier μ of the acceptance row
 *    are certified like those of the dual.
 *
 * CERTIFICATE (src/sdp/support.ts): primal point the test Λ (or the rejection M = I − Λ when the
 * answer is carried by the complement), dual point μ; the bracket of D_H follows from g(μ) ≤ β ≤ Tr σΛ
 * (or Tr σM ≤ Tr σ − β ≤ με + Tr(σ − μρ)₊), with rounding allowances (eigenvalueAllowance).
 *
 * Deliberately not here: validation that ρ is a density matrix (the ops layer does it; ρ is divided by
 * its trace), asymptotic expansions, the normalised convention (use the identity above).
 * Cost: one eigendecomposition of σ (support) and the one-dimensional search, each step one
 * eigendecomposition of μρ − σ and the diagonal of V*ρV (O(d³)), typically 8–15 steps; "sdp": d² + 1
 * constraints, O(d⁶) per interior-point iteration.
 */
import { CMatrix, zeros, mul, adjoint, identity, traceOfProductRe, trace, traceParts, scale, eigh, hermitianPart } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import {
  solveSdp, partialTraceConstraints, certify, lnBase, matrixBlock, symmetrize, roundingPad,
  type SdpProblem, type SdpCertificate, type OneShotSdpOptions,
} from '../sdp/index.js';
import { spectral, columns, DEFAULT_SUPPORT_TOLERANCE } from '../quantities/divergence-kit.js';
import { dualBounds, evaluateDual, neymanPearsonDual } from './neyman-pearson.js';

export const HYPOTHESIS_TESTING_CONVENTION =
  'D_H^ε(ρ‖σ) = −log min{Tr σΛ : 0 ≤ Λ ≤ I, Tr ρΛ ≥ 1−ε} (Wang & Renner, PRL 108, 200501 (2012); not normalised by ε)';

export interface HypothesisTestingOptions extends OneShotSdpOptions {
  /** 'auto' (default): the one-dimensional dual; 'sdp': the generic SDP (a cross-check). */
  method?: 'auto' | 'sdp';
}

export type HypothesisTestingMethod = 'neyman-pearson-dual' | 'support' | 'closed-form' | 'sdp';

export interface HypothesisTestingResult {
  /** D_H^ε(ρ‖σ) in the chosen base; +Infinity when β = 0. */
  value: number;
  /** Why the value is infinite (present only then). */
  reason?: string;
  epsilon: number;
  base: number;
  /** The optimal type-II error β = Tr σΛ (σ as given, not normalised). */
  beta: number;
  /** The optimal test Λ (0 ⪯ Λ ⪯ I). */
  test: CMatrix;
  /** Its complement M = I − Λ, when the answer is carried by it (β close to Tr σ). */
  rejection?: CMatrix;
  /** Tr ρΛ of the returned test (≥ 1 − ε). */
  acceptance: number;
  method: HypothesisTestingMethod;
  certificate: SdpCertificate;
  /** Present when the answer needs a caveat (solver status, tolerance decisions, clipping). */
  note?: string;
  convention: string;
}

function checkEpsilon(epsilon: number): void {
  if (typeof epsilon !== 'number' || !(epsilon >= 0 && epsilon <= 1)) {
    throw new RhoError('invalid-argument', `ε must lie in [0, 1] (got ${epsilon}).`, 'epsilon');
  }
}

function checkPair(rho: CMatrix, sigma: CMatrix): void {
  if (rho.rows !== rho.cols || sigma.rows !== sigma.cols) {
    throw new RhoError('dimension-mismatch', 'ρ and σ must be square matrices.', rho.rows !== rho.cols ? 'rho' : 'sigma');
  }
  if (rho.rows !== sigma.rows) {
    throw new RhoError('dimension-mismatch', `ρ is ${rho.rows}×${rho.rows} but σ is ${sigma.rows}×${sigma.rows}.`, 'sigma');
  }
}

export interface NeymanPearsonSolution {
  /** min Σ q_i t_i. */
  beta: number;
  /** The optimal randomised test, t_i ∈ [0, 1]. */
  t: number[];
  /** The boundary likelihood ratio (the LP's dual multiplier of the acceptance constraint). */
  mu: number;
  /** The LP dual value (1 − ε)μ − Σ max(0, μ p_i − q_i); equals beta up to rounding. */
  dual: number;
}

/**
 * The classical Neyman–Pearson problem min{Σ q_i t_i : Σ p_i t_i ≥ 1 − ε, 0 ≤ t_i ≤ 1} for a
 * probability vector p and nonnegative weights q: outcomes in increasing order of q_i/p_i (outcomes
 * with p_i = 0 never enter), the boundary one randomised (Neyman & Pearson 1933). An independent
 * reference for commuting inputs in the tests.
 */
export function neymanPearson(p: readonly number[], q: readonly number[], epsilon: number): NeymanPearsonSolution {
  checkEpsilon(epsilon);
  const n = p.length;
  const pp = p.map((x) => Math.max(0, x));
  const qq = q.map((x) => Math.max(0, x));
  const total = pp.reduce((a, b) => a + b, 0);
  const need = (1 - epsilon) * total;
  const order = [...Array(n).keys()].filter((i) => pp[i] > 0).sort((i, j) => qq[i] * pp[j] - qq[j] * pp[i]);
  const t = new Array<number>(n).fill(0);
  let got = 0;
  let beta = 0;
  let mu = 0;
  for (const i of order) {
    if (got >= need) break;
    const take = Math.min(1, (need - got) / pp[i]);
    t[i] = take;
    got += take * pp[i];
    beta += take * qq[i];
    mu = qq[i] / pp[i];
  }
  let dual = (1 - epsilon) * total * mu;
  for (let i = 0; i < n; i++) dual -= Math.max(0, mu * pp[i] - qq[i]);
  return { beta, t, mu, dual };
}

/** The SDP for β_ε with σ of unit trace (see the header). Exported for tests and benchmarks. */
export function hypothesisTestingProblem(rho: CMatrix, sigmaUnit: CMatrix, epsilon: number): SdpProblem {
  const d = rho.rows;
  return {
    cones: [
      { kind: 'hermitian', size: d },
      { kind: 'hermitian', size: d },
      { kind: 'nonnegative', size: 1 },
    ],
    objective: [{ block: 0, matrix: sigmaUnit }],
    constraints: [
      ...partialTraceConstraints({ block: 0, dims: [d], traceOut: [], hermitian: true, equals: identity(d), add: [1] }),
      { terms: [{ block: 0, matrix: rho }, { block: 2, vector: [-1] }], equals: 1 - epsilon, label: 'acceptance' },
    ],
  };
}

export const HYPOTHESIS_TESTING_PROBLEM =
  'minimize Tr σΛ s.t. 0 ⪯ Λ ⪯ I, Tr ρΛ ≥ 1 − ε (ρ divided by its trace); dual: maximize μ(1 − ε) − Tr(μρ − σ)₊ over μ ≥ 0. ' +
  'The primal point is the test Λ, or the rejection M = I − Λ when the answer is carried by Tr σ − β: ' +
  'then Tr σM ≤ Tr σ − β ≤ με + Tr(σ − μρ)₊';

/**
 * A test repaired into feasibility: eigenvalues clipped to [0, 1], then mixed with I just enough to
 * reach the acceptance 1 − ε. Returns the repaired test and Tr σΛ' (an upper bound on β).
 */
export function repairTest(test: CMatrix, rho: CMatrix, sigma: CMatrix, epsilon: number): { test: CMatrix; bound: number } {
  const d = test.rows;
  const { values, vectors } = eigh(hermitianPart(test), { vectors: true });
  const v = vectors!;
  const clipped = zeros(d, d);
  for (let k = 0; k < d; k++) {
    const w = Math.min(1, Math.max(0, values[k]));
    if (w === 0) continue;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        // w v_k v_k*
        const ar = v.re[i * d + k];
        const ai = v.im[i * d + k];
        const br = v.re[j * d + k];
        const bi = v.im[j * d + k];
        clipped.re[i * d + j] += w * (ar * br + ai * bi);
        clipped.im[i * d + j] += w * (ai * br - ar * bi);
      }
    }
  }
  const a = traceOfProductRe(rho, clipped);
  let out = clipped;
  let bound = traceOfProductRe(sigma, clipped);
  if (a < 1 - epsilon) {
    const t = (1 - epsilon - a) / (1 - a);
    out = zeros(d, d);
    for (let k = 0; k < d * d; k++) {
      out.re[k] = (1 - t) * clipped.re[k];
      out.im[k] = (1 - t) * clipped.im[k];
    }
    for (let i = 0; i < d; i++) out.re[i * d + i] += t;
    bound = (1 - t) * bound + t * trace(sigma).re;
  }
  return { test: out, bound };
}

/** Tr M correct to about one ulp (traceParts rounded). */
function exactTrace(m: CMatrix): number {
  return traceParts(m).hi;
}

/**
 * D_H^ε(ρ‖σ) (see the header for the convention, the methods and the certificate). ρ: density matrix
 * (divided by its trace); σ: positive semidefinite, any trace; ε ∈ [0, 1].
 */
export function hypothesisTestingDivergence(
  rho: CMatrix, sigma: CMatrix, epsilon: number, options: HypothesisTestingOptions = {},
): HypothesisTestingResult {
  checkEpsilon(epsilon);
  checkPair(rho, sigma);
  const lb = lnBase(options.base);
  const base = options.base ?? 2;
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const d = rho.rows;
  const trRho = exactTrace(rho);
  if (!(trRho > 0)) throw new RhoError('invalid-argument', 'ρ has zero trace.', 'rho');
  const rhoN = scale(rho, 1 / trRho);
  const { hi: trSigma, lo: trSigmaLo } = traceParts(sigma);
  const common = { epsilon, base, convention: HYPOTHESIS_TESTING_CONVENTION };
  const infinite = (test: CMatrix, reason: string, method: HypothesisTestingMethod, dualNote: string): HypothesisTestingResult => ({
    ...common,
    value: Infinity,
    reason,
    beta: 0,
    test,
    acceptance: traceOfProductRe(rhoN, test),
    method,
    certificate: {
      status: 'exact', problem: HYPOTHESIS_TESTING_PROBLEM, sense: 'minimize',
      primal: { test }, primalObjective: traceOfProductRe(sigma, test), dual: { mu: 0 }, dualObjective: 0, gap: 0, relativeGap: 0,
      bounds: { lower: Infinity, upper: Infinity }, accuracy: { absolute: 0, relative: 0 }, iterations: 0, primalResidual: 0, dualResidual: 0,
      message: dualNote,
    },
  });

  if (epsilon === 1) {
    return infinite(zeros(d, d), 'With ε = 1 the test Λ = 0 is allowed (no acceptance required), so β = 0.', 'closed-form', 'Λ = 0 has Tr σΛ = 0; μ = 0 gives the dual value 0.');
  }

  // β = 0 when the kernel of σ carries at least 1 − ε of ρ.
  const S = spectral(sigma, tol);
  const kernelCols = [...Array(d).keys()].filter((i) => !S.support.includes(i));
  let outside = 0;
  let kernelProjector: CMatrix | undefined;
  if (kernelCols.length > 0) {
    const K = columns(S.vectors, kernelCols);
    kernelProjector = mul(K, adjoint(K));
    outside = traceOfProductRe(rhoN, kernelProjector);
  }
  if (!(trSigma > 0) || outside >= 1 - epsilon) {
    const test = kernelProjector ? scale(kernelProjector, (1 - epsilon) / outside) : identity(d);
    return infinite(
      test,
      `The kernel of σ carries Tr ρ(I − Π_σ) = ${outside.toPrecision(6)} ≥ 1 − ε = ${(1 - epsilon).toPrecision(6)} of ρ, ` +
        `so a test accepting ρ with probability 1 − ε never accepts σ (β = 0). The kernel of σ was decided with the ` +
        `relative support tolerance ${tol}: eigenvalues of σ at or below ${S.threshold.toExponential(3)} counted as zero.`,
      'support',
      'closed form: Λ ∝ projector onto ker σ (Tr σΛ = 0 up to the support decision); μ = 0 gives the dual value 0.',
    );
  }

  const sigmaUnit = scale(sigma, 1 / trSigma);
  // σ̂ = σ/hi has the exact trace 1 + lo/hi (its rounded entries err relative to themselves, which the
  // Neyman–Pearson bracket covers); β = hi·β̂ and β̂ = 1 + lo/hi − β̂_c.
  const trUnit = 1 + trSigmaLo / trSigma;
  const what = 'the hypothesis-testing relative entropy';
  // −log β in the chosen base from β = Tr σ·β̂ (or from the complement β̂_c), with log1p for the
  // complement so that a D_H of 1e-9 bits keeps its relative accuracy. Each logarithm carries an ulp or
  // two of its own size and the sum and the division by log(base) an ulp of the result: `widen` pads
  // the bracket of D_H by 16u·(|D| + |log Tr σ|/log b), relative to D when Tr σ ≈ 1.
  const lnHi = Math.log(trSigma);
  const fromBeta = (betaHat: number): number => (betaHat > 0 ? -(lnHi + Math.log(betaHat)) / lb : Infinity);
  const fromComplement = (bc: number): number => (bc < trUnit ? -(lnHi + Math.log1p(trSigmaLo / trSigma - bc)) / lb : Infinity);
  const logPad = (x: number): number => 16 * 1.1102230246251565e-16 * (Math.abs(x) + Math.abs(lnHi) / lb);
  const widen = (b: { lower: number; upper: number }) => ({ lower: b.lower - logPad(b.lower), upper: b.upper + logPad(b.upper) });

  if (epsilon === 0) {
    // Λ = Π_ρ (Tr ρΛ = 1 forces Λ = I on supp ρ), β = Tr σΠ_ρ; the dual sup is approached as μ → ∞.
    const R = spectral(rhoN, tol);
    const P = columns(R.vectors, R.support);
    const test = mul(P, adjoint(P));
    const rejection = zeros(d, d);
    for (let k = 0; k < d * d; k++) {
      rejection.re[k] = (k % (d + 1) === 0 ? 1 : 0) - test.re[k];
      rejection.im[k] = -test.im[k];
    }
    const betaC = traceOfProductRe(sigmaUnit, rejection);
    let upperC = Infinity;
    let muBest = 0;
    for (const mu of [1e2, 1e4, 1e6, 1e8, 1e10, 1e12]) {
      const b = dualBounds(evaluateDual(rhoN, sigmaUnit, 0, mu), 0, rhoN, sigmaUnit).upperComplement;
      if (b < upperC) {
        upperC = b;
        muBest = mu;
      }
    }
    const lowerC = Math.max(0, betaC - roundingPad(d * d, betaC));
    const c = certify({
      what, problem: HYPOTHESIS_TESTING_PROBLEM, sense: 'minimize',
      primal: { rejection }, primalObjective: trSigma * (trUnit - betaC),
      dual: { mu: muBest * trSigma }, dualObjective: trSigma * (trUnit - upperC),
      bounds: widen({ lower: fromComplement(lowerC), upper: fromComplement(Math.min(upperC, trUnit)) }),
      estimate: fromComplement(betaC),
    });
    const notes = [
      `ε = 0: the optimal test is the projector onto the support of ρ (rank ${R.support.length} of ${d}, eigenvalues at or below ` +
        `${R.threshold.toExponential(3)} counted as zero), so D_H^0 = D_min(ρ‖σ).`,
    ];
    if (c.note) notes.push(c.note);
    return {
      ...common, value: c.value, beta: trSigma * (trUnit - betaC), test, rejection, acceptance: traceOfProductRe(rhoN, test),
      method: 'closed-form', certificate: c.certificate, note: notes.join(' '),
    };
  }

  if (options.method === 'sdp') return viaSdp(rhoN, sigma, sigmaUnit, epsilon, trSigma, fromBeta, options, common);

  const np = neymanPearsonDual(rhoN, sigmaUnit, epsilon);
  const value = np.complement ? fromComplement(np.betaComplement) : fromBeta(np.beta);
  const bounds = np.complement
    ? { lower: fromComplement(np.bracket.lower), upper: fromComplement(Math.min(np.bracket.upper, trUnit)) }
    : { lower: fromBeta(np.bracket.upper), upper: fromBeta(np.bracket.lower) };
  const c = certify({
    what, problem: HYPOTHESIS_TESTING_PROBLEM, sense: 'minimize',
    primal: np.complement ? { rejection: np.rejection } : { test: np.test },
    primalObjective: trSigma * (np.complement ? trUnit - np.betaComplement : np.beta),
    dual: { mu: np.mu * trSigma },
    dualObjective: trSigma * (np.complement ? trUnit - np.dualBound : np.dualBound),
    bounds: widen(bounds),
    estimate: value,
  });
  c.certificate.status = 'optimal';
  c.certificate.iterations = np.evaluations;
  return {
    ...common,
    value: c.value,
    beta: trSigma * (np.complement ? trUnit - np.betaComplement : np.beta),
    test: np.test,
    ...(np.complement ? { rejection: np.rejection } : {}),
    acceptance: np.acceptance,
    method: 'neyman-pearson-dual',
    certificate: c.certificate,
    ...(c.note ? { note: c.note } : {}),
  };
}

/** The generic SDP (method "sdp"), certified like the dual: the repaired test and the acceptance row's multiplier μ. */
function viaSdp(
  rhoN: CMatrix, sigma: CMatrix, sigmaUnit: CMatrix, epsilon: number, trSigma: number, fromBeta: (b: number) => number,
  options: HypothesisTestingOptions, common: { epsilon: number; base: number; convention: string },
): HypothesisTestingResult {
  const d = rhoN.rows;
  const ans = solveSdp(hypothesisTestingProblem(rhoN, sigmaUnit, epsilon), options.solver);
  const raw = symmetrize(matrixBlock(ans, 0));
  const repaired = repairTest(raw, rhoN, sigmaUnit, epsilon);
  // The acceptance row is the last constraint; its multiplier is μ (the solver's dual maximises b·y).
  const mu = Math.max(0, ans.y[ans.y.length - 1]);
  const lower = dualBounds(evaluateDual(rhoN, sigmaUnit, epsilon, mu), epsilon, rhoN, sigmaUnit).lowerBeta;
  const upper = repaired.bound + roundingPad(d * d, repaired.bound);
  const c = certify({
    what: 'the hypothesis-testing relative entropy', solve: ans, problem: HYPOTHESIS_TESTING_PROBLEM, sense: 'minimize',
    primal: { test: repaired.test }, primalObjective: trSigma * repaired.bound,
    dual: { mu: mu * trSigma }, dualObjective: trSigma * lower,
    bounds: { lower: fromBeta(upper) - 8e-16, upper: fromBeta(lower) + 8e-16 },
    estimate: ans.primalObjective > 0 ? fromBeta(ans.primalObjective) : undefined,
  });
  return {
    ...common,
    value: c.value,
    beta: trSigma * repaired.bound,
    test: repaired.test,
    acceptance: traceOfProductRe(rhoN, repaired.test),
    method: 'sdp',
    certificate: c.certificate,
    ...(c.note ? { note: c.note } : {}),
  };
}
