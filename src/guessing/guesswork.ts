/**
 * Guesswork: the least expected (number of guesses)^k needed to find the value of a classical variable
 * X by asking "is it x?" one value at a time, without and with quantum side information.
 *
 * WITHOUT SIDE INFORMATION (Massey 1994, ISIT; Arikan 1996, IEEE Trans. Inf. Theory 42, 99): guessing
 * in order of decreasing probability is optimal for every moment k > 0 (rearrangement: the positions
 * 1 < 2 < ... are increasing and p_(1) ≥ p_(2) ≥ ...), so
 *
 *   G_k(X) = Σ_i i^k p_(i).
 *
 * WITH QUANTUM SIDE INFORMATION (ensemble {p_x, ρ_x}): the guesser measures B with a POVM whose
 * outcomes are guessing orders g (permutations of the alphabet), then guesses in the order g:
 *
 *   G_k(X|B) = min { Σ_g Tr M_g C_g : M_g ⪰ 0, Σ_g M_g = 1 },   C_g = Σ_x p_x (pos_g(x))^k ρ_x     (primal)
 *            = max { Tr Y : Y ⪯ C_g for every order g }                                            (dual)
 *
 * (Hanson, Katariya, Leditzky & Wilde, "Guesswork with quantum side information", IEEE Trans. Inf.
 * Theory 68 (2022) — formulation recalled from memory.) Both problems are strictly feasible (M_g = 1/N,
 * Y = −c·1), so strong duality holds and the optimum is attained.
 *
 * Methods: column generation over orders (side-information.ts, column-generation.ts, orders.ts; the one
 * the op uses, to K = 12 symbols), and here the plain SDP over all orders at once, a cross-check for
 * K ≤ 6: the primal is handed to rhosigma's own interior-point solver (src/sdp) with one Hermitian
 * d×d block per order and d² real equality rows for Σ_g M_g = 1. Two checkable bounds are returned
 * beside the solver's objectives, as the certificate of src/sdp/support.ts (the answer is refused with
 * 'solver-failed' when they are more than 1e-5 relative apart):
 *   upper: orders whose element has weight Tr M_g / d above `weightTolerance` are kept, renormalised
 *          (M'_g = G^{−1/2} M_g G^{−1/2}, G = Σ_kept M_g) into a POVM up to rounding; its cost
 *          Σ Tr M'_g C_g is achieved by that (returned) strategy.
 *   lower: Y is rebuilt from the multipliers; with ε = max_g max(0, −λ_min(C_g − Y)), Y − ε·1 is dual
 *          feasible, so G_k(X|B) ≥ Tr Y − d·ε (weak duality).
 * Both are floating-point evidence, not proofs. Which orders appear in the strategy is a tolerance
 * decision (an interior-point iterate gives every order a tiny positive element); the dropped weight
 * is reported. With ties, the optimal measurement is not unique and the solver returns a mixture.
 *
 * REDUCTION: symbols of probability zero never need to be guessed before the others (moving them to
 * the end shortens every other symbol's position), so only orders of the support are searched, with
 * the zero-probability symbols appended in increasing index. The plain SDP is refused ('too-large')
 * when the support has more than 6 symbols (720 orders), the side information is larger than
 * MAX_SIDE_DIMENSION, or (orders × d²) exceeds MAX_SDP_SIZE; column generation goes to 12 symbols.
 *
 * Also here: Arikan's and Massey's bounds through Rényi entropies (renyiBounds) and guesswork with
 * classical side information (guessworkClassicalSide, sorting per y).
 *
 * Deliberately not here: reductions by symmetry of the ensemble, column generation
 * (side-information.ts), parsing (src/ops/guesswork-ops.ts). States are validated here too (density matrices of
 * one size, within the tolerance) because engine callers may bypass the codec.
 *
 * Cost: closed form O(n log n). SDP: N = n_support! blocks of size d (real embedding 2d), d²
 * constraints; each interior-point iteration costs about O(N d⁶) for the Schur complement plus O(d⁶)
 * to factor it, typically 10–30 iterations; plus N eigendecompositions of d×d matrices.
 */
import { CMatrix, combine, hermitianPart, trace, traceOfProductRe } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import { checkNumber, checkProbabilities } from '../quantum/arguments.js';
import { checkDensityMatrix, DEFAULT_TOLERANCE } from '../quantum/validate.js';
import {
  solveSdp, DEFAULT_OPTIONS, matrixCoordinates, coordinateEntry, type BlockTerm, type Constraint, type SdpOptions,
} from '../sdp/index.js';
import { factorial } from './orders.js';
import {
  ACCEPT_INACCURATE_LOOSE, certify, multiplierMatrix, psdShift, renormalisePovm, roundingPad, type SdpCertificate,
} from '../sdp/support.js';

