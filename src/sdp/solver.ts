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
 * Does not: presolve, scale the data, exploit low rank of constraint matrices, or warm start.
 * Numerical answers are evidence: a status 'optimal' means the residuals and the relative gap
 * met the tolerances for this floating-point iterate; check `primalResidual`, `dualResidual` and
 * `relativeGap` on the answer when a decision hangs on a small number.
 *
 * Cost per iteration: Schur assembly (schur.ts), its factorization, and O(n³) per PSD block for
 * the scaling (one-sided Jacobi SVD) and the directions. Typically 10–40 iterations.
 */
import { zeros, type CMatrix } from '../linalg/index.js';
import { compile, type Compiled } from './compile.js';
import { cholesky, congruence, congruenceT, matMul, matTMul, minEig, svdJacobi } from './dense.js';
import { SchurSystem } from './schur.js';
import type { BlockValue, Certificate, IterationInfo, SdpAnswer, SdpOptions, SdpProblem, SdpStatus } from './types.js';

export const DEFAULT_OPTIONS = {
  gapTolerance: 1e-8,
  feasibilityTolerance: 1e-8,
  maxIterations: 100,
  stepFraction: 0.98,
} as const;

interface Iterate {
  X: Float64Array[];
  S: Float64Array[];
  xL: Float64Array;
  sL: Float64Array;
  xF: Float64Array;
  y: Float64Array;
  tau: number;
  kappa: number;
}

interface Direction {
  dX: Float64Array[];
  dS: Float64Array[];
  /** scaled directions (λ-space) */
  dXs: Float64Array[];
  dSs: Float64Array[];
  dxL: Float64Array;
  dsL: Float64Array;
  dxLs: Float64Array;
  dsLs: Float64Array;
  dxF: Float64Array;
  dy: Float64Array;
  dtau: number;
  dkappa: number;
}

/** A(x): constraint values of the cone and free parts. */
function applyA(cp: Compiled, X: Float64Array[], xL: Float64Array, xF: Float64Array): Float64Array {
  const out = new Float64Array(cp.m);
  cp.psd.forEach((blk, k) => {
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
  });
  for (let i = 0; i < cp.m; i++) {
    let s = 0;
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) s += cp.linVal[e] * xL[cp.linIdx[e]];
    for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) s += cp.freeVal[e] * xF[cp.freeIdx[e]];
    out[i] += s;
  }
  return out;
}

/** Aᵀy: dense symmetric per PSD block, orthant vector, free vector. */
function applyAT(cp: Compiled, y: Float64Array): { M: Float64Array[]; L: Float64Array; F: Float64Array } {
  const M = cp.psd.map((blk) => {
    const n = blk.n;
    const out = new Float64Array(n * n);
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
    return out;
  });
  const L = new Float64Array(cp.nL);
  const F = new Float64Array(cp.nF);
  for (let i = 0; i < cp.m; i++) {
    const yi = y[i];
    if (yi === 0) continue;
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) L[cp.linIdx[e]] += yi * cp.linVal[e];
    for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) F[cp.freeIdx[e]] += yi * cp.freeVal[e];
  }
  return { M, L, F };
}

function dotv(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k] * b[k];
  return s;
}

function norm2(a: ArrayLike<number>): number {
  return Math.sqrt(dotv(a, a));
}

