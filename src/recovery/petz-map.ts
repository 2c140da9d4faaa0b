/**
 * The Petz recovery map of any positive σ and channel N, its rotated versions R^t, and the averaged
 * rotated map R̄ = ∫ β₀(t) R^t dt with β₀(t) = (π/2)(cosh(πt) + 1)⁻¹, as channels.
 *
 *   R_{σ,N}(X)   = σ^{1/2} N*(N(σ)^{−1/2} X N(σ)^{−1/2}) σ^{1/2}                    (Petz 1986, 1988)
 *   R^t_{σ,N}(X) = σ^{(1+it)/2} N*(N(σ)^{−(1+it)/2} X N(σ)^{−(1−it)/2}) σ^{(1−it)/2}
 *   R̄_{σ,N}      = ∫ β₀(t) R^t_{σ,N} dt        (Junge, Renner, Sutter, Wilde & Winter, Ann. Henri
 *                                               Poincaré 19, 2955 (2018), Eqs. (1.3)–(1.5))
 *
 * With Kraus operators K_k of N, R^t has the Kraus operators L_k^t = σ^{(1+it)/2} K_k* N(σ)^{−(1+it)/2}.
 * In the eigenbases σ = V_S diag(μ) V_S*, N(σ) = V_N diag(ν) V_N*, L_k^t = V_S (L̃_k ∘ e^{itθ}) V_N*
 * with L̃_k[a,c] = √μ_a (V_S* K_k* V_N)[a,c] / √ν_c and θ_ac = (ln μ_a − ln ν_c)/2 on the supports
 * (eigenvalues above tol·λ_max; pseudo-inverses, a tolerance-dependent decision whose ranks are
 * returned). So the Choi matrix of R^t is a fixed PSD matrix G Hadamard-multiplied by e^{itΔ}, Δ a
 * difference of two θ's, and R̄'s Choi matrix is G ∘ W with W(Δ) = ∫ β₀(t) e^{itΔ} dt: the averaging is
 * a quadrature of scalars, done here by the trapezoidal rule on the whole line, truncated.
 *
 * Error bound of the quadrature (reported): f(t) = β₀(t) e^{itΔ} is analytic in the strip |Im t| < 1
 * (β₀ has its poles at ±i), and ∫|f(x+ib)| dx = (πb / sin πb) e^{|Δ|b} (from |cosh(π(x+ib)/2)|² =
 * sinh²(πx/2) + cos²(πb/2) and ∫ dv/(cosh v + cos φ) = 2φ/sin φ; derived here). By the trapezoidal
 * rule's strip theorem (Trefethen & Weideman, SIAM Review 56, 385 (2014), Thm 5.1) the step-h sum
 * errs by at most 2M/(e^{2πb/h} − 1) for each b ∈ (0, 1); truncating at |t| ≤ T adds at most
 * 1 − tanh(πT/2) (β₀ decreases on t > 0 and ∫_T^∞ β₀ = (1 − tanh(πT/2))/2). With ε that bound at the
 * largest |Δ|, ‖J_quad − J̄‖_F ≤ ε‖G‖_F ≤ ε Tr G = ε·rank N(σ) (G is PSD, conjugation by V is unitary).
 * As a cross-check the answer also gives the largest deviation of the weights from the closed form
 * W(Δ) = Δ / sinh Δ (the Fourier transform of (π/4) sech²(πt/2); derived from the standard transform of
 * sech², recalled), which the quadrature never uses.
 *
 * Completion outside supp N(σ): R is trace preserving only on supp N(σ) (Σ L*L = Π_{supp N(σ)}).
 * With `complete` (the default) the Kraus operators √(μ_j/Tr σ) |w_j⟩⟨e_k| over the eigenpairs (μ_j, w_j)
 * of σ and an orthonormal basis e_k of ker N(σ) are added: X ↦ Tr(Q X) σ/Tr σ on the kernel projector Q,
 * making a channel that acts as the Petz map on every operator supported on supp N(σ) (so on N(ρ)
 * whenever supp ρ ⊆ supp σ). The completion does not depend on t, so R̄ carries the same one.
 *
 * Deliberately not here: data processing (data-processing.ts), the tripartite bookkeeping (petz.ts),
 * validation of the inputs (the ops layer).
 * Cost: two Hermitian eigendecompositions (d_in, d_out), per Kraus operator two products of size
 * d_in × d_out; the averaged map forms its (d_in d_out)² Choi matrix and one eigendecomposition of it.
 */
import {
  CMatrix, adjoint, columns, conjugate, eigh, hermitianPart, kron, mul, outer, scale, trace, zeros,
} from '../linalg/index.js';
import { zeroThreshold, DEFAULT_SUPPORT_TOLERANCE, type EighResult } from '../linalg/index.js';
import type { Channel } from '../quantum/types.js';
import { applyKraus, choiToKraus, inputDimension, krausToChoi, outputDimension } from '../quantum/channels.js';
import { RhoError } from '../errors.js';

