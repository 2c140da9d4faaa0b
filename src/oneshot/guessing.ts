/**
 * Guessing probability of a classical variable X from quantum side information B: for an ensemble
 * {p_x, ρ_x},
 *
 *   p_guess(X|B) = max { Σ_x p_x Tr M_x ρ_x : M_x ⪰ 0, Σ_x M_x = 1 }            (primal)
 *                = min { Tr Y : Y ⪰ p_x ρ_x for every x }                           (dual)
 *
 * (Holevo 1973, J. Multivariate Anal. 3, 337; Yuen, Kennedy & Lax 1975, IEEE Trans. Inf. Theory 21,
 * 125). At the optimum Y = Σ_x p_x ρ_x M_x, and (Y − p_x ρ_x) M_x = 0 for every x (the Holevo /
 * Yuen–Kennedy–Lax optimality conditions).
 *
 * Method: the primal is handed to rhosigma's own interior-point solver (src/sdp) with one Hermitian
 * d×d block per M_x and d² real equality rows for Σ_x M_x = 1. The dual operator Y is rebuilt from
 * the solver's multipliers. Because an interior-point iterate satisfies the constraints only to its
 * residuals, two checkable bounds are returned beside the solver's objectives:
 *   lower: the measurement is renormalised, M'_x = G^{−1/2} M_x G^{−1/2} with G = Σ_x M_x, which is a
 *          POVM up to rounding, and Σ_x p_x Tr M'_x ρ_x is a value that measurement achieves;
 *   upper: with ε = max_x max(0, −λ_min(Y − p_x ρ_x)), Y + ε·1 is dual feasible, so
 *          p_guess ≤ Tr Y + d·ε (weak duality).
 * Both are floating-point evidence, not proofs (eigenvalues carry rounding of order 1e-15·‖Y‖; the
 * bracket is padded by the allowances of src/sdp/support.ts).
 *
 * The certificate (primal point: the measurement; dual point: Y), the acceptance rule and the repairs
 * are shared with the other SDP-based quantities (src/sdp/support.ts).
 *
 * Deliberately not here: the closed form for two states (Helstrom) — the tests compare against it —,
 * guesswork, and input validation beyond shapes and probabilities (the ops layer validates states).
 *
 * Cost: the SDP has n blocks of size d and d² constraints; each interior-point iteration is about
 * O(n d⁶ + d⁶) for the Schur complement, typically 10–30 iterations. Plus n eigendecompositions.
 */
import {
  CMatrix, add, identity, mul, scale, sub, trace, traceOfProductRe, zeros, hermitianPart,
} from '../linalg/index.js';
import { RhoError } from '../errors.js';
import { checkProbabilities } from '../quantum/arguments.js';
import { solveSdp, matrixCoordinates, coordinateEntry, type BlockTerm, type Constraint, type SdpOptions, type SdpProblem } from '../sdp/index.js';
import {
  ACCEPT_INACCURATE_LOOSE, certify, frobenius, multiplierMatrix, psdShift, repairPovm, roundingPad, type SdpCertificate,
} from '../sdp/support.js';

export interface GuessingResult {
  /** p_guess from the solver's primal objective. */
  value: number;
  /** The optimal POVM, renormalised so that Σ_x M_x = 1 up to rounding (one element per state). */
  measurement: CMatrix[];
  /** The dual operator Y (Y ⪰ p_x ρ_x up to `dualViolation`; Tr Y = the dual objective). */
  dual: CMatrix;
  certificate: SdpCertificate;
  /** Checkable bracket: `lower` achieved by `measurement`, `upper` = Tr Y + d·dualViolation (padded; = certificate.bounds). */
  bounds: { lower: number; upper: number };
  diagnostics: {
    /** ‖Σ_x M_x − 1‖_F of the solver's measurement before renormalisation. */
    povmDefect: number;
    /** max_x max(0, −λ_min(Y − p_x ρ_x)). */
    dualViolation: number;
  };
  /** Present when the solver's status was not 'optimal' but close enough to report. */
  warning?: string;
}

export interface GuessingOptions {
  /** Tolerance for the probability vector (entries ≥ −tol, sum within tol of 1). Default 1e-9. */
  tolerance?: number;
  /** Passed to the SDP solver. */
  sdp?: SdpOptions;
}

/** Checks an ensemble: probabilities a distribution, states square and of one size. Returns d. */
export function checkEnsemble(probabilities: readonly number[], states: readonly CMatrix[], tol: number): number {
  checkProbabilities(probabilities, 'probabilities', tol);
  if (states.length !== probabilities.length) {
    throw new RhoError(
      'dimension-mismatch',
      `There are ${probabilities.length} probabilities but ${states.length} states; give one probability per state.`,
      'states',
    );
  }
  const d = states[0].rows;
  states.forEach((s, k) => {
    if (s.rows !== s.cols) throw new RhoError('dimension-mismatch', `State ${k} is not square (${s.rows}×${s.cols}).`, `states[${k}]`);
    if (s.rows !== d) {
      throw new RhoError('dimension-mismatch', `State ${k} is ${s.rows}×${s.rows} but state 0 is ${d}×${d}; all states must act on one space.`, `states[${k}]`);
    }
  });
  return d;
}

