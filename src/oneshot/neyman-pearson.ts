/**
 * The optimal type-II error of quantum hypothesis testing through its one-dimensional dual (the
 * quantum Neyman–Pearson lemma; for the SDP duality see e.g. Dupuis, Kraemer, Faist, Renes & Renner,
 * "Generalized entropies", 2012, and Tomamichel, "Quantum Information Processing with Finite
 * Resources", 2016, Sec. 6.2 — attributions recalled from memory):
 *
 *   β_ε(ρ‖σ) = min { Tr σΛ : 0 ⪯ Λ ⪯ I, Tr ρΛ ≥ 1 − ε }
 *            = max_{μ ≥ 0} g(μ),   g(μ) = μ(1 − ε) − Tr(μρ − σ)₊,
 *
 * g concave, each evaluation one eigendecomposition of μρ − σ. Every μ ≥ 0 is dual feasible, so g(μ)
 * is a lower bound; an optimal test is the projector onto the positive part of μ*ρ − σ plus a
 * fraction of the eigenvectors at its boundary. Written for the complement M = I − Λ the same problem
 * reads β^c = Tr σ − β = max { Tr σM : 0 ⪯ M ⪯ I, Tr ρM ≤ ε } ≤ ψ(μ) = με + Tr(σ − μρ)₊, which keeps
 * the relative accuracy of β^c when it is the small part (ε → 0): the answer is carried in whichever of
 * β, β^c is smaller.
 *
 * THE SEARCH. The slope g'(μ) = (1 − ε) − f(μ), f(μ) = Tr ρP₊(μ) (Hellmann–Feynman), is
 * nonincreasing; the eigenvalues of μρ − σ are nondecreasing in μ (Weyl), so the number k(μ) of
 * positive ones only grows, and f jumps exactly where one of them crosses zero. A bracket [lo, hi]
 * with g'(lo) > 0 ≥ g'(hi) is shrunk by a secant step on g' when k(lo) = k(hi) (g smooth there:
 * superlinear) and by the intersection of the tangents of g at lo and hi when an eigenvalue crosses
 * inside (g has a kink there, the tangent intersection converges quadratically to it), bisection as
 * the safeguard. It stops when the primal test built at hi and the best dual point seen agree to
 * `tolerance` relative to the small part. Both ends of ε come out exact: for ε → 1 the root is the
 * first crossing, μ* = 1/λ_max(σ^(−1/2)ρσ^(−1/2)), and the test is rank one; for ε → 0 with ρ of full
 * rank it is the last crossing, μ* = λ_max(ρ^(−1/2)σρ^(−1/2)), and the rejection is rank one.
 *
 * Deliberately not here: the support decision (β = 0 when the kernel of σ carries 1 − ε of ρ) and the
 * logarithm (hypothesis-testing.ts); ρ is taken as a density matrix, σ ⪰ 0 of unit trace.
 * Cost: per evaluation one d×d eigendecomposition with vectors and the diagonal of V*ρV (d³/2 complex
 * multiply-adds); typically 5–10 evaluations; then the test, d²k/2.
 */
import { eigh, zeros, type CMatrix } from '../linalg/index.js';
import { columnQuadraticForms, isPositiveDefiniteCombination, weightedColumnGram } from '../linalg/dense-complex.js';
import { eigenvalueAllowance, roundingPad } from '../sdp/support.js';
import { checkDeadline } from '../deadline.js';

/** One evaluation of the dual at μ. */
export interface DualEvaluation {
  mu: number;
  /** Eigenvalues of μρ − σ (ascending) and eigenvectors (columns). */
  values: Float64Array;
  vectors: CMatrix;
  /** w_i = v_i* ρ v_i. */
  w: Float64Array;
  /** Number of positive eigenvalues (the last `positive` ones). */
  positive: number;
  /** Σ w over positive, over nonpositive eigenvalues; Σ λ₊, Σ |λ₋|. */
  fPlus: number;
  fMinus: number;
  phiPlus: number;
  phiMinus: number;
  /** g'(μ), computed from the side that is small (f₋ − ε for ε < ½, else (1 − ε) − f₊). */
  slope: number;
  /** Rounding allowance of one eigenvalue of μρ − σ (support.ts, eigenvalueAllowance). */
  eigPad: number;
}

