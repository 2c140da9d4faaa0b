/**
 * Quantum relative entropies and Rényi divergences D(ρ‖σ) of a density matrix ρ from a positive
 * semidefinite σ (σ may have any trace; the trade uses unnormalised σ, e.g. I_A ⊗ ρ_B):
 *
 *  - Umegaki                D(ρ‖σ) = Tr ρ (log ρ − log σ)
 *  - Petz–Rényi             D̄_α = log(Tr ρ^α σ^{1−α})/(α−1),            α ∈ [0, ∞); α=0: D_min, α=1: Umegaki
 *  - sandwiched Rényi       D̃_α = log Tr (σ^{(1−α)/2α} ρ σ^{(1−α)/2α})^α/(α−1),  α ∈ [1/2, ∞]; α=∞: D_max
 *    (Müller-Lennert, Dupuis, Szehr, Fehr & Tomamichel 2013; Wilde, Winter & Yang 2014)
 *  - α-z Rényi              D_{α,z} = log Tr (σ^{(1−α)/2z} ρ^{α/z} σ^{(1−α)/2z})^z/(α−1),  α, z > 0
 *    with the flag `dataProcessing` for Zhang's region (H. Zhang, "From WYD-like inequality to Rényi
 *    relative entropies and their data processing inequalities", Adv. Math. 365 (2020) 107053):
 *    0<α<1 with z ≥ max(α, 1−α), or α>1 with max(α/2, α−1) ≤ z ≤ α.
 *  - geometric (Matsumoto's maximal) D̂_α = log Tr σ (σ^{-1/2} ρ σ^{-1/2})^α/(α−1), α ∈ (0, 2];
 *    α → 1: Belavkin–Staszewski D_BS = Tr ρ log(ρ^{1/2} σ^{-1} ρ^{1/2})
 *  - max-relative entropy   D_max = log ‖σ^{-1/2} ρ σ^{-1/2}‖_∞ (Datta 2009)
 *  - min-relative entropy   D_min = −log Tr Π_ρ σ (Datta 2009)
 *  - measured relative entropy: see measured-relative-entropy.ts.
 *
 * Support conventions (see divergence-kit.ts for the tolerance rule):
 *  - α ≥ 1 families (Umegaki, Petz/sandwiched/α-z with α > 1, geometric with α ≥ 1, D_max): +∞
 *    unless supp ρ ⊆ supp σ; negative powers of σ are taken on its support.
 *  - α < 1 families: +∞ only when ρ ⊥ σ; powers of σ are positive, taken on its support.
 *  - geometric with α < 1 when supp ρ ⊄ supp σ: we compute the limit ε → 0 of the quantity for
 *    σ + ε1 (the weighted geometric mean σ #_α ρ of positive semidefinite operators in the sense of
 *    Kubo and Ando). That limit replaces ρ by its shorted operator to supp σ,
 *    ρ_M = ρ_11 − ρ_12 ρ_22^+ ρ_21 in the block form of supp σ ⊕ ker σ (Anderson & Trapp's
 *    generalised Schur complement); test/quantities/divergence-geometric.test.ts checks it against the
 *    regularised formula. The diagnostic `shortedTrace` = Tr ρ_M reports how much of ρ survives.
 *  - Under a decided inclusion, the leakage Tr ρ(1 − Π_σ) (at most tol) is dropped, i.e. ρ is
 *    replaced by Π_σ ρ Π_σ / Tr Π_σ ρ; this keeps α → 1 continuous. `leakage` reports it.
 *
 * Continuity in α: at α = 1 each family returns Umegaki (geometric: Belavkin–Staszewski). Near 1 the
 * numerators are written as sums of expm1 terms that are O(α−1) without cancellation
 * (Petz: Σ w_ij expm1((α−1)(ln r_i − ln s_j)); sandwiched: Tr ρ(σ^{(1−α)/α} − 1) + Σ μ(μ^{α−1} − 1);
 * geometric: Σ c_k g_k expm1((α−1) ln g_k); α-z: Tr ρ^α − 1 plus a Gauss–Legendre integral of the
 * Fréchet derivative of x^z along the segment from ρ^{α/z} to ρ^{α/2z}σ^{(1−α)/z}ρ^{α/2z}), so the
 * divergences join Umegaki to near machine precision from both sides.
 *
 * ρ is divided by its trace (the ops layer has checked the trace is 1). Deliberately not here:
 * validation of inputs, hypothesis-testing divergence (an SDP; the sdp helper adds it).
 * Cost: two eigendecompositions and a few n^3 products per value; α-z near α = 1 does 8 more.
 */
