/**
 * Shared plumbing of the one-shot entropic quantities that are semidefinite programs
 * (hypothesis-testing, smooth max-relative entropy, conditional min/max-entropy, max-information):
 * the certificate every answer carries, the rule that turns a solver status into an answer or a
 * RhoError 'solver-failed', and the reading of dual multipliers of matrix-equality constraints back
 * into a Hermitian matrix.
 *
 * Deliberately not here: any quantity, and any change to the solver (src/sdp is used only through
 * its public API, src/sdp/index.ts). Cost: O(d²) per multiplier matrix; nothing else of note.
 */
import { CMatrix, zeros } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import { matrixCoordinates, type SdpAnswer, type SdpOptions, type SdpStatus } from '../sdp/index.js';

/**
 * What the solver reports about one solve, in the solver's own terms: `problem` states the primal
 * problem that was handed to it (minimize ... subject to ...), so the signs and roles of the two
 * objectives can be read without guessing. `gap` = primal − dual objective, `relativeGap` =
 * |gap| / (1 + |primal| + |dual|); the residuals are relative (src/sdp/types.ts).
 */
export interface SdpCertificate {
  status: SdpStatus;
  primalObjective: number;
  dualObjective: number;
  gap: number;
  relativeGap: number;
  primalResidual: number;
  dualResidual: number;
  iterations: number;
  /** The primal problem handed to the solver, in words. */
  problem: string;
}

/** Options every one-shot SDP quantity accepts. */
export interface OneShotSdpOptions {
  /** Logarithm base (default 2). */
  base?: number;
  /** Relative support tolerance for rank decisions made before the solve (default 1e-12). */
  tol?: number;
  /** Passed to the solver (tolerances, iteration limit, cancellation). */
  solver?: SdpOptions;
}

/**
 * Statuses short of 'optimal' whose iterate is still accepted (with a note) when the relative gap
 * and both relative residuals are at most this. Above it the answer would mislead: 'solver-failed'.
 */
export const ACCEPT_INACCURATE = 1e-6;

export function certificateOf(ans: SdpAnswer, problem: string): SdpCertificate {
  return {
    status: ans.status,
    primalObjective: ans.primalObjective,
    dualObjective: ans.dualObjective,
    gap: ans.gap,
    relativeGap: ans.relativeGap,
    primalResidual: ans.primalResidual,
    dualResidual: ans.dualResidual,
    iterations: ans.iterations,
    problem,
  };
}

/**
 * Accept an answer or throw RhoError 'solver-failed' carrying the status. 'optimal' passes silently;
 * 'inaccurate' and 'iteration-limit' pass with a note when gap and residuals are at most
 * ACCEPT_INACCURATE; everything else (infeasible statuses the caller did not expect, 'cancelled')
 * throws. Returns the note, if any.
 */
export function acceptAnswer(ans: SdpAnswer, what: string): string | undefined {
  if (ans.status === 'optimal') return undefined;
  const worst = Math.max(ans.relativeGap, ans.primalResidual, ans.dualResidual);
  if ((ans.status === 'inaccurate' || ans.status === 'iteration-limit') && Number.isFinite(worst) && worst <= ACCEPT_INACCURATE) {
    return (
      `The SDP solver stopped with status '${ans.status}' (relative gap ${ans.relativeGap.toExponential(2)}, ` +
      `residuals ${ans.primalResidual.toExponential(2)} / ${ans.dualResidual.toExponential(2)}); ` +
      `the value of ${what} is accurate to about that size, not to the solver's default 1e-8.`
    );
  }
  throw new RhoError(
    'solver-failed',
    `The SDP for ${what} did not solve: status '${ans.status}'${ans.message ? ` (${ans.message})` : ''}, ` +
      `relative gap ${ans.relativeGap.toExponential(2)}, residuals ${ans.primalResidual.toExponential(2)} / ${ans.dualResidual.toExponential(2)}.`,
    undefined,
    { status: ans.status, iterations: ans.iterations, relativeGap: ans.relativeGap },
  );
}

/**
 * The Hermitian matrix Y = Σ_c y_c E_c built from the multipliers of one matrix-equality family of
 * constraints (one per real coordinate of a d×d matrix, in the order of sdp's matrixCoordinates, as
 * partialTraceConstraints writes them), where E_c is the Hermitian coefficient with ⟨E_c, X⟩ = that
 * coordinate: 1 at (i,i); ½ at (i,j) and (j,i) for Re X_ij; ½i at (i,j) and −½i at (j,i) for Im X_ij.
 * Then Σ_c y_c ⟨E_c, X⟩ = ⟨Y, X⟩, which is how the dual slack reads.
 */
export function multiplierMatrix(y: readonly number[], offset: number, d: number, hermitian = true): CMatrix {
  const m = zeros(d, d);
  let k = offset;
  for (const c of matrixCoordinates(d, hermitian)) {
    const v = y[k++];
    if (c.i === c.j) m.re[c.i * d + c.i] += v;
    else if (c.part === 're') {
      m.re[c.i * d + c.j] += v / 2;
      m.re[c.j * d + c.i] += v / 2;
    } else {
      m.im[c.i * d + c.j] += v / 2;
      m.im[c.j * d + c.i] -= v / 2;
    }
  }
  return m;
}

/** Natural log of the base, validated (default 2). */
export function lnBase(base: number | undefined): number {
  const b = base ?? 2;
  if (!(b > 0) || b === 1 || !Number.isFinite(b)) {
    throw new RhoError('invalid-argument', `The logarithm base must be a positive number other than 1 (got ${b}).`, 'base');
  }
  return Math.log(b);
}

/** The matrix block of a solver answer (matrix blocks are CMatrix). */
export function matrixBlock(ans: SdpAnswer, k: number): CMatrix {
  const x = ans.x[k];
  if (Array.isArray(x)) throw new Error(`block ${k} is a vector block`);
  return x as CMatrix;
}

/** The Hermitian part of a matrix, in place (solver iterates are Hermitian to rounding). */
export function symmetrize(m: CMatrix): CMatrix {
  const n = m.rows;
  for (let i = 0; i < n; i++) {
    m.im[i * n + i] = 0;
    for (let j = i + 1; j < n; j++) {
      const re = (m.re[i * n + j] + m.re[j * n + i]) / 2;
      const im = (m.im[i * n + j] - m.im[j * n + i]) / 2;
      m.re[i * n + j] = re;
      m.re[j * n + i] = re;
      m.im[i * n + j] = im;
      m.im[j * n + i] = -im;
    }
  }
  return m;
}
