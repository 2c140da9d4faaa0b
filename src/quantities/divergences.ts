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
 *  - measured relative entropy and measured Rényi divergences: see measured.ts.
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
 *  - Only ρ and σ have supports decided; intermediate operators (σ^g ρ^{α/z} σ^g, σ^{-1/2} ρ σ^{-1/2}, …)
 *    never have eigenvalues dropped. They are handled through their factors in the eigenbases of ρ
 *    and σ, e.g. σ^g ρ^{α/z} σ^g = B B* with B = diag(s^g) X diag(r^{α/2z}), X_ji = ⟨v_j|u_i⟩, whose
 *    singular values come from a relative-accuracy SVD (src/linalg/graded.ts): a singular value of
 *    1e-60 of the largest, raised to the power 2z = 0.1, still counts exactly. Where an intermediate
 *    really is rank deficient (the supports of ρ and σ meet in fewer dimensions than their ranks)
 *    the answer says so (`intermediateRank` and a note).
 *  - Powers are taken in scaled form: B is divided by its largest entry (the logarithms of the
 *    entries are formed first), so α = 200 or z = 0.05 overflow nothing; entries below e^-690 of the
 *    largest are dropped, and a note bounds their effect when it could reach 1e-13 (relative).
 *
 * Continuity in α: at α = 1 each family returns Umegaki (geometric: Belavkin–Staszewski). Near 1 the
 * numerators are written as sums of terms that are O(α−1) without cancellation, so the divergences
 * join their α = 1 values to near machine precision from both sides: Petz Σ w_ij expm1((α−1)(ln r_i −
 * ln s_j)); geometric Σ w_k expm1(2(α−1) ln σ_k) over the singular triples of diag(s^{-1/2}) X
 * diag(r^{1/2}); α-z and sandwiched (z = α) Σ r_i expm1((α−1) ln r_i) + Σ r_i^α expm1(z log1p δ_i), with
 * d_i²(1 + δ_i) the eigenvalues of D(1 + K)D, D = diag(r^{α/2z}), K = X* diag(expm1(−(α−1)/z · ln s)) X,
 * and δ_i from the scaled Jacobi method of src/linalg/graded.ts (used while |K| ≤ 1/2; beyond, the
 * direct form loses at most ~1e-16/|α−1| and a note says so when |α − 1| < 1e-6).
 *
 * Checked against a high-precision referee (mpmath, 50–400 digits) on nearly pure states, α from
 * 0.05 to 200, α within 1e-12 of 1 and small z: test/quantities/divergence-mpmath.test.ts.
 * ρ is divided by its trace (the ops layer has checked the trace is 1). Deliberately not here:
 * validation of inputs, hypothesis-testing divergence (an SDP; the sdp helper adds it).
 * Cost: two eigendecompositions, one O(n³) product for the overlaps X and one graded SVD (O(n³),
 * a few Jacobi sweeps) per value; near α = 1 a scaled Jacobi solve instead of the SVD.
 */
import { CMatrix, zeros, mul, adjoint, hermitianPart } from '../linalg/cmatrix.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { spectral, columns, compress, scaleRowsCols, ones } from '../linalg/spectral.js';
import { gradedSvd, scaledEigenDeviations } from '../linalg/graded.js';
import { RhoError } from '../errors.js';
import { analysePair, PairAnalysis, logSumExp, logOfBase, checkOrder } from './divergence-kit.js';
import { measuredRenyiDivergence, MeasuredOptions } from './measured.js';
import { alphaZDataProcessing } from './alpha-z-region.js';

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

/** Values below this many nats in magnitude are reported with a note that they are 0 within rounding. */
const ROUNDING_LEVEL = 1e-13;

function finite(r: DivergenceResult, nats: number, lb: number): DivergenceResult {
  if (Number.isNaN(nats)) throw new RhoError('internal-error', `The ${r.family} divergence evaluated to NaN.`);
  r.value = nats / lb + 0; // + 0: no signed zero (−log 1 = −0)
  if (r.value === Infinity) r.reason = 'the value overflows double precision';
  if (nats !== 0 && Math.abs(nats) <= ROUNDING_LEVEL) {
    addNote(r, `|D| = ${Math.abs(nats).toExponential(1)} nats is at the level of double precision's rounding errors (below ${ROUNDING_LEVEL} nats): it is 0 within rounding, and its sign carries no information.`);
  }
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
  if (p.rho.support.length === p.cross.cols) {
    // ρ of full rank: Π_ρ = 1, so Tr Π_ρ σ = Tr σ, read from σ's diagonal rather than summed over two
    // eigenbases (whose rounding made D_min of full-rank states −6e-16 instead of 0 for Tr σ = 1).
    q = p.traceSigma;
  } else {
    for (let a = 0; a < p.r.length; a++) for (let b = 0; b < p.s.length; b++) q += p.overlap[a][b] * p.s[b];
  }
  r.projectedTrace = q;
  return finite(r, -Math.log(q), lb);
}