import { CMatrix, zeros, adjoint, mul, hermitianPart } from '../linalg/cmatrix.js';
import { eigvalsh, eigh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import {
  analysePair, PairAnalysis, columns, compress, scaleRowsCols, spectral, logSumExp, logOfBase, checkOrder,
  GAUSS_LEGENDRE_01,
} from './divergence-kit.js';
import { measuredRelativeEntropy, MeasuredOptions } from './measured-relative-entropy.js';

export type DivergenceFamily = 'umegaki' | 'petz' | 'sandwiched' | 'alpha-z' | 'geometric' | 'max' | 'min' | 'measured';

export const DIVERGENCE_FAMILIES: readonly DivergenceFamily[] = [
  'umegaki', 'petz', 'sandwiched', 'alpha-z', 'geometric', 'max', 'min', 'measured',
];

export interface DivergenceOptions {
  /** Logarithm base (default 2). */
  base?: number;
  /** Relative support tolerance (default DEFAULT_SUPPORT_TOLERANCE = 1e-12). */
  tol?: number;
}

export interface DivergenceResult {
  value: number;
  /** Why the value is infinite (present only then). */
  reason?: string;
  family: DivergenceFamily | 'belavkin-staszewski';
  alpha?: number;
  z?: number;
  base: number;
  tolerance: number;
  /** supp ρ ⊆ supp σ as decided with the tolerance. */
  supportIncluded: boolean;
  /** ρ ⊥ σ as decided with the tolerance. */
  supportsOrthogonal: boolean;
  /** Tr ρ (1 − Π_σ) with ρ of unit trace. */
  leakage: number;
  rankRho: number;
  rankSigma: number;
  /** α-z only: (α, z) lies in Zhang's (2020) data-processing region. */
  dataProcessing?: boolean;
  /** Anything a reader should know about how the value was obtained. */
  notes?: string[];
  [extra: string]: unknown;
}

const NOT_INCLUDED = (p: PairAnalysis) =>
  `supp ρ is not contained in supp σ: Tr ρ(1 − Π_σ) = ${p.leakage.toExponential(3)} exceeds the support tolerance ${p.tolerance}`;
const ORTHOGONAL = (p: PairAnalysis) =>
  `ρ and σ have orthogonal supports: Tr ρ Π_σ = ${p.inside.toExponential(3)} is within the support tolerance ${p.tolerance}`;

function base0(family: DivergenceResult['family'], p: PairAnalysis, options: DivergenceOptions): DivergenceResult {
  const r: DivergenceResult = {
    value: NaN,
    family,
    base: options.base ?? 2,
    tolerance: p.tolerance,
    supportIncluded: p.included,
    supportsOrthogonal: p.orthogonal,
    leakage: p.leakage,
    rankRho: p.rho.support.length,
    rankSigma: p.sigma.support.length,
  };
  if (p.included && p.leakage > 1e-14) {
    r.notes = [
      `ρ has weight ${p.leakage.toExponential(3)} outside supp σ, below the support tolerance, and it was treated as zero; ` +
        'were it genuine, the divergences of order ≥ 1 would be +Infinity.',
    ];
  }
  return r;
}

function infinite(r: DivergenceResult, reason: string): DivergenceResult {
  r.value = Infinity;
  r.reason = reason;
  return r;
}

function finite(r: DivergenceResult, nats: number, lb: number): DivergenceResult {
  if (Number.isNaN(nats)) throw new RhoError('internal-error', `The ${r.family} divergence evaluated to NaN.`);
  r.value = nats / lb;
  if (r.value === Infinity) r.reason = 'the value overflows double precision';
  return r;
}

function addNote(r: DivergenceResult, note: string): void {
  (r.notes ??= []).push(note);
}

/** Weights w_ij = r_i P_ij / Tr ρ Π_σ (they sum to 1) and L_ij = ln r_i − ln s_j over both supports. */
function normalisedWeights(p: PairAnalysis): { w: number[]; L: number[] } {
  const w: number[] = [];
  const L: number[] = [];
  for (let a = 0; a < p.r.length; a++) {
    const lr = Math.log(p.r[a]);
    for (let b = 0; b < p.s.length; b++) {
      const x = (p.r[a] * p.overlap[a][b]) / p.inside;
      if (x > 0) {
        w.push(x);
        L.push(lr - Math.log(p.s[b]));
      }
    }
  }
  return { w, L };
}

// ---------------------------------------------------------------------------------------------
// Umegaki, min and max relative entropies

function umegakiFromPair(p: PairAnalysis, options: DivergenceOptions, lb: number): DivergenceResult {
  const r = base0('umegaki', p, options);
  if (!p.included) return infinite(r, NOT_INCLUDED(p));
  const { w, L } = normalisedWeights(p);
  let d = 0;
  for (let k = 0; k < w.length; k++) d += w[k] * L[k];
  return finite(r, d, lb);
}

/** Umegaki relative entropy D(ρ‖σ) = Tr ρ (log ρ − log σ); +∞ unless supp ρ ⊆ supp σ. */
export function umegakiRelativeEntropy(rho: CMatrix, sigma: CMatrix, options: DivergenceOptions = {}): DivergenceResult {
  const lb = logOfBase(options.base);
  return umegakiFromPair(analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), options, lb);
}