/**
 * The primal SDP handed to the solver for the weighted states w_x = p_x ρ_x (Hermitian, one size d):
 * minimize −Σ_x ⟨w_x, M_x⟩ over one Hermitian d×d block per M_x, subject to Σ_x M_x = 1 written as d²
 * real rows (one per coordinate, in matrixCoordinates order; the dual operator is read back from
 * their multipliers). Exported for the benchmark, which times the solve of exactly this problem.
 */
export function guessingProblem(weighted: readonly CMatrix[]): SdpProblem {
  const d = weighted[0].rows;
  const cones = weighted.map(() => ({ kind: 'hermitian' as const, size: d }));
  const objective: BlockTerm[] = weighted.map((w, x) => ({ block: x, matrix: scale(w, -1) }));
  const constraints: Constraint[] = [];
  for (const c of matrixCoordinates(d, true)) {
    const e = coordinateEntry(c.i, c.j, c.part);
    constraints.push({
      terms: weighted.map((_, x) => ({ block: x, entries: [e] })),
      equals: c.i === c.j ? 1 : 0,
      label: `Σ_x M_x = 1 (${c.i}, ${c.j}) ${c.part}`,
    });
  }
  return { cones, objective, constraints };
}

/**
 * p_guess(X|B) of the ensemble {p_x, ρ_x} (ρ_x positive semidefinite, one size), with the optimal
 * measurement, the dual operator and the certificate. Probabilities are checked (nonnegative, sum 1
 * within `tolerance`); the states are taken as given.
 */
export function guessingProbability(
  probabilities: readonly number[],
  states: readonly CMatrix[],
  options: GuessingOptions = {},
): GuessingResult {
  const tol = options.tolerance ?? 1e-9;
  const d = checkEnsemble(probabilities, states, tol);
  const n = states.length;
  const weighted = states.map((s, x) => hermitianPart(scale(s, Math.max(probabilities[x], 0))));
  const answer = solveSdp(guessingProblem(weighted), options.sdp);

  const raw = answer.x.map((m) => hermitianPart(m as CMatrix));
  let sum = raw[0];
  for (let x = 1; x < n; x++) sum = add(sum, raw[x]);
  const defect = sub(sum, identity(d));
  const povmDefect = frobenius(defect);
  const measurement = repairPovm(raw);

  // The dual: S_x = −p_x ρ_x − Z with Z = Σ_i y_i A_i, so Y = −Z satisfies Y − p_x ρ_x = S_x ⪰ 0.
  const dual = scale(multiplierMatrix(answer.y, 0, d), -1);
  let dualViolation = 0;
  for (const w of weighted) dualViolation = Math.max(dualViolation, psdShift(dual, w));
  let achieved = 0;
  for (let x = 0; x < n; x++) achieved += traceOfProductRe(measurement[x], weighted[x]);
  const trY = trace(dual).re;
  const upper = trY + d * dualViolation;
  const pad = roundingPad(n * d * d, 1);
  const c = certify({
    what: 'the guessing probability', solve: answer,
    problem: 'maximize Σ_x p_x Tr M_x ρ_x s.t. M_x ⪰ 0, Σ_x M_x = I; dual: minimize Tr Y s.t. Y ⪰ p_x ρ_x for every x (Y + s·I with s the largest violation is feasible)',
    sense: 'maximize',
    primal: { measurement }, primalObjective: achieved,
    dual: { Y: dual }, dualObjective: trY,
    bounds: { lower: achieved - pad, upper: upper + pad },
    estimate: -answer.primalObjective,
    range: guessingRange(weighted),
    limit: ACCEPT_INACCURATE_LOOSE,
  });
  const result: GuessingResult = {
    value: c.value,
    measurement,
    dual,
    certificate: c.certificate,
    bounds: c.certificate.bounds,
    diagnostics: { povmDefect, dualViolation },
  };
  if (c.note) result.warning = c.note;
  return result;
}

/**
 * The range of p_guess for the weighted states w_x = p_x ρ_x: at least max_x Tr w_x (always guess the most
 * likely x: M_x* = I) and at most Σ_x Tr w_x (each Tr M_x w_x ≤ Tr w_x) — [max_x p_x, 1] for a distribution
 * and states of unit trace, and max_x p_x ≥ 1/n. Facts of the problem, not of the solve (common practice).
 */
export function guessingRange(weighted: readonly CMatrix[]): [number, number] {
  let top = 0;
  let sum = 0;
  for (const w of weighted) {
    const t = trace(w).re;
    top = Math.max(top, t);
    sum += t;
  }
  return [top, Math.max(top, sum)];
}

/** Σ_x p_x ρ_x M_x, the operator that equals Y at the optimum (Holevo / Yuen–Kennedy–Lax). */
export function holevoOperator(probabilities: readonly number[], states: readonly CMatrix[], measurement: readonly CMatrix[]): CMatrix {
  let acc = zeros(states[0].rows, states[0].rows);
  states.forEach((s, x) => {
    acc = add(acc, scale(mul(s, measurement[x]), probabilities[x]));
  });
  return acc;
}
