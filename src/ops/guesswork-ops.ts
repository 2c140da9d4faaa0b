/**
 * The `guesswork` op (PROTOCOL.md): the least expected (number of guesses)^moment needed to find X.
 * Without `states`: the closed form Σ_i i^k p_(i) (guessing by decreasing probability; Massey 1994,
 * Arikan 1996), answered with the optimal order and `method: "closed-form"` (no certificate).
 * With `states` (one density matrix per symbol): the SDP over POVMs whose outcomes are guessing orders
 * (src/guessing/guesswork.ts), answered with the strategy, the certificate and the bounds.
 *
 * Deliberately not here: numerics (src/guessing). States are read and validated by the codec.
 * Cost: that of src/guessing/guesswork.ts (limits there: at most 6 symbols of nonzero probability,
 * side information up to 32 dimensions, orders × d² up to 11520).
 */
import { RhoError } from '../errors.js';
import {
  DEFAULT_WEIGHT_TOLERANCE, guessworkClassical, guessworkWithSideInformation,
} from '../guessing/guesswork.js';
import { defineOp } from './registry.js';
import { readNumber, readState, schemas, writeCertificate, writeComplexMatrix, writeNumber } from './codec.js';
import { dense, plain, sdp, sideOf } from './cost.js';

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

defineOp({
  name: 'guesswork',
  summary:
    'Least expected (number of guesses)^moment to find X: by decreasing probability without side information, or by an SDP over POVMs whose outcomes are guessing orders given quantum side information (states).',
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
        description: 'Optional quantum side information: one density matrix per symbol, all of one size. Without it, no side information.',
        type: 'array',
        minItems: 1,
        maxItems: MAX_ALPHABET,
        items: schemas.state,
      },
      moment: { description: 'The moment k > 0 of the number of guesses (default 1).', type: 'number', exclusiveMinimum: 0 },
      weightTolerance: {
        description: `Orders whose POVM element has Tr M / d at or below this are left out of the strategy (default ${DEFAULT_WEIGHT_TOLERANCE}).`,
        type: 'number',
        minimum: 0,
        maximum: 1,
      },
    },
    required: ['probabilities'],
  },
  cost: (req) => {
    const n = req.probabilities.length;
    if (req.states === undefined) return plain(64 * n * Math.log2(n + 1), 64 * n, `sorting ${n} probabilities`);
    const d = sideOf(req.states[0]);
    // The SDP has one block per guessing order of the support (at most MAX_SUPPORT symbols, else refused).
    let orders = 1;
    for (let k = 2; k <= Math.min(n, 6); k++) orders *= k;
    return sdp({ blocks: Array.from({ length: orders }, () => ({ size: d, hermitian: true })), constraints: d * d }, dense(d, 2 * n));
  },
  run(req, { tolerance }) {
    const p = readProbabilities(req.probabilities);
    const moment = req.moment === undefined ? 1 : readNumber(req.moment, 'moment', { min: 0, minExclusive: true });
    if (req.states === undefined) {
      if (req.weightTolerance !== undefined) {
        throw new RhoError('invalid-argument', '"weightTolerance" is used only with side information ("states").', 'weightTolerance');
      }
      const g = guessworkClassical(p, moment, tolerance);
      const out: Record<string, unknown> & { value: unknown } = { value: writeNumber(g.value), method: 'closed-form', moment, order: g.order, ties: g.ties };
      if (!Number.isFinite(g.value)) {
        // A finite sum that overflowed: say so, with its logarithm (log-sum-exp over the guessing order).
        const log2 = log2Guesswork(p, g.order, moment);
        out.log2Value = log2;
        out.reason = `The value is finite but above the largest double (about 1.8e308): its base-2 logarithm is ${log2}.`;
      }
      return out;
    }
    if (!Array.isArray(req.states)) throw new RhoError('invalid-argument', 'The states must be a list, one state per symbol.', 'states');
    // The SDP's costs are (number of guesses)^moment: they must stay finite, with room for the sums.
    const largestMoment = Math.log(1e300) / Math.log(Math.max(2, p.length));
    if (moment > largestMoment) {
      throw new RhoError(
        'invalid-argument',
        `With ${p.length} symbols the costs (number of guesses)^moment reach ${p.length}^${moment}, beyond double precision; the SDP needs finite costs, so the moment must be at most ${largestMoment.toFixed(2)} here.`,
        'moment',
        { limit: largestMoment },
      );
    }
    const states = req.states.map((s: unknown, x: number) => readState(s, `states[${x}]`, tolerance).matrix);
    const weightTolerance =
      req.weightTolerance === undefined ? DEFAULT_WEIGHT_TOLERANCE : readNumber(req.weightTolerance, 'weightTolerance', { min: 0, max: 1 });
    const g = guessworkWithSideInformation(p, states, { moment, tolerance, weightTolerance });
    const { lowerBound, upperBound, ...certificate } = g.certificate;
    const out: Record<string, unknown> & { value: unknown } = {
      value: writeNumber(g.value),
      method: 'sdp',
      moment,
      strategy: g.strategy.map((s) => ({ order: s.order, probability: s.probability, weight: s.weight, element: writeComplexMatrix(s.element) })),
      certificate: writeCertificate(certificate),
      bounds: { lower: writeNumber(lowerBound), upper: writeNumber(upperBound) },
      droppedWeight: g.droppedWeight,
      weightTolerance: g.weightTolerance,
      ordersSearched: g.ordersSearched,
      zeroProbabilitySymbols: g.zeroProbabilitySymbols,
      withoutSideInformation: writeNumber(g.withoutSideInformation),
    };
    if (g.warning) out.warning = g.warning;
    return out;
  },
});
