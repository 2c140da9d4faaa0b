/**
 * Entropies of one group of subsystems given another, for any grouping of the subsystems of a
 * multipartite density matrix (groups are arrays of subsystem indices; order within a group is the
 * order of the tensor factors):
 *
 *  - conditional entropy      H(A|B) = H(AB) − H(B)
 *  - mutual information       I(A:B) = H(A) + H(B) − H(AB)
 *  - conditional mutual info  I(A;C|B) = H(AB) + H(BC) − H(B) − H(ABC)  (≥ 0: strong subadditivity)
 *  - conditional Rényi entropies (Tomamichel, Berta & Hayashi, J. Math. Phys. 55, 082206 (2014)):
 *      non-optimised  H_α^↓(A|B) = −D_α(ρ_AB ‖ 1_A ⊗ ρ_B),
 *      optimised      H_α^↑(A|B) = sup_σ −D_α(ρ_AB ‖ 1_A ⊗ σ_B) over states σ_B,
 *    for the Petz and the sandwiched families. Petz optimised has the closed form (TBH 2014, Lemma 1)
 *      H̄_α^↑(A|B) = α/(1−α) log Tr (Tr_A ρ_AB^α)^{1/α},  optimiser σ_B ∝ (Tr_A ρ_AB^α)^{1/α}.
 *    Sandwiched optimised is computed by the iteration described at `sandwichedOptimised`.
 *
 * Near α = 1 every value is computed without cancellation (expm1 forms; the sandwiched values go
 * through the divergence code of divergences.ts), so α → 1 joins H(A|B) continuously.
 * Deliberately not here: the optimised sandwiched entropy at α = ∞ (the conditional min-entropy, an
 * SDP). Cost: eigendecompositions of the marginals, O(d^3); the sandwiched iteration a few per step.
 */
import { checkDeadline } from '../deadline.js';
import { CMatrix, kron, identity, mul, adjoint, zeros, hermitianPart } from '../linalg/cmatrix.js';
import { eigh, eigvalsh } from '../linalg/eigh.js';
import { marginal, partialTrace, product } from '../linalg/subsystems.js';
import { DEFAULT_SUPPORT_TOLERANCE, fromSpectrum } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import { entropy, EntropyOptions } from './entropy.js';
import { divergence } from './divergences.js';
import { columns, doubleOperatorIntegral, powerDivided, spectral } from '../linalg/spectral.js';
import { logOfBase, checkOrder, logSumExp } from './divergence-kit.js';

/** Check that the groups are disjoint lists of valid subsystem indices. */
export function checkGroups(dims: readonly number[], groups: Record<string, readonly number[]>): void {
  const seen = new Map<number, string>();
  for (const [name, g] of Object.entries(groups)) {
    if (!Array.isArray(g)) throw new RhoError('invalid-argument', `${name} must be an array of subsystem indices.`, name);
    g.forEach((s, k) => {
      if (!Number.isInteger(s) || s < 0 || s >= dims.length) {
        throw new RhoError('invalid-argument', `Subsystem ${s} does not exist; indices run from 0 to ${dims.length - 1}.`, `${name}[${k}]`);
      }
      const other = seen.get(s);
      if (other !== undefined) {
        throw new RhoError('invalid-argument', `Subsystem ${s} appears in both ${other} and ${name}; the groups must be disjoint.`, `${name}[${k}]`);
      }
      seen.set(s, name);
    });
  }
}

function h(rho: CMatrix, dims: readonly number[], keep: readonly number[], options: EntropyOptions): number {
  if (keep.length === 0) return 0;
  return entropy(marginal(rho, dims, keep), 1, options).value;
}

export interface ConditionalEntropyResult {
  value: number;
  /** The entropies of the marginals that enter (same base). */
  parts: Record<string, number>;
  base: number;
  tolerance: number;
}

/** H(A|B) = H(AB) − H(B). */
export function conditionalEntropy(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: EntropyOptions = {},
): ConditionalEntropyResult {
  checkGroups(dims, { a, b });
  const hAB = h(rho, dims, [...a, ...b], options);
  const hB = h(rho, dims, b, options);
  return { value: hAB - hB, parts: { AB: hAB, B: hB }, base: options.base ?? 2, tolerance: options.tol ?? DEFAULT_SUPPORT_TOLERANCE };
}