export const GUESSWORK_PROBLEM =
  'minimize Σ_g Tr M_g C_g s.t. M_g ⪰ 0, Σ_g M_g = I over guessing orders g of the support of p, C_g = Σ_x p_x pos_g(x)^k ρ_x ' +
  '(primal point: the kept orders and their POVM elements, the others zero); dual: maximize Tr Y s.t. Y ⪯ C_g for every order g ' +
  '(Y − s·I with s the largest violation is feasible)';

/** Largest support of X for the plain SDP over all orders at once (6! = 720 blocks). */
export const MAX_SUPPORT = 6;
/** Largest dimension of the side information (the SDP has d² constraints and a d²×d² Schur complement). */
export const MAX_SIDE_DIMENSION = 32;
/**
 * Largest (number of orders) × d² searched: the solve time grows with both (about 10 s at the limit on
 * one core, e.g. 720 orders with d = 4; 6 orders with d = 32 take about 25 s).
 */
export const MAX_SDP_SIZE = 720 * 16;
/** Stopping tolerance (relative gap and residuals) tried first; the solver's defaults (1e-8) are the fallback. */
export const TIGHT_TOLERANCE = 1e-10;
/** Default weight Tr M_g / d below which an order is left out of the returned strategy. */
export const DEFAULT_WEIGHT_TOLERANCE = 1e-7;

export interface ClassicalGuesswork {
  /** Σ_i i^k p_(i). */
  value: number;
  /** The optimal order: symbol indices by decreasing probability (ties: smaller index first). */
  order: number[];
  moment: number;
  /** true when two nonzero probabilities are equal (within the tolerance), so other orders are optimal too. */
  ties: boolean;
}

/** Σ_x p_x (position of x in `order`)^k, positions counted from 1. */
export function orderCost(order: readonly number[], probabilities: readonly number[], moment = 1): number {
  let s = 0;
  order.forEach((x, i) => {
    s += probabilities[x] * Math.pow(i + 1, moment);
  });
  return s;
}

/** All orders (permutations) of the given items, in lexicographic order of positions. */
export function allOrders<T>(items: readonly T[]): T[][] {
  if (items.length <= 1) return [items.slice()];
  const out: T[][] = [];
  items.forEach((first, i) => {
    const rest = items.filter((_, j) => j !== i);
    for (const tail of allOrders(rest)) out.push([first, ...tail]);
  });
  return out;
}

export function checkMoment(moment: number): number {
  return checkNumber(moment, 'moment', { min: 0, minExclusive: true });
}

/**
 * Guesswork without side information: guess by decreasing probability (Massey 1994; Arikan 1996).
 * Probabilities must be nonnegative and sum to 1 within `tol` (entries in [−tol, 0) count as 0).
 */
export function guessworkClassical(probabilities: readonly number[], moment = 1, tol = DEFAULT_TOLERANCE): ClassicalGuesswork {
  checkProbabilities(probabilities, 'probabilities', tol);
  checkMoment(moment);
  const p = probabilities.map((x) => Math.max(0, x));
  const order = p.map((_, i) => i).sort((a, b) => p[b] - p[a] || a - b);
  let ties = false;
  for (let i = 1; i < order.length; i++) {
    const a = p[order[i - 1]];
    const b = p[order[i]];
    if (b > 0 && a - b <= tol) ties = true;
  }
  return { value: orderCost(order, p, moment), order, moment, ties };
}

/** One guessing order the measurement can output, with its (renormalised) POVM element. */
export interface GuessingOrder {
  /** The order: symbol indices, first guess first (zero-probability symbols appended at the end). */
  order: number[];
  /** Probability that the measurement outputs this order: Σ_x p_x Tr M_g ρ_x. */
  probability: number;
  /** Tr M_g / d: the element's share of the identity. */
  weight: number;
  /** The POVM element M_g (after renormalisation over the kept orders). */
  element: CMatrix;
}

/**
 * The one certificate shape (src/sdp/support.ts; primal point: the kept orders and their renormalised
 * POVM elements; dual point: Y) with the two checkable bounds repeated and the stopping tolerances of
 * this solve.
 */
export interface GuessworkCertificate extends SdpCertificate {
  /** Tr Y − d·ε for the dual point Y shifted into feasibility (weak duality). */
  lowerBound: number;
  /** Cost of the returned (renormalised) strategy: achieved by it. */
  upperBound: number;
  /** The solver's stopping tolerances on the relative gap and the residuals used for this solve. */
  gapTolerance: number;
  feasibilityTolerance: number;
}

