/**
 * Measured divergences: the supremum over measurements of the classical divergence of the outcome
 * distributions,
 *
 *   measured relative entropy    D^M(ρ‖σ)   = sup_M D(P_ρ‖P_σ),
 *   measured Rényi divergence    D^M_α(ρ‖σ) = sup_M D_α(P_ρ‖P_σ),   α ∈ [1/2, 1) ∪ (1, ∞),
 *
 * through the variational formulas of Berta, Fawzi & Tomamichel ("On variational expressions for
 * quantum relative entropies", Lett. Math. Phys. 107 (2017) 2239; recalled from memory, and
 * re-derived here), one formula for every order:
 *
 *   D^M_α(ρ‖σ) = sup_{ω > 0}  (α/(α−1)) log Tr ρ ω^{(α−1)/α} − log Tr σ ω   (→ Tr ρ log ω − log Tr σ ω at α = 1),
 *
 * attained by the projective measurement onto an eigenbasis of the optimal ω. Derivation: the
 * classical identity p^α q^{1−α} = sup_{w>0} (inf for α < 1) [α p w^β + (1−α) q w], β = 1 − 1/α,
 * together with the operator Jensen inequality for x ↦ x^β (operator concave for β ∈ (0, 1),
 * operator convex for β ∈ [−1, 0), i.e. α ≥ 1/2) gives Q^M_α = sup (inf) over ω of
 * α Tr ρ ω^β + (1−α) Tr σ ω, attained in ω's eigenbasis; optimising the scale of ω turns the bracket
 * into (Tr ρ ω^β)^α (Tr σ ω)^{1−α}, whose logarithm over α − 1 is the formula above. The bracket is
 * concave (α > 1) or convex (α < 1) in ω, so every stationary point of the formula is a global
 * optimum. Below α = 1/2 x^β is not operator convex and projective measurements are not known to
 * be optimal; those orders are refused.
 *
 * Method (our own): write ω = e^H with H Hermitian and maximise f(H) = (1/β) ln Tr ρ e^{βH} −
 * ln Tr σ e^H (Tr ρ H − ln Tr σ e^H at α = 1) by limited-memory BFGS with an Armijo backtracking line
 * search. The gradient is Dexp_{βH}[ρ]/Tr ρ e^{βH} − Dexp_H[σ]/Tr σ e^H, the Fréchet derivatives from
 * the Daleckii–Krein formula (divided differences of exp in the eigenbasis of H). exp is a
 * diffeomorphism onto the positive definite matrices, so an ascent that drives the gradient to zero
 * converges to D^M_α. Near α = 1 the first term is evaluated as log1p(Σ w_k expm1(β h_k))/β, free
 * of cancellation. When ρ is rank deficient the supremum is reached only as some eigenvalues of ω go
 * to 0 (H → −∞ there); the ascent then approaches it without attaining it, and slowly: the gradient
 * along those directions decays like the eigenvalues themselves (in a test with σ of size 16 and ρ
 * of rank 5, 1000 steps left an error near 1e-4 and 3000 steps near 1e-7). `gradientNorm` and
 * `finalChange` show how far the run got; a Newton method on H would do better there and is not
 * implemented.
 *
 * The returned `value` is the classical divergence of the returned measurement (the eigenbasis of
 * the final ω, completed by a basis of ker σ), or f(H) if that is larger: both are attained, hence
 * lower bounds on the measured divergence up to rounding. No upper bound is certified here;
 * D^M_α ≤ D̃_α (sandwiched) and D^M ≤ D (Umegaki) always hold.
 *
 * Supports: +∞ unless supp ρ ⊆ supp σ for α ≥ 1 (the two-outcome measurement {Π_σ, 1 − Π_σ} then
 * gives an infinite classical divergence); for α < 1, +∞ only when ρ ⊥ σ, and otherwise the
 * optimisation runs on supp σ with ρ compressed there unnormalised (a measurement that separates
 * ker σ contributes nothing to Σ p^α q^{1−α}). Decisions with the tolerance rule of
 * divergence-kit.ts; under a decided inclusion the leakage (at most tol) is dropped. ρ is normalised
 * to unit trace.
 *
 * Cost: O(m³) per function evaluation (m = rank σ), O(m² · memory) per L-BFGS step; a few hundred
 * steps for well-conditioned inputs.
 */