/** Min-relative entropy D_min(ρ‖σ) = −log Tr Π_ρ σ (Datta 2009); +∞ when ρ ⊥ σ. */
export function minRelativeEntropy(rho: CMatrix, sigma: CMatrix, options: DivergenceOptions = {}): DivergenceResult {
  const lb = logOfBase(options.base);
  return minFromPair(analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), options, lb);
}

// ---------------------------------------------------------------------------------------------
// ρ in σ's frame: the data every family below works from

/**
 * ρ seen from σ: eigenvalues r_i of ρ (unit trace) and the overlaps X_ji = ⟨v_j|u_i⟩ between σ's
 * support eigenvectors v_j and ρ's support eigenvectors u_i (m × k). When supp ρ ⊆ supp σ has been
 * decided and σ is rank deficient, ρ is replaced by Π_σ ρ Π_σ / Tr Π_σ ρ (the convention in the
 * header) and re-diagonalised, so that X has orthonormal columns (`isometric`); with σ of full rank
 * this holds as it is. Without inclusion (orders below 1 only) X is the plain overlap.
 */
interface Frame {
  r: number[];
  X: CMatrix;
  isometric: boolean;
}

function frameOf(rho: CMatrix, p: PairAnalysis): Frame {
  const n = p.sigma.vectors.cols;
  const m = p.s.length;
  const k = p.r.length;
  if (m === n || !p.included) {
    // X_ji = conj(cross_ij) for j over supp σ.
    const X = zeros(m, k);
    p.sigma.support.forEach((col, j) => {
      for (let i = 0; i < k; i++) {
        X.re[j * k + i] = p.cross.re[i * n + col];
        X.im[j * k + i] = -p.cross.im[i * n + col];
      }
    });
    return { r: normalised(p.r), X, isometric: m === n };
  }
  const V1 = columns(p.sigma.vectors, p.sigma.support);
  const c = compress(rho, V1);
  const f = 1 / (p.traceRho * p.inside);
  for (let i = 0; i < c.re.length; i++) {
    c.re[i] *= f;
    c.im[i] *= f;
  }
  const S = spectral(hermitianPart(c), p.tolerance);
  return { r: normalised(S.support.map((i) => S.values[i])), X: columns(S.vectors, S.support), isometric: true };
}

function normalised(r: number[]): number[] {
  let t = 0;
  for (const x of r) t += x;
  return r.map((x) => x / t);
}

/** Entries below e^{-FLUSH} of the largest are set to 0 (subnormal arithmetic is slow and inexact). */
const FLUSH = 690;

/**
 * ln Σ_k σ_k^{2z} for the singular values σ_k of B_ji = X_ji s_j^g r_i^h, in scaled form: B̂ = B e^{−shift}
 * with its largest entry of modulus 1, so that no power overflows or underflows wholesale. Returns also
 * how much the flushed entries could change the sum (relative, from |a^q − b^q| ≤ |a − b|^q for q ≤ 1).
 */
function logTracePower(f: Frame, s: number[], g: number, h: number, z: number): { logQ: number; flushBound: number } {
  const m = s.length;
  const k = f.r.length;
  const ls = s.map(Math.log);
  const lr = f.r.map(Math.log);
  let shift = -Infinity;
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < k; i++) {
      const a = Math.hypot(f.X.re[j * k + i], f.X.im[j * k + i]);
      if (a > 0) shift = Math.max(shift, g * ls[j] + h * lr[i] + Math.log(a));
    }
  }
  if (shift === -Infinity) return { logQ: -Infinity, flushBound: 0 };
  const B = zeros(m, k);
  let flushed = false;
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < k; i++) {
      const e = g * ls[j] + h * lr[i] - shift;
      const xr = f.X.re[j * k + i];
      const xi = f.X.im[j * k + i];
      if (e + Math.log(Math.hypot(xr, xi)) < -FLUSH) {
        if (xr !== 0 || xi !== 0) flushed = true;
        continue;
      }
      const w = Math.exp(e);
      B.re[j * k + i] = xr * w;
      B.im[j * k + i] = xi * w;
    }
  }
  const sv = gradedSvd(B).values;
  const e: number[] = [];
  for (const x of sv) if (x > 0) e.push(2 * z * Math.log(x));
  const logQ = 2 * z * shift + logSumExp(e.map(() => 1), e);
  let flushBound = 0;
  if (flushed) {
    // ‖E‖ ≤ e^{−FLUSH}·√(mk) for the flushed part E, against Σ σ̂^{2z} ≥ σ̂_max^{2z} ≥ 1.
    const dE = Math.exp(-FLUSH) * Math.sqrt(m * k);
    const q = 2 * z;
    const perValue = q <= 1 ? Math.pow(dE, q) : q * Math.pow(1 + dE, q - 1) * dE;
    flushBound = Math.min(m, k) * perValue;
  }
  return { logQ, flushBound };
}