export interface QuantumGuesswork {
  /** The solver's primal objective clamped into the certified bracket and into [1, G_k(X)]. */
  value: number;
  moment: number;
  /** Orders with weight above weightTolerance, largest probability first. */
  strategy: GuessingOrder[];
  certificate: GuessworkCertificate;
  /** The dual operator Y of the solve (Y ⪯ C_g for every order, up to the residuals). */
  dualOperator: CMatrix;
  /** Σ Tr M_g / d over the orders left out of the strategy (before renormalisation). */
  droppedWeight: number;
  weightTolerance: number;
  /** Number of orders searched (n_support!). */
  ordersSearched: number;
  /** Symbols of probability zero, placed last in every order. */
  zeroProbabilitySymbols: number[];
  /** The classical guesswork of X alone, for comparison (G_k(X|B) ≤ G_k(X)). */
  withoutSideInformation: number;
  /** Present when the solver stopped short of 'optimal' but close enough to report. */
  warning?: string;
}

export interface QuantumGuessworkOptions {
  /** k, default 1. */
  moment?: number;
  /** Validation tolerance for the probabilities and states, default 1e-9. */
  tolerance?: number;
  /** Orders with Tr M_g / d at or below this are left out of the strategy (default 1e-7). */
  weightTolerance?: number;
  /** Passed to the SDP solver (default: tolerances TIGHT_TOLERANCE, falling back to the solver's defaults). */
  sdp?: SdpOptions;
}

export function readStates(states: readonly CMatrix[], count: number, tol: number): CMatrix[] {
  if (states.length !== count) {
    throw new RhoError('dimension-mismatch', `There are ${count} probabilities but ${states.length} states; give one state per symbol.`, 'states');
  }
  const d = states[0].rows;
  states.forEach((s, x) => {
    if (s.rows !== d || s.cols !== d) {
      throw new RhoError('dimension-mismatch', `State ${x} is ${s.rows}×${s.cols}, state 0 is ${d}×${d}; all states must have one size.`, `states[${x}]`);
    }
    checkDensityMatrix(s, tol, `states[${x}]`);
  });
  if (d > MAX_SIDE_DIMENSION) {
    throw new RhoError('too-large', `The side information has dimension ${d}, above the limit of ${MAX_SIDE_DIMENSION} for the guesswork SDP.`, 'states', { size: d, limit: MAX_SIDE_DIMENSION });
  }
  return states.map((s) => hermitianPart(s));
}

/** An ensemble read for a search over guessing orders: states, their side, the clipped prior and its support. */
export interface PreparedEnsemble {
  rho: CMatrix[];
  d: number;
  p: number[];
  /** Symbols of nonzero probability, and of zero probability. */
  support: number[];
  zeroSymbols: number[];
}

/**
 * What both searches over guessing orders (all orders at once here, column generation in
 * side-information.ts) check and compute first: the prior and the states, the prior clipped at 0, and
 * the support, refused as 'too-large' above `limit` symbols (`what` says which search and why).
 */
export function prepareEnsemble(probabilities: readonly number[], states: readonly CMatrix[], tol: number, limit: number, what: string): PreparedEnsemble {
  checkProbabilities(probabilities, 'probabilities', tol);
  const rho = readStates(states, probabilities.length, tol);
  const p = probabilities.map((x) => Math.max(0, x));
  const support = p.map((_, x) => x).filter((x) => p[x] > 0);
  const zeroSymbols = p.map((_, x) => x).filter((x) => p[x] === 0);
  if (support.length > limit) {
    throw new RhoError('too-large', `X has ${support.length} symbols of nonzero probability; ${what}.`, 'probabilities', { size: support.length, limit });
  }
  return { rho, d: rho[0].rows, p, support, zeroSymbols };
}

/**
 * Guesswork of X given quantum side information B, for the ensemble {p_x, ρ_x}, by the plain SDP over
 * POVMs indexed by ALL guessing orders at once (see the module comment): the generic method, kept as an
 * independent cross-check of the column generation (guessworkWithSideInformation, side-information.ts)
 * on small cases. Throws 'too-large' for a support of more than MAX_SUPPORT symbols, 'solver-failed'
 * when the solver does not reach a usable answer.
 */
