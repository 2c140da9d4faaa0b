/**
 * sdp: rhosigma's own semidefinite programming solver.
 *
 * WHAT IT SOLVES. A problem is a list of cone blocks and linear equality constraints:
 *
 *   primal  minimize  Σ_k ⟨C_k, X_k⟩   s.t.  Σ_k ⟨A_ik, X_k⟩ = b_i (i = 1..m),  X_k in cone k
 *   dual    maximize  Σ_i b_i y_i      s.t.  S_k = C_k − Σ_i y_i A_ik in cone k (S_k = 0 on free blocks)
 *
 * Cones: 'symmetric' (real PSD n×n), 'hermitian' (complex PSD n×n), 'nonnegative' (R^n_+), 'free'
 * (R^n). ⟨A, X⟩ = Re tr(A X) for matrix blocks and the dot product for vector blocks. There are
 * no inequality constraints: add a 'nonnegative' slack block (or a PSD slack block for a matrix
 * inequality). To maximize, minimize the negated objective.
 *
 * THE FORMAT (plain data; see types.ts for every field):
 *   { cones: Cone[], objective: BlockTerm[], constraints: { terms: BlockTerm[], equals: number }[] }
 *   A BlockTerm gives one block's coefficient: sparse `entries` ([row, col, re, im?], each
 *   off-diagonal pair listed ONCE and mirrored as its conjugate), a dense Hermitian `matrix`, or a
 *   `vector` for vector blocks. Blocks not mentioned have coefficient zero.
 *
 * WORKED EXAMPLE: a Hermitian two-qubit block with a partial-trace constraint. Largest value of
 * Re tr(K X) over X_AB ⪰ 0 (complex 4×4) whose marginal on A is a given qubit state ρ_A:
 *
 *   import { solveSdp, partialTraceConstraints } from './sdp/index.js';
 *   import { fromRows } from './linalg/index.js';
 *   const rhoA = fromRows([[0.7, 0.1], [0.1, 0.3]], [[0, -0.2], [0.2, 0]]);  // ρ_A = [[.7, .1−.2i], [.1+.2i, .3]]
 *   const K = fromRows(
 *     [[1, 0, 0, 0.5], [0, 0, 0, 0], [0, 0, 0, 0], [0.5, 0, 0, 1]],
 *     [[0, 0, 0, -0.5], [0, 0, 0, 0], [0, 0, 0, 0], [0.5, 0, 0, 0]]);          // Hermitian
 *   const negK = { ...K, re: K.re.map((v) => -v), im: K.im.map((v) => -v) };
 *   const answer = solveSdp({
 *     cones: [{ kind: 'hermitian', size: 4 }],
 *     objective: [{ block: 0, matrix: negK }],                                 // minimize −Re tr(K X)
 *     constraints: partialTraceConstraints({ block: 0, dims: [2, 2], traceOut: [1], hermitian: true, equals: rhoA }),
 *   });
 *   // answer.status === 'optimal'; the value is −answer.primalObjective; answer.x[0] is the
 *   // optimal X as a CMatrix; answer.y holds one multiplier per real coordinate of ρ_A (4 here).
 *
 * The same constraint written by hand: (tr_B X)_01 = Σ_b X_(0b),(1b) has real part
 *   { terms: [{ block: 0, entries: [[0, 2, 0.5], [1, 3, 0.5]] }], equals: 0.1 }
 * (entry [i, j, 0.5] with its mirror gives ⟨E, X⟩ = Re X_ij) and imaginary part
 *   { terms: [{ block: 0, entries: [[0, 2, 0, 0.5], [1, 3, 0, 0.5]] }], equals: -0.2 }.
 *
 * THE ANSWER: status ('optimal' | 'primal-infeasible' | 'dual-infeasible' | 'inaccurate' |
 * 'iteration-limit' | 'cancelled'), x and s per block (CMatrix for matrix blocks, number[] for
 * vector blocks), y, both objectives, gap and relativeGap, primalResidual and dualResidual
 * (relative), iterations, dependentConstraints, and for the infeasible statuses a checkable
 * certificate (a dual ray y with −Σ y_i A_i ⪰ 0 and b·y = 1, or a primal ray X ⪰ 0 with A(X) = 0
 * and ⟨C, X⟩ = −1). Read the residuals before trusting a near-zero. Numerical trouble never throws:
 * 'inaccurate' and 'iteration-limit' return the best iterate seen with its residuals and gap, and
 * `message` says what went wrong. test/sdp/degenerate.test.ts lists what degenerate problems (no
 * interior, dependent rows, data scaled by 1e±8) give, and what is still not handled.
 *
 * THE METHOD (solver.ts): primal–dual interior point on the homogeneous self-dual embedding,
 * Nesterov–Todd scaling, Mehrotra predictor–corrector; Hermitian blocks through the real
 * embedding [[Re, −Im], [Im, Re]] (compile.ts says why); the Schur complement is assembled per
 * block and factored by groups of constraints sharing blocks (schur.ts), so thousands of 2×2
 * blocks cost time linear in their number. Deterministic: no randomness anywhere.
 *
 * OPTIONS (SdpOptions): gapTolerance 1e-8 (relative to the size of the objective), absoluteGapTolerance
 * 1e-13 (for objectives at zero), feasibilityTolerance 1e-8, maxIterations 100,
 * stepFraction 0.98, onIteration(info) progress callback, shouldStop() and signal (AbortSignal)
 * for cancellation (status 'cancelled' with the last iterate).
 *
 * Does not: accept inequality rows directly, second-order or exponential cones, warm starts.
 */
export { solveSdp, DEFAULT_OPTIONS } from './solver.js';
export * from './support.js';
export { sdpCost, shapeOf, checkSdpLimits, SDP_TYPICAL_ITERATIONS, type SdpShape } from './cost.js';
export { compile, GLOBAL_ATOM_THRESHOLD } from './compile.js';
export { partialTraceConstraints, matrixCoordinates, coordinateEntry, coordinateValue } from './build.js';
export type { Coordinate, PartialTraceSpec } from './build.js';
export type {
  Cone,
  Entry,
  BlockTerm,
  Constraint,
  SdpProblem,
  SdpOptions,
  SdpAnswer,
  SdpStatus,
  BlockValue,
  Certificate,
  IterationInfo,
} from './types.js';