/** Default target of the quadrature's error bound on each weight W(Δ). */
export const DEFAULT_QUADRATURE_TOLERANCE = 1e-13;

export interface PetzOptions {
  /** Relative tolerance below which an eigenvalue of σ or N(σ) counts as zero (default 1e-12). */
  tol?: number;
  /** Add the completion on ker N(σ), making the map trace preserving (default true). */
  complete?: boolean;
}

export interface PetzDiagnostics {
  /** Rank of σ and of N(σ) used. */
  rankSigma: number;
  rankImage: number;
  /** Smallest eigenvalue of N(σ) kept (the inverse square root scales errors by its −1/2 power). */
  smallestKeptImage: number;
  /** Dimension of ker N(σ), where the completion acts (0 when N(σ) has full rank). */
  kernelDimension: number;
  /** Whether the completion was added. */
  completed: boolean;
  supportTolerance: number;
}

/** The eigen-data shared by R, R^t and R̄ (see the header). */
export interface PetzFrame {
  vS: CMatrix;
  vN: CMatrix;
  /** ln μ_a on supp σ (NaN off it), ln ν_c on supp N(σ). */
  logMu: Float64Array;
  logNu: Float64Array;
  /** L̃_k (d_in × d_out), zero off the supports. */
  tilde: CMatrix[];
  /** Completion Kraus operators (empty when not completing or N(σ) has full rank). */
  completion: CMatrix[];
  dIn: number;
  dOut: number;
  fromDims: number[];
  toDims: number[];
  diagnostics: PetzDiagnostics;
}

function kept(e: EighResult, tol: number): boolean[] {
  const thr = zeroThreshold(e.values, tol);
  return Array.from(e.values, (v) => v > thr && v > 0);
}

/** The Petz frame of (σ, N): eigenbases, supports and the t-independent part of the Kraus operators. */
export function petzFrame(sigma: CMatrix, channel: Channel, options: PetzOptions = {}): PetzFrame {
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const complete = options.complete ?? true;
  const dIn = inputDimension(channel);
  const dOut = outputDimension(channel);
  if (sigma.rows !== dIn || sigma.cols !== dIn) {
    throw new RhoError('dimension-mismatch', `sigma is ${sigma.rows}x${sigma.cols} but the channel takes inputs of dimension ${dIn}.`, 'sigma');
  }
  const s = hermitianPart(sigma);
  const image = hermitianPart(applyKraus(channel, s));
  const eS = eigh(s, { vectors: true });
  const eN = eigh(image, { vectors: true });
  const inS = kept(eS, tol);
  const inN = kept(eN, tol);
  const logMu = Float64Array.from(eS.values, (v, a) => (inS[a] ? Math.log(v) : NaN));
  const logNu = Float64Array.from(eN.values, (v, c) => (inN[c] ? Math.log(v) : NaN));
  const vS = eS.vectors!;
  const vN = eN.vectors!;
  const tilde = channel.kraus.map((K) => {
    const m = mul(mul(adjoint(vS), adjoint(K)), vN); // V_S* K* V_N, d_in × d_out
    for (let a = 0; a < dIn; a++) {
      for (let c = 0; c < dOut; c++) {
        const p = a * dOut + c;
        const w = inS[a] && inN[c] ? Math.exp((logMu[a] - logNu[c]) / 2) : 0;
        m.re[p] *= w;
        m.im[p] *= w;
      }
    }
    return m;
  });
  const rankSigma = inS.filter(Boolean).length;
  const rankImage = inN.filter(Boolean).length;
  if (rankSigma === 0) throw new RhoError('invalid-argument', 'sigma is zero at the support tolerance; the Petz map needs σ ≠ 0.', 'sigma');
  const completion: CMatrix[] = [];
  const kernelDimension = dOut - rankImage;
  if (complete && kernelDimension > 0) {
    const trS = trace(s).re;
    eS.values.forEach((mu, j) => {
      if (!inS[j]) return;
      const w = columns(vS, [j]);
      inN.forEach((inside, k) => {
        if (!inside) completion.push(scale(outer(w, columns(vN, [k])), Math.sqrt(mu / trS)));
      });
    });
  }
  let smallest = Infinity;
  eN.values.forEach((v, c) => { if (inN[c]) smallest = Math.min(smallest, v); });
  return {
    vS, vN, logMu, logNu, tilde, completion, dIn, dOut,
    fromDims: [...channel.toDims],
    toDims: [...channel.fromDims],
    diagnostics: {
      rankSigma,
      rankImage,
      smallestKeptImage: rankImage > 0 ? smallest : 0,
      kernelDimension,
      completed: completion.length > 0,
      supportTolerance: tol,
    },
  };
}