function minFromPair(p: PairAnalysis, options: DivergenceOptions, lb: number): DivergenceResult {
  const r = base0('min', p, options);
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  let q = 0;
  for (let a = 0; a < p.r.length; a++) for (let b = 0; b < p.s.length; b++) q += p.overlap[a][b] * p.s[b];
  r.projectedTrace = q;
  return finite(r, -Math.log(q), lb);
}

/** Min-relative entropy D_min(ρ‖σ) = −log Tr Π_ρ σ (Datta 2009); +∞ when ρ ⊥ σ. */
export function minRelativeEntropy(rho: CMatrix, sigma: CMatrix, options: DivergenceOptions = {}): DivergenceResult {
  const lb = logOfBase(options.base);
  return minFromPair(analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), options, lb);
}

/**
 * ρ written on supp σ (in σ's eigenbasis, restricted to its support), normalised as the support
 * decision says: under inclusion Π_σ ρ Π_σ / Tr Π_σ ρ; otherwise ρ/Tr ρ compressed.
 */
function rhoOnSigmaSupport(rho: CMatrix, p: PairAnalysis): CMatrix {
  const V1 = columns(p.sigma.vectors, p.sigma.support);
  const c = compress(rho, V1);
  const f = 1 / (p.traceRho * (p.included ? p.inside : 1));
  const out = zeros(c.rows, c.cols);
  for (let k = 0; k < c.re.length; k++) {
    out.re[k] = c.re[k] * f;
    out.im[k] = c.im[k] * f;
  }
  return hermitianPart(out);
}

