/**
 * The interior-point method: a primal–dual path-following method on the homogeneous self-dual
 * embedding, with Nesterov–Todd (NT) scaling and Mehrotra's predictor–corrector.
 *
 * Homogeneous self-dual embedding (Ye, Todd & Mizuno 1994; Xu, Hung & Ye 1996), as used e.g. in
 * the conic solvers described by Andersen, Roos & Terlaky (2003) and Vandenberghe (2010):
 *
 *     A x − b τ = 0,   −Aᵀy − s + c τ = 0,   b·y − ⟨c, x⟩ − κ = 0,   x ∈ K, s ∈ K*, τ, κ ≥ 0
 *
 * started from x = s = e (identity blocks, ones), y = 0, τ = κ = 1. Each iteration solves the
 * linearized system with right-hand side −(1 − σ)·(residuals) and the centred, Mehrotra-corrected
 * complementarity equations in the NT-scaled space, and takes one common step for all variables.
 * When τ stays positive, x/τ, y/τ, s/τ approach an optimal pair; when τ → 0 the iterates approach
 * an infeasibility certificate, which is read off and checked (status 'primal-infeasible' with a
 * dual ray, 'dual-infeasible' with a primal ray). This is the "homogeneous self-dual embedding"
 * option for infeasibility detection: no phase one, no big-M.
 *
 * NT scaling of a PSD block (Todd, Toh & Tütüncü 1998): X = L Lᵀ, S = R Rᵀ, Rᵀ L = U Σ Vᵀ,
 * G = L V Σ^(−1/2); then Gᵀ S G = G⁻¹ X G⁻ᵀ = Σ =: λ and W = G Gᵀ satisfies W S W = X. The
 * Schur complement is M_ij = ⟨A_i, W A_j W⟩ (schur.ts). NT was chosen over HKM because it treats
 * X and S symmetrically, so the step lengths and the Mehrotra corrector are computed in one
 * scaled space on the diagonal λ.
 *
 * Free variables are handled natively through a bordered Schur system (no splitting into two
 * nonnegative parts, which would make the iterates unbounded).
 *
 * Safeguards for degenerate problems (no interior, dependent constraints, rank-deficient optima),
 * none of which costs anything measurable on a well-posed solve:
 *  - every step is accepted only when the new iterate is numerically interior (Cholesky factors of
 *    X and S on every block, positive finite λ, τ, κ and orthant coordinates); otherwise it is
 *    retried shorter (in place, along the same direction). The step to the boundary comes from an eigenvalue
 *    computed in floating point and is not trusted on its own.
 *  - when the Mehrotra-corrected direction allows no step, an uncorrected, at least half-centred
 *    direction is tried before giving up.
 *  - the iterate with the best merit max(residuals/feasTol, relative gap/gapTol) is kept; a solve
 *    that ends as 'inaccurate' or 'iteration-limit' returns it (and says so in `message`), with its
 *    residuals and gap, instead of whatever the last iterate was.
 *  - data of tiny or huge magnitude is equilibrated first (scaling.ts; rows, b and c by powers of
 *    two, only outside [1/64, 64], so ordinary problems run bit for bit as without it); every test
 *    runs on the equilibrated problem and 'optimal' also requires the tolerances in the user's scale.
 *  - numerically dependent constraints are dropped by the Schur factorization (dense.ts,
 *    choleskyInPlaceGuarded) and counted in `dependentConstraints`.
 *
 * Does not: presolve, scale the data, exploit low rank of constraint matrices, or warm start.
 * Numerical answers are evidence: a status 'optimal' means the residuals and the relative gap
 * met the tolerances for this floating-point iterate; check `primalResidual`, `dualResidual` and
 * `relativeGap` on the answer when a decision hangs on a small number.
 *
 * Cost per iteration: Schur assembly (schur.ts, complex arithmetic on Hermitian blocks), its
 * factorization, and O(n³) per PSD block for the scaling (Cholesky factors and a one-sided Jacobi
 * SVD), the directions and the step lengths (tridiagonalization and bisection). Hermitian blocks do
 * all of these per-block steps on the complex h×h matrix (complexdense.ts), not on the 2h×2h real
 * embedding, about half the flops; only X, S, their steps and the matrices handed to A(·) are kept
 * embedded. Typically 8–40 iterations. Where the time went in this round's profiles (bench/sdp.ts
 * shapes): hypothesis testing at d = 16 (257 constraints), Schur assembly ≈ 25% and its 257×257
 * Cholesky ≈ 25%, triangular solves with refinement ≈ 10%, per-block work ≈ 15%; at d = 8 and for
 * the guessing shape (small blocks), assembly ≈ 10–18%, the rest spread over per-block kernels and
 * loop overhead, GC ≈ 5–10%. Measured against cvxopt in bench/sdp.ts.
 */
import { zeros, type CMatrix } from '../linalg/index.js';
import { compile, type Compiled } from './compile.js';
import { cholesky, congruence, congruenceT, matMul, matTMul, minEig, svdJacobi } from './dense.js';
import { SchurSystem } from './schur.js';
import { equilibrate } from './scaling.js';
import { checkSdpLimits } from './cost.js';
import { deadlineError, deadlinePassed } from '../deadline.js';
import {
  cCholesky,
  cCongruence,
  cCongruenceH,
  cGram,
  cHMul,
  cMinEigInPlace,
  cMul,
  cSvdJacobi,
  embedComplex,
  extractHermitian,
} from './complexdense.js';
import type { BlockValue, Certificate, IterationInfo, SdpAnswer, SdpOptions, SdpProblem, SdpStatus } from './types.js';

export const DEFAULT_OPTIONS = {
  gapTolerance: 1e-8,
  feasibilityTolerance: 1e-8,
  maxIterations: 100,
  stepFraction: 0.98,
} as const;

