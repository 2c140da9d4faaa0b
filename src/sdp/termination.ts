/**
 * Phase 5: termination and certificates. The numbers of an iterate (objectives, gap, relative
 * residuals) in the solver's and in the user's scale, the stopping test, the detection of
 * infeasibility with its checkable ray, the record of the best iterate seen, and the answer in the
 * user's scale (blocks read back from their embedding, multipliers unscaled).
 *
 * Does not: decide what a caller makes of the status (src/sdp/support.ts does that for the
 * quantities). Cost: O(m + Σ n_k²) per test; reading the answer O(Σ n_k²).
 */
import { zeros, type CMatrix } from '../linalg/cmatrix.js';
import type { Compiled } from './compile.js';
import { Iterate, norm2, type Direction, type SolverData, type Workspace } from './iterate.js';
import type { BlockValue, Certificate, IterationInfo, SdpStatus } from './types.js';

/**
 * Stopping tolerances of one solve: `gap` relative to the size of the objective, |p − d| ≤ gap·max(|p|, |d|);
 * `absoluteGap`, |p − d| ≤ absoluteGap, for objectives at or near zero, where no relative test can pass;
 * `feasibility` for the relative residuals.
 */
export interface Tolerances {
  gap: number;
  absoluteGap: number;
  feasibility: number;
}

/** |p − d| / max(|p|, |d|): the gap relative to the size of the objective (0 when both are 0). */
export function relativeGapOf(p: number, d: number): number {
  const big = Math.max(Math.abs(p), Math.abs(d));
  return big > 0 ? Math.abs(p - d) / big : 0;
}

/** The numbers of the current iterate in the solver's (equilibrated) scale. `step`, `sigma`: of the last iteration. */
export function iterationInfo(d: SolverData, it: Iterate, ws: Workspace, iteration: number, step: number, sigma: number): IterationInfo {
  const r = ws.res;
  const { tau, kappa } = it;
  const pobj = r.cx / tau;
  const dobj = r.by / tau;
  return {
    iteration,
    primalObjective: pobj,
    dualObjective: dobj,
    gap: r.xs / (tau * tau),
    relativeGap: relativeGapOf(pobj, dobj),
    primalResidual: norm2(r.rp) / tau / (1 + d.bNorm),
    dualResidual: r.rdNorm / tau / (1 + d.cNorm),
    tau,
    kappa,
    step,
    sigma,
  };
}

/** The same numbers in the user's scale (the internal ones when nothing was rescaled). */
export function userInfo(d: SolverData, it: Iterate, ws: Workspace, info: IterationInfo): IterationInfo {
  const sc = d.scaling;
  if (!sc.active) return info;
  const f = sc.b * sc.c;
  const pobj = info.primalObjective * f;
  const dobj = info.dualObjective * f;
  const rp = ws.res.rp;
  let r2 = 0;
  for (let i = 0; i < d.m; i++) r2 += (sc.row[i] * sc.b * rp[i]) ** 2;
  return {
    ...info,
    primalObjective: pobj,
    dualObjective: dobj,
    gap: info.gap * f,
    relativeGap: relativeGapOf(pobj, dobj),
    primalResidual: Math.sqrt(r2) / it.tau / (1 + d.bNormUser),
    dualResidual: (sc.c * ws.res.rdNorm) / it.tau / (1 + d.cNormUser),
  };
}

/** How far the gap is from passing: the better of its relative and its absolute test. */
function gapMerit(info: IterationInfo, tol: Tolerances): number {
  return Math.min(info.relativeGap / tol.gap, Math.abs(info.primalObjective - info.dualObjective) / tol.absoluteGap);
}

export function meetsTolerances(info: IterationInfo, tol: Tolerances): boolean {
  return info.primalResidual <= tol.feasibility && info.dualResidual <= tol.feasibility && gapMerit(info, tol) <= 1;
}

