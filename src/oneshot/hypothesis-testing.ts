/**
 * Hypothesis-testing relative entropy, as a semidefinite program with its certificate, and in closed
 * form (Neyman–Pearson) when ρ and σ commute.
 *
 * CONVENTION (stated because the literature has two). We use the un-normalised form
 *
 *     D_H^ε(ρ‖σ) = −log β_ε(ρ‖σ),   β_ε(ρ‖σ) = min { Tr σΛ : 0 ⪯ Λ ⪯ I, Tr ρΛ ≥ 1 − ε },   ε ∈ (0, 1),
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
 *  - 'support': β = 0 exactly when the kernel of σ carries enough of ρ, Tr ρ(I − Π_σ) ≥ 1 − ε; then
 *    D_H^ε = +∞ and Λ = (1 − ε) Π_ker σ / Tr ρ Π_ker σ. Decided with the support tolerance: a
 *    numerical decision, reported in `reason`.
 *  - 'neyman-pearson': when ‖[ρ, σ]‖_F ≤ commuteTol · ‖ρ‖_F ‖σ‖_F the two are diagonal in one basis
 *    (found from σ's eigenvectors, ρ diagonalised inside each eigenspace of σ) and the problem is the
 *    classical Neyman–Pearson problem: take eigenvectors in increasing order of the likelihood ratio
 *    q_i/p_i until the acceptance 1 − ε is reached, randomising on the boundary one. Exact up to
 *    rounding; its certificate is the closed-form LP dual (μ = the boundary ratio,
 *    y_i = max(0, μ p_i − q_i)), whose value equals β.
 *  - 'sdp': our interior-point solver on
 *        minimize ⟨σ/Tr σ, Λ⟩  s.t.  Λ + W = I,  ⟨ρ, Λ⟩ − t = 1 − ε,  Λ, W ⪰ 0 (Hermitian),  t ≥ 0,
 *    with σ scaled to unit trace for conditioning (log Tr σ added back). Its dual is
 *    max (1 − ε)μ − Tr Y s.t. σ/Tr σ − μρ + Y ⪰ 0, Y ⪰ 0, μ ≥ 0.
 *
 * Accuracy: the solver's accuracy is absolute in β (relative gap ~1e-8 of O(1) objectives), so when
 * β is very small, −log β carries a relative error of about gap/β; a `note` says so below β = 1e-6.
 *
 * Deliberately not here: validation that ρ is a density matrix (the ops layer does it; ρ is divided by
 * its trace), asymptotic expansions, the normalised convention (use the identity above).
 * Cost: one eigendecomposition of σ (and of ρ in the commuting case), O(d³); the SDP has 2 Hermitian
 * d×d blocks and d² + 1 constraints, each interior-point iteration O(d⁶) for the Schur complement.
 */
import {
  CMatrix, zeros, mul, adjoint, sub, frobeniusNorm, identity, traceOfProductRe, trace, scale, eigh,
} from '../linalg/index.js';
import { RhoError } from '../errors.js';
import { solveSdp, partialTraceConstraints, type SdpProblem } from '../sdp/index.js';
import { spectral, columns, DEFAULT_SUPPORT_TOLERANCE } from '../quantities/divergence-kit.js';
import {
  acceptAnswer, certificateOf, lnBase, matrixBlock, symmetrize, type OneShotSdpOptions, type LegacyCertificate,
} from '../sdp/support.js';

export const HYPOTHESIS_TESTING_CONVENTION =
  'D_H^ε(ρ‖σ) = −log min{Tr σΛ : 0 ≤ Λ ≤ I, Tr ρΛ ≥ 1−ε} (Wang & Renner, PRL 108, 200501 (2012); not normalised by ε)';

/** Default relative commutator size below which ρ and σ count as commuting (Neyman–Pearson path). */
export const DEFAULT_COMMUTE_TOLERANCE = 1e-10;

export interface HypothesisTestingOptions extends OneShotSdpOptions {
  /** 'auto' (default): closed form when ρ and σ commute, else the SDP. */
  method?: 'auto' | 'sdp' | 'neyman-pearson';
  /** Relative commutator size counted as commuting (default 1e-10). */
  commuteTol?: number;
}

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
  /** Tr ρΛ of the returned test (≥ 1 − ε up to the solver's residuals). */
  acceptance: number;
  /** How the value was found. */
  method: 'sdp' | 'neyman-pearson' | 'support';
  /** ‖ρσ − σρ‖_F / (‖ρ‖_F ‖σ‖_F). */
  commutator: number;
  certificate: LegacyCertificate;
  /** Present when the answer needs a caveat (solver status, tiny β, tolerance decisions). */
  note?: string;
  convention: string;
}