export interface PetzMapResult {
  /** The map N's output → N's input, in Kraus form. */
  channel: Channel;
  diagnostics: PetzDiagnostics;
}

/** The rotated Petz map R^t_{σ,N} (t = 0: the Petz map) as Kraus operators L_k^t, plus the completion. */
export function rotatedPetzMap(sigma: CMatrix, channel: Channel, t = 0, options: PetzOptions = {}): PetzMapResult {
  const f = petzFrame(sigma, channel, options);
  return { channel: rotatedFromFrame(f, t), diagnostics: f.diagnostics };
}

/** R^t's Kraus operators from a frame. */
export function rotatedFromFrame(f: PetzFrame, t: number): Channel {
  const kraus = f.tilde.map((m) => {
    const r = zeros(f.dIn, f.dOut);
    for (let a = 0; a < f.dIn; a++) {
      for (let c = 0; c < f.dOut; c++) {
        const p = a * f.dOut + c;
        if (m.re[p] === 0 && m.im[p] === 0) continue;
        const ph = (t * (f.logMu[a] - f.logNu[c])) / 2;
        const cs = Math.cos(ph);
        const sn = Math.sin(ph);
        r.re[p] = m.re[p] * cs - m.im[p] * sn;
        r.im[p] = m.re[p] * sn + m.im[p] * cs;
      }
    }
    return mul(mul(f.vS, r), adjoint(f.vN));
  });
  return { kraus: [...kraus, ...f.completion], fromDims: [...f.fromDims], toDims: [...f.toDims] };
}

/** β₀(t) = (π/2)(cosh(πt) + 1)⁻¹ = (π/4) sech²(πt/2), a probability density on ℝ. */
export function beta0(t: number): number {
  const c = Math.cosh((Math.PI * t) / 2);
  return Math.PI / 4 / (c * c);
}

export interface QuadratureRule {
  /** Step h and the number of nodes on each side: nodes t_n = n h, |n| ≤ count. */
  step: number;
  count: number;
  /** The strip half-width b used in the bound. */
  strip: number;
  /** Bound on |Σ h β₀(t_n) e^{i t_n Δ} − ∫ β₀ e^{itΔ}| for every |Δ| ≤ spread. */
  errorBound: number;
  spread: number;
}

/** The trapezoidal error bound (header) for step h, strip b, truncation T and frequency bound Ω. */
export function trapezoidBound(h: number, b: number, T: number, omega: number): number {
  const M = ((Math.PI * b) / Math.sin(Math.PI * b)) * Math.exp(omega * b);
  const discretisation = (2 * M) / Math.expm1((2 * Math.PI * b) / h);
  const tail = 2 / (Math.exp(Math.PI * T) + 1); // 1 − tanh(πT/2)
  return discretisation + tail;
}

/**
 * The coarsest trapezoidal rule (over a grid of strips b) whose bound at the frequency bound Ω is at
 * most `target`: the tail fixes T, the discretisation part fixes h for each b.
 */
export function quadratureRule(omega: number, target: number): QuadratureRule {
  if (!(target > 0 && target < 1)) throw new RhoError('invalid-argument', `The quadrature tolerance must be in (0, 1) (got ${target}).`, 'quadratureTolerance');
  // Tail 2/(e^{πT}+1) ≤ target/2.
  const T = Math.log(4 / target) / Math.PI;
  let best: { h: number; b: number } | null = null;
  for (let k = 1; k < 40; k++) {
    const b = k / 40;
    const M = ((Math.PI * b) / Math.sin(Math.PI * b)) * Math.exp(omega * b);
    // 2M/(e^{2πb/h} − 1) ≤ target/2  ⇔  h ≤ 2πb / ln(1 + 4M/target).
    const h = (2 * Math.PI * b) / Math.log1p((4 * M) / target);
    if (!best || h > best.h) best = { h, b };
  }
  const count = Math.ceil(T / best!.h);
  return { step: best!.h, count, strip: best!.b, errorBound: trapezoidBound(best!.h, best!.b, count * best!.h, omega), spread: omega };
}

/** Σ_n h β₀(t_n) e^{i t_n Δ} (real: β₀ is even) for the rule. */
export function quadratureWeight(rule: QuadratureRule, delta: number): number {
  let s = beta0(0);
  for (let n = 1; n <= rule.count; n++) {
    const t = n * rule.step;
    s += 2 * beta0(t) * Math.cos(t * delta);
  }
  return s * rule.step;
}