import { checkDeadline } from '../deadline.js';
import { CMatrix, zeros, adjoint, mul, hermitianPart } from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import { columns, compress, doubleOperatorIntegral, expDivided } from '../linalg/spectral.js';
import { analysePair, logOfBase, logSumExp } from './divergence-kit.js';

export interface MeasuredOptions {
  base?: number;
  tol?: number;
  /** Largest number of ascent steps (default 3000). */
  maxIterations?: number;
  /** Stop when the Frobenius norm of the gradient is below this (default 1e-11). */
  gradientTolerance?: number;
}

export interface MeasuredResult {
  value: number;
  reason?: string;
  family: 'measured';
  /** The order (absent for the measured relative entropy, α = 1). */
  alpha?: number;
  base: number;
  tolerance: number;
  supportIncluded: boolean;
  supportsOrthogonal: boolean;
  leakage: number;
  rankRho: number;
  rankSigma: number;
  /** Orthonormal measurement basis as the columns of a unitary (the optimal projective measurement). */
  measurement: CMatrix;
  /** Outcome probabilities under ρ and σ for the basis vectors, in column order. */
  p: number[];
  q: number[];
  /** f(H) of the header at the final H (in the requested base); at most `value`. */
  objective: number;
  iterations: number;
  stoppingRule: string;
  gradientNorm: number;
  finalChange: number;
  notes?: string[];
  [extra: string]: unknown;
}

/** Hermitian m×m ↔ real vector of length m², an isometry for the Frobenius inner product. */
function toVector(h: CMatrix): Float64Array {
  const m = h.rows;
  const x = new Float64Array(m * m);
  let k = 0;
  for (let i = 0; i < m; i++) x[k++] = h.re[i * m + i];
  for (let i = 0; i < m; i++) {
    for (let j = i + 1; j < m; j++) {
      x[k++] = Math.SQRT2 * h.re[i * m + j];
      x[k++] = Math.SQRT2 * h.im[i * m + j];
    }
  }
  return x;
}