export function guessworkAllOrders(
  probabilities: readonly number[],
  states: readonly CMatrix[],
  options: QuantumGuessworkOptions = {},
): QuantumGuesswork {
  const tol = options.tolerance ?? DEFAULT_TOLERANCE;
  const moment = checkMoment(options.moment ?? 1);
  const weightTolerance = options.weightTolerance ?? DEFAULT_WEIGHT_TOLERANCE;
  checkNumber(weightTolerance, 'weightTolerance', { min: 0, max: 1 });
  const { rho, d, p, support, zeroSymbols } = prepareEnsemble(probabilities, states, tol, MAX_SUPPORT,
    `the guesswork SDP searches all orders and is limited to ${MAX_SUPPORT} (${factorial(MAX_SUPPORT)} orders)`);

  const count = factorial(support.length);
  if (count * d * d > MAX_SDP_SIZE) {
    throw new RhoError(
      'too-large',
      `The guesswork SDP would have ${count} blocks of size ${d} (orders × d² = ${count * d * d}), above the limit of ${MAX_SDP_SIZE}.`,
      'states',
      { size: count * d * d, limit: MAX_SDP_SIZE },
    );
  }
  const orders = allOrders(support).map((o) => [...o, ...zeroSymbols]);
  // C_g = Σ_x p_x pos_g(x)^k ρ_x (zero-probability symbols contribute nothing).
  const costs = orders.map((o) => {
    const w: number[] = [];
    const mats: CMatrix[] = [];
    o.forEach((x, i) => {
      if (p[x] > 0) {
        w.push(p[x] * Math.pow(i + 1, moment));
        mats.push(rho[x]);
      }
    });
    return hermitianPart(combine(w, mats));
  });

  const n = orders.length;
  const constraints: Constraint[] = matrixCoordinates(d, true).map((c) => {
    const e = coordinateEntry(c.i, c.j, c.part);
    const terms: BlockTerm[] = orders.map((_, g) => ({ block: g, entries: [e] }));
    return { terms, equals: c.i === c.j ? 1 : 0, label: `sum of POVM elements (${c.i}, ${c.j}) ${c.part}` };
  });
  const problem = {
    cones: orders.map(() => ({ kind: 'hermitian' as const, size: d })),
    objective: costs.map((c, g) => ({ block: g, matrix: c })),
    constraints,
  };
  // Tight tolerances first (one or two extra iterations buy about two more digits); should the solver
  // not reach them, the solve is repeated at the solver's defaults (1e-8). Caller options override both.
  let solverOptions: SdpOptions = options.sdp ?? { gapTolerance: TIGHT_TOLERANCE, feasibilityTolerance: TIGHT_TOLERANCE };
  let answer = solveSdp(problem, solverOptions);
  if (answer.status !== 'optimal' && options.sdp === undefined) {
    solverOptions = {};
    answer = solveSdp(problem, solverOptions);
  }
  // Lower bound from the dual: Y − ε·1 is feasible, ε the largest shift (with its rounding allowance)
  // that makes every C_g − Y positive semidefinite.
  const y = multiplierMatrix(answer.y, 0, d);
  let eps = 0;
  for (const c of costs) eps = Math.max(eps, psdShift(c, y));
  const trY = trace(y).re;
  const lowerBound = trY - d * eps;

  // The strategy: orders of non-negligible weight, renormalised into a POVM.
  const elements = answer.x as CMatrix[];
  const weights = elements.map((m) => trace(m).re / d);
  const kept: number[] = [];
  let dropped = 0;
  weights.forEach((w, g) => {
    if (w > weightTolerance) kept.push(g);
    else dropped += Math.max(0, w);
  });
  const povm = renormalisePovm(kept.map((g) => elements[g]));
  const average = combine(p, rho);
  let upperBound = 0;
  const strategy: GuessingOrder[] = kept.map((g, k) => {
    upperBound += traceOfProductRe(povm[k], costs[g]);
    return {
      order: orders[g],
      probability: traceOfProductRe(povm[k], average),
      weight: trace(povm[k]).re / d,
      element: povm[k],
    };
  });
  strategy.sort((a, b) => b.probability - a.probability);

  const classical = guessworkClassical(p, moment, tol).value;
  const pad = roundingPad(n * d * d, Math.max(Math.abs(upperBound), Math.abs(lowerBound)));
  const c = certify({
    what: 'the guesswork', solve: answer, problem: GUESSWORK_PROBLEM, sense: 'minimize',
    primal: { orders: kept.map((g) => orders[g]), measurement: povm }, primalObjective: upperBound,
    dual: { Y: y }, dualObjective: trY,
    bounds: { lower: lowerBound - pad, upper: upperBound + pad },
    estimate: answer.primalObjective,
    // G_k(X|B) ≥ Σ_x p_x 1^k = 1 (every symbol costs at least one guess) and ≤ G_k(X) (ignore B).
    range: [1, classical],
    limit: ACCEPT_INACCURATE_LOOSE,
  });
  const warning = c.note;
  const certificate: GuessworkCertificate = {
    ...c.certificate,
    lowerBound: c.certificate.bounds.lower,
    upperBound: c.certificate.bounds.upper,
    gapTolerance: solverOptions.gapTolerance ?? DEFAULT_OPTIONS.gapTolerance,
    feasibilityTolerance: solverOptions.feasibilityTolerance ?? DEFAULT_OPTIONS.feasibilityTolerance,
  };
  const out: QuantumGuesswork = {
    value: c.value,
    moment,
    strategy,
    certificate,
    dualOperator: y,
    droppedWeight: dropped,
    weightTolerance,
    ordersSearched: n,
    zeroProbabilitySymbols: zeroSymbols,
    withoutSideInformation: classical,
  };
  if (warning) out.warning = warning;
  return out;
}