/** The closed form ∫ β₀(t) e^{itΔ} dt = Δ / sinh Δ (header), used only as a cross-check. */
export function averagedWeightClosedForm(delta: number): number {
  const x = Math.abs(delta);
  if (x < 1e-4) return 1 - (x * x) / 6;
  if (x > 700) return 0;
  return x / Math.sinh(x);
}

export interface AveragedPetzResult {
  channel: Channel;
  /** The Choi matrix of R̄ (input first, as in the protocol). */
  choi: CMatrix;
  diagnostics: PetzDiagnostics;
  quadrature: QuadratureRule & {
    nodes: number;
    /** ‖J_quad − J̄‖_F ≤ errorBound · rank N(σ) (header). */
    choiFrobeniusBound: number;
    /** max |quadrature weight − Δ/sinh Δ| over the frequencies that occur (a cross-check, not a bound). */
    closedFormDeviation: number;
  };
}

/** The averaged rotated Petz map R̄_{σ,N} with its quadrature bound (header). */
export function averagedPetzMap(sigma: CMatrix, channel: Channel, options: PetzOptions & { quadratureTolerance?: number } = {}): AveragedPetzResult {
  const f = petzFrame(sigma, channel, options);
  const { dIn, dOut } = f;
  const finite = (x: Float64Array) => Array.from(x).filter((v) => !Number.isNaN(v));
  const mu = finite(f.logMu);
  const nu = finite(f.logNu);
  const spread = mu.length && nu.length ? (Math.max(...mu) - Math.min(...mu) + Math.max(...nu) - Math.min(...nu)) / 2 : 0;
  const rule = quadratureRule(spread, options.quadratureTolerance ?? DEFAULT_QUADRATURE_TOLERANCE);
  // J̃[(c,a),(c',a')] = Σ_k L̃_k[a,c] conj(L̃_k[a',c']) · W(θ_ac − θ_a'c'); indices (c, a) ↦ c·d_in + a.
  const n = dIn * dOut;
  const Jt = zeros(n, n);
  const theta = new Float64Array(n);
  const live: number[] = [];
  for (let c = 0; c < dOut; c++) {
    for (let a = 0; a < dIn; a++) {
      const p = c * dIn + a;
      theta[p] = (f.logMu[a] - f.logNu[c]) / 2;
      if (!Number.isNaN(theta[p])) live.push(p);
    }
  }
  const cache = new Map<number, number>();
  let deviation = 0;
  const weight = (delta: number) => {
    const key = Math.round(delta * 1e12) / 1e12;
    let w = cache.get(key);
    if (w === undefined) {
      w = quadratureWeight(rule, key);
      deviation = Math.max(deviation, Math.abs(w - averagedWeightClosedForm(key)));
      cache.set(key, w);
    }
    return w;
  };
  for (const m of f.tilde) {
    for (const p of live) {
      const a = p % dIn;
      const c = (p - a) / dIn;
      const xr = m.re[a * dOut + c];
      const xi = m.im[a * dOut + c];
      if (xr === 0 && xi === 0) continue;
      for (const q of live) {
        const a2 = q % dIn;
        const c2 = (q - a2) / dIn;
        const yr = m.re[a2 * dOut + c2];
        const yi = m.im[a2 * dOut + c2];
        Jt.re[p * n + q] += xr * yr + xi * yi;
        Jt.im[p * n + q] += xi * yr - xr * yi;
      }
    }
  }
  for (const p of live) {
    for (const q of live) {
      const k = p * n + q;
      if (Jt.re[k] === 0 && Jt.im[k] === 0) continue;
      const w = weight(theta[p] - theta[q]);
      Jt.re[k] *= w;
      Jt.im[k] *= w;
    }
  }
  const U = kron(conjugate(f.vN), f.vS);
  let choi = hermitianPart(mul(mul(U, Jt), adjoint(U)));
  if (f.completion.length) {
    const c = krausToChoi({ kraus: f.completion, fromDims: f.fromDims, toDims: f.toDims });
    choi = { ...choi, re: choi.re.map((x, k) => x + c.re[k]), im: choi.im.map((x, k) => x + c.im[k]) };
  }
  // The trapezoidal weights Σ h β₀(t_n) e^{i t_n Δ} are a positive combination of characters, so
  // [W(θ_p − θ_q)] is PSD and G ∘ W is PSD (Schur product theorem): J is a CP map's Choi matrix up to
  // rounding. The Kraus reading drops eigenvalues at or below 1e-12 of the largest.
  const kraus = choiToKraus(choi, f.fromDims, f.toDims, 1e-12);
  return {
    channel: kraus,
    choi,
    diagnostics: f.diagnostics,
    quadrature: {
      ...rule,
      nodes: 2 * rule.count + 1,
      choiFrobeniusBound: rule.errorBound * f.diagnostics.rankImage,
      closedFormDeviation: deviation,
    },
  };
}