/** Eigen-data of σ^{-1/2} ρ_M σ^{-1/2} on supp σ, with c_k = ⟨x_k|σ|x_k⟩. */
function geometricSpectrum(rhoM: CMatrix, p: PairAnalysis): { g: number[]; c: number[]; gmax: number } {
  const inv = p.s.map((x) => 1 / Math.sqrt(x));
  const G = scaleRowsCols(rhoM, inv, inv);
  const e = eigh(hermitianPart(G), { vectors: true });
  const X = e.vectors!;
  const m = X.rows;
  let gmax = 0;
  for (let k = 0; k < m; k++) gmax = Math.max(gmax, e.values[k]);
  const thr = p.tolerance * gmax;
  const g: number[] = [];
  const c: number[] = [];
  for (let k = 0; k < m; k++) {
    if (!(e.values[k] > thr && e.values[k] > 0)) continue;
    let ck = 0;
    for (let j = 0; j < m; j++) ck += p.s[j] * (X.re[j * m + k] ** 2 + X.im[j * m + k] ** 2);
    g.push(e.values[k]);
    c.push(ck);
  }
  return { g, c, gmax };
}

function maxFromPair(rho: CMatrix, p: PairAnalysis, options: DivergenceOptions, lb: number): DivergenceResult {
  const r = base0('max', p, options);
  if (!p.included) return infinite(r, NOT_INCLUDED(p));
  const { gmax } = geometricSpectrum(rhoOnSigmaSupport(rho, p), p);
  return finite(r, Math.log(gmax), lb);
}

/** Max-relative entropy D_max(ρ‖σ) = log ‖σ^{-1/2} ρ σ^{-1/2}‖_∞; +∞ unless supp ρ ⊆ supp σ. */
export function maxRelativeEntropy(rho: CMatrix, sigma: CMatrix, options: DivergenceOptions = {}): DivergenceResult {
  const lb = logOfBase(options.base);
  return maxFromPair(rho, analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), options, lb);
}

// ---------------------------------------------------------------------------------------------
// Petz–Rényi

function petzFromPair(p: PairAnalysis, alpha: number, options: DivergenceOptions, lb: number): DivergenceResult {
  if (alpha === 1) return umegakiFromPair(p, options, lb);
  if (alpha === 0) {
    const m = minFromPair(p, options, lb);
    m.family = 'petz';
    m.alpha = 0;
    addNote(m, 'α = 0 is the min-relative entropy −log Tr Π_ρ σ (the α → 0 limit).');
    return m;
  }
  const r = base0('petz', p, options);
  r.alpha = alpha;
  const t = alpha - 1;
  if (alpha > 1 && !p.included) return infinite(r, NOT_INCLUDED(p));
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  if (p.included) {
    const { w, L } = normalisedWeights(p);
    if (Math.abs(t) <= 0.5) {
      let s = 0;
      for (let k = 0; k < w.length; k++) s += w[k] * Math.expm1(t * L[k]);
      return finite(r, Math.log1p(s) / t, lb);
    }
    return finite(r, logSumExp(w, L.map((x) => t * x)) / t, lb);
  }
  // α < 1 and supp ρ ⊄ supp σ: Q = Σ r_i P_ij r_i^{α-1} s_j^{1-α}, unnormalised.
  const w: number[] = [];
  const e: number[] = [];
  for (let a = 0; a < p.r.length; a++) {
    for (let b = 0; b < p.s.length; b++) {
      w.push(p.r[a] * p.overlap[a][b]);
      e.push(t * (Math.log(p.r[a]) - Math.log(p.s[b])));
    }
  }
  return finite(r, logSumExp(w, e) / t, lb);
}

/** Petz–Rényi divergence D̄_α(ρ‖σ), α ∈ [0, ∞) (α = 0: D_min; α = 1: Umegaki). */
export function petzRenyiDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, options: DivergenceOptions = {}): DivergenceResult {
  checkOrder(alpha, 'alpha', (a) => a >= 0 && a < Infinity, '[0, ∞)', 'petz');
  const lb = logOfBase(options.base);
  return petzFromPair(analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), alpha, options, lb);
}

// ---------------------------------------------------------------------------------------------
// Sandwiched Rényi

