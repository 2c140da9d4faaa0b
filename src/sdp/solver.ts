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
 * Termination: the gap is measured relative to the size of the objective, |p − d| ≤ gapTolerance·
 * max(|p|, |d|) (or absolutely, |p − d| ≤ absoluteGapTolerance, for objectives at zero), so that an
 * objective of 1e-9 is not "optimal" at 1e-1 relative; the residuals relative to 1 + ‖b‖ and 1 + ‖c‖.
 *
 * Does not: presolve, exploit low rank of constraint matrices, or warm start.
 * Numerical answers are evidence: a status 'optimal' means the residuals and the relative gap
 * met the tolerances for this floating-point iterate; check `primalResidual`, `dualResidual` and
 * `relativeGap` on the answer when a decision hangs on a small number.
 *
 * Structure: the solve's state is explicit (iterate.ts: the problem data, the iterate, the workspace)
 * and each phase of an iteration is one function of it: residuals (residuals.ts), NT scaling and the
 * interiority test (nt-scaling.ts), the Newton direction and corrector (direction.ts), step lengths and
 * the safeguarded step (step.ts), termination, infeasibility certificates and the best iterate
 * (termination.ts). This file runs them in order.
 *
 * Cost per iteration: Schur assembly (schur.ts, complex arithmetic on Hermitian blocks), its
 * factorization, and O(n³) per PSD block for the scaling (Cholesky factors and a one-sided Jacobi
 * SVD), the directions and the step lengths (tridiagonalization and bisection). Hermitian blocks do
 * all of these per-block steps on the complex h×h matrix (src/linalg/dense-complex.ts), not on the
 * 2h×2h real embedding, about half the flops. Typically 8–40 iterations. Profiles and timings against
 * cvxopt: bench/sdp.ts and bench/RESULTS.md.
 */
import type { SdpAnswer, SdpOptions, SdpProblem, SdpStatus } from './types.js';
import { Iterate, Workspace, solverData } from './iterate.js';
import { computeResiduals } from './residuals.js';
import { ntScaling } from './nt-scaling.js';
import { mehrotraCorrector, newtonDirection, prepareDirections } from './direction.js';
import { SHORTEST_STEP, maxStep, safeguardedStep } from './step.js';
import { checkSdpLimits } from './cost.js';
import { deadlineError, deadlinePassed, reportProgress } from '../deadline.js';
import {
  BestIterate, detectInfeasibility, iterationInfo, meetsTolerances, merit, userBlocks, userInfo, type Tolerances,
} from './termination.js';
import { schurSystemFor } from './elimination.js';
import type { Certificate } from './types.js';

export const DEFAULT_OPTIONS = {
  gapTolerance: 1e-8,
  absoluteGapTolerance: 1e-13,
  feasibilityTolerance: 1e-8,
  maxIterations: 100,
  stepFraction: 0.98,
} as const;

/**
 * Whether Hermitian blocks' step-length eigenvalues stop bisecting once they are known to lie above
 * −½·min(1, stepFraction) (such an eigenvalue allows a step ≥ 2/min(1, f), and steps are capped at 1).
 * Off: the saving is small and bench/RESULTS.md ("SDP", stories) says why it stays off.
 */
