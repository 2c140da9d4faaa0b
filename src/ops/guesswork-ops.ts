/**
 * The `guesswork` and `success-within-guesses` ops (PROTOCOL.md).
 * `guesswork`: the least expected (number of guesses)^moment needed to find X.
 *  - only `probabilities`: the closed form Σ_i i^k p_(i) (guessing by decreasing probability; Massey
 *    1994, Arikan 1996), with the optimal order, the Rényi-entropy bounds beside it and
 *    `method: "closed-form"` (no certificate);
 *  - `joint` (classical side information p(x, y), rows x): sorting per y, `method: "classical-side-information"`;
 *  - `states` (one density matrix per symbol): column generation over guessing orders
 *    (src/guessing/side-information.ts), answered with the bracket, the strategy, the dual point and the
 *    certificate, `method: "column-generation"`; with `stopAfter` and `giveUpCost`, the guesser may give
 *    up after that many wrong guesses at that cost.
 * `success-within-guesses`: the largest probability that X is among the first `guesses` guesses given B
 * (guesses = 1: the guessing probability), by the same machinery.
 *
 * Deliberately not here: numerics (src/guessing). States are read and validated by the codec.
 * Cost: that of src/guessing/column-generation.ts: a few restricted SDPs (blocks of side d, d²
 * constraints) and a few exact pricing passes, each bounded by NODE_WORK operations through the node
 * budget; at most 12 symbols of nonzero probability, side information up to 32 dimensions.
 */
import { RhoError } from '../errors.js';
import { guessworkClassical, guessworkClassicalSide, renyiBounds, MAX_SIDE_DIMENSION } from '../guessing/guesswork.js';
import {
  DEFAULT_ORDER_WEIGHT_TOLERANCE, MAX_ORDER_SUPPORT, guessworkWithGivingUp, guessworkWithSideInformation, nodeBudget,
  successWithinGuesses, type OrdersAnswer,
} from '../guessing/side-information.js';
import { DEFAULT_GAP, MAX_ROUNDS } from '../guessing/column-generation.js';
import { factorial } from '../guessing/orders.js';
import { defineOp } from './registry.js';
import { readNumber, readState, schemas, writeCertificate, writeComplexMatrix, writeNumber } from './codec.js';
import { dense, plain, sdp, sequence, sideOf, type CostEstimate } from './cost.js';

/** Largest alphabet accepted in the request (the closed form is cheap; the SDP checks its own limit). */
const MAX_ALPHABET = 1 << 16;

/** log2 Σ_i i^k p_(i) over the guessing order (1-based positions), by log-sum-exp: finite where the sum overflows. */
function log2Guesswork(p: readonly number[], order: readonly number[], moment: number): number {
  const terms = order.map((x, i) => (p[x] > 0 ? moment * Math.log(i + 1) + Math.log(p[x]) : -Infinity));
  const top = Math.max(...terms);
  let sum = 0;
  for (const t of terms) sum += Math.exp(t - top);
  return (top + Math.log(sum)) / Math.LN2;
}

function readProbabilities(value: unknown): number[] {
  if (!Array.isArray(value) || value.length === 0) {
    throw new RhoError('invalid-argument', 'The probabilities must be a non-empty list of numbers.', 'probabilities');
  }
  return value.map((v, x) => readNumber(v, `probabilities[${x}]`));
}

/** Symbols of nonzero probability in a request not yet read (entries that are not the number 0). */
function supportOf(probabilities: unknown): number {
  return Array.isArray(probabilities) ? probabilities.filter((x) => x !== 0).length : 0;
}

/**
 * The estimate of column generation over orders, an upper bound on what it may do: MAX_ROUNDS restricted
 * SDPs with at most 4d² + 2K orders (the working set's cap) and as many exact pricing passes of at most
 * min(e·K!, node budget) nodes of 8d³ + 8d² operations, plus the eigendecompositions of the cheap pricing.
 * (Typical solves take 1–5 rounds.)
 */