function positiveEigenvalues(m: CMatrix, tol: number): { mu: number[]; max: number } {
  const v = eigvalsh(hermitianPart(m));
  let max = 0;
  for (let k = 0; k < v.length; k++) max = Math.max(max, v[k]);
  const mu: number[] = [];
  for (let k = 0; k < v.length; k++) if (v[k] > tol * max && v[k] > 0) mu.push(v[k]);
  return { mu, max };
}

function sandwichedFromPair(rho: CMatrix, p: PairAnalysis, alpha: number, options: DivergenceOptions, lb: number): DivergenceResult {
  if (alpha === 1) return umegakiFromPair(p, options, lb);
  if (alpha === Infinity) {
    const m = maxFromPair(rho, p, options, lb);
    m.family = 'sandwiched';
    m.alpha = Infinity;
    addNote(m, 'α = ∞ is the max-relative entropy (the α → ∞ limit).');
    return m;
  }
  const r = base0('sandwiched', p, options);
  r.alpha = alpha;
  const t = alpha - 1;
  if (alpha > 1 && !p.included) return infinite(r, NOT_INCLUDED(p));
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  const rhoS = rhoOnSigmaSupport(rho, p);
  const gamma = (1 - alpha) / (2 * alpha);
  const g = p.s.map((x) => Math.pow(x, gamma));
  const { mu } = positiveEigenvalues(scaleRowsCols(rhoS, g, g), p.tolerance);
  if (mu.length === 0) return infinite(r, ORTHOGONAL(p));
  if (p.included && Math.abs(t) <= 0.5) {
    // Q − 1 = Tr ρ(σ^{2γ} − 1) + Σ μ (μ^{α−1} − 1), both O(α − 1) and free of cancellation.
    let s = 0;
    const m = rhoS.rows;
    for (let j = 0; j < m; j++) s += rhoS.re[j * m + j] * Math.expm1(2 * gamma * Math.log(p.s[j]));
    for (const x of mu) s += x * Math.expm1(t * Math.log(x));
    return finite(r, Math.log1p(s) / t, lb);
  }
  return finite(r, logSumExp(mu.map(() => 1), mu.map((x) => alpha * Math.log(x))) / t, lb);
}

/** Sandwiched Rényi divergence D̃_α(ρ‖σ), α ∈ [1/2, ∞] (α = 1: Umegaki; α = ∞: D_max). */
export function sandwichedRenyiDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, options: DivergenceOptions = {}): DivergenceResult {
  checkOrder(alpha, 'alpha', (a) => a >= 0.5, '[1/2, ∞]', 'sandwiched');
  const lb = logOfBase(options.base);
  return sandwichedFromPair(rho, analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), alpha, options, lb);
}

// ---------------------------------------------------------------------------------------------
// α-z Rényi

/**
 * Whether (α, z) lies in the region where D_{α,z} satisfies the data-processing inequality
 * (Zhang 2020, Theorem 1.2): 0 < α < 1 and z ≥ max(α, 1 − α), or α > 1 and max(α/2, α − 1) ≤ z ≤ α.
 * α = 1 (Umegaki) counts as inside.
 */
export function alphaZDataProcessing(alpha: number, z: number): boolean {
  if (alpha === 1) return true;
  if (alpha > 0 && alpha < 1) return z >= Math.max(alpha, 1 - alpha);
  if (alpha > 1) return z >= Math.max(alpha / 2, alpha - 1) && z <= alpha;
  return false;
}

