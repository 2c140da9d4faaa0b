/**
 * Shared plumbing of every quantity solved by rhosigma's SDP solver (src/oneshot, src/guessing,
 * src/recovery): the certificate every answer carries (DESIGN.md: "Every SDP-based answer carries
 * its certificate"), the one rule that turns a solver status into an answer or a RhoError
 * 'solver-failed', the reading of dual multipliers of matrix-equality constraints back into a
 * Hermitian matrix, solver entries for Re Σ c·X_kl, and the repairs applied to an interior-point
 * iterate before its bounds are checked (smallest eigenvalue, POVM renormalisation).
 *
 * Two certificate shapes exist because two answer contracts were published (schema/ pins both):
 *  - SdpCertificate (hypothesis testing, smooth max, conditional min/max-entropy, max-information):
 *    the solver's numbers as it reports them, signed gap, plus `problem`, the primal handed to it;
 *  - SolverCertificate (guessing, diamond, fidelity SDP, fidelity of recovery, guesswork):
 *    objectives in the sign of the quantity, |gap|, and the solver's message when it has one.
 * Both are built from the same SolveNumbers here.
 *
 * Deliberately not here: any quantity, and any change to the solver (src/sdp is used only through
 * its public API, src/sdp/index.ts). Cost: O(d²) per multiplier matrix, one d×d eigendecomposition
 * per minEigenvalue or POVM renormalisation; nothing else of note.
 */
import { CMatrix, add, eigh, hermitianPart, mul, zeros } from '../linalg/index.js';
import { fromSpectrum } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import { matrixCoordinates, type Entry, type SdpAnswer, type SdpOptions } from '../sdp/index.js';

/**
 * The numbers of one solve, in the solver's terms: `gap` = primal − dual objective, `relativeGap` =
 * |gap| / (1 + |primal| + |dual|); the residuals are relative (src/sdp/types.ts).
 */
export type SolveNumbers = Pick<
  SdpAnswer,
  'status' | 'primalObjective' | 'dualObjective' | 'gap' | 'relativeGap' | 'primalResidual' | 'dualResidual' | 'iterations'
>;

/**
 * The certificate of the one-shot entropic quantities: the solver's numbers as reported, and
 * `problem`, the primal problem that was handed to it (minimize ... subject to ...), so the signs and
 * roles of the two objectives can be read without guessing.
 */
export interface SdpCertificate extends SolveNumbers {
  /** The primal problem handed to the solver, in words. */
  problem: string;
}

/**
 * The certificate of guessing, diamond distance, fidelity SDPs and guesswork: objectives in the sign
 * of the quantity (maximisations reported as maximisations), `gap` = |primal − dual|, relativeGap and
 * the relative residuals as the solver reports them, and the solver's message when it has one.
 */
export interface SolverCertificate extends SolveNumbers {
  message?: string;
}

function solveNumbers(ans: SdpAnswer, sign: 1 | -1, absoluteGap: boolean): SolveNumbers {
  return {
    status: ans.status,
    primalObjective: sign * ans.primalObjective,
    dualObjective: sign * ans.dualObjective,
    gap: absoluteGap ? Math.abs(ans.gap) : ans.gap,
    relativeGap: ans.relativeGap,
    primalResidual: ans.primalResidual,
    dualResidual: ans.dualResidual,
    iterations: ans.iterations,
  };
}

/** The SdpCertificate of an answer: the solver's numbers unchanged, with the problem in words. */
export function certificateOf(ans: SdpAnswer, problem: string): SdpCertificate {
  return { ...solveNumbers(ans, 1, false), problem };
}