function ordersCost(K: number, d: number): CostEstimate {
  const ROUNDS = MAX_ROUNDS;
  const PASSES = MAX_ROUNDS;
  const blocks = Math.max(1, Math.min(factorial(Math.min(K, MAX_ORDER_SUPPORT)), 4 * d * d + 2 * K));
  const solve = sdp({ blocks: Array.from({ length: blocks }, () => ({ size: d, hermitian: true })), constraints: d * d });
  const nodes = Math.min(Math.E * factorial(Math.min(K, MAX_ORDER_SUPPORT)), nodeBudget(d));
  const pass = { ...plain(nodes * (8 * d ** 3 + 8 * d * d), 16 * d * d * (2 * K + 8), `pricing ${K}! orders`), step: 65536 * (8 * d ** 3 + 8 * d * d) };
  const est = sequence(...Array.from({ length: ROUNDS }, () => solve), ...Array.from({ length: PASSES }, () => pass), dense(d, ROUNDS * blocks));
  return { ...est, basis: `column generation over the orders of ${K} symbols with side information of dimension ${d} (${ROUNDS} restricted SDPs of ${blocks} blocks, ${PASSES} pricing passes of up to ${Math.round(nodes)} nodes)` };
}

/** The answer fields shared by the ops solved over orders. */
function ordersFields(g: OrdersAnswer): Record<string, unknown> {
  const out: Record<string, unknown> = {
    certified: g.certified,
    bounds: { lower: writeNumber(g.bounds.lower), upper: writeNumber(g.bounds.upper) },
    strategy: g.strategy.map((s) => ({ order: s.order, probability: s.probability, weight: s.weight, element: writeComplexMatrix(s.element) })),
    dualOperator: writeComplexMatrix(g.dualOperator),
    certificate: writeCertificate(g.certificate),
    droppedWeight: g.droppedWeight,
    weightTolerance: g.weightTolerance,
    search: g.search,
    zeroProbabilitySymbols: g.zeroProbabilitySymbols,
  };
  if (g.warning) out.warning = g.warning;
  return out;
}

const orderProperties = {
  weightTolerance: {
    description: `Orders whose POVM element has Tr M / d at or below this are left out of the strategy (default ${DEFAULT_ORDER_WEIGHT_TOLERANCE}).`,
    type: 'number',
    minimum: 0,
    maximum: 1,
  },
  gap: {
    description: `Relative width of the certified bracket at which the search over orders stops (default ${DEFAULT_GAP}); a wider bracket is answered with a warning that states it.`,
    type: 'number',
    exclusiveMinimum: 0,
    maximum: 1,
  },
} as const;

function readStates(req: Record<string, any>, tolerance: number) {
  if (!Array.isArray(req.states)) throw new RhoError('invalid-argument', 'The states must be a list, one state per symbol.', 'states');
  return req.states.map((s: unknown, x: number) => readState(s, `states[${x}]`, tolerance).matrix);
}

function readOrderOptions(req: Record<string, any>, tolerance: number) {
  return {
    tolerance,
    weightTolerance: req.weightTolerance === undefined ? DEFAULT_ORDER_WEIGHT_TOLERANCE : readNumber(req.weightTolerance, 'weightTolerance', { min: 0, max: 1 }),
    gap: req.gap === undefined ? DEFAULT_GAP : readNumber(req.gap, 'gap', { min: 0, minExclusive: true, max: 1 }),
  };
}

function refuseUnused(req: Record<string, any>, fields: readonly string[], why: string): void {
  for (const k of fields) if (req[k] !== undefined) throw new RhoError('invalid-argument', `"${k}" is used only ${why}.`, k);
}