/** Largest α ≤ cap with diag(λ) + α·D ⪰ 0 (D symmetric n×n). */
function maxStepPsd(lambda: Float64Array, D: Float64Array, n: number): number {
  const t = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const si = 1 / Math.sqrt(lambda[i]);
    for (let j = 0; j < n; j++) t[i * n + j] = D[i * n + j] * si / Math.sqrt(lambda[j]);
  }
  const mn = minEig(t, n);
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
  const cp = compile(problem);
  const gapTol = options.gapTolerance ?? DEFAULT_OPTIONS.gapTolerance;
  const feasTol = options.feasibilityTolerance ?? DEFAULT_OPTIONS.feasibilityTolerance;
  const maxIter = options.maxIterations ?? DEFAULT_OPTIONS.maxIterations;
  const stepFraction = options.stepFraction ?? DEFAULT_OPTIONS.stepFraction;
  const nb = cp.psd.length;
  const nu = cp.degree;

  // Data norms.
  const b = cp.b;
  const nb2 = norm2(b);
  let cn2 = dotv(cp.cL, cp.cL) + dotv(cp.cF, cp.cF);
  for (const blk of cp.psd) cn2 += dotv(blk.c, blk.c);
  const cnorm = Math.sqrt(cn2);

  // Starting point.
  const it: Iterate = {
    X: cp.psd.map((blk) => {
      const a = new Float64Array(blk.n * blk.n);
      for (let i = 0; i < blk.n; i++) a[i * blk.n + i] = 1;
      return a;
    }),
    S: [],
    xL: new Float64Array(cp.nL).fill(1),
    sL: new Float64Array(cp.nL).fill(1),
    xF: new Float64Array(cp.nF),
    y: new Float64Array(cp.m),
    tau: 1,
    kappa: 1,
  };
  it.S = it.X.map((a) => Float64Array.from(a));

  const schur = new SchurSystem(cp);
  let status: SdpStatus = 'iteration-limit';
  let message: string | undefined;
  let certificate: Certificate | undefined;
  let iter = 0;
  let lastStep = 0;
  let lastSigma = 0;

  // Residuals of the current iterate.
  const residuals = () => {
    const Ax = applyA(cp, it.X, it.xL, it.xF);
    const rp = new Float64Array(cp.m);
    for (let i = 0; i < cp.m; i++) rp[i] = Ax[i] - b[i] * it.tau;
    const aty = applyAT(cp, it.y);
    const rdK = cp.psd.map((blk, k) => {
      const r = new Float64Array(blk.n * blk.n);
      const S = it.S[k];
      for (let e = 0; e < r.length; e++) r[e] = -aty.M[k][e] - S[e] + blk.c[e] * it.tau;
      return r;
    });
    const rdL = new Float64Array(cp.nL);
    for (let p = 0; p < cp.nL; p++) rdL[p] = -aty.L[p] - it.sL[p] + cp.cL[p] * it.tau;
    const rdF = new Float64Array(cp.nF);
    for (let p = 0; p < cp.nF; p++) rdF[p] = -aty.F[p] + cp.cF[p] * it.tau;
    let cx = dotv(cp.cL, it.xL) + dotv(cp.cF, it.xF);
    cp.psd.forEach((blk, k) => (cx += dotv(blk.c, it.X[k])));
    const by = dotv(b, it.y);
    const rg = by - cx - it.kappa;
    let xs = dotv(it.xL, it.sL);
    for (let k = 0; k < nb; k++) xs += dotv(it.X[k], it.S[k]);
    const mu = (xs + it.tau * it.kappa) / (nu + 1);
    let rd2 = dotv(rdL, rdL) + dotv(rdF, rdF);
    for (const r of rdK) rd2 += dotv(r, r);
    return { rp, rdK, rdL, rdF, rg, cx, by, xs, mu, rdNorm: Math.sqrt(rd2), aty };
  };

  const metrics = (res: ReturnType<typeof residuals>): IterationInfo => {
    const t = it.tau;
    const pobj = res.cx / t;
    const dobj = res.by / t;
    return {
      iteration: iter,
      primalObjective: pobj,
      dualObjective: dobj,
      gap: res.xs / (t * t),
      relativeGap: Math.abs(pobj - dobj) / (1 + Math.abs(pobj) + Math.abs(dobj)),
      primalResidual: norm2(res.rp) / t / (1 + nb2),
      dualResidual: res.rdNorm / t / (1 + cnorm),
      tau: it.tau,
      kappa: it.kappa,
      step: lastStep,
      sigma: lastSigma,
    };
  };

  const checkInfeasible = (res: ReturnType<typeof residuals>): boolean => {
    // Dual ray: A^T y + s = c τ − r_d.
    if (res.by > 0) {
      let r2 = 0;
      cp.psd.forEach((blk, k) => {
        for (let e = 0; e < blk.c.length; e++) {
          const v = blk.c[e] * it.tau - res.rdK[k][e];
          r2 += v * v;
        }
      });
      for (let p = 0; p < cp.nL; p++) r2 += (cp.cL[p] * it.tau - res.rdL[p]) ** 2;
      for (let p = 0; p < cp.nF; p++) r2 += (cp.cF[p] * it.tau - res.rdF[p]) ** 2;
      const resid = Math.sqrt(r2) / res.by;
      if (resid / Math.max(1, cnorm) <= feasTol) {
        const scale = 1 / res.by;
        certificate = {
          kind: 'dual-ray',
          y: Array.from(it.y, (v) => v * scale),
          s: userBlocks(cp, it.S, it.sL, null, scale),
          bDotY: 1,
          residual: resid,
        };
        status = 'primal-infeasible';
        message = 'the constraints admit no X in the cone: a dual ray (Farkas certificate) was found';
        return true;
      }
    }
    if (res.cx < 0) {
      // Primal ray: A x = r_p + b τ.
      let r2 = 0;
      for (let i = 0; i < cp.m; i++) r2 += (res.rp[i] + b[i] * it.tau) ** 2;
      const resid = Math.sqrt(r2) / -res.cx;
      if (resid / Math.max(1, nb2) <= feasTol) {
        const scale = 1 / -res.cx;
        certificate = { kind: 'primal-ray', x: userBlocks(cp, it.X, it.xL, it.xF, scale), cDotX: -1, residual: resid };
        status = 'dual-infeasible';
        message = 'the dual has no feasible point; the primal is unbounded below if it is feasible: a primal ray was found';
        return true;
      }
    }
    return false;
  };

  let res = residuals();
  for (;;) {
    const info = metrics(res);
    if (iter > 0) options.onIteration?.(info);
    if (!isFinite(info.primalObjective) || !isFinite(info.dualObjective) || !isFinite(res.mu)) {
      status = 'inaccurate';
      message = 'the iteration produced non-finite numbers';
      break;
    }
    if (info.primalResidual <= feasTol && info.dualResidual <= feasTol && info.relativeGap <= gapTol) {
      status = 'optimal';
      break;
    }
    if (checkInfeasible(res)) break;
    if (iter >= maxIter) {
      status = 'iteration-limit';
      message = `stopped after ${maxIter} iterations`;
      break;
    }
    if (options.shouldStop?.() || options.signal?.aborted) {
      status = 'cancelled';
      message = `cancelled after ${iter} iterations`;
      break;
    }

    // --- NT scaling ---
    const G: Float64Array[] = [];
    const lam: Float64Array[] = [];
    const W: Float64Array[] = [];
    let scalingFailed = false;
    for (let k = 0; k < nb; k++) {
      const n = cp.psd[k].n;
      const Lx = cholesky(it.X[k], n);
      const Ls = cholesky(it.S[k], n);
      if (!Lx || !Ls) {
        scalingFailed = true;
        break;
      }
      const Bm = matTMul(Ls, Lx, n); // Rᵀ L
      const { sigma, v } = svdJacobi(Bm, n);
      const g = matMul(Lx, v, n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) g[i * n + j] /= Math.sqrt(sigma[j]);
      G.push(g);
      lam.push(sigma);
      const w = new Float64Array(n * n);
      for (let i = 0; i < n; i++) {
        for (let j = i; j < n; j++) {
          let s = 0;
          for (let c = 0; c < n; c++) s += g[i * n + c] * g[j * n + c];
          w[i * n + j] = s;
          w[j * n + i] = s;
        }
      }
      W.push(w);
    }
    if (scalingFailed) {
      status = 'inaccurate';
      message = 'an iterate lost positive definiteness in floating point';
      break;
    }
    const gL = new Float64Array(cp.nL);
    const lamL = new Float64Array(cp.nL);
    const dL = new Float64Array(cp.nL);
    for (let p = 0; p < cp.nL; p++) {
      gL[p] = Math.sqrt(it.xL[p] / it.sL[p]);
      lamL[p] = Math.sqrt(it.xL[p] * it.sL[p]);
      dL[p] = it.xL[p] / it.sL[p];
    }

    schur.assembleAndFactor(W, dL);

    // D c and its images.
    const Dc = cp.psd.map((blk, k) => congruence(W[k], blk.c, blk.n));
    const DcL = new Float64Array(cp.nL);
    for (let p = 0; p < cp.nL; p++) DcL[p] = dL[p] * cp.cL[p];
    const adc = applyA(cp, Dc, DcL, new Float64Array(cp.nF));
    let cDc = dotv(cp.cL, DcL);
    cp.psd.forEach((blk, k) => (cDc += dotv(blk.c, Dc[k])));
    const h2 = new Float64Array(cp.m + cp.nF);
    for (let i = 0; i < cp.m; i++) h2[i] = adc[i] + b[i];
    for (let f = 0; f < cp.nF; f++) h2[cp.m + f] = cp.cF[f];
    const pv = schur.solve(h2);
    let bp = 0;
    for (let i = 0; i < cp.m; i++) bp += b[i] * pv[i];
    let adcp = 0;
    for (let i = 0; i < cp.m; i++) adcp += adc[i] * pv[i];
    let cfpf = 0;
    for (let f = 0; f < cp.nF; f++) cfpf += cp.cF[f] * pv[cp.m + f];
    const denomBase = bp - (adcp - cDc) - cfpf + it.kappa / it.tau;

    // Scaled residual transforms W r_d W (fixed for this iteration).
    const WrdW = cp.psd.map((blk, k) => congruence(W[k], res.rdK[k], blk.n));

    const direction = (eta: number, sigmaMu: number, corr: Float64Array[] | null, corrL: Float64Array | null, corrTK: number): Direction => {
      // Complementarity right-hand sides in λ-space.
      const Z: Float64Array[] = [];
      const T: Float64Array[] = [];
      for (let k = 0; k < nb; k++) {
        const n = cp.psd[k].n;
        const l = lam[k];
        const z = new Float64Array(n * n);
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) {
            let r = (i === j ? sigmaMu - l[i] * l[i] : 0) - (corr ? corr[k][i * n + j] : 0);
            z[i * n + j] = (2 * r) / (l[i] + l[j]);
          }
        }
        Z.push(z);
        const rc = congruence(G[k], z, n);
        for (let e = 0; e < rc.length; e++) rc[e] -= eta * WrdW[k][e];
        T.push(rc);
      }
      const zL = new Float64Array(cp.nL);
      const TL = new Float64Array(cp.nL);
      for (let p = 0; p < cp.nL; p++) {
        zL[p] = (sigmaMu - lamL[p] * lamL[p] - (corrL ? corrL[p] : 0)) / lamL[p];
        TL[p] = gL[p] * zL[p] - eta * dL[p] * res.rdL[p];
      }
      const rtk = sigmaMu - it.tau * it.kappa - corrTK;
      const AT = applyA(cp, T, TL, new Float64Array(cp.nF));
      const h1 = new Float64Array(cp.m + cp.nF);
      for (let i = 0; i < cp.m; i++) h1[i] = -eta * res.rp[i] - AT[i];
      for (let f = 0; f < cp.nF; f++) h1[cp.m + f] = eta * res.rdF[f];
      const qv = schur.solve(h1);
      let bq = 0;
      let adcq = 0;
      for (let i = 0; i < cp.m; i++) {
        bq += b[i] * qv[i];
        adcq += adc[i] * qv[i];
      }
      let cT = dotv(cp.cL, TL);
      cp.psd.forEach((blk, k) => (cT += dotv(blk.c, T[k])));
      let cfqf = 0;
      for (let f = 0; f < cp.nF; f++) cfqf += cp.cF[f] * qv[cp.m + f];
      const cu = cT + adcq;
      const dtau = (-eta * res.rg - bq + cu + cfqf + rtk / it.tau) / denomBase;
      const dy = new Float64Array(cp.m);
      for (let i = 0; i < cp.m; i++) dy[i] = qv[i] + pv[i] * dtau;
      const dxF = new Float64Array(cp.nF);
      for (let f = 0; f < cp.nF; f++) dxF[f] = qv[cp.m + f] + pv[cp.m + f] * dtau;
      const aty = applyAT(cp, dy);
      const dS: Float64Array[] = [];
      const dX: Float64Array[] = [];
      const dSs: Float64Array[] = [];
      const dXs: Float64Array[] = [];
      for (let k = 0; k < nb; k++) {
        const blk = cp.psd[k];
        const n = blk.n;
        const ds = new Float64Array(n * n);
        for (let e = 0; e < ds.length; e++) ds[e] = -aty.M[k][e] + blk.c[e] * dtau + eta * res.rdK[k][e];
        const dss = congruenceT(G[k], ds, n);
        const dxs = new Float64Array(n * n);
        for (let e = 0; e < dxs.length; e++) dxs[e] = Z[k][e] - dss[e];
        dS.push(ds);
        dSs.push(dss);
        dXs.push(dxs);
        dX.push(congruence(G[k], dxs, n));
      }
      const dsL = new Float64Array(cp.nL);
      const dxL = new Float64Array(cp.nL);
      const dsLs = new Float64Array(cp.nL);
      const dxLs = new Float64Array(cp.nL);
      for (let p = 0; p < cp.nL; p++) {
        dsL[p] = -aty.L[p] + cp.cL[p] * dtau + eta * res.rdL[p];
        dsLs[p] = gL[p] * dsL[p];
        dxLs[p] = zL[p] - dsLs[p];
        dxL[p] = gL[p] * dxLs[p];
      }
      const dkappa = (rtk - it.kappa * dtau) / it.tau;
      return { dX, dS, dXs, dSs, dxL, dsL, dxLs, dsLs, dxF, dy, dtau, dkappa };
    };

    const maxStep = (d: Direction): number => {
      let a = Infinity;
      for (let k = 0; k < nb; k++) {
        const n = cp.psd[k].n;
        a = Math.min(a, maxStepPsd(lam[k], d.dXs[k], n), maxStepPsd(lam[k], d.dSs[k], n));
      }
      for (let p = 0; p < cp.nL; p++) {
        if (d.dxLs[p] < 0) a = Math.min(a, -lamL[p] / d.dxLs[p]);
        if (d.dsLs[p] < 0) a = Math.min(a, -lamL[p] / d.dsLs[p]);
      }
      if (d.dtau < 0) a = Math.min(a, -it.tau / d.dtau);
      if (d.dkappa < 0) a = Math.min(a, -it.kappa / d.dkappa);
      return a;
    };

    // Predictor (affine scaling).
    const aff = direction(1, 0, null, null, 0);
    const alphaAff = Math.min(1, maxStep(aff));
    let sigma = Math.max(0, Math.min(1, 1 - alphaAff));
    sigma = sigma * sigma * sigma;
    // Mehrotra corrector: second-order term (ΔX_a ∘ ΔS_a) in λ-space.
    const corr = cp.psd.map((blk, k) => {
      const n = blk.n;
      const a = matMul(aff.dXs[k], aff.dSs[k], n);
      const out = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = 0.5 * (a[i * n + j] + a[j * n + i]);
      return out;
    });
    const corrL = new Float64Array(cp.nL);
    for (let p = 0; p < cp.nL; p++) corrL[p] = aff.dxLs[p] * aff.dsLs[p];
    const dir = direction(1 - sigma, sigma * res.mu, corr, corrL, aff.dtau * aff.dkappa);
    const alpha = Math.min(1, stepFraction * maxStep(dir));
    if (!(alpha > 1e-10)) {
      status = 'inaccurate';
      message = 'the step length collapsed; the problem may be badly scaled or nearly infeasible';
      break;
    }

    // Update.
    for (let k = 0; k < nb; k++) {
      const X = it.X[k];
      const S = it.S[k];
      for (let e = 0; e < X.length; e++) {
        X[e] += alpha * dir.dX[k][e];
        S[e] += alpha * dir.dS[k][e];
      }
    }
    for (let p = 0; p < cp.nL; p++) {
      it.xL[p] += alpha * dir.dxL[p];
      it.sL[p] += alpha * dir.dsL[p];
    }
    for (let f = 0; f < cp.nF; f++) it.xF[f] += alpha * dir.dxF[f];
    for (let i = 0; i < cp.m; i++) it.y[i] += alpha * dir.dy[i];
    it.tau += alpha * dir.dtau;
    it.kappa += alpha * dir.dkappa;
    lastStep = alpha;
    lastSigma = sigma;
    iter++;
    res = residuals();
  }

  const info = metrics(res);
  const t = it.tau;
  return {
    status,
    x: userBlocks(cp, it.X, it.xL, it.xF, 1 / t),
    y: Array.from(it.y, (v) => v / t),
    s: userBlocks(cp, it.S, it.sL, null, 1 / t),
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