function checkEpsilon(epsilon: number): void {
  if (typeof epsilon !== 'number' || !(epsilon > 0 && epsilon < 1)) {
    throw new RhoError('invalid-argument', `ε must lie strictly between 0 and 1 (got ${epsilon}).`, 'epsilon');
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
 * with p_i = 0 never enter), the boundary one randomised (Neyman & Pearson 1933).
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

/** Relative commutator ‖ρσ − σρ‖_F / (‖ρ‖_F ‖σ‖_F). */
export function relativeCommutator(rho: CMatrix, sigma: CMatrix): number {
  const c = sub(mul(rho, sigma), mul(sigma, rho));
  const scaleBy = frobeniusNorm(rho) * frobeniusNorm(sigma);
  return scaleBy > 0 ? frobeniusNorm(c) / scaleBy : 0;
}

/**
 * An orthonormal basis (columns) diagonalising both σ and a ρ that commutes with it: σ's eigenvectors,
 * with ρ diagonalised inside each cluster of (relatively) equal eigenvalues of σ.
 */
export function commonEigenbasis(rho: CMatrix, sigma: CMatrix, clusterTol = 1e-9): CMatrix {
  const { values, vectors } = eigh(sigma, { vectors: true });
  const V = vectors!;
  const n = values.length;
  const spread = Math.max(Math.abs(values[0]), Math.abs(values[n - 1]), Number.MIN_VALUE);
  const W = zeros(n, n);
  let start = 0;
  while (start < n) {
    let end = start + 1;
    while (end < n && values[end] - values[end - 1] <= clusterTol * spread) end++;
    const cols = [...Array(end - start).keys()].map((k) => start + k);
    const Vc = columns(V, cols);
    let basis = Vc;
    if (cols.length > 1) {
      const block = mul(mul(adjoint(Vc), rho), Vc);
      basis = mul(Vc, eigh(symmetrize(block), { vectors: true }).vectors!);
    }
    for (let i = 0; i < n; i++) {
      for (let k = 0; k < cols.length; k++) {
        W.re[i * n + start + k] = basis.re[i * cols.length + k];
        W.im[i * n + start + k] = basis.im[i * cols.length + k];
      }
    }
    start = end;
  }
  return W;
}

function diagonalIn(W: CMatrix, m: CMatrix): number[] {
  const d = mul(mul(adjoint(W), m), W);
  const out: number[] = [];
  for (let i = 0; i < d.rows; i++) out.push(d.re[i * d.cols + i]);
  return out;
}

function fromColumns(W: CMatrix, weights: readonly number[]): CMatrix {
  const n = W.rows;
  const out = zeros(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < weights.length; k++) {
        const w = weights[k];
        if (w === 0) continue;
        const ar = W.re[i * n + k];
        const ai = W.im[i * n + k];
        const br = W.re[j * n + k];
        const bi = -W.im[j * n + k];
        re += w * (ar * br - ai * bi);
        im += w * (ar * bi + ai * br);
      }
      out.re[i * n + j] = re;
      out.im[i * n + j] = im;
    }
  }
  return out;
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

const SDP_PROBLEM = 'minimize Tr (σ/Tr σ)Λ s.t. Λ + W = I, Tr ρΛ − t = 1 − ε; Λ, W ⪰ 0 (Hermitian), t ≥ 0';

/**
 * D_H^ε(ρ‖σ) (see the header for the convention, the methods and their caveats). ρ: density matrix
 * (divided by its trace); σ: positive semidefinite, any trace; ε ∈ (0, 1).
 */