defineOp({
  name: 'guesswork',
  summary:
    'Least expected (number of guesses)^moment to find X: by decreasing probability without side information (with the Rényi-entropy bounds), per value of y with classical side information (joint), or by column generation over guessing orders with quantum side information (states), answered with the strategy, the bracket and the certificate.',
  args: {
    type: 'object',
    properties: {
      probabilities: {
        description: 'The distribution of X: nonnegative numbers summing to 1 (within the tolerance). Not with "joint".',
        type: 'array',
        minItems: 1,
        maxItems: MAX_ALPHABET,
        items: { type: 'number' },
      },
      states: {
        description: `Optional quantum side information: one density matrix per symbol, all of one size (at most ${MAX_SIDE_DIMENSION}); at most ${MAX_ORDER_SUPPORT} symbols of nonzero probability. Without it, no side information.`,
        type: 'array',
        minItems: 1,
        maxItems: MAX_ALPHABET,
        items: schemas.state,
      },
      joint: {
        description: 'Classical side information instead: the joint distribution p(x, y) as rows x of columns y (nonnegative, summing to 1).',
        type: 'array',
        minItems: 1,
        maxItems: 4096,
        items: { type: 'array', minItems: 1, maxItems: 4096, items: { type: 'number' } },
      },
      moment: { description: 'The moment k > 0 of the number of guesses (default 1).', type: 'number', exclusiveMinimum: 0 },
      stopAfter: { description: 'With states: the guesser gives up after this many wrong guesses (with "giveUpCost").', type: 'integer', minimum: 1 },
      giveUpCost: { description: 'With "stopAfter": what giving up costs, in units of (number of guesses)^moment.', type: 'number', minimum: 0 },
      ...orderProperties,
    },
  },
  cost: (req) => {
    if (Array.isArray(req.joint)) {
      const n = req.joint.length * (Array.isArray(req.joint[0]) ? req.joint[0].length : 1);
      return plain(64 * n * Math.log2(n + 1), 64 * n, `sorting ${n} joint probabilities`);
    }
    const n = Array.isArray(req.probabilities) ? req.probabilities.length : 0;
    if (req.states === undefined) return plain(64 * n * Math.log2(n + 1), 64 * n, `sorting ${n} probabilities`);
    return ordersCost(supportOf(req.probabilities), Math.max(1, sideOf(req.states[0])));
  },
  run(req, { tolerance }) {
    const moment = req.moment === undefined ? 1 : readNumber(req.moment, 'moment', { min: 0, minExclusive: true });
    if (req.joint !== undefined) {
      if (req.probabilities !== undefined) throw new RhoError('invalid-argument', 'Give either "probabilities" (with optional "states") or "joint", not both.', 'joint');
      refuseUnused(req, ['states', 'weightTolerance', 'gap', 'stopAfter', 'giveUpCost'], 'with quantum side information ("states")');
      const joint = (req.joint as unknown[]).map((row, x) => {
        if (!Array.isArray(row)) throw new RhoError('invalid-argument', 'Each row of "joint" must be a list of numbers.', `joint[${x}]`);
        return row.map((v, y) => readNumber(v, `joint[${x}][${y}]`));
      });
      const g = guessworkClassicalSide(joint, moment, tolerance);
      return { value: writeNumber(g.value), method: 'classical-side-information', moment, orders: g.orders };
    }
    if (req.probabilities === undefined) throw new RhoError('missing-argument', 'Give the distribution of X as "probabilities" (or a joint distribution as "joint").', 'probabilities');
    const p = readProbabilities(req.probabilities);
    if (req.states === undefined) {
      refuseUnused(req, ['weightTolerance', 'gap', 'stopAfter', 'giveUpCost'], 'with side information ("states")');
      const g = guessworkClassical(p, moment, tolerance);
      const out: Record<string, unknown> & { value: unknown } = {
        value: writeNumber(g.value), method: 'closed-form', moment, order: g.order, ties: g.ties,
        renyiBounds: writePlainBounds(renyiBounds(p, moment)),
      };
      if (!Number.isFinite(g.value)) {
        // A finite sum that overflowed: say so, with its logarithm (log-sum-exp over the guessing order).
        const log2 = log2Guesswork(p, g.order, moment);
        out.log2Value = log2;
        out.reason = `The value is finite but above the largest double (about 1.8e308): its base-2 logarithm is ${log2}.`;
      }
      return out;
    }
    // The costs are (number of guesses)^moment: they must stay finite, with room for the sums.
    const largestMoment = Math.log(1e300) / Math.log(Math.max(2, p.length));
    if (moment > largestMoment) {
      throw new RhoError(
        'invalid-argument',
        `With ${p.length} symbols the costs (number of guesses)^moment reach ${p.length}^${moment}, beyond double precision; the SDP needs finite costs, so the moment must be at most ${largestMoment.toFixed(2)} here.`,
        'moment',
        { limit: largestMoment },
      );
    }
    const states = readStates(req, tolerance);
    const opts = { ...readOrderOptions(req, tolerance), moment };
    if ((req.stopAfter === undefined) !== (req.giveUpCost === undefined)) {
      throw new RhoError('missing-argument', 'Giving up needs both "stopAfter" and "giveUpCost".', req.stopAfter === undefined ? 'stopAfter' : 'giveUpCost');
    }
    if (req.stopAfter !== undefined) {
      const stopAfter = readNumber(req.stopAfter, 'stopAfter', { min: 1 });
      const giveUpCost = readNumber(req.giveUpCost, 'giveUpCost', { min: 0 });
      const g = guessworkWithGivingUp(p, states, { ...opts, stopAfter, giveUpCost });
      return { value: writeNumber(g.value), method: 'column-generation', moment, stopAfter, giveUpCost, ...ordersFields(g) };
    }
    const g = guessworkWithSideInformation(p, states, opts);
    return {
      value: writeNumber(g.value),
      method: 'column-generation',
      moment,
      ...ordersFields(g),
      withoutSideInformation: writeNumber(g.withoutSideInformation),
    };
  },
});