function alphaZFromPair(rho: CMatrix, p: PairAnalysis, alpha: number, z: number, options: DivergenceOptions, lb: number): DivergenceResult {
  if (alpha === 1) {
    const u = umegakiFromPair(p, options, lb);
    u.family = 'alpha-z';
    u.alpha = 1;
    u.z = z;
    u.dataProcessing = true;
    addNote(u, 'α = 1 is the Umegaki relative entropy for every z (the α → 1 limit).');
    return u;
  }
  const r = base0('alpha-z', p, options);
  r.alpha = alpha;
  r.z = z;
  r.dataProcessing = alphaZDataProcessing(alpha, z);
  const t = alpha - 1;
  if (alpha > 1 && !p.included) return infinite(r, NOT_INCLUDED(p));
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  const g = (1 - alpha) / (2 * z);
  // C = U_1* V_1: ρ's support basis against σ's support basis (k × m).
  const C = mul(adjoint(columns(p.rho.vectors, p.rho.support)), columns(p.sigma.vectors, p.sigma.support));
  const k = p.r.length;
  const m = p.s.length;
  let spread = 0;
  for (const s of p.s) spread = Math.max(spread, Math.abs(2 * g * Math.log(s)));
  if (p.included && Math.abs(t) <= 0.5 && spread <= 0.5) {
    // Q − 1 = (Tr ρ^α − 1) + [Tr (A + E)^z − Tr A^z], A = ρ^{α/z}, E = A^{1/2}(σ^{2g} − Π_σ)A^{1/2},
    // the bracket = ∫_0^1 z Tr (A + uE)^{z−1} E du by 8-point Gauss–Legendre; A + uE stays positive
    // definite on supp ρ and its spectrum moves by at most a factor e^{±spread}, so the integrand is
    // analytic well beyond [0, 1] and the rule is accurate to rounding.
    let s = 0;
    for (const x of p.r) s += x * Math.expm1(t * Math.log(x));
    const a = p.r.map((x) => Math.pow(x, alpha / (2 * z)));
    const e = p.s.map((x) => Math.expm1(2 * g * Math.log(x)));
    const E = hermitianPart(scaleRowsCols(mul(scaleRowsCols(C, a, e), adjoint(C)), ones(k), a));
    for (let q = 0; q < GAUSS_LEGENDRE_01.nodes.length; q++) {
      const u = GAUSS_LEGENDRE_01.nodes[q];
      const M = zeros(k, k);
      for (let i = 0; i < k * k; i++) {
        M.re[i] = u * E.re[i];
        M.im[i] = u * E.im[i];
      }
      for (let i = 0; i < k; i++) M.re[i * k + i] += Math.pow(p.r[i], alpha / z);
      const ev = eigh(M, { vectors: true });
      // Tr f'(M) E with f'(x) = z x^{z−1}, evaluated in M's eigenbasis.
      const W = ev.vectors!;
      const Et = mul(mul(adjoint(W), E), W);
      let tr = 0;
      for (let i = 0; i < k; i++) tr += z * Math.pow(ev.values[i], z - 1) * Et.re[i * k + i];
      s += GAUSS_LEGENDRE_01.weights[q] * tr;
    }
    return finite(r, Math.log1p(s) / t, lb);
  }
  // Direct: scale ρ and σ by their largest eigenvalues so that no power overflows.
  const rmax = Math.max(...p.r);
  const smax = Math.max(...p.s);
  const a = p.r.map((x) => Math.pow(x / rmax, alpha / z));
  const sg = p.s.map((x) => Math.pow(x / smax, g));
  // B = C* diag(a) C on supp σ, then M = diag(sg) B diag(sg).
  const B = mul(adjoint(C), scaleRowsCols(C, a, ones(m)));
  const { mu } = positiveEigenvalues(scaleRowsCols(B, sg, sg), p.tolerance);
  if (mu.length === 0) return infinite(r, ORTHOGONAL(p));
  const logQ = alpha * Math.log(rmax) + (1 - alpha) * Math.log(smax) + logSumExp(mu.map(() => 1), mu.map((x) => z * Math.log(x)));
  return finite(r, logQ / t, lb);
}

function ones(n: number): number[] {
  return new Array<number>(n).fill(1);
}

/**
 * α-z Rényi divergence D_{α,z}(ρ‖σ), α > 0, z > 0 (α = 1: Umegaki). z = 1 is Petz, z = α sandwiched.
 * Accuracy note: for large α/z or |1 − α|/z the powers span more than double precision can hold and
 * eigenvalues of ρ or σ far below the largest are lost; the result is then a lower-accuracy estimate.
 */