function fromVector(x: Float64Array, m: number): CMatrix {
  const h = zeros(m, m);
  let k = 0;
  for (let i = 0; i < m; i++) h.re[i * m + i] = x[k++];
  for (let i = 0; i < m; i++) {
    for (let j = i + 1; j < m; j++) {
      const a = x[k++] / Math.SQRT2;
      const b = x[k++] / Math.SQRT2;
      h.re[i * m + j] = a;
      h.im[i * m + j] = b;
      h.re[j * m + i] = a;
      h.im[j * m + i] = -b;
    }
  }
  return h;
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

interface Evaluation {
  f: number;
  grad: Float64Array;
  basis: CMatrix;
}

/**
 * f(H) = (1/β) ln Tr ρ e^{βH} − ln Tr σ e^H (β = 0: Tr ρ H − ln Tr σ e^H) and its gradient (as a
 * vector), with the eigenbasis of H. H is shifted by its largest eigenvalue first (f does not change).
 */
function evaluate(x: Float64Array, rhoS: CMatrix, sigmaS: CMatrix, beta: number, unitTrace: boolean): Evaluation {
  const m = rhoS.rows;
  const H = fromVector(x, m);
  const { values, vectors } = eigh(H, { vectors: true });
  const Y = vectors!;
  let hmax = -Infinity;
  for (let k = 0; k < m; k++) hmax = Math.max(hmax, values[k]);
  const h = Array.from(values, (v) => v - hmax);
  const sigmaY = mul(mul(adjoint(Y), sigmaS), Y);
  let z = 0;
  for (let k = 0; k < m; k++) z += Math.exp(h[k]) * sigmaY.re[k * m + k];
  // Dexp at the shifted H in the direction σ (Daleckii–Krein with exp's divided differences).
  const shifted = { values: Float64Array.from(h), vectors: Y };
  const Ds = doubleOperatorIntegral(expDivided, H, H, sigmaS, shifted, shifted);
  const G = zeros(m, m);
  let first: number;
  if (beta === 0) {
    let trRhoH = 0;
    // Tr ρH = Σ_ij ρ_ij H_ji = Σ_ij ρ_ij conj(H_ij) → real part Σ (ρre Hre + ρim Him).
    for (let i = 0; i < m * m; i++) trRhoH += rhoS.re[i] * H.re[i] + rhoS.im[i] * H.im[i];
    first = trRhoH - hmax;
    for (let i = 0; i < m * m; i++) {
      G.re[i] = rhoS.re[i];
      G.im[i] = rhoS.im[i];
    }
  } else {
    // (1/β) ln Σ_k w_k e^{βh_k}, w_k = ⟨y_k|ρ|y_k⟩ (Σ w = Tr ρ_S), without cancellation when βh is small.
    const rhoY = mul(mul(adjoint(Y), rhoS), Y);
    const w = Array.from({ length: m }, (_, k) => rhoY.re[k * m + k]);
    const bh = h.map((v) => beta * v);
    let spread = 0;
    for (const v of bh) spread = Math.max(spread, Math.abs(v));
    let lnA: number;
    if (spread <= 1) {
      let s = 0;
      let tw = 0;
      for (let k = 0; k < m; k++) {
        s += w[k] * Math.expm1(bh[k]);
        tw += w[k];
      }
      // With Tr ρ_S = 1 by construction (inclusion), ln Tr ρ_S is taken as exactly 0: its rounding
      // divided by a tiny β would otherwise dominate.
      lnA = (unitTrace ? 0 : Math.log(tw)) + Math.log1p(s / tw);
    } else {
      lnA = logSumExp(w, bh);
    }
    first = lnA / beta;
    // Gradient of (1/β) ln A: Y (exp[βh_k, βh_l] ∘ Y*ρY) Y* / A, with A = Σ w e^{βh}.
    const A = Math.exp(lnA);
    const Dr = doubleOperatorIntegral((a, b) => expDivided(beta * a, beta * b), H, H, rhoS, shifted, shifted);
    for (let i = 0; i < m * m; i++) {
      G.re[i] = Dr.re[i] / A;
      G.im[i] = Dr.im[i] / A;
    }
  }
  const f = first - Math.log(z);
  for (let i = 0; i < m * m; i++) {
    G.re[i] -= Ds.re[i] / z;
    G.im[i] -= Ds.im[i] / z;
  }
  return { f, grad: toVector(hermitianPart(G)), basis: Y };
}

/** Maximise f by L-BFGS; returns the final point's evaluation and the run's record. */
function ascend(rhoS: CMatrix, sigmaS: CMatrix, beta: number, unitTrace: boolean, x0: Float64Array, maxIterations: number, gtol: number) {
  const memory = 12;
  const S: Float64Array[] = [];
  const Yd: Float64Array[] = [];
  let x = x0;
  let cur = evaluate(x, rhoS, sigmaS, beta, unitTrace);
  let iterations = 0;
  let stoppingRule = `reached the iteration limit ${maxIterations}`;
  let finalChange = 0;
  let stall = 0;
  while (iterations < maxIterations) {
    // The request's deadline (src/deadline.ts), polled once per step.
    checkDeadline('the ascent of the measured divergence', () => ({ iterations }), () => `it had taken ${iterations} steps`);
    const gnorm = Math.sqrt(dot(cur.grad, cur.grad));
    if (gnorm <= gtol) {
      stoppingRule = `gradient norm ${gnorm.toExponential(2)} <= ${gtol}`;
      break;
    }
    // Two-loop recursion on the ascent problem (we minimise −f; its gradient is −grad).
    const q = Float64Array.from(cur.grad, (v) => -v);
    const alphas: number[] = [];
    for (let k = S.length - 1; k >= 0; k--) {
      const a = dot(S[k], q) / dot(Yd[k], S[k]);
      alphas[k] = a;
      for (let i = 0; i < q.length; i++) q[i] -= a * Yd[k][i];
    }
    let gamma = 1;
    if (S.length) gamma = dot(S[S.length - 1], Yd[S.length - 1]) / dot(Yd[S.length - 1], Yd[S.length - 1]);
    for (let i = 0; i < q.length; i++) q[i] *= gamma;
    for (let k = 0; k < S.length; k++) {
      const b = dot(Yd[k], q) / dot(Yd[k], S[k]);
      for (let i = 0; i < q.length; i++) q[i] += S[k][i] * (alphas[k] - b);
    }
    let dir = Float64Array.from(q, (v) => -v); // ascent direction for f
    let slope = dot(dir, cur.grad);
    if (!(slope > 0) || !Number.isFinite(slope)) {
      S.length = 0;
      Yd.length = 0;
      dir = Float64Array.from(cur.grad);
      slope = dot(dir, dir);
    }
    let step = 1;
    let next: Evaluation | undefined;
    let xn = x;
    for (let tries = 0; tries < 60; tries++) {
      xn = Float64Array.from(x, (v, i) => v + step * dir[i]);
      // A step to exponents beyond double range is simply too long.
      const e = xn.every((v) => Math.abs(v) < 1e300) ? evaluate(xn, rhoS, sigmaS, beta, unitTrace) : undefined;
      if (e && Number.isFinite(e.f) && e.f >= cur.f + 1e-4 * step * slope) {
        next = e;
        break;
      }
      step *= 0.5;
    }
    iterations++;
    if (!next) {
      stoppingRule = 'the line search found no increase (the value is stationary to rounding)';
      finalChange = 0;
      break;
    }
    const s = Float64Array.from(xn, (v, i) => v - x[i]);
    const y = Float64Array.from(next.grad, (v, i) => -(v - cur.grad[i])); // gradient change of −f
    if (dot(s, y) > 1e-300) {
      S.push(s);
      Yd.push(y);
      if (S.length > memory) {
        S.shift();
        Yd.shift();
      }
    }
    finalChange = next.f - cur.f;
    x = xn;
    cur = next;
    if (Math.abs(finalChange) <= 1e-15 * Math.max(1, Math.abs(cur.f))) {
      if (++stall >= 3) {
        stoppingRule = 'the value changed by less than 1e-15 (relative) in 3 consecutive steps';
        break;
      }
    } else stall = 0;
  }
  return { x, cur, iterations, stoppingRule, finalChange };
}

/** The measured relative entropy D^M(ρ‖σ) with the optimal projective measurement. */
export function measuredRelativeEntropy(rho: CMatrix, sigma: CMatrix, options: MeasuredOptions = {}): MeasuredResult {
  return measuredDivergence(rho, sigma, 1, options);
}

/** The measured Rényi divergence D^M_α(ρ‖σ), α ∈ [1/2, ∞) (α = 1: the measured relative entropy). */
export function measuredRenyiDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, options: MeasuredOptions = {}): MeasuredResult {
  return measuredDivergence(rho, sigma, alpha, options);
}