/** I(A:B) = H(A) + H(B) − H(AB). */
export function mutualInformation(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: EntropyOptions = {},
): ConditionalEntropyResult {
  checkGroups(dims, { a, b });
  const hA = h(rho, dims, a, options);
  const hB = h(rho, dims, b, options);
  const hAB = h(rho, dims, [...a, ...b], options);
  return { value: hA + hB - hAB, parts: { A: hA, B: hB, AB: hAB }, base: options.base ?? 2, tolerance: options.tol ?? DEFAULT_SUPPORT_TOLERANCE };
}

/** I(A;C|B) = H(AB) + H(BC) − H(B) − H(ABC). */
export function conditionalMutualInformation(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], c: readonly number[], options: EntropyOptions = {},
): ConditionalEntropyResult {
  checkGroups(dims, { a, b, c });
  const hAB = h(rho, dims, [...a, ...b], options);
  const hBC = h(rho, dims, [...b, ...c], options);
  const hB = h(rho, dims, b, options);
  const hABC = h(rho, dims, [...a, ...b, ...c], options);
  return {
    value: hAB + hBC - hB - hABC,
    parts: { AB: hAB, BC: hBC, B: hB, ABC: hABC },
    base: options.base ?? 2,
    tolerance: options.tol ?? DEFAULT_SUPPORT_TOLERANCE,
  };
}

// ---------------------------------------------------------------------------------------------
// Conditional Rényi entropies

export interface ConditionalRenyiOptions extends EntropyOptions {
  family: 'petz' | 'sandwiched';
  alpha: number;
  /** sup over σ_B (true) or σ_B = ρ_B (false). */
  optimized: boolean;
  /** Sandwiched optimised: largest number of iterations (default 500). */
  maxIterations?: number;
  /** Sandwiched optimised: stop when the certified gap bound is below this, in the requested base (default 1e-10). */
  gapTolerance?: number;
}

export interface ConditionalRenyiResult {
  value: number;
  reason?: string;
  family: 'petz' | 'sandwiched';
  alpha: number;
  optimized: boolean;
  base: number;
  tolerance: number;
  /** The σ_B used (ρ_B, or the optimiser), normalised, on the full B space. */
  sigmaB?: CMatrix;
  iterations?: number;
  stoppingRule?: string;
  /** Change of the entropy in the last iteration (requested base). */
  finalChange?: number;
  /** Certified bound on (optimal value − returned value), from the Frank–Wolfe gap (requested base). */
  gapBound?: number;
  notes?: string[];
  [extra: string]: unknown;
}

type Head = Pick<ConditionalRenyiResult, 'family' | 'alpha' | 'optimized' | 'base' | 'tolerance'>;

/** ρ_AB with A first, and its dimensions. */
function bipartite(rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[]) {
  const dA = product(a.map((s) => dims[s]));
  const dB = product(b.map((s) => dims[s]));
  const rhoAB = a.length + b.length === dims.length && [...a, ...b].every((s, k) => s === k) ? rho : marginal(rho, dims, [...a, ...b]);
  return { rhoAB, dA, dB };
}

