/**
 * Guessing with quantum side information at the sizes researchers need (up to 12 symbols of nonzero
 * probability), by column generation over guessing orders (column-generation.ts, orders.ts), always
 * answered with a bracket [lower, upper] and the points that prove it:
 *
 *  - guessworkWithSideInformation: G_k(X|B) = min over POVMs {M_g} indexed by orders g of
 *    Σ_g Σ_x p_x pos_g(x)^k Tr M_g ρ_x (Hanson, Katariya, Leditzky & Wilde, "Guesswork with quantum side
 *    information", IEEE Trans. Inf. Theory 68 (2022) — formulation recalled from memory);
 *  - successWithinGuesses: the largest probability that X is among the first k guesses, max over the
 *    same POVMs of Σ_g Σ_x p_x [pos_g(x) ≤ k] Tr M_g ρ_x; k = 1 is p_guess(X|B);
 *  - guessworkWithGivingUp: the guesser stops after `stopAfter` wrong guesses and pays `giveUpCost`
 *    instead: positions cost j^k up to stopAfter and giveUpCost after it.
 * All three are the SDP of column-generation.ts with their own cost of positions f.
 *
 * REDUCTION: symbols of probability zero are never guessed before the others when f is nondecreasing
 * (moving them last shortens every other position), so only orders of the support are searched, with
 * the zero-probability symbols appended in increasing index. When f decreases somewhere (a give-up
 * cost below the cost of the last guess allowed), a wasted guess can pay, and every symbol is searched.
 *
 * THE ANSWER: `value` (the restricted problem's objective clamped into the bracket), `bounds`, the
 * certificate (src/sdp/support.ts's shape: primal point = the strategy, dual point = Y − ε·1, their
 * objectives and the gap), `certified` (the bracket's relative width reached `gap`, default 1e-7); a
 * wider bracket is still returned, with a warning that states it: the value is then known only to that
 * width. Numbers are floating-point evidence: the bracket is padded for rounding, not proved.
 *
 * Deliberately not here: the plain SDP over all orders (guesswork.ts, a cross-check for K ≤ 6), parsing
 * (src/ops/guesswork-ops.ts). Cost: see column-generation.ts; the node budget of one exact pricing pass
 * is NODE_WORK / (8d³ + 8d²) nodes, so a pass costs at most about NODE_WORK operations whatever K is.
 */
import type { CMatrix } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import { checkNumber, checkProbabilities } from '../quantum/arguments.js';
import { DEFAULT_TOLERANCE } from '../quantum/validate.js';
import { assess, type SdpCertificate } from '../sdp/support.js';
import type { SdpOptions } from '../sdp/index.js';
import { solveOverOrders, DEFAULT_GAP, type OrderProgress } from './column-generation.js';
import { factorial } from './orders.js';
import { checkMoment, guessworkClassical, prepareEnsemble, type GuessingOrder } from './guesswork.js';

/** Largest support of X searched by column generation (12! ≈ 4.8 × 10⁸ orders, streamed). */
export const MAX_ORDER_SUPPORT = 12;
/** Operations one exact pricing pass may spend before closing subtrees by their bounds. */
export const NODE_WORK = 2e10;
/** Default weight Tr M_g / d below which an order is left out of the strategy. */
export const DEFAULT_ORDER_WEIGHT_TOLERANCE = 1e-9;

/** The node budget of one exact pricing pass for side information of dimension d. */
export function nodeBudget(d: number): number {
  return Math.max(1e4, Math.floor(NODE_WORK / (8 * d ** 3 + 8 * d * d)));
}

export interface OrderOptions {
  /** Validation tolerance for the probabilities and states (default 1e-9). */
  tolerance?: number;
  /** Orders with Tr M_g / d at or below this are left out of the strategy (default 1e-9). */
  weightTolerance?: number;
  /** Relative width of the bracket at which the search stops (default 1e-7). */
  gap?: number;
  /** Override of the node budget of one exact pricing pass (default nodeBudget(d)). */
  nodeBudget?: number;
  /** Options of the restricted SDP solves. */
  sdp?: SdpOptions;
  onProgress?: (p: OrderProgress) => void;
  shouldStop?: () => boolean;
  signal?: { readonly aborted: boolean };
}

export interface GuessworkOptions extends OrderOptions {
  /** k, default 1. */
  moment?: number;
}

