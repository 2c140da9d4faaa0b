/**
 * What every quantity solved with rhosigma's SDP solver shares (src/oneshot, src/guessing,
 * src/recovery): the one certificate shape every answer carries, the rule that turns certified
 * bounds into an answer or a RhoError 'solver-failed', values clipped to their range, and the
 * helpers that read an interior-point iterate back (multipliers of matrix equalities as a Hermitian
 * matrix, solver entries for Re Σ c·X_kl) and repair it into feasible points (smallest eigenvalue,
 * POVM renormalisation, inverse square roots on a support).
 *
 * THE CERTIFICATE (SdpCertificate): the primal problem in words and its sense, a primal and a dual
 * point (plain engine values: numbers, CMatrix, lists of them) made feasible up to rounding, the
 * objectives of those two points, their gap, and the bracket of the headline value (after its
 * logarithm, square, ...) that the two points prove, with the accuracy that bracket certifies. The
 * solver's own numbers of its final iterate (status, iterations, relative residuals) stay beside them.
 * kernel-bridge/rhosigma/certificates.py recomputes all of it from the request and the answer with
 * numpy alone, from the published formulations.
 *
 * THE RULE (certify): an answer is returned when its certified bracket is narrow (relative width at
 * most `limit`, default 1e-6, or absolute width at most `absolute`, default 1e-9); its value is then
 * the solver's estimate clamped into the bracket and into the quantity's range (the excess, if any,
 * stated). A bracket that is wider is refused with 'solver-failed' carrying the bracket, whatever the
 * solver's status: 'optimal' means that the solver's stopping test passed, the bracket is what the
 * returned points prove. Both are floating-point evidence: eigenvalues and traces carry rounding of
 * order 1e-15 times the norms involved, which the brackets are padded by.
 *
 * Deliberately not here: any quantity (each computes its own points and bracket). Cost: O(d²) per
 * multiplier matrix, one d×d eigendecomposition per minEigenvalue or POVM renormalisation.
 */
import { CMatrix, add, eigh, hermitianPart, mul, zeros } from '../linalg/index.js';
import { fromSpectrum } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import { matrixCoordinates } from './build.js';
import type { Entry, SdpAnswer, SdpOptions, SdpStatus } from './types.js';

/** A point of a certificate: named plain engine values (numbers, CMatrix, lists of them). */
export type CertificatePoint = Record<string, number | CMatrix | readonly CMatrix[] | readonly number[] | readonly unknown[] | Record<string, unknown>>;

/** The one certificate shape of every SDP-based answer (see the header). */
export interface SdpCertificate {
  /** The solver's status for its final iterate, or 'exact' when no interior-point solve was needed (closed forms, one-dimensional duals). */
  status: SdpStatus | 'exact';
  /** The primal problem in words, in the sense it is optimised, with the dual it is paired with. */
  problem: string;
  sense: 'minimize' | 'maximize';
  /** The primal point (feasible up to rounding) and its objective. */
  primal: CertificatePoint;
  primalObjective: number;
  /** The dual point (feasible up to rounding) and its objective: a bound on the primal optimum by weak duality. */
  dual: CertificatePoint;
  dualObjective: number;
  /** |primalObjective − dualObjective| and that over max(|primal|, |dual|) (0 when both are 0). */
  gap: number;
  relativeGap: number;
  /** The bracket of the headline value proved by the two points (padded for rounding). */
  bounds: { lower: number; upper: number };
  /** Its width, absolute and relative to |value|: the accuracy the answer certifies. */
  accuracy: { absolute: number; relative: number };
  /** The solver's final iterate: iterations and relative residuals (0 for 'exact'). */
  iterations: number;
  primalResidual: number;
  dualResidual: number;
  /** The solver's remark, when it has one. */
  message?: string;
  /**
   * Present only when the solver's estimate or the padded bracket reached beyond the range the quantity
   * has by definition (a fidelity above 1, a distance above 1): what was clipped, and by how much.
   */
  clipped?: RangeClip;
}

/**
 * What clipping to a quantity's range changed: `from`, the solver's raw estimate of the headline value
 * (before any clamping); `excess`, how far beyond the range the raw estimate or the padded bracket reached
 * (the larger; 0 < excess); `range`, the quantity's range; `bracket`, the padded bracket before clipping.
 * The reported value and `bounds` are the clipped ones, so `bounds` still contains `value`.
 */
export interface RangeClip {
  from: number;
  excess: number;
  range: [number, number];
  bracket: { lower: number; upper: number };
}

/** Default relative width of the certified bracket up to which an answer is returned. */
export const ACCEPT_RELATIVE = 1e-6;
/** Default absolute width (in the value's units) up to which an answer is returned, for values near zero. */
export const ACCEPT_ABSOLUTE = 1e-9;

/** Rounding allowance for a sum of n products of numbers of size `scale`: 8 n u·scale (u = 2⁻⁵³). */
export function roundingPad(n: number, scale: number): number {
  return 8 * Math.max(1, n) * 1.1102230246251565e-16 * Math.abs(scale);
}