/** Conditional Rényi entropy H_α^{↑/↓}(A|B) for the Petz or sandwiched family. */
export function conditionalRenyiEntropy(
  rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], options: ConditionalRenyiOptions,
): ConditionalRenyiResult {
  checkGroups(dims, { a, b });
  const { family, optimized } = options;
  if (family !== 'petz' && family !== 'sandwiched') {
    throw new RhoError('unknown-family', `Unknown conditional Rényi family "${family}"; known families: petz, sandwiched.`, 'family');
  }
  const alpha = options.alpha;
  if (family === 'petz') checkOrder(alpha, 'alpha', (x) => (optimized ? x > 0 : x >= 0) && x < Infinity, optimized ? '(0, ∞)' : '[0, ∞)', 'petz');
  else checkOrder(alpha, 'alpha', (x) => x >= 0.5 && (!optimized || x < Infinity), optimized ? '[1/2, ∞)' : '[1/2, ∞]', 'sandwiched');
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const lb = logOfBase(options.base);
  const base = options.base ?? 2;
  const { rhoAB, dA, dB } = bipartite(rho, dims, a, b);
  const head: Head = { family, alpha, optimized, base, tolerance: tol };

  if (alpha === 1) {
    const c = conditionalEntropy(rho, dims, a, b, options);
    return { ...head, value: c.value, notes: ['α = 1 is the conditional von Neumann entropy H(A|B) (the α → 1 limit).'] };
  }
  const rhoB = partialTrace(rhoAB, [dA, dB], [0]);
  if (!optimized) {
    const d = divergence(family, rhoAB, kron(identity(dA), rhoB), { alpha, base, tol });
    return { ...head, value: -d.value, reason: d.reason, sigmaB: rhoB };
  }
  if (family === 'petz') return petzOptimised(rhoAB, dA, dB, alpha, tol, lb, head);
  return sandwichedOptimised(rhoAB, rhoB, dA, dB, alpha, tol, lb, head, options);
}

/** H̄_α^↑(A|B) = α/(1−α) log Tr (Tr_A ρ^α)^{1/α} (TBH 2014), computed without cancellation near α = 1. */
function petzOptimised(
  rhoAB: CMatrix, dA: number, dB: number, alpha: number, tol: number, lb: number,
  head: Head,
): ConditionalRenyiResult {
  const S = spectral(rhoAB, tol);
  let total = 0;
  for (const i of S.support) total += S.values[i];
  const r = S.support.map((i) => S.values[i] / total);
  const f = new Float64Array(S.values.length);
  S.support.forEach((i, k) => (f[i] = Math.pow(r[k], alpha)));
  const X = hermitianPart(partialTrace(fromSpectrum(S.vectors, f), [dA, dB], [0]));
  const ex = eigh(X, { vectors: true });
  const xmax = Math.max(...ex.values);
  const x = Array.from(ex.values).filter((v) => v > tol * xmax && v > 0);
  const t = alpha - 1;
  let nats: number;
  if (Math.abs(t) <= 0.5) {
    // Tr X^{1/α} − 1 = (Tr ρ^α − 1) + Σ x (x^{1/α − 1} − 1): both O(α − 1).
    let s = 0;
    for (const v of r) s += v * Math.expm1(t * Math.log(v));
    for (const v of x) s += v * Math.expm1((-t / alpha) * Math.log(v));
    nats = (alpha / (1 - alpha)) * Math.log1p(s);
  } else {
    nats = (alpha / (1 - alpha)) * logSumExp(x.map(() => 1), x.map((v) => Math.log(v) / alpha));
  }
  // Optimiser σ_B = X^{1/α}/Tr X^{1/α}.
  const thr = tol * xmax;
  const pw = Array.from(ex.values, (v) => (v > thr && v > 0 ? Math.pow(v, 1 / alpha) : 0));
  const z = pw.reduce((u, v) => u + v, 0);
  const sigmaB = fromSpectrum(ex.vectors!, pw.map((v) => v / z));
  return { ...head, value: nats / lb, sigmaB };
}

