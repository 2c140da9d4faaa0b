/**
 * Measured relative entropy D_M(ρ‖σ) = sup over measurements of the classical relative entropy of
 * the outcome distributions, through the variational formula of Berta, Fawzi & Tomamichel
 * ("On variational expressions for quantum relative entropies", Lett. Math. Phys. 107 (2017), Lemma 1):
 *
 *     D_M(ρ‖σ) = sup_{ω > 0}  Tr ρ log ω − log Tr σ ω,
 *
 * whose optimum is attained by the projective measurement onto an eigenbasis of the optimal ω.
 *
 * Method (our own): write ω = e^H with H Hermitian and maximise f(H) = Tr ρ H − ln Tr σ e^H by
 * limited-memory BFGS with an Armijo backtracking line search. The gradient is
 * ∇f = ρ − Dexp_H[σ]/Tr σ e^H, with the Fréchet derivative of exp from the Daleckii–Krein formula
 * (first divided differences of exp in the eigenbasis of H). f is not concave in H, but ω ↦
 * Tr ρ log ω − log Tr σ ω is concave on positive definite ω and exp is a diffeomorphism from the
 * Hermitian matrices onto them, so every critical point of f is a global maximum: an ascent that
 * drives the gradient to zero converges to D_M. When ρ is rank deficient the supremum is reached
 * only as some eigenvalues of ω go to 0 (H → −∞ there); the ascent then approaches it without
 * attaining it, and slowly: the gradient along those directions decays like the eigenvalues
 * themselves (in a test with σ of size 16 and ρ of rank 5, 1000 steps left an error near 1e-4 and
 * 3000 steps near 1e-7). `gradientNorm` and `finalChange` show how far the run got; a Newton
 * method on H would do better there and is not implemented.
 *
 * The returned `value` is the classical relative entropy Σ p_k log(p_k/q_k) of the returned
 * measurement (the eigenbasis of the final ω, completed by a basis of ker σ): it is attained, hence a
 * lower bound on D_M up to rounding, and at least f(H). The diagnostics say how far from stationary
 * the final point is (`gradientNorm`) and how much the value changed in the last iteration.
 * No upper bound is certified here; D_M ≤ D (Umegaki) always holds.
 *
 * Supports: +∞ unless supp ρ ⊆ supp σ (the two-outcome measurement {Π_σ, 1 − Π_σ} then gives an
 * infinite classical relative entropy), decided with the tolerance rule of divergence-kit.ts;
 * otherwise everything is computed on supp σ. ρ is normalised to unit trace.
 *
 * Deliberately not here: measured Rényi divergences. Cost: O(m^3) per function evaluation
 * (m = rank σ), O(m^2 · memory) per L-BFGS step; a few hundred steps for well-conditioned inputs.
 */
import { checkDeadline } from '../deadline.js';
import { CMatrix, zeros, adjoint, mul, hermitianPart } from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import {
  analysePair, columns, compress, dividedDifferences, expDivided, hadamardReal, logOfBase,
} from './divergence-kit.js';

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
  /** f(H) = Tr ρ H − log Tr σ e^H at the final H (in the requested base); at most `value`. */
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

/** f(H) and its gradient (as a vector), with the eigenbasis of H. */
function evaluate(x: Float64Array, rhoS: CMatrix, sigmaS: CMatrix): Evaluation {
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
  let trRhoH = 0;
  for (let i = 0; i < m * m; i++) trRhoH += rhoS.re[i] * H.re[i] + rhoS.im[i] * H.im[i];
  // Tr ρH = Σ_ij ρ_ij H_ji = Σ_ij ρ_ij conj(H_ij) → real part Σ (ρre Hre + ρim Him).
  const f = trRhoH - hmax - Math.log(z);
  const K = dividedDifferences(h, Math.exp, Math.exp, expDivided);
  const D = mul(mul(Y, hadamardReal(sigmaY, K)), adjoint(Y));
  const G = zeros(m, m);
  for (let i = 0; i < m * m; i++) {
    G.re[i] = rhoS.re[i] - D.re[i] / z;
    G.im[i] = rhoS.im[i] - D.im[i] / z;
  }
  return { f, grad: toVector(hermitianPart(G)), basis: Y };
}