/**
 * Q − 1 for Q = Tr (σ^{−t/2z} ρ^{α/z} σ^{−t/2z})^z, t = α − 1 small, without cancellation: in ρ's
 * eigenbasis the operator ρ^{α/2z} σ^{−t/z} ρ^{α/2z} (same nonzero spectrum) is D(1 + K)D with
 * D = diag(r^{α/2z}) and K = X* diag(expm1(−(t/z) ln s)) X, whose eigenvalues d_i²(1 + δ_i) come with
 * δ_i accurate however small K is (src/linalg/graded.ts); then
 * Q − 1 = Σ r_i expm1(t ln r_i) + Σ r_i^α expm1(z log1p δ_i). Undefined (null) when K is not small.
 */
function nearOneExcess(f: Frame, s: number[], alpha: number, z: number): number | null {
  const t = alpha - 1;
  const k = f.r.length;
  const e = s.map((x) => Math.expm1((-t / z) * Math.log(x)));
  let big = 0;
  for (const x of e) big = Math.max(big, Math.abs(x));
  if (!(big <= 0.5)) return null;
  // K = X* diag(e) X.
  const K = hermitianPart(mul(adjoint(f.X), scaleRowsCols(f.X, e, ones(k))));
  const logD = f.r.map((x) => (alpha / (2 * z)) * Math.log(x));
  const delta = scaledEigenDeviations(logD, K);
  let q = 0;
  for (let i = 0; i < k; i++) {
    if (!(delta[i] > -1)) return null;
    const lr = Math.log(f.r[i]);
    q += f.r[i] * Math.expm1(t * lr) + Math.exp(alpha * lr) * Math.expm1(z * Math.log1p(delta[i]));
  }
  return q;
}

/**
 * The supports of ρ and σ meet in a subspace whose dimension is the number of principal cosines
 * (singular values of X) above √tol. When it is below min(rank ρ, rank σ), the intermediate operators
 * of the sandwiched, α-z and geometric families are really rank deficient; the answer says so.
 */
function noteIntermediateRank(r: DivergenceResult, f: Frame, tol: number, what: string): void {
  if (f.isometric) return;
  const cos = gradedSvd(f.X).values;
  let rank = 0;
  for (const c of cos) if (c > Math.sqrt(tol)) rank++;
  r.intermediateRank = rank;
  if (rank < Math.min(f.X.rows, f.X.cols)) {
    addNote(r, `supp ρ and supp σ meet in a subspace of dimension ${rank} (principal cosines above √tol), so ${what} has rank ${rank} < min(rank ρ, rank σ).`);
  }
}

// ---------------------------------------------------------------------------------------------
// Max-relative entropy