/**
 * Sandwiched optimised conditional Rényi entropy, H̃_α^↑(A|B) = sup_σ −D̃_α(ρ_AB ‖ 1_A ⊗ σ_B).
 *
 * Reduction: σ_B may be restricted to supp ρ_B (for α > 1 it must cover it; for α ∈ [1/2, 1) the
 * pinching onto supp ρ_B ⊕ its complement cannot increase D̃_α, by data processing, and the
 * complementary block does not enter). With R = ρ_AB^{1/2} (compressed to A ⊗ supp ρ_B) and
 * β = (α−1)/α, D̃_α(ρ_AB‖1⊗σ) = log Q(σ)/(α−1) with Q(σ) = Tr (R (1⊗σ^{−β}) R)^α. Q is convex
 * in σ for α > 1 and concave for α ∈ [1/2, 1) (joint convexity/concavity of the sandwiched
 * quasi-entropy, Frank & Lieb, J. Math. Phys. 54, 122201 (2013)), so we minimise φ = Q (α > 1) or
 * φ = −Q (α < 1) over states σ_B, a convex problem.
 *
 * Iteration (our derivation): stationarity of Q on {Tr σ = 1}, written with μ = σ^{−β}, reads
 * Z(σ) ∝ σ^{(2α−1)/α} with Z(σ) = Tr_A[R Y^{α−1} R], Y = R(1⊗σ^{−β})R. The map
 *     F(σ) = (σ^p Z(σ) σ^p)^{1/α} / Tr(·),   p = (α−1)²/(2α),
 * has exactly these stationary points as fixed points, and when ρ_AB is classical on B it sends
 * any σ to the optimiser in one step (the classical optimiser is σ ∝ (Σ_a p(a,b)^α)^{1/α}).
 * Each step moves along the segment σ + λ(F(σ) − σ), λ ∈ {1, 1/2, ...}, accepting the first λ with
 * Armijo decrease of φ; if F(σ) − σ is not a descent direction, a matrix exponentiated-gradient
 * step σ ∝ exp(log σ − η∇φ) (always a descent direction) is used instead. So φ decreases
 * monotonically. Stopping rule: the Frank–Wolfe gap g = ⟨∇φ, σ⟩ − λ_min(∇φ) bounds φ(σ) − min φ
 * (convexity), which we turn into a certified bound on the optimal entropy minus ours
 * (`gapBound`); we stop when it is below `gapTolerance`, when no step decreases φ, when the
 * entropy has changed by less than 1e-14 (relative) in 5 consecutive iterations, or after
 * `maxIterations`. Near the optimum φ is flat to second order, so the value settles long before
 * the gap bound (first order in the distance to the optimiser) does: expect `gapBound` around 1e-8
 * when the value itself is accurate to ~1e-14. Optimisers on the boundary (σ_B singular, seen for
 * α near 1/2 and rank-deficient ρ_AB) converge slowly; `gapBound` then says how far off we may be. The returned value is −D̃_α(ρ_AB‖1⊗σ) at the final σ, which is attained, hence a
 * lower bound on H̃_α^↑ that is within `gapBound` of it.
 */