export interface NeymanPearsonDual {
  /** Whether the answer is carried by β (false) or by its complement β^c = Tr σ − β (true). */
  complement: boolean;
  /** β and β^c of the returned test (σ as given: unit trace). */
  beta: number;
  betaComplement: number;
  /** The optimal test Λ and its complement M = I − Λ (both d×d). */
  test: CMatrix;
  rejection: CMatrix;
  /** Tr ρΛ of the test (1 − ε up to rounding). */
  acceptance: number;
  /** The dual point μ*, and its certified bound: g(μ*) ≤ β (or ψ(μ*) ≥ β^c), padded for rounding. */
  mu: number;
  dualBound: number;
  /** The primal objective of the test: β (or β^c), and the certified bracket of the small part. */
  primalValue: number;
  /** Bracket of β (complement false) or of β^c (complement true), padded. */
  bracket: { lower: number; upper: number };
  evaluations: number;
}

export interface NeymanPearsonOptions {
  /** Relative gap (to the small part) at which the search stops. Default 1e-12. */
  tolerance?: number;
  /** Most evaluations (default 80). */
  maxEvaluations?: number;
}

const U = 1.1102230246251565e-16;

/** The dual at μ for ρ and σ (see DualEvaluation). */
export function evaluateDual(rho: CMatrix, sigma: CMatrix, epsilon: number, mu: number): DualEvaluation {
  const d = rho.rows;
  const a = zeros(d, d);
  let f2 = 0;
  for (let k = 0; k < d * d; k++) {
    a.re[k] = mu * rho.re[k] - sigma.re[k];
    a.im[k] = mu * rho.im[k] - sigma.im[k];
    f2 += a.re[k] * a.re[k] + a.im[k] * a.im[k];
  }
  const { values, vectors } = eigh(a, { vectors: true });
  const w = columnQuadraticForms(rho, vectors!);
  let positive = 0;
  let fPlus = 0;
  let fMinus = 0;
  let phiPlus = 0;
  let phiMinus = 0;
  for (let i = 0; i < d; i++) {
    if (values[i] > 0) {
      positive++;
      fPlus += w[i];
      phiPlus += values[i];
    } else {
      fMinus += w[i];
      phiMinus -= values[i];
    }
  }
  const slope = epsilon < 0.5 ? fMinus - epsilon : 1 - epsilon - fPlus;
  return { mu, values, vectors: vectors!, w, positive, fPlus, fMinus, phiPlus, phiMinus, slope, eigPad: eigenvalueAllowance(d, Math.sqrt(f2)) };
}

/**
 * Certified dual bounds at one evaluation: lowerBeta ≤ β (g(μ) with every eigenvalue raised by its
 * rounding allowance) and upperComplement ≥ β^c (ψ(μ), eigenvalues lowered), each exact (no allowance)
 * when a Cholesky factorization shows μρ − σ negative (resp. positive) definite by more than the
 * allowance.
 */
export function dualBounds(e: DualEvaluation, epsilon: number, rho: CMatrix, sigma: CMatrix): { lowerBeta: number; upperComplement: number } {
  const d = e.values.length;
  let plus = 0;
  let minus = 0;
  // Each eigenvalue moved by TWICE its allowance: the bound then holds for any eigensolver whose values are
  // within one allowance of ours (the numpy checker recomputes it with one).
  const pad = 2 * e.eigPad;
  for (let i = 0; i < d; i++) {
    plus += Math.max(0, e.values[i] + pad);
    minus += Math.max(0, -e.values[i] + pad);
  }
  // λ_min(σ − μρ) > twice the allowance (Cholesky): (μρ − σ)₊ = 0 exactly; likewise for (σ − μρ)₊.
  if (e.positive === 0 && isPositiveDefiniteCombination(sigma, rho, -e.mu, pad)) plus = 0;
  if (e.positive === d && isPositiveDefiniteCombination(rho, sigma, -1 / e.mu, pad / e.mu)) minus = 0;
  return { lowerBeta: e.mu * (1 - epsilon) - plus, upperComplement: e.mu * epsilon + minus };
}

/**
 * The test at an evaluation: eigenvectors of μρ − σ taken from the top of the spectrum (for ε < ½:
 * rejected from the bottom) until the acceptance Tr ρΛ reaches its target (1 − ε)(1 + κ) exactly (the
 * rejection Tr ρM its target ε(1 − κ)), the last one fractionally; the slack κ of a few d·u keeps
 * rounding in Tr ρΛ from putting it below 1 − ε. The weights are computed from the side that is small
 * (c_i for Λ = Σ c_i v_i v_i*, r_i = 1 − c_i for M = Σ r_i v_i v_i*), so that a test of acceptance 1e-12
 * or a rejection of 1e-12 keeps its relative accuracy. `gap`: Σ |c_i − [λ_i > 0]|·|λ_i|, the gap of
 * that test to g(μ).
 */
