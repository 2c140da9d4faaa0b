/**
 * Phase 4: step lengths and the safeguarded step.
 *
 * The largest step α with every cone variable still in its cone: for a PSD block,
 * λ + α·ΔX_s ⪰ 0 ⟺ α ≤ −1/λ_min(λ^(−1/2) ΔX_s λ^(−1/2)) (scaled space, src/linalg/smallest-eigenvalue.ts),
 * likewise for ΔS_s; on the orthant, τ and κ, the ratio test. The step actually taken is a fraction of
 * it; because the eigenvalue is computed in floating point, the new iterate is accepted only when it is
 * numerically interior (its NT scaling exists, nt-scaling.ts), and the step is shortened otherwise.
 *
 * Does not: pick the step fraction (solver.ts). Cost: one smallest eigenvalue (4n³/3) per PSD block and
 * direction, plus one NT scaling per trial step (usually one).
 */
import { minEig, minEigHermitianInPlace } from '../linalg/smallest-eigenvalue.js';
import type { Iterate, SolverData, Workspace } from './iterate.js';
import { ntScaling } from './nt-scaling.js';

/** Largest α with diag(λ) + α·D ⪰ 0 (D symmetric n×n); Infinity when D ⪰ 0. */
export function maxStepPsd(lambda: Float64Array, D: Float64Array, n: number, t: Float64Array, work: Float64Array): number {
  for (let i = 0; i < n; i++) {
    const si = 1 / Math.sqrt(lambda[i]);
    for (let j = 0; j < n; j++) t[i * n + j] = (D[i * n + j] * si) / Math.sqrt(lambda[j]);
  }
  const mn = minEig(t, n, work);
  return mn < 0 ? -1 / mn : Infinity;
}

/**
 * Largest α with diag(λ) + α·D ⪰ 0 for a complex Hermitian h×h D (dense-complex.ts layout). With a
 * finite `floor`, an eigenvalue above it (α ≥ −1/floor) is reported as `floor` itself (no bisection).
 */
export function maxStepHermitian(lambda: Float64Array, D: Float64Array, h: number, t: Float64Array, ws: Workspace, floor: number): number {
  const hh = h * h;
  for (let i = 0; i < h; i++) {
    const si = 1 / Math.sqrt(lambda[i]);
    for (let j = 0; j <= i; j++) {
      const f = si / Math.sqrt(lambda[j]);
      t[i * h + j] = D[i * h + j] * f;
      t[hh + i * h + j] = D[hh + i * h + j] * f;
    }
  }
  const mn = minEigHermitianInPlace(t, h, ws.stepDiag, ws.stepOff2, ws.stepV, floor);
  return mn < 0 ? -1 / mn : Infinity;
}

/**
 * Largest step along ws.dir keeping every cone variable, τ and κ in its cone (Infinity when none
 * limits it). `floor`: see maxStepHermitian (−Infinity: exact).
 */
export function maxStep(d: SolverData, it: Iterate, ws: Workspace, floor = -Infinity): number {
  const { nb, nL, sizes, herm, hs } = d;
  const { lam, lamL } = ws.nt;
  const { dXs, dSs, dxLs, dsLs, dtau, dkappa } = ws.dir;
  const { tmp1, tmp2 } = ws;
  let a = Infinity;
  for (let k = 0; k < nb; k++) {
    const n = sizes[k];
    if (herm[k]) {
      const h = hs[k];
      a = Math.min(a, maxStepHermitian(lam.v[k], dXs.v[k], h, tmp1, ws, floor), maxStepHermitian(lam.v[k], dSs.v[k], h, tmp1, ws, floor));
      continue;
    }
    a = Math.min(a, maxStepPsd(lam.v[k], dXs.v[k], n, tmp1, tmp2), maxStepPsd(lam.v[k], dSs.v[k], n, tmp1, tmp2));
  }
  for (let p = 0; p < nL; p++) {
    if (dxLs[p] < 0) a = Math.min(a, -lamL[p] / dxLs[p]);
    if (dsLs[p] < 0) a = Math.min(a, -lamL[p] / dsLs[p]);
  }
  if (dtau < 0) a = Math.min(a, -it.tau / dtau);
  if (dkappa < 0) a = Math.min(a, -it.kappa / dkappa);
  return a;
}

/** Shortest step the safeguard tries before giving up. */
export const SHORTEST_STEP = 1e-10;

/**
 * Move `it` by `alpha` along ws.dir and accept the new iterate only when it is numerically interior
 * (its NT scaling, computed into ws.nt, exists); otherwise shorten the step in place (×0.9 on the
 * first retry, then halved: a few-ulp overshoot needs little, anything worse halving) down to
 * SHORTEST_STEP. Returns the step taken and the number of shortenings, or step 0 with `it` moved back
 * (up to rounding) when no step was accepted — then ws.nt is that of a rejected trial, not of `it`.
 */
export function safeguardedStep(d: SolverData, it: Iterate, ws: Workspace, alpha: number): { step: number; shortened: number } {
  let taken = 0;
  let shortened = 0;
  for (let tries = 0; tries < 40; tries++) {
    it.move(alpha - taken, ws.dir);
    taken = alpha;
    if (ntScaling(d, it, ws)) return { step: alpha, shortened };
    alpha *= tries === 0 ? 0.9 : 0.5;
    shortened++;
    if (!(alpha > SHORTEST_STEP)) break;
  }
  it.move(-taken, ws.dir);
  return { step: 0, shortened };
}