/**
 * Whether Hermitian blocks' step-length eigenvalues stop bisecting once they are known to lie above
 * −½·min(1, stepFraction) (such an eigenvalue allows a step ≥ 2/min(1, f), and steps are capped at 1).
 * An earlier attempt at this made a degenerate smooth-max instance lose positive definiteness; the
 * cause was not rounding but a wrong 1×1 case in cMinEigInPlace (it returned the floor for an
 * eigenvalue below it), fixed in complexdense.ts; the step is now also safeguarded (see solveSdpWith).
 */
export const EARLY_STEP_EXIT = false;

/** Per-PSD-block storage in one buffer, allocated once per solve (small blocks: no GC churn). */
class Blocks {
  readonly data: Float64Array;
  readonly v: Float64Array[];
  constructor(sizes: readonly number[]) {
    let total = 0;
    for (const s of sizes) total += s;
    this.data = new Float64Array(total);
    this.v = [];
    let off = 0;
    for (const s of sizes) {
      this.v.push(this.data.subarray(off, off + s));
      off += s;
    }
  }
}

/** A(x): constraint values of the cone and free parts. */
function applyA(cp: Compiled, X: Float64Array[], xL: Float64Array, xF: Float64Array | null, out: Float64Array = new Float64Array(cp.m)): Float64Array {
  out.fill(0);
  const psd = cp.psd;
  for (let k = 0; k < psd.length; k++) {
    const blk = psd[k];
    const x = X[k];
    const n = blk.n;
    for (let a = 0; a < blk.cons.length; a++) {
      const p = blk.tp[a];
      const q = blk.tq[a];
      const v = blk.tv[a];
      let s = 0;
      for (let t = 0; t < v.length; t++) s += (p[t] === q[t] ? 1 : 2) * v[t] * x[p[t] * n + q[t]];
      out[blk.cons[a]] += s;
    }
  }
  for (let i = 0; i < cp.m; i++) {
    let s = 0;
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) s += cp.linVal[e] * xL[cp.linIdx[e]];
    if (xF) for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) s += cp.freeVal[e] * xF[cp.freeIdx[e]];
    out[i] += s;
  }
  return out;
}

/** Aᵀy into M (dense symmetric per PSD block), L (orthant), F (free). */
function applyAT(cp: Compiled, y: Float64Array, M: Float64Array[], L: Float64Array, F: Float64Array): void {
  const psd = cp.psd;
  for (let k = 0; k < psd.length; k++) {
    const blk = psd[k];
    const n = blk.n;
    const out = M[k];
    out.fill(0);
    for (let a = 0; a < blk.cons.length; a++) {
      const yi = y[blk.cons[a]];
      if (yi === 0) continue;
      const p = blk.tp[a];
      const q = blk.tq[a];
      const v = blk.tv[a];
      for (let t = 0; t < v.length; t++) {
        out[p[t] * n + q[t]] += yi * v[t];
        if (p[t] !== q[t]) out[q[t] * n + p[t]] += yi * v[t];
      }
    }
  }
  L.fill(0);
  F.fill(0);
  for (let i = 0; i < cp.m; i++) {
    const yi = y[i];
    if (yi === 0) continue;
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) L[cp.linIdx[e]] += yi * cp.linVal[e];
    for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) F[cp.freeIdx[e]] += yi * cp.freeVal[e];
  }
}

function dotv(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k] * b[k];
  return s;
}

function norm2(a: ArrayLike<number>): number {
  return Math.sqrt(dotv(a, a));
}

/** Largest α with diag(λ) + α·D ⪰ 0 (D symmetric n×n); Infinity when D ⪰ 0. */
function maxStepPsd(lambda: Float64Array, D: Float64Array, n: number, t: Float64Array, work: Float64Array): number {
  for (let i = 0; i < n; i++) {
    const si = 1 / Math.sqrt(lambda[i]);
    for (let j = 0; j < n; j++) t[i * n + j] = (D[i * n + j] * si) / Math.sqrt(lambda[j]);
  }
  const mn = minEig(t, n, work);
  return mn < 0 ? -1 / mn : Infinity;
}

interface HermitianStepWork {
  diag: Float64Array;
  off2: Float64Array;
  v: Float64Array;
}

/** Largest α with diag(λ) + α·D ⪰ 0 for a complex Hermitian h×h D (complexdense.ts layout). */
/**
 * Step lengths are only ever used as min(1, f·α_max) with f = stepFraction (≤ 1) or 1 for the
 * predictor, so an eigenvalue above floor = −½·min(1, f) (α_max ≥ 2/min(1, f)) needs no bisection:
 * it is reported as `floor` itself, and the step is capped at 1 either way.
 */
function maxStepHermitian(lambda: Float64Array, D: Float64Array, h: number, t: Float64Array, w: HermitianStepWork, floor: number): number {
  const hh = h * h;
  for (let i = 0; i < h; i++) {
    const si = 1 / Math.sqrt(lambda[i]);
    for (let j = 0; j <= i; j++) {
      const f = si / Math.sqrt(lambda[j]);
      t[i * h + j] = D[i * h + j] * f;
      t[hh + i * h + j] = D[hh + i * h + j] * f;
    }
  }
  const mn = cMinEigInPlace(t, h, w.diag, w.off2, w.v, floor);
  return mn < 0 ? -1 / mn : Infinity;
}

/** Read an internal PSD block back as the user's matrix (Hermitian blocks from their embedding). */
function readBlock(M: Float64Array, n: number, hermitian: boolean, scale: number): CMatrix {
  if (!hermitian) {
    const out = zeros(n, n);
    for (let k = 0; k < n * n; k++) out.re[k] = M[k] * scale;
    return out;
  }
  const s = n / 2;
  const out = zeros(s, s);
  for (let i = 0; i < s; i++) {
    for (let j = 0; j < s; j++) {
      out.re[i * s + j] = 0.5 * (M[i * n + j] + M[(i + s) * n + j + s]) * scale;
      out.im[i * s + j] = 0.5 * (M[(i + s) * n + j] - M[i * n + j + s]) * scale;
    }
  }
  return out;
}