export function hypothesisTestingDivergence(
  rho: CMatrix, sigma: CMatrix, epsilon: number, options: HypothesisTestingOptions = {},
): HypothesisTestingResult {
  checkEpsilon(epsilon);
  checkPair(rho, sigma);
  const lb = lnBase(options.base);
  const base = options.base ?? 2;
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const method = options.method ?? 'auto';
  const d = rho.rows;
  const trRho = trace(rho).re;
  if (!(trRho > 0)) throw new RhoError('invalid-argument', 'ρ has zero trace.', 'rho');
  const rhoN = scale(rho, 1 / trRho);
  const trSigma = trace(sigma).re;
  const commutator = relativeCommutator(rhoN, sigma);
  const common = { epsilon, base, commutator, convention: HYPOTHESIS_TESTING_CONVENTION };

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
    return {
      ...common,
      value: Infinity,
      reason:
        `The kernel of σ carries Tr ρ(I − Π_σ) = ${outside.toPrecision(6)} ≥ 1 − ε = ${(1 - epsilon).toPrecision(6)} of ρ, ` +
        `so a test accepting ρ with probability 1 − ε never accepts σ (β = 0). The kernel of σ was decided with the ` +
        `relative support tolerance ${tol}: eigenvalues of σ at or below ${S.threshold.toExponential(3)} counted as zero.`,
      beta: 0,
      test,
      acceptance: traceOfProductRe(rhoN, test),
      method: 'support',
      certificate: {
        status: 'optimal', primalObjective: 0, dualObjective: 0, gap: 0, relativeGap: 0,
        primalResidual: 0, dualResidual: 0, iterations: 0,
        problem: 'closed form: Λ ∝ projector onto ker σ (primal value 0); dual point μ = 0, Y = 0 (value 0)',
      },
    };
  }

  const commuting = commutator <= (options.commuteTol ?? DEFAULT_COMMUTE_TOLERANCE);
  if (method === 'neyman-pearson' && !commuting) {
    throw new RhoError(
      'invalid-argument',
      `The Neyman–Pearson closed form needs commuting ρ and σ, but ‖[ρ, σ]‖_F/(‖ρ‖_F‖σ‖_F) = ${commutator.toExponential(2)}; use the SDP.`,
      'method',
    );
  }
  if (method !== 'sdp' && commuting) {
    const W = commonEigenbasis(rhoN, sigma);
    const p = diagonalIn(W, rhoN);
    const q = diagonalIn(W, sigma);
    const np = neymanPearson(p, q, epsilon);
    const test = fromColumns(W, np.t);
    const value = np.beta > 0 ? -Math.log(np.beta) / lb : Infinity;
    return {
      ...common,
      value,
      ...(np.beta > 0 ? {} : { reason: 'The Neyman–Pearson test reaches acceptance 1 − ε on outcomes σ never produces (β = 0).' }),
      beta: np.beta,
      test,
      acceptance: traceOfProductRe(rhoN, test),
      method: 'neyman-pearson',
      certificate: {
        status: 'optimal',
        primalObjective: np.beta,
        dualObjective: np.dual,
        gap: np.beta - np.dual,
        relativeGap: Math.abs(np.beta - np.dual) / (1 + Math.abs(np.beta) + Math.abs(np.dual)),
        primalResidual: 0,
        dualResidual: 0,
        iterations: 0,
        problem:
          'Neyman–Pearson in the common eigenbasis: minimize Σ q_i t_i s.t. Σ p_i t_i ≥ 1 − ε, 0 ≤ t ≤ 1 ' +
          '(closed form; dual μ = boundary likelihood ratio, y_i = max(0, μp_i − q_i))',
      },
      ...(commutator > 0
        ? { note: `ρ and σ were treated as commuting (relative commutator ${commutator.toExponential(2)} ≤ ${options.commuteTol ?? DEFAULT_COMMUTE_TOLERANCE}); the closed form neglects it.` }
        : {}),
    };
  }

  const sigmaUnit = scale(sigma, 1 / trSigma);
  const ans = solveSdp(hypothesisTestingProblem(rhoN, sigmaUnit, epsilon), options.solver);
  const notes: string[] = [];
  const statusNote = acceptAnswer(ans, 'the hypothesis-testing relative entropy');
  if (statusNote) notes.push(statusNote);
  const betaUnit = ans.primalObjective;
  if (!(betaUnit > 0)) {
    throw new RhoError(
      'solver-failed',
      `The optimal type-II error is below the solver's accuracy (primal objective ${betaUnit.toExponential(3)}, ` +
        `dual ${ans.dualObjective.toExponential(3)}); D_H^ε is too large to resolve.`,
      undefined,
      { status: ans.status },
    );
  }
  if (betaUnit < 1e-6) {
    notes.push(
      `β/Tr σ = ${betaUnit.toExponential(3)} is small: the solver's accuracy is absolute in β, so −log β carries a ` +
        `relative error of about |gap|/β = ${(Math.abs(ans.gap) / betaUnit).toExponential(2)}.`,
    );
  }
  const test = symmetrize(matrixBlock(ans, 0));
  return {
    ...common,
    value: -(Math.log(betaUnit) + Math.log(trSigma)) / lb,
    beta: betaUnit * trSigma,
    test,
    acceptance: traceOfProductRe(rhoN, test),
    method: 'sdp',
    certificate: certificateOf(ans, SDP_PROBLEM),
    ...(notes.length ? { note: notes.join(' ') } : {}),
  };
}