function boundaryWeights(e: DualEvaluation, epsilon: number): { keep: Float64Array; reject: Float64Array; gap: number } {
  const d = e.values.length;
  const kappa = 16 * d * U;
  const keep = new Float64Array(d);
  const reject = new Float64Array(d);
  if (epsilon >= 0.5) {
    const target = (1 - epsilon) * (1 + kappa);
    let acc = 0;
    for (let i = d - 1; i >= 0; i--) {
      const wi = e.w[i];
      if (acc + wi <= target) {
        keep[i] = 1;
        acc += wi;
      } else {
        keep[i] = wi > 0 ? (target - acc) / wi : 0;
        break;
      }
    }
    for (let i = 0; i < d; i++) reject[i] = 1 - keep[i];
  } else {
    const target = epsilon * (1 - kappa);
    let rej = 0;
    for (let i = 0; i < d; i++) {
      const wi = e.w[i];
      if (rej + wi <= target) {
        reject[i] = 1;
        rej += wi;
      } else {
        reject[i] = wi > 0 ? (target - rej) / wi : 0;
        break;
      }
    }
    for (let i = 0; i < d; i++) keep[i] = 1 - reject[i];
  }
  let gap = 0;
  for (let i = 0; i < d; i++) gap += e.values[i] > 0 ? reject[i] * e.values[i] : -keep[i] * e.values[i];
  return { keep, reject, gap };
}

/**
 * The root of the linearized model at an evaluation: every eigenvalue moved at its own rate,
 * λ_i(μ) ≈ λ_i + (μ − μ₀)w_i (first-order perturbation, exact when ρ and σ commute), crosses zero at
 * c_i = μ₀ − λ_i/w_i; the model's f(μ) = Σ_{c_i < μ} w_i reaches 1 − ε at the crossing returned.
 */
function modelRoot(e: DualEvaluation, epsilon: number): number {
  const d = e.values.length;
  const cross: { c: number; w: number }[] = [];
  let base = 0;
  for (let i = 0; i < d; i++) {
    const wi = e.w[i];
    if (!(wi > 0)) continue;
    const c = e.mu - e.values[i] / wi;
    if (c <= 0) base += wi; // positive for every μ > 0 in the model
    else cross.push({ c, w: wi });
  }
  cross.sort((a, b) => a.c - b.c);
  let acc = base;
  for (const { c, w } of cross) {
    acc += w;
    if (acc >= 1 - epsilon) return c;
  }
  return Infinity;
}

/** Σ_jk |M_jk|·|v_j|·|v_k| for the column `col` of V: the scale of the rounding of v*Mv. */
function absoluteForm(m: CMatrix, v: CMatrix, col: number): number {
  const d = m.rows;
  const a = new Float64Array(d);
  for (let j = 0; j < d; j++) a[j] = Math.hypot(v.re[j * d + col], v.im[j * d + col]);
  let s = 0;
  for (let j = 0; j < d; j++) {
    if (a[j] === 0) continue;
    let row = 0;
    for (let k = 0; k < d; k++) row += Math.hypot(m.re[j * d + k], m.im[j * d + k]) * a[k];
    s += a[j] * row;
  }
  return s;
}

/** ‖V_SᴴV_S − I‖_F over the columns S of V (how far the computed eigenvectors are from orthonormal). */
function orthonormalityDefect(v: CMatrix, cols: number[]): number {
  const d = v.rows;
  let f2 = 0;
  for (const a of cols) {
    for (const b of cols) {
      let re = 0;
      let im = 0;
      for (let j = 0; j < d; j++) {
        const ar = v.re[j * d + a];
        const ai = v.im[j * d + a];
        const br = v.re[j * d + b];
        const bi = v.im[j * d + b];
        re += ar * br + ai * bi;
        im += ar * bi - ai * br;
      }
      if (a === b) re -= 1;
      f2 += re * re + im * im;
    }
  }
  return Math.sqrt(f2);
}