function maxFromPair(rho: CMatrix, p: PairAnalysis, options: DivergenceOptions, lb: number): DivergenceResult {
  const r = base0('max', p, options);
  if (!p.included) return infinite(r, NOT_INCLUDED(p));
  // λ_max(σ^{-1/2} ρ σ^{-1/2}) = σ_max(diag(s^{-1/2}) X diag(r^{1/2}))².
  const f = frameOf(rho, p);
  const top = gradedSvd(scaleRowsCols(f.X, p.s.map((x) => 1 / Math.sqrt(x)), f.r.map(Math.sqrt))).values[0];
  return finite(r, 2 * Math.log(top), lb);
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
// Sandwiched and α-z Rényi (sandwiched is α-z with z = α)

// The region where D_{α,z} satisfies data processing: one function, in alpha-z-region.ts.
export { alphaZDataProcessing };

/** log Q/(α − 1) for Q = Tr (σ^{(1−α)/2z} ρ^{α/z} σ^{(1−α)/2z})^z, with the cases of the header. */
function alphaZValue(rho: CMatrix, p: PairAnalysis, alpha: number, z: number, r: DivergenceResult, lb: number, what: string): DivergenceResult {
  const t = alpha - 1;
  const f = frameOf(rho, p);
  if (f.isometric) {
    const excess = nearOneExcess(f, p.s, alpha, z);
    if (excess !== null) return finite(r, Math.log1p(excess) / t, lb);
  }
  if (!p.included) noteIntermediateRank(r, f, p.tolerance, what);
  const { logQ, flushBound } = logTracePower(f, p.s, (1 - alpha) / (2 * z), alpha / (2 * z), z);
  if (logQ === -Infinity) return infinite(r, `${what} vanishes (supp ρ ⊥ supp σ in exact arithmetic)`);
  if (flushBound > 1e-13) {
    addNote(r, `the powers span more than e^${FLUSH} (z = ${z} is small against the spread of the eigenvalues): entries of the intermediate operator below e^-${FLUSH} of the largest were dropped, changing Tr(·)^z by at most a relative ${flushBound.toExponential(1)}.`);
  }
  if (Math.abs(t) < 1e-6) {
    addNote(r, `α is within ${Math.abs(t).toExponential(1)} of 1 but the spectrum of σ is too wide for the cancellation-free form; the value may be off by about ${(4e-16 / Math.abs(t)).toExponential(0)} (relative).`);
  }
  return finite(r, logQ / t, lb);
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
  if (alpha > 1 && !p.included) return infinite(r, NOT_INCLUDED(p));
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  return alphaZValue(rho, p, alpha, alpha, r, lb, 'σ^{(1−α)/2α} ρ σ^{(1−α)/2α}');
}

/** Sandwiched Rényi divergence D̃_α(ρ‖σ), α ∈ [1/2, ∞] (α = 1: Umegaki; α = ∞: D_max). */
export function sandwichedRenyiDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, options: DivergenceOptions = {}): DivergenceResult {
  checkOrder(alpha, 'alpha', (a) => a >= 0.5, '[1/2, ∞]', 'sandwiched');
  const lb = logOfBase(options.base);
  return sandwichedFromPair(rho, analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), alpha, options, lb);
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
  if (alpha > 1 && !p.included) return infinite(r, NOT_INCLUDED(p));
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  return alphaZValue(rho, p, alpha, z, r, lb, 'σ^{(1−α)/2z} ρ^{α/z} σ^{(1−α)/2z}');
}

/** α-z Rényi divergence D_{α,z}(ρ‖σ), α > 0, z > 0 (α = 1: Umegaki). z = 1 is Petz, z = α sandwiched. */
export function alphaZRenyiDivergence(rho: CMatrix, sigma: CMatrix, alpha: number, z: number, options: DivergenceOptions = {}): DivergenceResult {
  checkOrder(alpha, 'alpha', (a) => a > 0 && a < Infinity, '(0, ∞)', 'alpha-z');
  checkOrder(z, 'z', (x) => x > 0 && x < Infinity, '(0, ∞)', 'alpha-z');
  const lb = logOfBase(options.base);
  return alphaZFromPair(rho, analysePair(rho, sigma, options.tol ?? DEFAULT_SUPPORT_TOLERANCE), alpha, z, options, lb);
}

// ---------------------------------------------------------------------------------------------
// Geometric (maximal) Rényi and Belavkin–Staszewski

/**
 * A factor W (m × q, σ's support basis) with W W* = the operator that stands for ρ on supp σ: under
 * inclusion X diag(r^{1/2}) (so W W* = ρ compressed and normalised); otherwise the factor of the
 * shorted operator ρ_M = ρ_11 − ρ_12 ρ_22^+ ρ_21: with Y = [Y₁; Y₀] = V* U₁ diag(r^{1/2}) split into
 * supp σ and ker σ rows, ρ_M = Y₁ N N* Y₁* for an orthonormal basis N of ker Y₀ (singular values of
 * Y₀ at most √(tol · λ_max(ρ)) count as zero, the rule ρ_22's eigenvalues had before).
 */