function userBlocks(cp: Compiled, X: Float64Array[], xL: Float64Array, xF: Float64Array | null, scale: number): BlockValue[] {
  return cp.cones.map((cone, k) => {
    const pl = cp.place[k];
    if (pl.type === 'psd') return readBlock(X[pl.index], cp.psd[pl.index].n, cp.psd[pl.index].hermitian, scale);
    if (pl.type === 'lin') return Array.from(xL.subarray(pl.offset, pl.offset + cone.size), (v) => v * scale);
    return xF ? Array.from(xF.subarray(pl.offset, pl.offset + cone.size), (v) => v * scale) : new Array<number>(cone.size).fill(0);
  });
}

/**
 * Solve a semidefinite program (see types.ts for the problem format and index.ts for examples).
 * Never throws for numerical trouble: the status says what happened. Throws RhoError for a
 * malformed problem.
 */
export function solveSdp(problem: SdpProblem, options: SdpOptions = {}): SdpAnswer {
  // The request's limits and deadline (src/limits.ts, src/deadline.ts): a problem whose estimated cost
  // is above the limits is refused before anything is allocated, and a solve still running at the
  // deadline stops after the current iteration with what it has (RhoError 'deadline-exceeded').
  checkSdpLimits(problem);
  const stop = options.shouldStop;
  const answer = solveSdpWith(problem, { ...options, shouldStop: () => deadlinePassed() || (stop?.() ?? false) }, {});
  if (answer.status === 'cancelled' && deadlinePassed() && !options.signal?.aborted) {
    throw deadlineError('the SDP solver', {
      status: 'stopped at the deadline',
      iterations: answer.iterations,
      primalObjective: answer.primalObjective,
      dualObjective: answer.dualObjective,
      relativeGap: answer.relativeGap,
      primalResidual: answer.primalResidual,
      dualResidual: answer.dualResidual,
    }, `after ${answer.iterations} iterations its primal and dual objectives (minimize ⟨C, X⟩) were ${answer.primalObjective} and ${answer.dualObjective}, relative gap ${answer.relativeGap.toExponential(2)}, residuals ${answer.primalResidual.toExponential(2)} / ${answer.dualResidual.toExponential(2)}; the optimum lies between the two objectives as far as the residuals are small`);
  }
  return answer;
}

/**
 * Test-only knobs (not exported from index.ts): perturbations of the method that a robust solver must
 * survive, so that tests can make them permanent instead of relying on last-bit luck.
 */
export interface SolverInternals {
  /**
   * Multiplies every computed largest step to the cone boundary (default 1). A value > 1 emulates a
   * step-length computation that overshoots the boundary (a wrong eigenvalue, rounding in the last
   * bits); the safeguarded step must then back off instead of failing.
   */
  stepScale?: number;
  /**
   * Stop the step-length eigenvalue bisection of Hermitian blocks as soon as the eigenvalue is known
   * to be above −½·min(1, stepFraction) (the step is capped at 1 anyway). Default: see EARLY_STEP_EXIT.
   */
  earlyStepExit?: boolean;
}