export const EARLY_STEP_EXIT = false;

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
  const d = solverData(problem);
  const tol: Tolerances = {
    gap: options.gapTolerance ?? DEFAULT_OPTIONS.gapTolerance,
    absoluteGap: options.absoluteGapTolerance ?? DEFAULT_OPTIONS.absoluteGapTolerance,
    feasibility: options.feasibilityTolerance ?? DEFAULT_OPTIONS.feasibilityTolerance,
  };
  const maxIter = options.maxIterations ?? DEFAULT_OPTIONS.maxIterations;
  const stepFraction = options.stepFraction ?? DEFAULT_OPTIONS.stepFraction;
  const stepFloor = internals.earlyStepExit ?? EARLY_STEP_EXIT ? -0.5 * Math.min(1, stepFraction) : -Infinity;
  const stepScale = internals.stepScale ?? 1;

  const it = Iterate.start(d);
  const ws = new Workspace(d);
  const schur = schurSystemFor(d.cp);
  const best = new BestIterate();
  let status: SdpStatus = 'iteration-limit';
  let message: string | undefined;
  let certificate: Certificate | undefined;
  let iter = 0;
  let lastStep = 0;
  let lastSigma = 0;
  let useBest = false;
  let backtracks = 0;

  computeResiduals(d, it, ws);
  if (!ntScaling(d, it, ws)) {
    // Only non-finite data can make the start point (identity blocks, ones) fail.
    status = 'inaccurate';
    message = 'the starting point could not be scaled (non-finite data?)';
  } else for (;;) {
    const info = iterationInfo(d, it, ws, iter, lastStep, lastSigma);
    const shown = userInfo(d, it, ws, info);
    if (iter > 0) {
      options.onIteration?.(shown);
      reportProgress('the SDP solver', () => ({
        iteration: shown.iteration, primalObjective: shown.primalObjective, dualObjective: shown.dualObjective, relativeGap: shown.relativeGap,
      }));
    }
    best.observe(d, it, ws.dir, lastStep, iter, merit(info, tol));
    if (!isFinite(info.primalObjective) || !isFinite(info.dualObjective) || !isFinite(ws.res.mu)) {
      status = 'inaccurate';
      message = 'the iteration produced non-finite numbers';
      useBest = true;
      break;
    }
    if (meetsTolerances(info, tol) && (shown === info || meetsTolerances(shown, tol))) {
      status = 'optimal';
      break;
    }
    const infeasible = detectInfeasibility(d, it, ws, tol.feasibility);
    if (infeasible) {
      ({ status, certificate, message } = infeasible);
      break;
    }
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

    // The NT scaling of this iterate was computed when it was accepted (safeguardedStep).
    prepareDirections(d, it, ws, schur);
    const mu = ws.res.mu;
    // Predictor (affine scaling direction), then Mehrotra's corrector.
    newtonDirection(d, it, ws, schur, 1, 0, false, 0);
    const alphaAff = Math.min(1, stepScale * maxStep(d, it, ws, stepFloor));
    const affTK = ws.dir.dtau * ws.dir.dkappa;
    let sigma = Math.max(0, Math.min(1, 1 - alphaAff));
    sigma = sigma * sigma * sigma;
    mehrotraCorrector(d, ws);
    newtonDirection(d, it, ws, schur, 1 - sigma, sigma * mu, true, affTK);
    let alpha = Math.min(1, stepFraction * stepScale * maxStep(d, it, ws, stepFloor));
    if (!(alpha > SHORTEST_STEP)) {
      // The corrected direction makes no progress (or is not finite): retry without the
      // second-order term and with at least half centring, which keeps the iterate away from the
      // boundary. Only reached on trouble; a well-posed solve never gets here.
      sigma = Math.max(sigma, 0.5);
      newtonDirection(d, it, ws, schur, 1 - sigma, sigma * mu, false, 0);
      alpha = Math.min(1, stepFraction * stepScale * maxStep(d, it, ws, stepFloor));
    }
    if (!(alpha > SHORTEST_STEP)) {
      status = 'inaccurate';
      message = 'the step length collapsed; the problem may be badly scaled or nearly infeasible';
      useBest = true;
      break;
    }
    // Safeguarded step: the new iterate must be numerically interior; the step length is computed to
    // stay inside by the margin 1 − stepFraction, but from an eigenvalue computed in floating point.
    const taken = safeguardedStep(d, it, ws, alpha);
    backtracks += taken.shortened;
    if (taken.step === 0) {
      computeResiduals(d, it, ws);
      status = 'inaccurate';
      message = 'no step along the Newton direction kept the iterate positive definite in floating point';
      useBest = true;
      break;
    }
    lastStep = taken.step;
    lastSigma = sigma;
    iter++;
    computeResiduals(d, it, ws);
  }

  const stash = useBest ? best.stash(iter) : null;
  if (stash) {
    it.copyFrom(stash);
    computeResiduals(d, it, ws);
    message = `${message ?? ''}; returned the best iterate seen (iteration ${best.iteration}), not the last`;
  }
  if (backtracks > 0 && status !== 'optimal') {
    message = `${message ?? ''} (${backtracks} step${backtracks === 1 ? ' was' : 's were'} shortened to stay inside the cone)`;
  }
  const info = userInfo(d, it, ws, iterationInfo(d, it, ws, iter, lastStep, lastSigma));
  const inv = 1 / it.tau;
  const sc = d.scaling;
  return {
    status,
    x: userBlocks(d.cp, it.X.v, it.xL, it.xF, inv * sc.b),
    y: Array.from(it.y, (v, i) => (v * inv * sc.c) / sc.row[i]),
    s: userBlocks(d.cp, it.S.v, it.sL, null, inv * sc.c),
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