/** max(residuals / feasibility tolerance, gap against its tolerance); Infinity for NaN. */
export function merit(info: IterationInfo, tol: Tolerances): number {
  const v = Math.max(info.primalResidual / tol.feasibility, info.dualResidual / tol.feasibility, gapMerit(info, tol));
  return v === v ? v : Infinity;
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

/** Every user block of an internal iterate, multiplied by `scale` (xF null: free blocks read as zero). */
export function userBlocks(cp: Compiled, X: Float64Array[], xL: Float64Array, xF: Float64Array | null, scale: number): BlockValue[] {
  return cp.cones.map((cone, k) => {
    const pl = cp.place[k];
    if (pl.type === 'psd') return readBlock(X[pl.index], cp.psd[pl.index].n, cp.psd[pl.index].hermitian, scale);
    if (pl.type === 'lin') return Array.from(xL.subarray(pl.offset, pl.offset + cone.size), (v) => v * scale);
    return xF ? Array.from(xF.subarray(pl.offset, pl.offset + cone.size), (v) => v * scale) : new Array<number>(cone.size).fill(0);
  });
}

/**
 * Infeasibility from the iterate's residuals (the homogeneous embedding's τ → 0 limit): a dual ray y
 * with Aᵀy + s = c τ − r_d, b·y > 0 small relative to it (primal infeasible), or a primal ray x with
 * A x = r_p + b τ, ⟨c, x⟩ < 0 (dual infeasible), each checked at the feasibility tolerance and
 * returned in the user's scale (b·y = 1, resp. ⟨c, x⟩ = −1). Null when neither is found.
 */
export function detectInfeasibility(d: SolverData, it: Iterate, ws: Workspace, feasTol: number): { status: SdpStatus; certificate: Certificate; message: string } | null {
  const { cp, nb, nL, nF, m } = d;
  const { rp, rdK, rdL, rdF, by, cx } = ws.res;
  const { tau, y, S, sL, X, xL, xF } = it;
  const sc = d.scaling;
  const b = cp.b;
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
    if (resid / Math.max(1, d.cNorm) <= feasTol) {
      // In the user's scale: y_i = ŷ_i / (r_i β_b b̂·ŷ), S = Ŝ / (β_b b̂·ŷ) (scaling.ts), so b·y = 1.
      const scale = 1 / (by * sc.b);
      return {
        status: 'primal-infeasible',
        certificate: {
          kind: 'dual-ray',
          y: Array.from(y, (v, i) => (v * scale) / sc.row[i]),
          s: userBlocks(cp, S.v, sL, null, scale),
          bDotY: 1,
          residual: resid / sc.b,
        },
        message: 'the constraints admit no point in the cone: a dual ray (Farkas certificate) was found',
      };
    }
  }
  if (cx < 0) {
    let r2 = 0;
    for (let i = 0; i < m; i++) r2 += (rp[i] + b[i] * tau) ** 2;
    const resid = Math.sqrt(r2) / -cx;
    if (resid / Math.max(1, d.bNorm) <= feasTol) {
      // In the user's scale: X = X̂ / (β_c (−ĉ·X̂)), so ⟨c, X⟩ = −1 and A(X)_i = r_i Â_i(X̂) / (β_c (−ĉ·X̂)).
      const scale = 1 / (-cx * sc.c);
      let u2 = 0;
      for (let i = 0; i < m; i++) u2 += (sc.row[i] * (rp[i] + b[i] * tau)) ** 2;
      return {
        status: 'dual-infeasible',
        certificate: { kind: 'primal-ray', x: userBlocks(cp, X.v, xL, xF, scale), cDotX: -1, residual: Math.sqrt(u2) * scale },
        message: 'the dual has no feasible point (the primal is unbounded below if feasible): a primal ray was found',
      };
    }
  }
  return null;
}

/**
 * The iterate with the smallest merit seen, returned when a solve ends as 'inaccurate' or
 * 'iteration-limit'. It is stored only when an iterate is worse than its predecessor (rebuilt as the
 * current iterate minus the last step, before the next direction overwrites it), so a solve whose merit
 * improves at every iteration, the common case, copies and allocates nothing for it.
 */
export class BestIterate {
  private best: Iterate | null = null;
  private stored = false;
  merit = Infinity;
  iteration = -1;

  /** Record iteration `iter` of merit `m`; `it` is that iterate and `it − step·dir` its predecessor. */
  observe(d: SolverData, it: Iterate, dir: Direction, step: number, iter: number, m: number): void {
    if (m < this.merit) {
      this.merit = m;
      this.iteration = iter;
      this.stored = false;
    } else if (!this.stored && this.iteration === iter - 1) {
      (this.best ??= new Iterate(d)).setBefore(it, step, dir);
      this.stored = true;
    }
  }

  /** The best iterate when it is stored and is not `iter` itself, else null. */
  stash(iter: number): Iterate | null {
    return this.stored && this.best && this.iteration !== iter ? this.best : null;
  }
}