function writePlainBounds(b: ReturnType<typeof renyiBounds>): Record<string, unknown> {
  const out: Record<string, unknown> = { alpha: b.alpha, renyiEntropy: b.renyiEntropy, arikanLower: writeNumber(b.arikanLower), arikanUpper: writeNumber(b.arikanUpper) };
  if (b.massey !== undefined) out.massey = writeNumber(b.massey);
  return out;
}

defineOp({
  name: 'success-within-guesses',
  summary:
    'Largest probability that X is among the first k guesses given quantum side information (states): max over POVMs whose outcomes are guessing orders, by column generation; k = 1 is the guessing probability. With the strategy, the bracket and the certificate.',
  args: {
    type: 'object',
    properties: {
      probabilities: {
        description: 'The distribution of X: nonnegative numbers summing to 1 (within the tolerance).',
        type: 'array',
        minItems: 1,
        maxItems: MAX_ALPHABET,
        items: { type: 'number' },
      },
      states: {
        description: `One density matrix per symbol, all of one size (at most ${MAX_SIDE_DIMENSION}); at most ${MAX_ORDER_SUPPORT} symbols of nonzero probability.`,
        type: 'array',
        minItems: 1,
        maxItems: MAX_ALPHABET,
        items: schemas.state,
      },
      guesses: { description: 'k ≥ 1, the number of guesses allowed.', type: 'integer', minimum: 1 },
      ...orderProperties,
    },
    required: ['probabilities', 'states', 'guesses'],
  },
  cost: (req) => ordersCost(supportOf(req.probabilities), Math.max(1, sideOf(req.states?.[0]))),
  run(req, { tolerance }) {
    const p = readProbabilities(req.probabilities);
    const states = readStates(req, tolerance);
    const guesses = readNumber(req.guesses, 'guesses', { min: 1 });
    const g = successWithinGuesses(p, states, { ...readOrderOptions(req, tolerance), guesses });
    return { value: writeNumber(g.value), method: 'column-generation', guesses, ...ordersFields(g) };
  },
});