export function alphaZRenyiDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, z: number, options: DivergenceOptions = {}): DivergenceResult {
  checkOrder(alpha, 'alpha', (a) => a > 0 && a < Infinity, '(0, ∞)', 'alpha-z');
  checkOrder(z, 'z', (x) => x > 0 && x < Infinity, '(0, ∞)', 'alpha-z');
  const lb = logOfBase(options.base);
  return alphaZFromPair(rho, analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), alpha, z, options, lb);
}

// ---------------------------------------------------------------------------------------------
// Geometric (maximal) Rényi and Belavkin–Staszewski

/** Shorted operator of ρ (unit trace) to supp σ, in σ's support basis: ρ_11 − ρ_12 ρ_22^+ ρ_21. */
function shortedToSigmaSupport(rho: CMatrix, p: PairAnalysis): CMatrix {
  const kernel: number[] = [];
  const inSupp = new Set(p.sigma.support);
  for (let j = 0; j < p.sigma.vectors.cols; j++) if (!inSupp.has(j)) kernel.push(j);
  const V1 = columns(p.sigma.vectors, p.sigma.support);
  const scaleBy = 1 / p.traceRho;
  const r11 = compress(rho, V1);
  if (kernel.length === 0) return hermitianPart(scaleRowsCols(r11, ones(r11.rows).map(() => scaleBy), ones(r11.cols)));
  const V0 = columns(p.sigma.vectors, kernel);
  const r12 = mul(mul(adjoint(V1), rho), V0);
  const r22 = hermitianPart(compress(rho, V0));
  // Pseudo-inverse of ρ_22 with eigenvalues below tol · λ_max(ρ) taken as zero.
  const e = eigh(r22, { vectors: true });
  const thr = p.tolerance * p.rho.max;
  const W = e.vectors!;
  const keep: number[] = [];
  for (let i = 0; i < e.values.length; i++) if (e.values[i] > thr) keep.push(i);
  const Wk = columns(W, keep);
  const invSqrt = keep.map((i) => 1 / Math.sqrt(e.values[i]));
  const T = scaleRowsCols(mul(r12, Wk), ones(r12.rows), invSqrt); // ρ_12 W diag(λ^{-1/2})
  const corr = mul(T, adjoint(T));
  const out = zeros(r11.rows, r11.cols);
  for (let i = 0; i < out.re.length; i++) {
    out.re[i] = (r11.re[i] - corr.re[i]) * scaleBy;
    out.im[i] = (r11.im[i] - corr.im[i]) * scaleBy;
  }
  return hermitianPart(out);
}

function geometricFromPair(rho: CMatrix, p: PairAnalysis, alpha: number, options: DivergenceOptions, lb: number): DivergenceResult {
  const r = base0(alpha === 1 ? 'belavkin-staszewski' : 'geometric', p, options);
  r.alpha = alpha;
  const t = alpha - 1;
  if (alpha >= 1 && !p.included) return infinite(r, NOT_INCLUDED(p));
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  const rhoM = p.included ? rhoOnSigmaSupport(rho, p) : shortedToSigmaSupport(rho, p);
  if (!p.included) {
    let tr = 0;
    for (let i = 0; i < rhoM.rows; i++) tr += rhoM.re[i * rhoM.rows + i];
    r.shortedTrace = tr;
    addNote(r, `supp ρ ⊄ supp σ: computed the ε → 0 limit of the value for σ + ε1, which replaces ρ by its shorted operator to supp σ (trace ${tr.toExponential(3)}).`);
  }
  const { g, c } = geometricSpectrum(rhoM, p);
  if (g.length === 0) return infinite(r, 'the shorted operator of ρ to supp σ vanishes, so Tr σ #_α ρ = 0');
  if (alpha === 1) {
    let d = 0;
    for (let k = 0; k < g.length; k++) d += c[k] * g[k] * Math.log(g[k]);
    return finite(r, d, lb);
  }
  if (p.included && Math.abs(t) <= 0.5) {
    let s = 0;
    for (let k = 0; k < g.length; k++) s += c[k] * g[k] * Math.expm1(t * Math.log(g[k]));
    return finite(r, Math.log1p(s) / t, lb);
  }
  return finite(r, logSumExp(c, g.map((x) => alpha * Math.log(x))) / t, lb);
}