/**
 * Rounding allowance of one computed eigenvalue of an n×n Hermitian matrix of Frobenius norm `norm`:
 * 4√n·u·‖A‖_F, a few times the backward error of a Householder-based eigensolver (the rigorous bound
 * p(n)·u·‖A‖₂ has a p(n) growing with n that is far from what happens; this is evidence, not proof).
 * The checker (kernel-bridge/rhosigma/certificates.py) uses the same allowance.
 */
export function eigenvalueAllowance(n: number, norm: number): number {
  return 4 * Math.sqrt(Math.max(1, n)) * 1.1102230246251565e-16 * Math.abs(norm);
}

/** What `certify` needs of a quantity. */
export interface CertifyInput {
  /** Names the quantity in messages ("the guessing probability"). */
  what: string;
  /** The solver's answer (absent for exact methods). */
  solve?: SdpAnswer;
  problem: string;
  sense: 'minimize' | 'maximize';
  primal: CertificatePoint;
  primalObjective: number;
  dual: CertificatePoint;
  dualObjective: number;
  /** The certified bracket of the headline value (padded), lower ≤ upper. */
  bounds: { lower: number; upper: number };
  /** The solver's estimate of the headline value (default: the middle of the bracket). */
  estimate?: number;
  /** The range the headline value lies in by definition (e.g. [0, 1] for a fidelity). */
  range?: readonly [number, number];
  /** Acceptance: relative and absolute widths (defaults ACCEPT_RELATIVE, ACCEPT_ABSOLUTE). */
  limit?: number;
  absolute?: number;
}

/** The certified answer: the value, its certificate, and a note when something needs saying. */
export interface Certified {
  value: number;
  certificate: SdpCertificate;
  note?: string;
}

function fmt(x: number): string {
  return Number.isFinite(x) ? x.toPrecision(12) : String(x);
}

/** An assessed answer: what certify returns, and whether the rule accepts it (else the error it would throw). */
export interface Assessed extends Certified {
  accepted: boolean;
  failure?: RhoError;
}

/**
 * The rule of the header without throwing: the value (the estimate clamped into the bracket, then
 * into `range`, with the excess stated), the certificate, a note, and whether the bracket is narrow
 * enough (`failure`: the RhoError 'solver-failed' with the bracket that certify would throw).
 */
export function assess(c: CertifyInput): Assessed {
  const s = c.solve;
  const status: SdpStatus | 'exact' = s ? s.status : 'exact';
  let lower = Math.min(c.bounds.lower, c.bounds.upper);
  let upper = Math.max(c.bounds.lower, c.bounds.upper);
  const raw = c.estimate ?? 0.5 * (lower + upper);
  const notes: string[] = [];
  let clipped: RangeClip | undefined;
  if (c.range) {
    const [lo, hi] = c.range;
    const excess = Math.max(upper - hi, lo - lower, Number.isFinite(raw) ? Math.max(raw - hi, lo - raw) : 0);
    if (excess > 0) {
      clipped = { from: raw, excess, range: [lo, hi], bracket: { lower, upper } };
      notes.push(
        `The solver's estimate ${fmt(raw)} and the certified bracket [${fmt(lower)}, ${fmt(upper)}] reach ${fmt(excess)} beyond the range ` +
          `[${lo}, ${hi}] of ${c.what} (rounding and the solver's residuals); the value and the bracket are clipped to the range ` +
          `(certificate.clipped).`,
      );
      lower = Math.min(Math.max(lower, lo), hi);
      upper = Math.min(Math.max(upper, lo), hi);
    }
  }
  let value = c.estimate ?? 0.5 * (lower + upper);
  if (!(value >= lower)) value = lower;
  if (!(value <= upper)) value = upper;
  const width = upper - lower;
  const scale = Math.abs(value);
  const accuracy = { absolute: width, relative: scale > 0 ? width / scale : width === 0 ? 0 : Infinity };
  const gap = Math.abs(c.primalObjective - c.dualObjective);
  const big = Math.max(Math.abs(c.primalObjective), Math.abs(c.dualObjective));
  const certificate: SdpCertificate = {
    status,
    problem: c.problem,
    sense: c.sense,
    primal: c.primal,
    primalObjective: c.primalObjective,
    dual: c.dual,
    dualObjective: c.dualObjective,
    gap,
    relativeGap: big > 0 ? gap / big : 0,
    bounds: { lower, upper },
    accuracy,
    iterations: s ? s.iterations : 0,
    primalResidual: s ? s.primalResidual : 0,
    dualResidual: s ? s.dualResidual : 0,
    ...(s?.message ? { message: s.message } : {}),
    ...(clipped ? { clipped } : {}),
  };
  const limit = c.limit ?? ACCEPT_RELATIVE;
  const absolute = c.absolute ?? ACCEPT_ABSOLUTE;
  const accepted = status !== 'cancelled' && Number.isFinite(width) && (accuracy.relative <= limit || width <= absolute);
  if (!accepted) {
    const failure = new RhoError(
      'solver-failed',
      `The SDP for ${c.what} did not reach a certified answer: the returned points prove only ${c.what} ∈ [${fmt(lower)}, ${fmt(upper)}] ` +
        `(width ${width.toExponential(2)}, relative ${accuracy.relative.toExponential(2)}; accepted up to ${limit} relative or ${absolute} absolute); ` +
        `solver status '${status}'${s?.message ? ` (${s.message})` : ''}.`,
      undefined,
      { status, bounds: { lower, upper }, accuracy, iterations: certificate.iterations, primalResidual: certificate.primalResidual, dualResidual: certificate.dualResidual },
    );
    return { value, certificate, accepted, failure };
  }
  if (s && status !== 'optimal') {
    notes.push(
      `The SDP solver stopped with status '${status}'${s.message ? ` (${s.message})` : ''}; the value is certified by the returned points to ` +
        `${accuracy.absolute.toExponential(2)} (relative ${accuracy.relative.toExponential(2)}).`,
    );
  }
  return { value, certificate, accepted, ...(notes.length ? { note: notes.join(' ') } : {}) };
}