/** Maximise f by L-BFGS; returns the final point's evaluation and the run's record. */
function ascend(rhoS: CMatrix, sigmaS: CMatrix, x0: Float64Array, maxIterations: number, gtol: number, lb: number) {
  const memory = 12;
  const S: Float64Array[] = [];
  const Yd: Float64Array[] = [];
  let x = x0;
  let cur = evaluate(x, rhoS, sigmaS);
  let iterations = 0;
  let stoppingRule = `reached the iteration limit ${maxIterations}`;
  let finalChange = 0;
  let stall = 0;
  while (iterations < maxIterations) {
    // The request's deadline (src/deadline.ts): every iterate's objective is a lower bound on D_M.
    checkDeadline('the ascent of the measured relative entropy', () => ({ iterations, lowerBound: cur.f / lb }), () => `after ${iterations} steps the best lower bound was ${cur.f / lb}`);
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
    if (!(slope > 0)) {
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
      const e = evaluate(xn, rhoS, sigmaS);
      if (Number.isFinite(e.f) && e.f >= cur.f + 1e-4 * step * slope) {
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

/** D_M(ρ‖σ) with the optimal projective measurement. */
export function measuredRelativeEntropy(rho: CMatrix, sigma: CMatrix, options: MeasuredOptions = {}): MeasuredResult {
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
  > = {
    family: 'measured',
    base: options.base ?? 2,
    tolerance: tol,
    supportIncluded: p.included,
    supportsOrthogonal: p.orthogonal,
    leakage: p.leakage,
    rankRho: p.rho.support.length,
    rankSigma: p.sigma.support.length,
  };
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
  if (!p.included) {
    const { pr, qr } = probs(p.sigma.vectors);
    return {
      ...base,
      value: Infinity,
      reason: `supp ρ is not contained in supp σ: Tr ρ(1 − Π_σ) = ${p.leakage.toExponential(3)} exceeds the support tolerance ${tol}; the measurement {Π_σ, 1 − Π_σ} already gives an infinite classical relative entropy`,
      measurement: p.sigma.vectors,
      p: pr,
      q: qr,
      objective: Infinity,
      iterations: 0,
      stoppingRule: 'support condition',
      gradientNorm: 0,
      finalChange: 0,
    };
  }
  // Everything on supp σ, in σ's eigenbasis: σ_S = diag(s), ρ_S = V1* ρ V1 normalised.
  const m = p.s.length;
  const rc = compress(rho, V1);
  const rhoS = zeros(m, m);
  for (let i = 0; i < m * m; i++) {
    rhoS.re[i] = rc.re[i] / (p.traceRho * p.inside);
    rhoS.im[i] = rc.im[i] / (p.traceRho * p.inside);
  }
  const sigmaS = zeros(m, m);
  for (let j = 0; j < m; j++) sigmaS.re[j * m + j] = p.s[j];
  // Start at H0 = log(ρ_S + δ) − log σ_S with δ = 1e-3 λ_max(ρ) (near the optimum when ρ and σ
  // commute; the shift keeps H0 finite on ker ρ).
  const r = eigh(hermitianPart(rhoS), { vectors: true });
  const rmax = Math.max(...Array.from(r.values));
  const delta = 1e-3 * rmax;
  const logRho = mul(mul(r.vectors!, diagonalOf(Array.from(r.values, (v) => Math.log(Math.max(v, 0) + delta)))), adjoint(r.vectors!));
  for (let j = 0; j < m; j++) logRho.re[j * m + j] -= Math.log(p.s[j]);
  const run = ascend(rhoS, sigmaS, toVector(hermitianPart(logRho)), maxIterations, gtol, lb);
  const basis = mul(V1, run.cur.basis);
  const full = kernel.length ? hstack(basis, columns(p.sigma.vectors, kernel)) : basis;
  const { pr, qr } = probs(full);
  let kl = 0;
  for (let k = 0; k < pr.length; k++) if (pr[k] > 0 && qr[k] > 0) kl += pr[k] * Math.log(pr[k] / qr[k]);
  const result: MeasuredResult = {
    ...base,
    value: Math.max(kl, run.cur.f) / lb,
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
      'ρ is rank deficient: the supremum is approached as eigenvalues of ω go to 0 and is not attained; the value is that of the returned measurement, a lower bound on D_M.',
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