/**
 * The classical bounds on the optimal moment E[G^ρ] of guessing X without side information, in terms
 * of the Rényi entropy of order α = 1/(1+ρ) (recalled from memory): Arikan 1996, Theorem 1,
 *
 *   (1 + ln n)^{−ρ} · 2^{ρ H_α(X)}  ≤  E[G*^ρ]  ≤  2^{ρ H_α(X)},    2^{ρ H_α} = (Σ_x p_x^{1/(1+ρ)})^{1+ρ},
 *
 * for n symbols (of nonzero probability), and Massey 1994 for ρ = 1: E[G*] ≥ 2^{H(X)−2} + 1 when the
 * Shannon entropy H(X) is at least 2 bits (`massey` is absent otherwise or for ρ ≠ 1).
 */
export interface RenyiBounds {
  alpha: number;
  /** H_α(X) in bits. */
  renyiEntropy: number;
  arikanLower: number;
  arikanUpper: number;
  massey?: number;
}

export function renyiBounds(probabilities: readonly number[], moment = 1): RenyiBounds {
  checkMoment(moment);
  const p = probabilities.map((x) => Math.max(0, x)).filter((x) => x > 0);
  const alpha = 1 / (1 + moment);
  let s = 0;
  for (const x of p) s += Math.pow(x, alpha);
  // In base-2 logarithms, so that large moments overflow to Infinity, never to Infinity/Infinity.
  const log2Upper = (1 + moment) * Math.log2(s); // ρ H_α
  const renyiEntropy = Math.log2(s) / (1 - alpha);
  const out: RenyiBounds = {
    alpha,
    renyiEntropy,
    arikanLower: Math.pow(2, log2Upper - moment * Math.log2(1 + Math.log(p.length))),
    arikanUpper: Math.pow(2, log2Upper),
  };
  if (moment === 1) {
    let h = 0;
    for (const x of p) h -= x * Math.log2(x);
    if (h >= 2) out.massey = Math.pow(2, h - 2) + 1;
  }
  return out;
}

/** Guesswork with classical side information Y: per value y, guess by decreasing p(x, y). */
export interface ClassicalSideGuesswork {
  /** Σ_y Σ_i i^k p_(i)(·, y), the sum over y of the sorted columns' costs. */
  value: number;
  /** For each y, the optimal order (ties: smaller index first). */
  orders: number[][];
  moment: number;
}

/**
 * G_k(X|Y) for a joint distribution given as rows x, columns y (nonnegative, summing to 1 within
 * `tol`): for each y the guesser sees y and guesses by decreasing p(x, y) (Arikan 1996, the conditional
 * form of the rearrangement argument).
 */
export function guessworkClassicalSide(joint: readonly (readonly number[])[], moment = 1, tol = DEFAULT_TOLERANCE): ClassicalSideGuesswork {
  checkMoment(moment);
  if (joint.length === 0 || joint[0].length === 0) throw new RhoError('invalid-argument', 'The joint distribution must have at least one row and one column.', 'joint');
  const cols = joint[0].length;
  joint.forEach((row, x) => {
    if (row.length !== cols) throw new RhoError('dimension-mismatch', `Row ${x} of the joint distribution has ${row.length} entries, row 0 has ${cols}.`, `joint[${x}]`);
  });
  checkProbabilities(joint.flat(), 'joint', tol);
  let value = 0;
  const orders: number[][] = [];
  for (let y = 0; y < cols; y++) {
    const q = joint.map((row) => Math.max(0, row[y]));
    const order = q.map((_, x) => x).sort((a, b) => q[b] - q[a] || a - b);
    value += orderCost(order, q, moment);
    orders.push(order);
  }
  return { value, orders, moment };
}