/** assess, throwing its failure (RhoError 'solver-failed' with the bracket) when the rule refuses the answer. */
export function certify(c: CertifyInput): Certified {
  const a = assess(c);
  if (!a.accepted) throw a.failure!;
  return { value: a.value, certificate: a.certificate, ...(a.note ? { note: a.note } : {}) };
}

/** Solver options for a second, tighter solve when the first bracket does not reach ACCEPT_RELATIVE. */
export const TIGHT_SOLVE = { gapTolerance: 1e-13, feasibilityTolerance: 1e-13, absoluteGapTolerance: 1e-16, maxIterations: 150 } as const;

/**
 * Assess an attempt, and when the caller gave no solver options and the bracket is wider than
 * ACCEPT_RELATIVE relative to the value (values near zero, 1 − small, ...), assess a second attempt with
 * TIGHT_SOLVE and keep the narrower bracket; then the rule (throws 'solver-failed' when refused).
 */
export function certifyRefined(attempt: (solver: SdpOptions | undefined) => Assessed, solver: SdpOptions | undefined): Certified {
  let a = attempt(solver);
  if (solver === undefined && !(a.certificate.accuracy.relative <= ACCEPT_RELATIVE)) {
    let b: Assessed | undefined;
    try {
      b = attempt({ ...TIGHT_SOLVE });
    } catch (e) {
      if (!(e instanceof RhoError) || e.code !== 'solver-failed') throw e;
    }
    if (b && (!a.accepted || b.certificate.accuracy.absolute < a.certificate.accuracy.absolute)) a = b;
  }
  if (!a.accepted) throw a.failure!;
  return { value: a.value, certificate: a.certificate, ...(a.note ? { note: a.note } : {}) };
}

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
export interface LegacyCertificate extends SolveNumbers {
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
export function certificateOf(ans: SdpAnswer, problem: string): LegacyCertificate {
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

// ---------------------------------------------------------------------------------------------------
// Repairs of points into feasibility, shared by the quantities (and mirrored in the numpy checker).

/** ‖M‖_F. */
export function frobenius(m: CMatrix): number {
  let s = 0;
  for (let k = 0; k < m.re.length; k++) s += m.re[k] * m.re[k] + m.im[k] * m.im[k];
  return Math.sqrt(s);
}

/** The positive semidefinite part of a Hermitian matrix: negative eigenvalues set to zero. */
export function clipPsd(m: CMatrix): CMatrix {
  const { values, vectors } = eigh(hermitianPart(m), { vectors: true });
  if (values[0] >= 0) return hermitianPart(m);
  return fromSpectrum(vectors!, Array.from(values, (v) => Math.max(0, v)));
}

/**
 * The shift s ≥ 0 that makes A − B + s·I positive semidefinite for Hermitian A, B, with the rounding
 * allowance of the computed smallest eigenvalue: max(0, −λ_min(A − B) + allowance).
 */
export function psdShift(a: CMatrix, b?: CMatrix): number {
  const n = a.rows;
  const d = zeros(n, n);
  for (let k = 0; k < n * n; k++) {
    d.re[k] = a.re[k] - (b ? b.re[k] : 0);
    d.im[k] = a.im[k] - (b ? b.im[k] : 0);
  }
  const h = hermitianPart(d);
  const lmin = eigh(h, { vectors: false }).values[0];
  return Math.max(0, -lmin + eigenvalueAllowance(n, frobenius(h)));
}

/** Largest eigenvalue of a Hermitian matrix, raised by its rounding allowance (an upper bound up to rounding). */
export function maxEigenvalueUpper(m: CMatrix): number {
  const h = hermitianPart(m);
  const v = eigh(h, { vectors: false }).values;
  return v[v.length - 1] + eigenvalueAllowance(m.rows, frobenius(h));
}

/**
 * A list of positive semidefinite elements made into a POVM: negative eigenvalues clipped, then
 * G^{−1/2} M G^{−1/2} with G = Σ M (renormalisePovm).
 */
export function repairPovm(elements: readonly CMatrix[]): CMatrix[] {
  return renormalisePovm(elements.map(clipPsd));
}