function sandwichedOptimised(
  rhoAB: CMatrix, rhoB: CMatrix, dA: number, dB: number, alpha: number, tol: number, lb: number,
  head: Head, options: ConditionalRenyiOptions,
): ConditionalRenyiResult {
  const maxIterations = options.maxIterations ?? 500;
  const gapTolerance = options.gapTolerance ?? 1e-10;
  const SB = spectral(hermitianPart(rhoB), tol);
  const VB = columns(SB.vectors, SB.support);
  const m = VB.cols;
  const finish = (sig: CMatrix, extra: Partial<ConditionalRenyiResult>): ConditionalRenyiResult => {
    const full = hermitianPart(mul(mul(VB, sig), adjoint(VB)));
    const d = divergence('sandwiched', rhoAB, kron(identity(dA), full), { alpha, base: head.base, tol });
    return { ...head, value: -d.value, reason: d.reason, sigmaB: full, ...extra };
  };
  if (m === 1) {
    const one = zeros(1, 1);
    one.re[0] = 1;
    return finish(one, { iterations: 0, stoppingRule: 'supp ρ_B is one-dimensional: σ_B is fixed', finalChange: 0, gapBound: 0 });
  }
  const IV = kron(identity(dA), VB);
  const rhoC = hermitianPart(mul(mul(adjoint(IV), rhoAB), IV));
  const Sr = spectral(rhoC, tol);
  const R = fromSpectrum(Sr.vectors, Array.from(Sr.values, (v) => (v > 0 ? Math.sqrt(v) : 0)));
  const beta = (alpha - 1) / alpha;
  const sign = alpha > 1 ? 1 : -1;

  interface Point { sigma: CMatrix; phi: number; Q: number; grad: CMatrix; Z: CMatrix; s: Float64Array; W: CMatrix }
  const evaluate = (sigma: CMatrix, withGrad: boolean): Point | undefined => {
    const es = eigh(hermitianPart(sigma), { vectors: true });
    const s = es.values;
    if (!(s[0] > 0)) return undefined; // left the interior
    const W = es.vectors!;
    const sp = fromSpectrum(W, Array.from(s, (v) => Math.pow(v, -beta)));
    const Y = hermitianPart(mul(mul(R, kron(identity(dA), sp)), R));
    const ey = eigh(Y, { vectors: true });
    let ymax = 0;
    for (const v of ey.values) ymax = Math.max(ymax, v);
    const thr = tol * ymax;
    let Q = 0;
    for (const v of ey.values) if (v > thr) Q += Math.pow(v, alpha);
    if (!Number.isFinite(Q) || Q <= 0) return undefined;
    const point: Point = { sigma, phi: sign * Q, Q, grad: sigma, Z: sigma, s, W };
    if (!withGrad) return point;
    const Yp = fromSpectrum(ey.vectors!, Array.from(ey.values, (v) => (v > thr ? Math.pow(v, alpha - 1) : 0)));
    const Z = hermitianPart(partialTrace(mul(mul(R, Yp), R), [dA, m], [0]));
    // Fréchet derivative of σ ↦ σ^{−β} in the direction Z (Daleckii–Krein).
    const g = doubleOperatorIntegral(powerDivided(-beta), sigma, sigma, Z, es, es);
    const grad = zeros(m, m);
    for (let k = 0; k < m * m; k++) {
      grad.re[k] = sign * alpha * g.re[k];
      grad.im[k] = sign * alpha * g.im[k];
    }
    point.grad = hermitianPart(grad);
    point.Z = Z;
    return point;
  };
  const inner = (x: CMatrix, y: CMatrix) => {
    let v = 0;
    for (let k = 0; k < x.re.length; k++) v += x.re[k] * y.re[k] + x.im[k] * y.im[k];
    return v;
  };
  const normalise = (x: CMatrix) => {
    let t = 0;
    for (let i = 0; i < m; i++) t += x.re[i * m + i];
    const out = zeros(m, m);
    for (let k = 0; k < m * m; k++) {
      out.re[k] = x.re[k] / t;
      out.im[k] = x.im[k] / t;
    }
    return hermitianPart(out);
  };
  const entropyOf = (Q: number) => -Math.log(Q) / (alpha - 1);
  const gapOf = (pt: Point) => {
    const g = inner(pt.grad, pt.sigma) - eigvalsh(pt.grad)[0];
    const fw = Math.max(g, 0);
    const bound = alpha > 1 ? (fw < pt.Q ? Math.log(pt.Q / (pt.Q - fw)) / (alpha - 1) : Infinity) : Math.log1p(fw / pt.Q) / (1 - alpha);
    return bound / lb;
  };

  // Start from ρ_B (the non-optimised point), written on its support.
  let cur = evaluate(normalise(fromDiag(SB.support.map((i) => SB.values[i]))), true)!;
  let iterations = 0;
  let stoppingRule = `reached the iteration limit ${maxIterations}`;
  let finalChange = 0;
  let gapBound = gapOf(cur);
  let flat = 0;
  const p = ((alpha - 1) * (alpha - 1)) / (2 * alpha);
  while (iterations < maxIterations) {
    // The request's deadline (src/deadline.ts): the current σ_B gives a lower bound, within gapBound of the optimum.
    checkDeadline('the optimised sandwiched conditional Rényi entropy', () => ({
      iterations, lowerBound: entropyOf(cur.Q) / lb, upperBound: entropyOf(cur.Q) / lb + gapBound,
    }), () => `after ${iterations} iterations it lay between ${entropyOf(cur.Q) / lb} and ${entropyOf(cur.Q) / lb + gapBound}`);
    if (gapBound <= gapTolerance) {
      stoppingRule = `certified gap bound ${gapBound.toExponential(2)} <= ${gapTolerance}`;
      break;
    }
    iterations++;
    let next: Point | undefined;
    // Fixed-point direction.
    const sp = fromSpectrum(cur.W, Array.from(cur.s, (v) => Math.pow(v, p)));
    const T = hermitianPart(mul(mul(sp, cur.Z), sp));
    const et = eigh(T, { vectors: true });
    const F = normalise(fromSpectrum(et.vectors!, Array.from(et.values, (v) => (v > 0 ? Math.pow(v, 1 / alpha) : 0))));
    const D = zeros(m, m);
    for (let k = 0; k < m * m; k++) {
      D.re[k] = F.re[k] - cur.sigma.re[k];
      D.im[k] = F.im[k] - cur.sigma.im[k];
    }
    const slope = inner(cur.grad, D);
    const along = (lam: number) => {
      const cand = zeros(m, m);
      for (let k = 0; k < m * m; k++) {
        cand.re[k] = cur.sigma.re[k] + lam * D.re[k];
        cand.im[k] = cur.sigma.im[k] + lam * D.im[k];
      }
      return evaluate(hermitianPart(cand), false);
    };
    if (slope < 0) {
      for (let lam = 1, tries = 0; tries < 40; tries++, lam *= 0.5) {
        const e = along(lam);
        if (e && e.phi <= cur.phi + 1e-4 * lam * slope) {
          // Accepted; if the full step was accepted, try extrapolating (λ = 2, 4, ...) while φ keeps
          // decreasing: the fixed-point map often undershoots along a slowly converging direction.
          let best = e;
          if (lam === 1) {
            for (let big = 2; big <= 64; big *= 2) {
              const f = along(big);
              if (!f || !(f.phi < best.phi)) break;
              best = f;
            }
          }
          next = evaluate(best.sigma, true);
          break;
        }
      }
      if (!next && Math.abs(slope) <= 1e-13 * Math.abs(cur.phi)) {
        // Within rounding of the minimum the value no longer tells steps apart; accept the full
        // fixed-point step when it lowers the certified gap instead.
        const e = along(1);
        const full = e && evaluate(e.sigma, true);
        if (full && gapOf(full) < gapBound) next = full;
      }
    }
    if (!next) {
      // Exponentiated-gradient step with backtracking.
      const logS = fromSpectrum(cur.W, Array.from(cur.s, Math.log));
      const gnorm = Math.max(...Array.from(eigvalsh(cur.grad), Math.abs));
      for (let eta = 1 / Math.max(gnorm, 1e-300), tries = 0; tries < 60; tries++, eta *= 0.5) {
        const Hm = zeros(m, m);
        for (let k = 0; k < m * m; k++) {
          Hm.re[k] = logS.re[k] - eta * cur.grad.re[k];
          Hm.im[k] = logS.im[k] - eta * cur.grad.im[k];
        }
        const eh = eigh(hermitianPart(Hm), { vectors: true });
        const hmax = Math.max(...Array.from(eh.values));
        const cand = normalise(fromSpectrum(eh.vectors!, Array.from(eh.values, (v) => Math.exp(v - hmax))));
        const e = evaluate(cand, false);
        if (e && e.phi < cur.phi) {
          next = evaluate(e.sigma, true);
          break;
        }
      }
    }
    if (!next) {
      stoppingRule = 'no step decreases the objective (stationary to rounding)';
      finalChange = 0;
      break;
    }
    finalChange = (entropyOf(next.Q) - entropyOf(cur.Q)) / lb;
    cur = next;
    gapBound = gapOf(cur);
    if (Math.abs(finalChange) <= 1e-14 * Math.max(1, Math.abs(entropyOf(cur.Q) / lb))) {
      if (++flat >= 5) {
        stoppingRule = 'the entropy changed by less than 1e-14 (relative) in 5 consecutive iterations';
        break;
      }
    } else flat = 0;
  }
  return finish(cur.sigma, { iterations, stoppingRule, finalChange, gapBound });
}

function fromDiag(v: number[]): CMatrix {
  const out = zeros(v.length, v.length);
  for (let i = 0; i < v.length; i++) out.re[i * v.length + i] = v[i];
  return out;
}