/** Geometric (maximal) Rényi divergence D̂_α(ρ‖σ), α ∈ (0, 2] (α = 1: Belavkin–Staszewski). */
export function geometricRenyiDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, options: DivergenceOptions = {}): DivergenceResult {
  checkOrder(alpha, 'alpha', (a) => a > 0 && a <= 2, '(0, 2]', 'geometric');
  const lb = logOfBase(options.base);
  return geometricFromPair(rho, analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), alpha, options, lb);
}

/** Belavkin–Staszewski relative entropy Tr ρ log(ρ^{1/2} σ^{-1} ρ^{1/2}); +∞ unless supp ρ ⊆ supp σ. */
export function belavkinStaszewskiRelativeEntropy(rho: CMatrix, sigma: CMatrix, options: DivergenceOptions = {}): DivergenceResult {
  return geometricRenyiDivergence(rho, sigma, 1, options);
}

// ---------------------------------------------------------------------------------------------
// Dispatcher

export interface DivergenceParams extends DivergenceOptions, MeasuredOptions {
  alpha?: number;
  z?: number;
}

/**
 * One entry point for every family: validates the family's parameters (RhoError 'invalid-argument'
 * naming `alpha` or `z` when outside the family's range; 'unknown-family' for an unknown family).
 */
export function divergence(family: string, rho: CMatrix, sigma: CMatrix, params: DivergenceParams = {}): DivergenceResult {
  const tol = params.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  if (!(tol >= 0 && tol < 1)) throw new RhoError('invalid-argument', `The support tolerance must be in [0, 1) (got ${tol}).`, 'tol');
  const lb = logOfBase(params.base);
  const pair = () => analysePair(rho, sigma, tol);
  switch (family) {
    case 'umegaki':
      return umegakiFromPair(pair(), params, lb);
    case 'petz':
      checkOrder(params.alpha, 'alpha', (a) => a >= 0 && a < Infinity, '[0, ∞)', 'petz');
      return petzFromPair(pair(), params.alpha!, params, lb);
    case 'sandwiched':
      checkOrder(params.alpha, 'alpha', (a) => a >= 0.5, '[1/2, ∞]', 'sandwiched');
      return sandwichedFromPair(rho, pair(), params.alpha!, params, lb);
    case 'alpha-z':
      checkOrder(params.alpha, 'alpha', (a) => a > 0 && a < Infinity, '(0, ∞)', 'alpha-z');
      checkOrder(params.z, 'z', (x) => x > 0 && x < Infinity, '(0, ∞)', 'alpha-z');
      return alphaZFromPair(rho, pair(), params.alpha!, params.z!, params, lb);
    case 'geometric':
      checkOrder(params.alpha, 'alpha', (a) => a > 0 && a <= 2, '(0, 2]', 'geometric');
      return geometricFromPair(rho, pair(), params.alpha!, params, lb);
    case 'max':
      return maxFromPair(rho, pair(), params, lb);
    case 'min':
      return minFromPair(pair(), params, lb);
    case 'measured':
      return measuredRelativeEntropy(rho, sigma, params) as DivergenceResult;
    default:
      throw new RhoError(
        'unknown-family',
        `Unknown divergence family "${family}"; known families: ${DIVERGENCE_FAMILIES.join(', ')}.`,
        'family',
      );
  }
}

/** Spectral data re-exported for callers that analyse the same pair repeatedly. */
export { analysePair, spectral };