/** solveSdp with test-only knobs (see SolverInternals). */
export function solveSdpWith(problem: SdpProblem, options: SdpOptions, internals: SolverInternals): SdpAnswer {
  // The solver works on the equilibrated problem (scaling.ts: identical to the compiled one unless
  // some row, b or c has a norm outside [1/64, 64]); everything reported is in the user's scale.
  const user = compile(problem);
  const scaling = equilibrate(user);
  const cp = scaling.cp;
  const rowScale = scaling.row;
  const bScale = scaling.b;
  const cScale = scaling.c;
  const gapTol = options.gapTolerance ?? DEFAULT_OPTIONS.gapTolerance;
  const feasTol = options.feasibilityTolerance ?? DEFAULT_OPTIONS.feasibilityTolerance;
  const maxIter = options.maxIterations ?? DEFAULT_OPTIONS.maxIterations;
  const stepFraction = options.stepFraction ?? DEFAULT_OPTIONS.stepFraction;
  // Early exit in the step-length eigenvalue (floor −½·min(1, f)): see EARLY_STEP_EXIT.
  const stepFloor = internals.earlyStepExit ?? EARLY_STEP_EXIT ? -0.5 * Math.min(1, stepFraction) : -Infinity;
  const stepScale = internals.stepScale ?? 1;
  const nb = cp.psd.length;
  const nu = cp.degree;
  const m = cp.m;
  const nL = cp.nL;
  const nF = cp.nF;
  const sizes = cp.psd.map((blk) => blk.n);
  const sq = sizes.map((n) => n * n);
  const nmax = Math.max(1, ...sizes);
  const mat = () => new Blocks(sq);
  // Hermitian blocks: every O(n³) step is done on the complex h×h matrix (complexdense.ts layout,
  // stored in the first 2h² numbers of the block's n×n slot); X, S, their steps, T and Dc stay in
  // the real embedding, which is what A(·) and Aᵀ(·) read.
  const herm = cp.psd.map((blk) => blk.hermitian);
  const hs = sizes.map((n) => n / 2);
  const cC = cp.psd.map((blk, k) => {
    if (!blk.hermitian) return new Float64Array(0);
    const out = new Float64Array(sq[k] / 2);
    extractHermitian(blk.c, hs[k], out);
    return out;
  });

  // Data norms.
  const b = cp.b;
  const nb2 = norm2(b);
  let cn2 = dotv(cp.cL, cp.cL) + dotv(cp.cF, cp.cF);
  for (const blk of cp.psd) cn2 += dotv(blk.c, blk.c);
  const cnorm = Math.sqrt(cn2);
  // The same norms of the user's data (for the reported residuals).
  const nb2User = norm2(user.b);
  let cu2 = dotv(user.cL, user.cL) + dotv(user.cF, user.cF);
  for (const blk of user.psd) cu2 += dotv(blk.c, blk.c);
  const cnormUser = Math.sqrt(cu2);

  // Iterate, started at x = s = e, y = 0, τ = κ = 1.
  const X = mat();
  const S = mat();
  cp.psd.forEach((blk, k) => {
    for (let i = 0; i < blk.n; i++) X.v[k][i * blk.n + i] = S.v[k][i * blk.n + i] = 1;
  });
  const xL = new Float64Array(nL).fill(1);
  const sL = new Float64Array(nL).fill(1);
  const xF = new Float64Array(nF);
  const y = new Float64Array(m);
  let tau = 1;
  let kappa = 1;

  // Work storage, allocated once.
  const G = mat();
  const W = mat();
  const lam = new Blocks(sizes);
  const Lx = mat();
  const Ls = mat();
  const Bm = mat();
  const V = mat();
  const Dc = mat();
  const WrdW = mat();
  const rdK = mat();
  const atyM = mat();
  const Z = mat();
  const T = mat();
  const dS = mat();
  const dSs = mat();
  const dXs = mat();
  const dX = mat();
  const corr = mat();
  const tmp1 = new Float64Array(nmax * nmax);
  const tmp2 = new Float64Array(nmax * nmax);
  const tmp3 = new Float64Array(nmax * nmax);
  const tmp4 = new Float64Array(nmax * nmax);
  const stepWork: HermitianStepWork = { diag: new Float64Array(nmax), off2: new Float64Array(nmax), v: new Float64Array(2 * nmax) };
  const atyL = new Float64Array(nL);
  const atyF = new Float64Array(nF);
  const rp = new Float64Array(m);
  const rdL = new Float64Array(nL);
  const rdF = new Float64Array(nF);
  const Ax = new Float64Array(m);
  const gL = new Float64Array(nL);
  const lamL = new Float64Array(nL);
  const dL = new Float64Array(nL);
  const DcL = new Float64Array(nL);
  const zL = new Float64Array(nL);
  const TL = new Float64Array(nL);
  const dsL = new Float64Array(nL);
  const dxL = new Float64Array(nL);
  const dsLs = new Float64Array(nL);
  const dxLs = new Float64Array(nL);
  const corrL = new Float64Array(nL);
  const dxF = new Float64Array(nF);
  const dy = new Float64Array(m);
  const h1 = new Float64Array(m + nF);
  const h2 = new Float64Array(m + nF);
  const adc = new Float64Array(m);
  const AT = new Float64Array(m);

  const schur = new SchurSystem(cp);
  let status: SdpStatus = 'iteration-limit';
  let message: string | undefined;
  let certificate: Certificate | undefined;
  let iter = 0;
  let lastStep = 0;
  let lastSigma = 0;

  // Residuals of the current iterate (into rp, rdK, rdL, rdF) and scalars.
  let rg = 0;
  let cx = 0;
  let by = 0;
  let xs = 0;
  let mu = 0;
  let rdNorm = 0;
  const residuals = () => {
    applyA(cp, X.v, xL, xF, Ax);
    for (let i = 0; i < m; i++) rp[i] = Ax[i] - b[i] * tau;
    applyAT(cp, y, atyM.v, atyL, atyF);
    for (let e = 0; e < rdK.data.length; e++) rdK.data[e] = -atyM.data[e] - S.data[e];
    for (let k = 0; k < nb; k++) {
      const c = cp.psd[k].c;
      const r = rdK.v[k];
      for (let e = 0; e < r.length; e++) r[e] += c[e] * tau;
    }
    for (let p = 0; p < nL; p++) rdL[p] = -atyL[p] - sL[p] + cp.cL[p] * tau;
    for (let p = 0; p < nF; p++) rdF[p] = -atyF[p] + cp.cF[p] * tau;
    cx = dotv(cp.cL, xL) + dotv(cp.cF, xF);
    for (let k = 0; k < nb; k++) cx += dotv(cp.psd[k].c, X.v[k]);
    by = dotv(b, y);
    rg = by - cx - kappa;
    xs = dotv(xL, sL) + dotv(X.data, S.data);
    mu = (xs + tau * kappa) / (nu + 1);
    rdNorm = Math.sqrt(dotv(rdL, rdL) + dotv(rdF, rdF) + dotv(rdK.data, rdK.data));
  };

  const metrics = (): IterationInfo => {
    const pobj = cx / tau;
    const dobj = by / tau;
    return {
      iteration: iter,
      primalObjective: pobj,
      dualObjective: dobj,
      gap: xs / (tau * tau),
      relativeGap: Math.abs(pobj - dobj) / (1 + Math.abs(pobj) + Math.abs(dobj)),
      primalResidual: norm2(rp) / tau / (1 + nb2),
      dualResidual: rdNorm / tau / (1 + cnorm),
      tau,
      kappa,
      step: lastStep,
      sigma: lastSigma,
    };
  };

  /** The iteration's numbers in the user's scale (the internal ones when nothing was rescaled). */
  const userMetrics = (info: IterationInfo): IterationInfo => {
    if (!scaling.active) return info;
    const f = bScale * cScale;
    const pobj = info.primalObjective * f;
    const dobj = info.dualObjective * f;
    let r2 = 0;
    for (let i = 0; i < m; i++) r2 += (rowScale[i] * bScale * rp[i]) ** 2;
    return {
      ...info,
      primalObjective: pobj,
      dualObjective: dobj,
      gap: info.gap * f,
      relativeGap: Math.abs(pobj - dobj) / (1 + Math.abs(pobj) + Math.abs(dobj)),
      primalResidual: Math.sqrt(r2) / tau / (1 + nb2User),
      dualResidual: (cScale * rdNorm) / tau / (1 + cnormUser),
    };
  };
  const meetsTolerances = (info: IterationInfo): boolean =>
    info.primalResidual <= feasTol && info.dualResidual <= feasTol && info.relativeGap <= gapTol;

  const checkInfeasible = (): boolean => {
    // Dual ray: Aᵀy + s = c τ − r_d.
    if (by > 0) {
      let r2 = 0;
      for (let k = 0; k < nb; k++) {
        const c = cp.psd[k].c;
        const r = rdK.v[k];
        for (let e = 0; e < c.length; e++) r2 += (c[e] * tau - r[e]) ** 2;
      }
      for (let p = 0; p < nL; p++) r2 += (cp.cL[p] * tau - rdL[p]) ** 2;
      for (let p = 0; p < nF; p++) r2 += (cp.cF[p] * tau - rdF[p]) ** 2;
      const resid = Math.sqrt(r2) / by;
      if (resid / Math.max(1, cnorm) <= feasTol) {
        // In the user's scale: y_i = ŷ_i / (r_i β_b b̂·ŷ), S = Ŝ / (β_b b̂·ŷ) (scaling.ts), so b·y = 1.
        const scale = 1 / (by * bScale);
        certificate = {
          kind: 'dual-ray',
          y: Array.from(y, (v, i) => (v * scale) / rowScale[i]),
          s: userBlocks(cp, S.v, sL, null, scale),
          bDotY: 1,
          residual: resid / bScale,
        };
        status = 'primal-infeasible';
        message = 'the constraints admit no point in the cone: a dual ray (Farkas certificate) was found';
        return true;
      }
    }
    if (cx < 0) {
      // Primal ray: A x = r_p + b τ.
      let r2 = 0;
      for (let i = 0; i < m; i++) r2 += (rp[i] + b[i] * tau) ** 2;
      const resid = Math.sqrt(r2) / -cx;
      if (resid / Math.max(1, nb2) <= feasTol) {
        // In the user's scale: X = X̂ / (β_c (−ĉ·X̂)), so ⟨c, X⟩ = −1 and A(X)_i = r_i Â_i(X̂) / (β_c (−ĉ·X̂)).
        const scale = 1 / (-cx * cScale);
        let u2 = 0;
        for (let i = 0; i < m; i++) u2 += (rowScale[i] * (rp[i] + b[i] * tau)) ** 2;
        certificate = { kind: 'primal-ray', x: userBlocks(cp, X.v, xL, xF, scale), cDotX: -1, residual: Math.sqrt(u2) * scale };
        status = 'dual-infeasible';
        message = 'the dual has no feasible point (the primal is unbounded below if feasible): a primal ray was found';
        return true;
      }
    }
    return false;
  };

  // Scalars fixed within one iteration, used by direction().
  let denomBase = 0;
  let pvCached: Float64Array = new Float64Array(0);
  const pvBuf = new Float64Array(m + nF);
  const qvBuf = new Float64Array(m + nF);

  /**
   * One Newton direction: residual weight eta, centring target sigmaMu, corrector terms (in corr /
   * corrL when useCorr) and corrTK. Writes dX, dS, dXs, dSs, dxL, dsL, dxLs, dsLs, dxF, dy.
   */
  const direction = (eta: number, sigmaMu: number, useCorr: boolean, corrTK: number): { dtau: number; dkappa: number } => {
    for (let k = 0; k < nb; k++) {
      if (herm[k]) {
        const h = hs[k];
        const hh = h * h;
        const l = lam.v[k];
        const z = Z.v[k];
        const cr = corr.v[k];
        for (let i = 0; i < h; i++) {
          for (let j = 0; j < h; j++) {
            const f = 2 / (l[i] + l[j]);
            const rr = (i === j ? sigmaMu - l[i] * l[i] : 0) - (useCorr ? cr[i * h + j] : 0);
            z[i * h + j] = rr * f;
            z[hh + i * h + j] = useCorr ? -cr[hh + i * h + j] * f : 0;
          }
        }
        cCongruence(G.v[k], z, h, tmp3, tmp1);
        const wr = WrdW.v[k];
        for (let e = 0; e < 2 * hh; e++) tmp3[e] -= eta * wr[e];
        embedComplex(tmp3, h, T.v[k]);
        continue;
      }
      const n = sizes[k];
      const l = lam.v[k];
      const z = Z.v[k];
      const cr = corr.v[k];
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const r = (i === j ? sigmaMu - l[i] * l[i] : 0) - (useCorr ? cr[i * n + j] : 0);
          z[i * n + j] = (2 * r) / (l[i] + l[j]);
        }
      }
      const t = T.v[k];
      congruence(G.v[k], z, n, t, tmp1);
      const wr = WrdW.v[k];
      for (let e = 0; e < t.length; e++) t[e] -= eta * wr[e];
    }
    for (let p = 0; p < nL; p++) {
      zL[p] = (sigmaMu - lamL[p] * lamL[p] - (useCorr ? corrL[p] : 0)) / lamL[p];
      TL[p] = gL[p] * zL[p] - eta * dL[p] * rdL[p];
    }
    const rtk = sigmaMu - tau * kappa - corrTK;
    applyA(cp, T.v, TL, null, AT);
    for (let i = 0; i < m; i++) h1[i] = -eta * rp[i] - AT[i];
    for (let f = 0; f < nF; f++) h1[m + f] = eta * rdF[f];
    const qv = schur.solve(h1, 1, qvBuf);
    let bq = 0;
    let adcq = 0;
    for (let i = 0; i < m; i++) {
      bq += b[i] * qv[i];
      adcq += adc[i] * qv[i];
    }
    let cT = dotv(cp.cL, TL);
    for (let k = 0; k < nb; k++) cT += dotv(cp.psd[k].c, T.v[k]);
    let cfqf = 0;
    for (let f = 0; f < nF; f++) cfqf += cp.cF[f] * qv[m + f];
    const dtau = (-eta * rg - bq + cT + adcq + cfqf + rtk / tau) / denomBase;
    const pv = pvCached;
    for (let i = 0; i < m; i++) dy[i] = qv[i] + pv[i] * dtau;
    for (let f = 0; f < nF; f++) dxF[f] = qv[m + f] + pv[m + f] * dtau;
    applyAT(cp, dy, atyM.v, atyL, atyF);
    for (let k = 0; k < nb; k++) {
      const n = sizes[k];
      const c = cp.psd[k].c;
      const ds = dS.v[k];
      const am = atyM.v[k];
      const rd = rdK.v[k];
      for (let e = 0; e < ds.length; e++) ds[e] = -am[e] + c[e] * dtau + eta * rd[e];
      if (herm[k]) {
        const h = hs[k];
        extractHermitian(ds, h, tmp3);
        const dss = dSs.v[k];
        cCongruenceH(G.v[k], tmp3, h, dss, tmp1);
        const dxs = dXs.v[k];
        const z = Z.v[k];
        for (let e = 0; e < 2 * h * h; e++) dxs[e] = z[e] - dss[e];
        cCongruence(G.v[k], dxs, h, tmp3, tmp1);
        embedComplex(tmp3, h, dX.v[k]);
        continue;
      }
      const dss = dSs.v[k];
      congruenceT(G.v[k], ds, n, dss, tmp1);
      const dxs = dXs.v[k];
      const z = Z.v[k];
      for (let e = 0; e < dxs.length; e++) dxs[e] = z[e] - dss[e];
      congruence(G.v[k], dxs, n, dX.v[k], tmp1);
    }
    for (let p = 0; p < nL; p++) {
      dsL[p] = -atyL[p] + cp.cL[p] * dtau + eta * rdL[p];
      dsLs[p] = gL[p] * dsL[p];
      dxLs[p] = zL[p] - dsLs[p];
      dxL[p] = gL[p] * dxLs[p];
    }
    const dkappa = (rtk - kappa * dtau) / tau;
    return { dtau, dkappa };
  };

  const maxStep = (d: { dtau: number; dkappa: number }): number => {
    let a = Infinity;
    for (let k = 0; k < nb; k++) {
      const n = sizes[k];
      if (herm[k]) {
        const h = hs[k];
        a = Math.min(a, maxStepHermitian(lam.v[k], dXs.v[k], h, tmp1, stepWork, stepFloor), maxStepHermitian(lam.v[k], dSs.v[k], h, tmp1, stepWork, stepFloor));
        continue;
      }
      a = Math.min(a, maxStepPsd(lam.v[k], dXs.v[k], n, tmp1, tmp2), maxStepPsd(lam.v[k], dSs.v[k], n, tmp1, tmp2));
    }
    for (let p = 0; p < nL; p++) {
      if (dxLs[p] < 0) a = Math.min(a, -lamL[p] / dxLs[p]);
      if (dsLs[p] < 0) a = Math.min(a, -lamL[p] / dsLs[p]);
    }
    if (d.dtau < 0) a = Math.min(a, -tau / d.dtau);
    if (d.dkappa < 0) a = Math.min(a, -kappa / d.dkappa);
    return a;
  };

  /**
   * NT scaling of the current iterate (X = L Lᵀ, S = R Rᵀ, Rᵀ L = U Σ Vᵀ, G = L V Σ^(−1/2), W = G Gᵀ;
   * orthant: g = √(x/s), λ = √(x s)). False when the iterate is not numerically interior: a
   * Cholesky factor fails, a scaled eigenvalue λ is not positive and finite, τ, κ or an orthant
   * coordinate is not positive, or y or a free variable is not finite. The safeguarded step below uses it as its acceptance test.
   */
  const computeScaling = (): boolean => {
    if (!(tau > 0 && tau < Infinity) || !(kappa > 0 && kappa < Infinity)) return false;
    for (let p = 0; p < nL; p++) if (!(xL[p] > 0 && xL[p] < Infinity) || !(sL[p] > 0 && sL[p] < Infinity)) return false;
    for (let i = 0; i < m; i++) if (!isFinite(y[i])) return false;
    for (let f = 0; f < nF; f++) if (!isFinite(xF[f])) return false;
    for (let k = 0; k < nb; k++) {
      const n = sizes[k];
      if (herm[k]) {
        const h = hs[k];
        const hh = h * h;
        extractHermitian(X.v[k], h, tmp3);
        extractHermitian(S.v[k], h, tmp4);
        const lx = Lx.v[k];
        const ls = Ls.v[k];
        if (!cCholesky(tmp3, h, lx) || !cCholesky(tmp4, h, ls)) return false;
        cHMul(ls, lx, h, Bm.v[k]);
        const sigma = lam.v[k];
        cSvdJacobi(Bm.v[k], h, V.v[k], sigma, tmp1);
        for (let j = h; j < n; j++) sigma[j] = sigma[j - h]; // the embedding's doubled spectrum
        const g = G.v[k];
        cMul(lx, V.v[k], h, g);
        for (let j = 0; j < h; j++) {
          const f = 1 / Math.sqrt(sigma[j]);
          for (let i = 0; i < h; i++) {
            g[i * h + j] *= f;
            g[hh + i * h + j] *= f;
          }
        }
        cGram(g, h, W.v[k]);
        continue;
      }
      const lx = cholesky(X.v[k], n, Lx.v[k]);
      const ls = cholesky(S.v[k], n, Ls.v[k]);
      if (!lx || !ls) return false;
      matTMul(ls, lx, n, Bm.v[k]);
      const sigma = lam.v[k];
      svdJacobi(Bm.v[k], n, V.v[k], sigma, tmp1);
      const g = G.v[k];
      matMul(lx, V.v[k], n, g);
      for (let j = 0; j < n; j++) {
        const f = 1 / Math.sqrt(sigma[j]);
        for (let i = 0; i < n; i++) g[i * n + j] *= f;
      }
      const w = W.v[k];
      for (let i = 0; i < n; i++) {
        for (let j = i; j < n; j++) {
          let s = 0;
          for (let c = 0; c < n; c++) s += g[i * n + c] * g[j * n + c];
          w[i * n + j] = s;
          w[j * n + i] = s;
        }
      }
    }
    for (let k = 0; k < nb; k++) for (const l of lam.v[k]) if (!(l > 0 && l < Infinity)) return false;
    for (let p = 0; p < nL; p++) {
      gL[p] = Math.sqrt(xL[p] / sL[p]);
      lamL[p] = Math.sqrt(xL[p] * sL[p]);
      dL[p] = xL[p] / sL[p];
    }

    return true;
  };

  // Safeguards. A step that leaves the cone in floating point is retried shorter in place (X += (α' − α)ΔX;
  // the direction arrays still hold ΔX). `best`: the iterate with the smallest merit max(residuals/feasTol,
  // relative gap/gapTol), returned when the solve ends as 'inaccurate' or 'iteration-limit'. It is stored
  // only when an iterate is worse than its predecessor (rebuilt as the current iterate minus the last step,
  // before the next direction overwrites it), so a solve whose merit improves at every iteration, the
  // common case, copies and allocates nothing for it.
  interface Snapshot { X: Float64Array; S: Float64Array; xL: Float64Array; sL: Float64Array; xF: Float64Array; y: Float64Array; tau: number; kappa: number }
  let best: Snapshot | null = null;
  let bestIter = -1;
  let bestStored = false;
  let bestMerit = Infinity;
  let useBest = false;
  let backtracks = 0;
  let lastDtau = 0;
  let lastDkappa = 0;
  /** Store the previous iterate (current minus the last accepted step α·Δ) in `best`. */
  const storePrevious = (): void => {
    const t: Snapshot = (best ??= {
      X: new Float64Array(X.data.length), S: new Float64Array(S.data.length), xL: new Float64Array(nL), sL: new Float64Array(nL),
      xF: new Float64Array(nF), y: new Float64Array(m), tau: 0, kappa: 0,
    });
    const a = lastStep;
    for (let e = 0; e < X.data.length; e++) {
      t.X[e] = X.data[e] - a * dX.data[e];
      t.S[e] = S.data[e] - a * dS.data[e];
    }
    for (let p = 0; p < nL; p++) {
      t.xL[p] = xL[p] - a * dxL[p];
      t.sL[p] = sL[p] - a * dsL[p];
    }
    for (let f = 0; f < nF; f++) t.xF[f] = xF[f] - a * dxF[f];
    for (let i = 0; i < m; i++) t.y[i] = y[i] - a * dy[i];
    t.tau = tau - a * lastDtau;
    t.kappa = kappa - a * lastDkappa;
  };
  const loadFrom = (t: Snapshot): void => {
    X.data.set(t.X);
    S.data.set(t.S);
    xL.set(t.xL);
    sL.set(t.sL);
    xF.set(t.xF);
    y.set(t.y);
    tau = t.tau;
    kappa = t.kappa;
  };
  /** Move the iterate along the current direction by `delta` (a step, or a correction of one). */
  const move = (delta: number, dtau: number, dkappa: number): void => {
    const Xd = X.data;
    const Sd = S.data;
    const dXd = dX.data;
    const dSd = dS.data;
    for (let e = 0; e < Xd.length; e++) {
      Xd[e] += delta * dXd[e];
      Sd[e] += delta * dSd[e];
    }
    for (let p = 0; p < nL; p++) {
      xL[p] += delta * dxL[p];
      sL[p] += delta * dsL[p];
    }
    for (let f = 0; f < nF; f++) xF[f] += delta * dxF[f];
    for (let i = 0; i < m; i++) y[i] += delta * dy[i];
    tau += delta * dtau;
    kappa += delta * dkappa;
  };
  const merit = (info: IterationInfo): number => {
    const v = Math.max(info.primalResidual / feasTol, info.dualResidual / feasTol, info.relativeGap / gapTol);
    return v === v ? v : Infinity;
  };

  residuals();
  if (!computeScaling()) {
    // Only non-finite data can make the start point (identity blocks, ones) fail.
    status = 'inaccurate';
    message = 'the starting point could not be scaled (non-finite data?)';
  } else for (;;) {
    const info = metrics();
    const shown = userMetrics(info);
    if (iter > 0) options.onIteration?.(shown);
    const meritNow = merit(info);
    if (meritNow < bestMerit) {
      bestMerit = meritNow;
      bestIter = iter;
      bestStored = false;
    } else if (!bestStored && bestIter === iter - 1) {
      storePrevious();
      bestStored = true;
    }
    if (!isFinite(info.primalObjective) || !isFinite(info.dualObjective) || !isFinite(mu)) {
      status = 'inaccurate';
      message = 'the iteration produced non-finite numbers';
      useBest = true;
      break;
    }
    if (meetsTolerances(info) && (shown === info || meetsTolerances(shown))) {
      status = 'optimal';
      break;
    }
    if (checkInfeasible()) break;
    if (iter >= maxIter) {
      status = 'iteration-limit';
      message = `stopped after ${maxIter} iterations`;
      useBest = true;
      break;
    }
    if (options.shouldStop?.() || options.signal?.aborted) {
      status = 'cancelled';
      message = `cancelled after ${iter} iterations`;
      break;
    }

    // The NT scaling of this iterate was computed when it was accepted (computeScaling).
    schur.assembleAndFactor(W.v, dL);

    // D c = W C W (orthant: d∘c), A(Dc), ⟨c, Dc⟩, and p = K⁻¹ [A D c + b; c_f].
    for (let k = 0; k < nb; k++) {
      if (herm[k]) {
        cCongruence(W.v[k], cC[k], hs[k], tmp3, tmp1);
        embedComplex(tmp3, hs[k], Dc.v[k]);
      } else congruence(W.v[k], cp.psd[k].c, sizes[k], Dc.v[k], tmp1);
    }
    for (let p = 0; p < nL; p++) DcL[p] = dL[p] * cp.cL[p];
    applyA(cp, Dc.v, DcL, null, adc);
    let cDc = dotv(cp.cL, DcL);
    for (let k = 0; k < nb; k++) cDc += dotv(cp.psd[k].c, Dc.v[k]);
    for (let i = 0; i < m; i++) h2[i] = adc[i] + b[i];
    for (let f = 0; f < nF; f++) h2[m + f] = cp.cF[f];
    pvCached = schur.solve(h2, 1, pvBuf);
    const pv = pvCached;
    let bp = 0;
    let adcp = 0;
    for (let i = 0; i < m; i++) {
      bp += b[i] * pv[i];
      adcp += adc[i] * pv[i];
    }
    let cfpf = 0;
    for (let f = 0; f < nF; f++) cfpf += cp.cF[f] * pv[m + f];
    denomBase = bp - (adcp - cDc) - cfpf + kappa / tau;
    for (let k = 0; k < nb; k++) {
      if (herm[k]) {
        extractHermitian(rdK.v[k], hs[k], tmp3);
        cCongruence(W.v[k], tmp3, hs[k], WrdW.v[k], tmp1);
      } else congruence(W.v[k], rdK.v[k], sizes[k], WrdW.v[k], tmp1);
    }

    // Predictor (affine scaling direction).
    const aff = direction(1, 0, false, 0);
    const alphaAff = Math.min(1, stepScale * maxStep(aff));
    let sigma = Math.max(0, Math.min(1, 1 - alphaAff));
    sigma = sigma * sigma * sigma;
    // Mehrotra corrector: the second-order term ΔX_a ∘ ΔS_a in λ-space.
    for (let k = 0; k < nb; k++) {
      const n = sizes[k];
      if (herm[k]) {
        const h = hs[k];
        const hh = h * h;
        cMul(dXs.v[k], dSs.v[k], h, tmp2);
        const out = corr.v[k];
        for (let i = 0; i < h; i++) {
          for (let j = 0; j < h; j++) {
            out[i * h + j] = 0.5 * (tmp2[i * h + j] + tmp2[j * h + i]);
            out[hh + i * h + j] = 0.5 * (tmp2[hh + i * h + j] - tmp2[hh + j * h + i]);
          }
        }
        continue;
      }
      matMul(dXs.v[k], dSs.v[k], n, tmp2);
      const out = corr.v[k];
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = 0.5 * (tmp2[i * n + j] + tmp2[j * n + i]);
    }
    for (let p = 0; p < nL; p++) corrL[p] = dxLs[p] * dsLs[p];
    let dir = direction(1 - sigma, sigma * mu, true, aff.dtau * aff.dkappa);
    let alpha = Math.min(1, stepFraction * stepScale * maxStep(dir));
    if (!(alpha > 1e-10)) {
      // The corrected direction makes no progress (or is not finite): retry without the
      // second-order term and with at least half centring, which keeps the iterate away from the
      // boundary. Only reached on trouble; a well-posed solve never gets here.
      sigma = Math.max(sigma, 0.5);
      dir = direction(1 - sigma, sigma * mu, false, 0);
      alpha = Math.min(1, stepFraction * stepScale * maxStep(dir));
    }
    if (!(alpha > 1e-10)) {
      status = 'inaccurate';
      message = 'the step length collapsed; the problem may be badly scaled or nearly infeasible';
      useBest = true;
      break;
    }

    // Safeguarded step: the new iterate must be numerically interior (Cholesky factors of every
    // block, positive λ, τ, κ and orthant coordinates). The step length is computed to stay inside
    // by the margin 1 − stepFraction, but it comes from an eigenvalue computed in floating point;
    // when the iterate is not accepted, the step is shortened (×0.9 on the first retry, then halved).
    let accepted = false;
    let taken = 0;
    for (let tries = 0; tries < 40; tries++) {
      move(alpha - taken, dir.dtau, dir.dkappa);
      taken = alpha;
      if (computeScaling()) {
        accepted = true;
        break;
      }
      alpha *= tries === 0 ? 0.9 : 0.5; // a few-ulp overshoot needs little; anything worse, halving
      backtracks++;
      if (!(alpha > 1e-10)) break;
    }
    if (!accepted) {
      move(-taken, dir.dtau, dir.dkappa); // back to the last accepted iterate (up to rounding)
      residuals();
      status = 'inaccurate';
      message = 'no step along the Newton direction kept the iterate positive definite in floating point';
      useBest = true;
      break;
    }
    lastDtau = dir.dtau;
    lastDkappa = dir.dkappa;
    lastStep = alpha;
    lastSigma = sigma;
    iter++;
    residuals();
  }

  if (useBest && bestStored && best && bestIter !== iter) {
    loadFrom(best);
    residuals();
    message = `${message ?? ''}; returned the best iterate seen (iteration ${bestIter}), not the last`;
  }
  if (backtracks > 0 && status !== 'optimal') {
    message = `${message ?? ''} (${backtracks} step${backtracks === 1 ? ' was' : 's were'} shortened to stay inside the cone)`;
  }
  const info = userMetrics(metrics());
  const inv = 1 / tau;
  return {
    status,
    x: userBlocks(cp, X.v, xL, xF, inv * bScale),
    y: Array.from(y, (v, i) => (v * inv * cScale) / rowScale[i]),
    s: userBlocks(cp, S.v, sL, null, inv * cScale),
    primalObjective: info.primalObjective,
    dualObjective: info.dualObjective,
    gap: info.primalObjective - info.dualObjective,
    relativeGap: info.relativeGap,
    primalResidual: info.primalResidual,
    dualResidual: info.dualResidual,
    iterations: iter,
    certificate,
    dependentConstraints: schur.dependent,
    ...(message ? { message } : {}),
  };
}