export interface OrdersAnswer {
  value: number;
  bounds: { lower: number; upper: number };
  /** True when the bracket's relative width is at most the requested gap. */
  certified: boolean;
  /** Orders with weight above the weight tolerance, largest probability first. */
  strategy: GuessingOrder[];
  /** The dual point Y − ε·1 (Y ⪯ C_g for every order, up to rounding). */
  dualOperator: CMatrix;
  certificate: SdpCertificate;
  droppedWeight: number;
  weightTolerance: number;
  search: {
    /** Orders of the support (K!). */
    orders: number;
    rounds: number;
    workingSet: number;
    /** Orders accounted for by the exact pricing passes (K! per complete pass). */
    ordersPriced: number;
    /** False when the last pricing pass was cut short by its node budget (the lower bound is then weaker). */
    complete: boolean;
    /** Interior-point iterations over all restricted solves. */
    iterations: number;
  };
  zeroProbabilitySymbols: number[];
  warning?: string;
}

interface Problem {
  what: string;
  problem: string;
  /** f for a support of K symbols. */
  costs: (K: number) => number[];
  /** The headline value from the minimised objective (identity or 1 − x), increasing or decreasing. */
  headline: (x: number) => number;
  decreasing: boolean;
  range?: readonly [number, number];
}

function overOrders(probabilities: readonly number[], states: readonly CMatrix[], options: OrderOptions, spec: Problem): OrdersAnswer {
  const tol = options.tolerance ?? DEFAULT_TOLERANCE;
  const weightTolerance = options.weightTolerance ?? DEFAULT_ORDER_WEIGHT_TOLERANCE;
  checkNumber(weightTolerance, 'weightTolerance', { min: 0, max: 1 });
  const gap = options.gap ?? DEFAULT_GAP;
  checkNumber(gap, 'gap', { min: 0, minExclusive: true, max: 1 });
  const { rho, d, p, support, zeroSymbols } = prepareEnsemble(probabilities, states, tol, MAX_ORDER_SUPPORT,
    `the search over guessing orders is limited to ${MAX_ORDER_SUPPORT} (${factorial(MAX_ORDER_SUPPORT)} orders, priced one by one)`);
  // With a cost of positions that decreases somewhere (giving up cheaper than guessing on), a wasted
  // guess on a zero-probability symbol can pay: then every symbol is searched.
  const full = spec.costs(p.length);
  const monotone = full.every((v, i) => i === 0 || v >= full[i - 1]);
  if (!monotone && zeroSymbols.length > 0) {
    if (p.length > MAX_ORDER_SUPPORT) {
      throw new RhoError(
        'too-large',
        `With a cost of positions that decreases (giving up cheaper than guessing on), symbols of probability zero are searched too; X has ${p.length} symbols, above the limit of ${MAX_ORDER_SUPPORT}.`,
        'probabilities',
        { size: p.length, limit: MAX_ORDER_SUPPORT },
      );
    }
    support.splice(0, support.length, ...p.map((_, x) => x));
    zeroSymbols.splice(0, zeroSymbols.length);
  }
  const K = support.length;
  const f = spec.costs(K);
  const r = solveOverOrders(
    support.map((x) => p[x]),
    support.map((x) => rho[x]),
    f,
    {
      gap, weightTolerance, nodeBudget: options.nodeBudget ?? nodeBudget(d), sdp: options.sdp,
      onProgress: options.onProgress, shouldStop: options.shouldStop, signal: options.signal,
    },
  );
  const strategy: GuessingOrder[] = r.strategy.map((s) => ({
    order: [...s.order.map((i) => support[i]), ...zeroSymbols],
    probability: s.probability,
    weight: s.weight,
    element: s.element,
  }));
  const lo = spec.headline(spec.decreasing ? r.upper : r.lower);
  const hi = spec.headline(spec.decreasing ? r.lower : r.upper);
  const a = assess({
    what: spec.what,
    solve: r.lastSolve,
    problem: spec.problem,
    sense: 'minimize',
    primal: { orders: strategy.map((s) => s.order), measurement: strategy.map((s) => s.element) },
    primalObjective: r.upper,
    dual: { Y: r.dual },
    dualObjective: r.lower,
    bounds: { lower: lo, upper: hi },
    estimate: spec.headline(r.value),
    ...(spec.range ? { range: spec.range } : {}),
    limit: gap,
    absolute: gap * 1e-2,
  });
  const notes: string[] = [];
  if (a.note) notes.push(a.note);
  if (!a.accepted) {
    notes.push(
      `${spec.what[0].toUpperCase()}${spec.what.slice(1)} is certified only to the bracket [${lo}, ${hi}] ` +
        `(relative width ${a.certificate.accuracy.relative.toExponential(2)}, asked for ${gap})` +
        (r.pricingComplete ? '' : '; the last pricing pass over all orders was cut short by its node budget, so the lower bound comes from the bounds of the subtrees it closed') +
        '. The value is known only to that width.',
    );
  }
  const out: OrdersAnswer = {
    value: a.value,
    bounds: a.certificate.bounds,
    certified: a.accepted && r.certified,
    strategy,
    dualOperator: r.dual,
    certificate: a.certificate,
    droppedWeight: r.droppedWeight,
    weightTolerance,
    search: { orders: factorial(K), rounds: r.rounds, workingSet: r.workingSet, ordersPriced: r.ordersPriced, complete: r.pricingComplete, iterations: r.iterations },
    zeroProbabilitySymbols: zeroSymbols,
  };
  if (notes.length) out.warning = notes.join(' ');
  return out;
}