/**
 * β_ε(ρ‖σ) by the one-dimensional dual (see the header), for ρ a density matrix and σ ⪰ 0 of unit
 * trace, 0 < ε < 1, and not the β = 0 case (the kernel of σ carries less than 1 − ε of ρ).
 */
export function neymanPearsonDual(rho: CMatrix, sigma: CMatrix, epsilon: number, options: NeymanPearsonOptions = {}): NeymanPearsonDual {
  const d = rho.rows;
  const tol = options.tolerance ?? 1e-12;
  const maxEval = options.maxEvaluations ?? 80;
  let evaluations = 0;
  const evaluate = (mu: number): DualEvaluation => {
    checkDeadline('the Neyman–Pearson search for the hypothesis-testing relative entropy', () => ({
      evaluations,
      ...(br.lo ? { lowerMultiplier: br.lo.mu } : {}),
      ...(br.hi ? { upperMultiplier: br.hi.mu } : {}),
    }));
    evaluations++;
    return evaluateDual(rho, sigma, epsilon, mu);
  };
  const br: { lo: DualEvaluation | null; hi: DualEvaluation | null } = { lo: null, hi: null };
  const place = (e: DualEvaluation): void => {
    if (e.slope > 0) {
      if (!br.lo || e.mu > br.lo.mu) br.lo = e;
    } else if (!br.hi || e.mu < br.hi.mu) br.hi = e;
  };
  // Bracket: start at μ = 1 (unit traces) and step towards the root, to the larger (smaller) of the
  // linearized model's root (modelRoot) and the secant extrapolation of g' through the last two
  // points, at least ×2 and at most ×10⁴ per step, until both sides are found.
  let last = evaluate(1);
  place(last);
  let recent: [DualEvaluation, DualEvaluation] = [last, last];
  while ((!br.lo || !br.hi) && evaluations < maxEval) {
    const up = !br.hi;
    const [p, q] = recent;
    const model = modelRoot(last, epsilon);
    const secant = p !== q && p.slope !== q.slope ? q.mu - (q.slope * (q.mu - p.mu)) / (q.slope - p.slope) : NaN;
    let mu = up ? last.mu * 2 : last.mu / 2;
    for (const c of [model, secant]) if (Number.isFinite(c) && (up ? c > mu : c > 0 && c < mu)) mu = c;
    mu = up ? Math.min(mu * (1 + 1e-9), last.mu * 1e4) : Math.max(mu * (1 - 1e-9), last.mu / 1e4);
    last = evaluate(mu);
    place(last);
    recent = [recent[1], last];
  }
  if (!br.lo || !br.hi) throw new Error('neymanPearsonDual: no bracket (β = 0 case not excluded?)');

  // Dual bookkeeping: every evaluation is a dual point; the raw values (eigenvalues as computed) steer
  // the stopping test, the certified bounds (dualBounds, with a Cholesky factorization where it makes
  // a bound exact) are computed at the end for the best few.
  let rawLower = -Infinity;
  let rawUpper = Infinity;
  const seen: DualEvaluation[] = [];
  const consider = (e: DualEvaluation): void => {
    rawLower = Math.max(rawLower, e.mu * (1 - epsilon) - e.phiPlus);
    rawUpper = Math.min(rawUpper, e.mu * epsilon + e.phiMinus);
    seen.push(e);
  };
  consider(br.lo);
  consider(br.hi);

  let lastWidth = Infinity;
  let stalls = 0;
  // How many evaluations in a row kept L (resp. H) as an end (the other end moved): Illinois.
  let keptL = 0;
  let keptH = 0;
  // Relative distance of a mirrored step: far enough from the root for a certified sign.
  const jump = Math.max(64 * d * U, 1e-13);
  while (evaluations < maxEval) {
    const L = br.lo!;
    const H = br.hi!;
    // The test built at H is the primal: β = g(H) + gap, β^c = ψ(H) − gap (unit traces).
    const { gap } = boundaryWeights(H, epsilon);
    const beta = H.mu * (1 - epsilon) - H.phiPlus + gap;
    const betaC = H.mu * epsilon + H.phiMinus - gap;
    const dualGap = beta <= betaC ? beta - rawLower : rawUpper - betaC;
    if (dualGap <= tol * Math.min(beta, betaC)) break;
    if (H.mu - L.mu <= 4 * U * H.mu) break;
    let mu: number;
    const sL = L.slope;
    const sH = H.slope;
    if (H.positive === L.positive + 1) {
      // One crossing inside: the eigenvalue that crosses is the smallest positive one at H; it crosses
      // zero near c = μ_H − λ_j/w_j (Newton with the Hellmann–Feynman derivative, quadratic): go just
      // above c, and once H sits there, just below it. Otherwise the tangents of g at L and H
      // intersect at the kink (also quadratic, within the rounding of g's values).
      // Newton from the end nearer its own estimate: an end far from the root (the bracket's first
      // upper end may sit 10³× above it) linearizes badly, and its estimate could land just beside the
      // other end again and again, creeping by one jump per evaluation.
      const j = d - H.positive;
      const jl = d - L.positive - 1;
      const cH = H.w[j] > 0 ? H.mu - H.values[j] / H.w[j] : NaN;
      const cL = L.w[jl] > 0 ? L.mu - L.values[jl] / L.w[jl] : NaN;
      const c = Number.isFinite(cL) && (!Number.isFinite(cH) || Math.abs(cL - L.mu) < Math.abs(H.mu - cH)) ? cL : cH;
      if (c > L.mu && c < H.mu) mu = H.mu - c <= 2 * jump * H.mu ? c * (1 - jump) : c * (1 + jump);
      else {
        const gL = L.mu * (1 - epsilon) - L.phiPlus;
        const gH = H.mu * (1 - epsilon) - H.phiPlus;
        mu = (gH - gL + sL * L.mu - sH * H.mu) / (sL - sH);
      }
    } else {
      // No crossing (g smooth in [L, H]) or several (g has many small kinks, smooth at the scale of
      // the bracket): regula falsi on g' between L and H with the Illinois modification (the slope of
      // an end kept twice in a row is halved), superlinear and never stuck at one end.
      const wL = keptL >= 2 ? sL / 2 ** (keptL - 1) : sL;
      const wH = keptH >= 2 ? sH / 2 ** (keptH - 1) : sH;
      mu = L.mu + (wL * (H.mu - L.mu)) / (wL - wH);
      if (H.mu / L.mu > 16) mu = Math.min(Math.max(mu, L.mu * 1.5), H.mu / 1.5); // far apart: not too close to an end
    }
    const width = H.mu - L.mu;
    const singleCrossing = H.positive === L.positive + 1;
    // A single crossing converges quadratically until both ends sit one jump from it; from then on the
    // width stops halving and the rounding of the eigenvalues decides: halve the bracket.
    if (width > 0.5 * lastWidth && (!singleCrossing || width <= 4 * jump * H.mu)) stalls++;
    else stalls = 0;
    lastWidth = width;
    // A proposal next to one end (the tangents meet at the crossing once H sits on it; a secant
    // converging from one side) is mirrored just across the estimated root, so that both ends close in.
    const close = 1e-12 * H.mu;
    if (Number.isFinite(mu) && mu > L.mu - close && mu < H.mu + close) {
      if (H.mu - mu <= close) mu = Math.min(mu, H.mu) * (1 - jump);
      else if (mu - L.mu <= close) mu = Math.max(mu, L.mu) * (1 + jump);
    }
    const inside = mu > L.mu && mu < H.mu;
    if (!Number.isFinite(mu) || !inside || stalls >= 3) {
      mu = H.mu / L.mu > 4 ? Math.sqrt(H.mu * L.mu) : 0.5 * (L.mu + H.mu);
      stalls = 0;
    }
    const e = evaluate(mu);
    if (e.slope > 0) {
      keptH++;
      keptL = 0;
    } else {
      keptL++;
      keptH = 0;
    }
    place(e);
    consider(e);
  }

  // At a crossing the dual is best just below it (ε ≥ ½: no positive eigenvalue, g exact) or just
  // above it (ε < ½: none negative, ψ exact): try points a few allowances away from the crossing.
  const L = br.lo!;
  const H = br.hi!;
  if (L.positive < H.positive) {
    // The margin makes λ_min(σ − μρ) (resp. λ_min(μρ − σ)) a few allowances positive: the eigenvalue
    // that crosses moves at the rate w_j = v_j*ρv_j (Hellmann–Feynman).
    const wj = Math.max(H.w[d - H.positive], L.w[d - L.positive - 1], 1e-300);
    const margin = Math.min(1e-3, Math.max(1e-13, (8 * H.eigPad) / (H.mu * wj)));
    consider(evaluate(L.mu * (1 - margin)));
    consider(evaluate(H.mu * (1 + margin)));
  }
  const best = { lowerBeta: -Infinity, upperComplement: Infinity, muLower: 0, muUpper: 0 };
  const byLower = [...seen].sort((x, y) => (y.mu * (1 - epsilon) - y.phiPlus) - (x.mu * (1 - epsilon) - x.phiPlus)).slice(0, 3);
  const byUpper = [...seen].sort((x, y) => (x.mu * epsilon + x.phiMinus) - (y.mu * epsilon + y.phiMinus)).slice(0, 3);
  for (const e of new Set([...byLower, ...byUpper, ...seen.slice(-2)])) {
    const b = dualBounds(e, epsilon, rho, sigma);
    if (b.lowerBeta > best.lowerBeta) {
      best.lowerBeta = b.lowerBeta;
      best.muLower = e.mu;
    }
    if (b.upperComplement < best.upperComplement) {
      best.upperComplement = b.upperComplement;
      best.muUpper = e.mu;
    }
  }

  const { keep: kw, reject: rw } = boundaryWeights(H, epsilon);
  const keepCols: number[] = [];
  const keepW: number[] = [];
  const rejectCols: number[] = [];
  const rejectW: number[] = [];
  for (let i = 0; i < d; i++) {
    if (kw[i] > 0) {
      keepCols.push(i);
      keepW.push(kw[i]);
    }
    if (rw[i] > 0) {
      rejectCols.push(i);
      rejectW.push(rw[i]);
    }
  }
  const qs = columnQuadraticForms(sigma, H.vectors);
  let beta = 0;
  let betaC = 0;
  let acceptance = 0;
  let rejection = 0;
  for (let i = 0; i < d; i++) {
    beta += kw[i] * qs[i];
    betaC += rw[i] * qs[i];
    acceptance += kw[i] * H.w[i];
    rejection += rw[i] * H.w[i];
  }
  const test = weightedColumnGram(H.vectors, keepCols, keepW);
  const rej = weightedColumnGram(H.vectors, rejectCols, rejectW);
  const complement = betaC < beta;
  // The primal end of the bracket is the value of the returned test, which was computed in floating
  // point; what it certifies must hold for the exact test. Running error bounds (common practice in
  // error analysis, Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed., §3.1):
  //   - a quadratic form v*Mv summed over d² products errs by at most c·u·Σ|M_jk||v_j||v_k| (here c
  //     also covers the one rounding of the input's normalization); when v*Mv cancels (a test that
  //     σ nearly misses, β ~ 1e-8) this is far above c·u·|v*Mv|;
  //   - computed eigenvectors are orthonormal to ‖VᴴV − I‖_F =: η, so the test divided by 1 + η lies
  //     in [0, I];
  //   - a test that misses the acceptance by Δ is fixed by moving ε by Δ, which changes the optimum
  //     by at most μ*·Δ (β_ε is convex in ε with slope −μ*, and μ* ≤ the bracket's upper end).
  const weights = complement ? rw : kw;
  const cols = complement ? rejectCols : keepCols;
  const cu = (2 * d + 8) * U;
  let errS = 0;
  let errR = 0;
  for (const i of cols) {
    errS += weights[i] * absoluteForm(sigma, H.vectors, i);
    errR += weights[i] * absoluteForm(rho, H.vectors, i);
  }
  errS *= cu;
  errR *= cu;
  const eta = orthonormalityDefect(H.vectors, cols) + d * U;
  const muMax = Math.max(H.mu, best.muLower, best.muUpper);
  const pad = roundingPad(d * d, complement ? betaC : beta) + errS;
  const bracket = complement
    ? {
      lower: Math.max(0, betaC - pad - eta * betaC - muMax * Math.max(0, rejection + errR - epsilon)),
      upper: best.upperComplement,
    }
    : {
      lower: Math.max(0, best.lowerBeta),
      upper: beta + pad + muMax * Math.max(0, 1 - epsilon - (acceptance - errR - eta * acceptance)),
    };
  return {
    complement,
    beta,
    betaComplement: betaC,
    test,
    rejection: rej,
    acceptance: epsilon < 0.5 ? 1 - rejection : acceptance,
    mu: complement ? best.muUpper : best.muLower,
    dualBound: complement ? best.upperComplement : best.lowerBeta,
    primalValue: complement ? betaC : beta,
    bracket,
    evaluations,
  };
}
