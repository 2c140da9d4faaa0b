/**
 * The plain-data shapes of the SDP solver: the problem, the options, the answer.
 *
 * A problem is a product of cones (blocks) and linear equality constraints:
 *
 *   primal   minimize   Σ_k ⟨C_k, X_k⟩
 *            subject to Σ_k ⟨A_ik, X_k⟩ = b_i   (i = 1..m),   X_k in cone k
 *   dual     maximize   Σ_i b_i y_i
 *            subject to S_k = C_k − Σ_i y_i A_ik in the dual cone of cone k
 *
 * where ⟨A, X⟩ = Re tr(A X) for matrix blocks (A Hermitian) and Σ_p a_p x_p for vector blocks. The
 * PSD cones and the orthant are self-dual; the dual cone of a free block is {0}, so free blocks turn
 * into dual equality constraints S_k = 0.
 *
 * Holds no numerics. Everything here is plain data (numbers, arrays, CMatrix typed arrays) that
 * survives JSON (after writing CMatrix as rows) or a structured clone.
 */
import type { CMatrix } from '../linalg/index.js';

/** One block of the cone product. */
export type Cone =
  /** Real symmetric positive semidefinite size×size matrices. */
  | { kind: 'symmetric'; size: number }
  /** Complex Hermitian positive semidefinite size×size matrices. */
  | { kind: 'hermitian'; size: number }
  /** Vectors with size nonnegative entries. */
  | { kind: 'nonnegative'; size: number }
  /** Vectors with size unrestricted entries. */
  | { kind: 'free'; size: number };

/**
 * One sparse entry of a block coefficient.
 * Matrix blocks: [row, col, re] or [row, col, re, im]. An off-diagonal entry (i, j, v) stands for
 * BOTH A_ij = v and A_ji = conj(v) (the coefficient is Hermitian); list each pair once. Diagonal
 * entries must be real. Repeated entries add up.
 * Vector blocks: [index, value].
 */
export type Entry = readonly [number, number] | readonly [number, number, number] | readonly [number, number, number, number];

/** The coefficient of one block in a linear function of the variables (blocks not listed: zero). */
export type BlockTerm =
  /** Sparse: listed entries only (see Entry). */
  | { block: number; entries: readonly Entry[] }
  /** Dense matrix coefficient: real rows, {re, im} rows, or a CMatrix; must be Hermitian. */
  | { block: number; matrix: readonly (readonly number[])[] | { re: readonly (readonly number[])[]; im: readonly (readonly number[])[] } | CMatrix }
  /** Dense vector coefficient for nonnegative/free blocks. */
  | { block: number; vector: readonly number[] };

/** One equality constraint Σ_k ⟨A_ik, X_k⟩ = equals. */
export interface Constraint {
  terms: readonly BlockTerm[];
  equals: number;
  /** Optional label, echoed in error messages. */
  label?: string;
}

export interface SdpProblem {
  cones: readonly Cone[];
  /** The objective coefficient C (minimized). */
  objective: readonly BlockTerm[];
  constraints: readonly Constraint[];
}

/** Numbers reported after each interior-point iteration. */
export interface IterationInfo {
  iteration: number;
  primalObjective: number;
  dualObjective: number;
  /** Complementarity ⟨X, S⟩ of the current (τ-normalized) iterate. */
  gap: number;
  relativeGap: number;
  primalResidual: number;
  dualResidual: number;
  /** Homogeneous embedding variables: τ → 0 with κ > 0 signals infeasibility. */
  tau: number;
  kappa: number;
  /** Step length taken in this iteration. */
  step: number;
  /** Centering parameter used in this iteration. */
  sigma: number;
}

export interface SdpOptions {
  /**
   * Duality gap relative to the size of the objective, |p − d| / max(|p|, |d|), required for 'optimal'
   * (unless the absolute test below passes). Default 1e-8.
   */
  gapTolerance?: number;
  /**
   * Absolute duality gap |p − d| that also counts as converged, for objectives at or near zero (in the
   * user's scale). Default 1e-13: an objective of 1e-9 is then resolved to about 1e-4 relative at worst,
   * which is why the quantities scale their objectives to order one where they can.
   */
  absoluteGapTolerance?: number;
  /** Relative primal and dual residuals required for 'optimal', and the accuracy of certificates. Default 1e-8. */
  feasibilityTolerance?: number;
  /** Default 100. */
  maxIterations?: number;
  /** Fraction of the step to the cone boundary. Default 0.98. */
  stepFraction?: number;
  /** Called after every iteration with its numbers. */
  onIteration?: (info: IterationInfo) => void;
  /** Polled before each iteration; returning true stops the solve with status 'cancelled'. */
  shouldStop?: () => boolean;
  /** An AbortSignal (or anything with `aborted`); aborted → status 'cancelled'. */
  signal?: { readonly aborted: boolean };
}

export type SdpStatus = 'optimal' | 'primal-infeasible' | 'dual-infeasible' | 'inaccurate' | 'iteration-limit' | 'cancelled';

/** A block's value: CMatrix for matrix blocks (im all zero for symmetric blocks), number[] for vector blocks. */
export type BlockValue = CMatrix | number[];

/**
 * Proof of infeasibility, checkable without trusting the solver.
 * primal-infeasible: a dual ray y with S = −Σ y_i A_i in the cone (S_k = 0 on free blocks) and
 *   b·y = 1; then no X satisfies the constraints (Farkas). `residual` = ‖Σ y_i A_i + S‖.
 * dual-infeasible: a primal ray X in the cone with A(X) = 0 and ⟨C, X⟩ = −1; then the primal is
 *   unbounded below when feasible, and the dual has no feasible point. `residual` = ‖A(X)‖.
 */
export type Certificate =
  | { kind: 'dual-ray'; y: number[]; s: BlockValue[]; bDotY: number; residual: number }
  | { kind: 'primal-ray'; x: BlockValue[]; cDotX: number; residual: number };

export interface SdpAnswer {
  status: SdpStatus;
  /**
   * Primal variable per block (the final iterate divided by τ; for 'inaccurate' and 'iteration-limit'
   * the iterate with the smallest residuals and gap relative to the tolerances seen during the solve).
   */
  x: BlockValue[];
  /** Dual multipliers, one per constraint. */
  y: number[];
  /** Dual slack per block: C − Σ y_i A_i (zero vector on free blocks). */
  s: BlockValue[];
  primalObjective: number;
  dualObjective: number;
  /** primalObjective − dualObjective (≥ 0 up to residuals by weak duality). */
  gap: number;
  /** |gap| / max(|primal|, |dual|): relative to the size of the objective. */
  relativeGap: number;
  /** ‖A(X) − b‖ / (1 + ‖b‖). */
  primalResidual: number;
  /** ‖C − Σ y_i A_i − S‖ / (1 + ‖C‖). */
  dualResidual: number;
  iterations: number;
  /** Present when status is 'primal-infeasible' or 'dual-infeasible'. */
  certificate?: Certificate;
  /** Constraints the Schur complement found numerically dependent on others (treated as redundant). */
  dependentConstraints: number;
  /** Human-readable remark for statuses other than 'optimal'. */
  message?: string;
}