export interface SideGuesswork extends OrdersAnswer {
  moment: number;
  /** G_k(X) without side information (an upper bound: G_k(X|B) ≤ G_k(X)). */
  withoutSideInformation: number;
}

/** G_k(X|B) by column generation over guessing orders (see the header). */
export function guessworkWithSideInformation(
  probabilities: readonly number[],
  states: readonly CMatrix[],
  options: GuessworkOptions = {},
): SideGuesswork {
  const moment = checkMoment(options.moment ?? 1);
  const tol = options.tolerance ?? DEFAULT_TOLERANCE;
  const a = overOrders(probabilities, states, options, {
    what: 'the guesswork',
    problem: `minimize Σ_g Tr M_g C_g, C_g = Σ_x p_x pos_g(x)^${moment} ρ_x, over POVMs {M_g} indexed by guessing orders; dual: maximize Tr Y s.t. Y ⪯ C_g for every order (column generation: the primal is supported on the orders listed)`,
    costs: (K) => Array.from({ length: K }, (_, i) => Math.pow(i + 1, moment)),
    headline: (x) => x,
    decreasing: false,
  });
  return { ...a, moment, withoutSideInformation: guessworkClassical(probabilities.map((x) => Math.max(0, x)), moment, tol).value };
}

export interface SuccessOptions extends OrderOptions {
  /** k ≥ 1: the number of guesses allowed. */
  guesses: number;
}

/** The largest probability of finding X within k guesses given B (k = 1: p_guess(X|B)). */
export function successWithinGuesses(probabilities: readonly number[], states: readonly CMatrix[], options: SuccessOptions): OrdersAnswer & { guesses: number } {
  const k = options.guesses;
  if (!Number.isInteger(k) || k < 1) throw new RhoError('invalid-argument', `The number of guesses must be a positive integer (got ${k}).`, 'guesses');
  const a = overOrders(probabilities, states, options, {
    what: `the probability of success within ${k} guesses`,
    problem: `minimize the failure probability Σ_g Tr M_g C_g, C_g = Σ_x p_x [pos_g(x) > ${k}] ρ_x, over POVMs {M_g} indexed by guessing orders; dual: maximize Tr Y s.t. Y ⪯ C_g for every order; the value is one minus it`,
    costs: (K) => Array.from({ length: K }, (_, i) => (i + 1 > k ? 1 : 0)),
    headline: (x) => 1 - x,
    decreasing: true,
    range: [0, 1],
  });
  return { ...a, guesses: k };
}

export interface GivingUpOptions extends GuessworkOptions {
  /** The guesser stops after this many wrong guesses (≥ 1). */
  stopAfter: number;
  /** What giving up costs (in the units of (number of guesses)^moment), ≥ 0. */
  giveUpCost: number;
}

/** Guesswork when the guesser may stop after `stopAfter` wrong guesses at the cost `giveUpCost`. */
export function guessworkWithGivingUp(
  probabilities: readonly number[],
  states: readonly CMatrix[],
  options: GivingUpOptions,
): OrdersAnswer & { moment: number; stopAfter: number; giveUpCost: number } {
  const moment = checkMoment(options.moment ?? 1);
  const { stopAfter, giveUpCost } = options;
  if (!Number.isInteger(stopAfter) || stopAfter < 1) throw new RhoError('invalid-argument', `"stopAfter" must be a positive integer (got ${stopAfter}).`, 'stopAfter');
  checkNumber(giveUpCost, 'giveUpCost', { min: 0 });
  const a = overOrders(probabilities, states, options, {
    what: 'the guesswork with giving up',
    problem: `minimize Σ_g Tr M_g C_g, C_g = Σ_x p_x f(pos_g(x)) ρ_x with f(j) = j^${moment} for j ≤ ${stopAfter} and ${giveUpCost} after, over POVMs indexed by guessing orders; dual: maximize Tr Y s.t. Y ⪯ C_g for every order`,
    costs: (K) => Array.from({ length: K }, (_, i) => (i + 1 <= stopAfter ? Math.pow(i + 1, moment) : giveUpCost)),
    headline: (x) => x,
    decreasing: false,
  });
  return { ...a, moment, stopAfter, giveUpCost };
}