function geometricFactor(rho: CMatrix, p: PairAnalysis, f: Frame): { W: CMatrix; kernelRank: number } {
  if (p.included) return { W: scaleRowsCols(f.X, ones(f.X.rows), f.r.map(Math.sqrt)), kernelRank: f.r.length };
  const n = p.sigma.vectors.cols;
  const k = f.r.length;
  const inSupp = new Set(p.sigma.support);
  const kernel: number[] = [];
  for (let j = 0; j < n; j++) if (!inSupp.has(j)) kernel.push(j);
  const roots = f.r.map(Math.sqrt);
  // Y₀ (padded with zero rows to k × k, so that the SVD returns all k right vectors).
  const rows = Math.max(kernel.length, k);
  const Y0 = zeros(rows, k);
  kernel.forEach((col, j) => {
    for (let i = 0; i < k; i++) {
      Y0.re[j * k + i] = p.cross.re[i * n + col] * roots[i];
      Y0.im[j * k + i] = -p.cross.im[i * n + col] * roots[i];
    }
  });
  const sv = gradedSvd(Y0, { right: true });
  const thr = Math.sqrt(p.tolerance * Math.max(...f.r));
  const keep: number[] = [];
  for (let c = 0; c < k; c++) if (!(sv.values[c] > thr)) keep.push(c);
  const N = columns(sv.right!, keep);
  const Y1 = scaleRowsCols(f.X, ones(f.X.rows), roots);
  return { W: mul(Y1, N), kernelRank: keep.length };
}

function geometricFromPair(rho: CMatrix, p: PairAnalysis, alpha: number, options: DivergenceOptions, lb: number): DivergenceResult {
  const r = base0(alpha === 1 ? 'belavkin-staszewski' : 'geometric', p, options);
  r.alpha = alpha;
  const t = alpha - 1;
  if (alpha >= 1 && !p.included) return infinite(r, NOT_INCLUDED(p));
  if (p.orthogonal) return infinite(r, ORTHOGONAL(p));
  const f = frameOf(rho, p);
  const { W } = geometricFactor(rho, p, f);
  // Q = Tr σ (σ^{-1/2} ρ_M σ^{-1/2})^α = Σ_k w_k σ_k^{2(α−1)} over the singular triples of
  // B = diag(s^{-1/2}) W, with w_k = ‖W y_k‖² (= ⟨x_k|σ|x_k⟩ σ_k² for the left vectors x_k).
  const B = scaleRowsCols(W, p.s.map((x) => 1 / Math.sqrt(x)), ones(W.cols));
  const sv = gradedSvd(B, { right: true });
  const Y = sv.right!;
  const WY = mul(W, Y);
  const w: number[] = [];
  const ls: number[] = [];
  let total = 0;
  for (let c = 0; c < sv.values.length; c++) {
    let x = 0;
    for (let i = 0; i < WY.rows; i++) x += WY.re[i * WY.cols + c] ** 2 + WY.im[i * WY.cols + c] ** 2;
    total += x;
    if (sv.values[c] > 0) {
      w.push(x);
      ls.push(Math.log(sv.values[c]));
    }
  }
  if (!p.included) {
    r.shortedTrace = total;
    addNote(r, `supp ρ ⊄ supp σ: computed the ε → 0 limit of the value for σ + ε1, which replaces ρ by its shorted operator to supp σ (trace ${total.toExponential(3)}).`);
    // A genuinely rank-deficient shorted operator leaves singular values of rounding size whose
    // weights are rounding noise too; they are dropped here (and said so).
    let dropped = 0;
    for (let c = w.length - 1; c >= 0; c--) {
      if (w[c] <= 64 * EPS_ * total) {
        w.splice(c, 1);
        ls.splice(c, 1);
        dropped++;
      }
    }
    if (dropped > 0) addNote(r, `the shorted operator of ρ to supp σ has rank ${w.length}: ${dropped} direction(s) of rounding-size weight were left out.`);
  }
  if (w.length === 0 || total === 0) return infinite(r, 'the shorted operator of ρ to supp σ vanishes, so Tr σ #_α ρ = 0');
  if (p.included) {
    for (let c = 0; c < w.length; c++) w[c] /= total; // Σ w = Tr ρ = 1 exactly in exact arithmetic
  }
  if (alpha === 1) {
    let d = 0;
    for (let c = 0; c < w.length; c++) d += 2 * w[c] * ls[c];
    return finite(r, d, lb);
  }
  if (p.included && Math.abs(t) <= 0.5) {
    let s = 0;
    for (let c = 0; c < w.length; c++) s += w[c] * Math.expm1(2 * t * ls[c]);
    return finite(r, Math.log1p(s) / t, lb);
  }
  return finite(r, logSumExp(w, ls.map((x) => 2 * t * x)) / t, lb);
}

const EPS_ = 2 ** -52;

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
      // α defaults to 1 (the measured relative entropy); measured.ts checks the range [1/2, ∞).
      return measuredRenyiDivergence(rho, sigma, params.alpha ?? 1, params) as DivergenceResult;
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