/** Classical Rényi divergence (natural log) of p from q over outcomes with p, q > 0; α = 1: KL. */
function classicalDivergence(p: number[], q: number[], alpha: number, unitTrace: boolean): number {
  const t = alpha - 1;
  if (t === 0) {
    let kl = 0;
    for (let k = 0; k < p.length; k++) if (p[k] > 0 && q[k] > 0) kl += p[k] * Math.log(p[k] / q[k]);
    return kl;
  }
  const w: number[] = [];
  const L: number[] = [];
  let tw = 0;
  for (let k = 0; k < p.length; k++) {
    if (p[k] > 0 && q[k] > 0) {
      w.push(p[k]);
      L.push(Math.log(p[k] / q[k]));
      tw += p[k];
    }
  }
  // Σ p^α q^{1−α} = Σ p e^{t ln(p/q)}; near α = 1 as tw·(1 + Σ (p/tw) expm1(·)).
  if (Math.abs(t) <= 0.5) {
    let s = 0;
    for (let k = 0; k < w.length; k++) s += (w[k] / tw) * Math.expm1(t * L[k]);
    return ((unitTrace ? 0 : Math.log(tw)) + Math.log1p(s)) / t;
  }
  return logSumExp(w, L.map((x) => t * x)) / t;
}

function measuredDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, options: MeasuredOptions): MeasuredResult {
  if (typeof alpha !== 'number' || !(alpha >= 0.5 && alpha < Infinity)) {
    throw new RhoError(
      'invalid-argument',
      `alpha = ${alpha} is outside the range [1/2, ∞) of the measured family (below 1/2 projective measurements are not known to be optimal, and the variational formula used here does not hold).`,
      'alpha',
    );
  }
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const lb = logOfBase(options.base);
  const maxIterations = options.maxIterations ?? 3000;
  const gtol = options.gradientTolerance ?? 1e-11;
  if (!(maxIterations >= 1) || !Number.isInteger(maxIterations)) {
    throw new RhoError('invalid-argument', 'maxIterations must be a positive integer.', 'maxIterations');
  }
  const p = analysePair(rho, sigma, tol);
  const n = rho.rows;
  const base: Pick<
    MeasuredResult,
    'family' | 'base' | 'tolerance' | 'supportIncluded' | 'supportsOrthogonal' | 'leakage' | 'rankRho' | 'rankSigma'
  > & { alpha?: number } = {
    family: 'measured',
    base: options.base ?? 2,
    tolerance: tol,
    supportIncluded: p.included,
    supportsOrthogonal: p.orthogonal,
    leakage: p.leakage,
    rankRho: p.rho.support.length,
    rankSigma: p.sigma.support.length,
  };
  if (alpha !== 1) base.alpha = alpha;
  const kernel: number[] = [];
  const inSupp = new Set(p.sigma.support);
  for (let j = 0; j < n; j++) if (!inSupp.has(j)) kernel.push(j);
  const V1 = columns(p.sigma.vectors, p.sigma.support);
  const probs = (B: CMatrix) => {
    const pr: number[] = [];
    const qr: number[] = [];
    const RB = mul(rho, B);
    const SB = mul(sigma, B);
    for (let k = 0; k < B.cols; k++) {
      let a = 0;
      let b = 0;
      for (let i = 0; i < n; i++) {
        const br = B.re[i * B.cols + k];
        const bi = B.im[i * B.cols + k];
        a += br * RB.re[i * B.cols + k] + bi * RB.im[i * B.cols + k];
        b += br * SB.re[i * B.cols + k] + bi * SB.im[i * B.cols + k];
      }
      pr.push(a / p.traceRho);
      qr.push(b);
    }
    return { pr, qr };
  };
  const trivial = (value: number, reason: string, rule: string): MeasuredResult => {
    const { pr, qr } = probs(p.sigma.vectors);
    return {
      ...base, value, reason, measurement: p.sigma.vectors, p: pr, q: qr, objective: value,
      iterations: 0, stoppingRule: rule, gradientNorm: 0, finalChange: 0,
    };
  };
  if (alpha >= 1 && !p.included) {
    return trivial(
      Infinity,
      `supp ρ is not contained in supp σ: Tr ρ(1 − Π_σ) = ${p.leakage.toExponential(3)} exceeds the support tolerance ${tol}; the measurement {Π_σ, 1 − Π_σ} already gives an infinite classical divergence`,
      'support condition',
    );
  }
  if (p.orthogonal) {
    return trivial(
      Infinity,
      `ρ and σ have orthogonal supports: Tr ρ Π_σ = ${p.inside.toExponential(3)} is within the support tolerance ${tol}`,
      'support condition',
    );
  }
  // Everything on supp σ, in σ's eigenbasis: σ_S = diag(s), ρ_S = V1* ρ V1 (normalised under inclusion).
  const m = p.s.length;
  const rc = compress(rho, V1);
  const scaleRho = 1 / (p.traceRho * (p.included ? p.inside : 1));
  const rhoS = zeros(m, m);
  for (let i = 0; i < m * m; i++) {
    rhoS.re[i] = rc.re[i] * scaleRho;
    rhoS.im[i] = rc.im[i] * scaleRho;
  }
  const sigmaS = zeros(m, m);
  for (let j = 0; j < m; j++) sigmaS.re[j * m + j] = p.s[j];
  // Start at H0 = α(log(ρ_S + δ) − log σ_S) with δ = 1e-3 λ_max(ρ): the optimum when ρ and σ commute
  // (ω ∝ (ρ/σ)^α), up to the shift that keeps H0 finite on ker ρ.
  const r = eigh(hermitianPart(rhoS), { vectors: true });
  const rmax = Math.max(...Array.from(r.values));
  const delta = 1e-3 * rmax;
  const logRho = mul(mul(r.vectors!, diagonalOf(Array.from(r.values, (v) => Math.log(Math.max(v, 0) + delta)))), adjoint(r.vectors!));
  for (let j = 0; j < m; j++) logRho.re[j * m + j] -= Math.log(p.s[j]);
  const H0 = toVector(hermitianPart(logRho)).map((v) => alpha * v);
  const beta = (alpha - 1) / alpha;
  const run = ascend(rhoS, sigmaS, beta, p.included, H0, maxIterations, gtol);
  const basis = mul(V1, run.cur.basis);
  const full = kernel.length ? hstack(basis, columns(p.sigma.vectors, kernel)) : basis;
  const { pr, qr } = probs(full);
  // The value of the measurement, from the outcomes on supp σ in the normalisation of ρ_S (the
  // leakage convention); the kernel outcomes are reported in p and q.
  const ps: number[] = [];
  const qs: number[] = [];
  const RY = mul(mul(adjoint(run.cur.basis), rhoS), run.cur.basis);
  for (let k = 0; k < m; k++) {
    ps.push(RY.re[k * m + k]);
    let b = 0;
    for (let j = 0; j < m; j++) b += p.s[j] * (run.cur.basis.re[j * m + k] ** 2 + run.cur.basis.im[j * m + k] ** 2);
    qs.push(b);
  }
  const classical = classicalDivergence(ps, qs, alpha, p.included);
  const result: MeasuredResult = {
    ...base,
    value: Math.max(classical, run.cur.f) / lb,
    measurement: full,
    p: pr,
    q: qr,
    objective: run.cur.f / lb,
    iterations: run.iterations,
    stoppingRule: run.stoppingRule,
    gradientNorm: Math.sqrt(dot(run.cur.grad, run.cur.grad)),
    finalChange: run.finalChange / lb,
  };
  if (p.rho.support.length < n) {
    result.notes = [
      'ρ is rank deficient: the supremum is approached as eigenvalues of ω go to 0 and is not attained; the value is that of the returned measurement, a lower bound on the measured divergence.',
    ];
  }
  return result;
}

function diagonalOf(v: number[]): CMatrix {
  const m = zeros(v.length, v.length);
  for (let i = 0; i < v.length; i++) m.re[i * v.length + i] = v[i];
  return m;
}

function hstack(a: CMatrix, b: CMatrix): CMatrix {
  const out = zeros(a.rows, a.cols + b.cols);
  const c = out.cols;
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      out.re[i * c + j] = a.re[i * a.cols + j];
      out.im[i * c + j] = a.im[i * a.cols + j];
    }
    for (let j = 0; j < b.cols; j++) {
      out.re[i * c + a.cols + j] = b.re[i * b.cols + j];
      out.im[i * c + a.cols + j] = b.im[i * b.cols + j];
    }
  }
  return out;
}