/** The SolverCertificate of an answer; `negate` for maximisations written as minimisations. */
export function solverCertificate(ans: SdpAnswer, negate: boolean): SolverCertificate {
  const c: SolverCertificate = solveNumbers(ans, negate ? -1 : 1, true);
  if (ans.message) c.message = ans.message;
  return c;
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
 * Statuses short of 'optimal' whose iterate the one-shot entropic quantities still accept (with a
 * note) when the relative gap and both relative residuals are at most this. Above it the answer
 * would mislead: 'solver-failed'.
 */
export const ACCEPT_INACCURATE = 1e-6;
/**
 * The same limit for guessing, diamond distance, the fidelity SDPs and guesswork (published with
 * 1e-5 when those were written; kept so that their answers do not change).
 */
export const ACCEPT_INACCURATE_LOOSE = 1e-5;

/**
 * Accept an answer or throw RhoError 'solver-failed' carrying the status. 'optimal' passes silently;
 * 'inaccurate' and 'iteration-limit' pass with a note when gap and residuals are at most `limit`;
 * everything else (infeasible statuses the caller did not expect, 'cancelled') throws. Returns the
 * note, if any. `what` names the quantity ("the diamond distance").
 */
export function acceptAnswer(ans: SdpAnswer, what: string, limit = ACCEPT_INACCURATE): string | undefined {
  if (ans.status === 'optimal') return undefined;
  const worst = Math.max(ans.relativeGap, ans.primalResidual, ans.dualResidual);
  const numbers =
    `relative gap ${ans.relativeGap.toExponential(2)}, residuals ${ans.primalResidual.toExponential(2)} / ${ans.dualResidual.toExponential(2)}`;
  if ((ans.status === 'inaccurate' || ans.status === 'iteration-limit') && Number.isFinite(worst) && worst <= limit) {
    return (
      `The SDP solver stopped with status '${ans.status}' (${numbers}); ` +
      `the value of ${what} is accurate to about that size, not to the solver's stopping tolerance.`
    );
  }
  throw new RhoError(
    'solver-failed',
    `The SDP for ${what} did not solve: status '${ans.status}'${ans.message ? ` (${ans.message})` : ''}, ${numbers}.`,
    undefined,
    {
      status: ans.status,
      iterations: ans.iterations,
      relativeGap: ans.relativeGap,
      primalResidual: ans.primalResidual,
      dualResidual: ans.dualResidual,
    },
  );
}

/**
 * The Hermitian matrix Y = Σ_c y_c E_c built from the multipliers of one matrix-equality family of
 * constraints (one per real coordinate of a d×d matrix, in the order of sdp's matrixCoordinates, as
 * partialTraceConstraints writes them), where E_c is the Hermitian coefficient with ⟨E_c, X⟩ = that
 * coordinate: 1 at (i,i); ½ at (i,j) and (j,i) for Re X_ij; ½i at (i,j) and −½i at (j,i) for Im X_ij.
 * Then Σ_c y_c ⟨E_c, X⟩ = ⟨Y, X⟩, which is how the dual slack reads. (With coordinateEntry's
 * entries, E_c is exactly the constraint coefficient A_c, so this is Σ_c y_c A_c.)
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

/**
 * The Hermitian coefficient E_c of one real coordinate c of a d×d matrix, dense: ⟨E_c, X⟩ = that
 * coordinate (1 at (i,i); ½ at (i,j) and (j,i) for Re X_ij; ½i at (i,j) and −½i at (j,i) for Im X_ij),
 * the dense form of sdp's coordinateEntry.
 */
export function coordinateMatrix(d: number, c: { i: number; j: number; part: 're' | 'im' }): CMatrix {
  const e = zeros(d, d);
  if (c.i === c.j) e.re[c.i * d + c.i] = 1;
  else if (c.part === 're') {
    e.re[c.i * d + c.j] = 0.5;
    e.re[c.j * d + c.i] = 0.5;
  } else {
    e.im[c.i * d + c.j] = 0.5;
    e.im[c.j * d + c.i] = -0.5;
  }
  return e;
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

/**
 * Solver entries E (on one block) with ⟨E, X⟩ = Re Σ c·X_kl over the given terms [k, l, c_re, c_im].
 * Uses the entry convention of src/sdp/types.ts: an off-diagonal entry [r, s, v] stands for A_rs = v
 * and A_sr = conj v, so ⟨A, X⟩ = 2 Re(conj(v) X_rs); hence v = conj(c)/2 at (k, l) when k < l, and
 * v = c/2 at (l, k) when k > l (X_kl = conj X_lk); on the diagonal v = Re c.
 */
export function realPartEntries(terms: readonly (readonly [number, number, number, number])[]): Entry[] {
  const out: Entry[] = [];
  for (const [k, l, cr, ci] of terms) {
    if (cr === 0 && ci === 0) continue;
    if (k === l) {
      if (cr !== 0) out.push([k, k, cr]);
    } else if (k < l) {
      out.push([k, l, cr / 2, -ci / 2]);
    } else {
      out.push([l, k, cr / 2, ci / 2]);
    }
  }
  return out;
}

/**
 * Smallest eigenvalue of a Hermitian matrix (of its Hermitian part, to absorb rounding): how far a
 * rebuilt dual point is from feasibility. Carries rounding of order 1e-15·‖h‖; not a proof of sign.
 */
export function minEigenvalue(h: CMatrix): number {
  return eigh(hermitianPart(h), { vectors: false }).values[0];
}

/**
 * λ_min(a − b) for a and b that are EXACTLY Hermitian (built by hermitianPart or multiplierMatrix,
 * whose mirrored entries are equal bit for bit): then a − b is exactly Hermitian too, its Hermitian
 * part is itself bit for bit, and minEigenvalue's copy is skipped. Same value as
 * minEigenvalue(sub(a, b)).
 */
export function minEigenvalueOfDifference(a: CMatrix, b: CMatrix): number {
  const n = a.rows;
  const d = zeros(n, n);
  for (let k = 0; k < n * n; k++) {
    d.re[k] = a.re[k] - b.re[k];
    d.im[k] = a.im[k] - b.im[k];
  }
  return eigh(d, { vectors: false }).values[0];
}

/**
 * G^{−1/2} for a positive semidefinite G, on its support: eigenvalues at most 1e-14 times the largest
 * (or nonpositive) are treated as zero, and their directions are left out.
 */
export function inverseRootOnSupport(g: CMatrix): CMatrix {
  const { values, vectors } = eigh(hermitianPart(g), { vectors: true });
  const top = Math.max(...values, 0);
  return fromSpectrum(vectors!, Array.from(values, (v) => (v > 1e-14 * top ? 1 / Math.sqrt(v) : 0)));
}

/**
 * G^{−1/2} M G^{−1/2} for every M, with G = Σ M (inverseRootOnSupport): an interior-point POVM made
 * to sum to the identity on G's support, up to rounding. An empty list stays empty. `sum`: G when
 * the caller has it already (it must be Σ M in list order, which is what is computed otherwise).
 */
export function renormalisePovm(elements: readonly CMatrix[], sum?: CMatrix): CMatrix[] {
  if (elements.length === 0) return [];
  let g = sum;
  if (!g) {
    g = elements[0];
    for (let k = 1; k < elements.length; k++) g = add(g, elements[k]);
  }
  const root = inverseRootOnSupport(g);
  return elements.map((m) => hermitianPart(mul(mul(root, m), root)));
}
