/**
 * Ops that draw random objects: `random-state` (Haar pure, Hilbert–Schmidt, Bures, induced), `random-unitary`
 * (Haar), `random-channel` (from a random Stinespring isometry, or random mixed-unitary hence unital),
 * `random-markov-state` (from a block structure) and `random-number` (uniform on an interval).
 *
 * Every draw is reproducible from plain data: either `seed` (an integer, the Philox4x64-10 key) with `stream`
 * (up to three counter words; the sweep runner uses [point index, draw number]), or `coordinates`, the list
 * of standard normals the draw consumes (for random-number: the uniform u in [0, 1]). With
 * `withCoordinates: true` the answer also carries the coordinates it used, so a local search can move a draw
 * smoothly and replay it without the generator. The ensembles are in src/quantum/random.ts, the generator in
 * src/linalg/philox.ts.
 *
 * Deliberately not here: sampling loops (one request, one object; sweeps are src/sweep).
 * Cost: that of the ensemble (a Ginibre matrix and a product, or a QR of the object's order).
 */
import { RhoError } from '../errors.js';
import { PhiloxStream, MAX_SEED, type VariateSource } from '../linalg/philox.js';
import { haarUnitary } from '../linalg/random.js';
import { product } from '../linalg/subsystems.js';
import {
  projectorOf, randomBuresState, randomInducedState, randomMarkovState, randomPureKet, randomStinespringChannel,
  randomUnitalChannel,
} from '../quantum/random.js';
import { defineOp } from './registry.js';
import { MAX_DIMENSION, MAX_KRAUS, MAX_CHANNEL_ENTRIES, readDims, schemas, writeChannel, writeComplexMatrix, writeMatrix } from './codec.js';
import type { CMatrix } from '../linalg/cmatrix.js';
import { dense, plain } from './cost.js';

/**
 * The order of a dims list of a schema-valid request, for cost estimates (nothing is read), capped at
 * MAX_DIMENSION: above it `run` refuses the request itself, naming the field.
 */
function orderOf(dims: unknown): number {
  const d = Array.isArray(dims) ? dims.reduce((p: number, x) => p * (Number(x) || 1), 1) : 1;
  return Math.min(d, MAX_DIMENSION);
}

/** Most normals one draw may consume (a 1024 × 4096 Ginibre matrix): bounds the work of one request. */
export const MAX_COORDINATES = 8 * 1024 * 1024;

const drawFields = {
  seed: {
    description: 'The generator\'s seed (the Philox4x64-10 key), an integer in [0, 2^53 − 1]. Give seed or coordinates.',
    type: 'integer',
    minimum: 0,
    maximum: MAX_SEED,
  },
  stream: {
    description:
      'Up to three counter words selecting an independent stream for this seed (the sweep runner uses [point index, draw number]); default [].',
    type: 'array',
    maxItems: 3,
    items: { type: 'integer', minimum: 0, maximum: MAX_SEED },
  },
  coordinates: {
    description:
      'Instead of seed: the standard normal variates the draw consumes, in order (random-number: the one uniform u in [0, 1]). A smooth parametrization of the ensemble.',
    type: 'array',
    minItems: 1,
    items: { type: 'number' },
  },
  withCoordinates: {
    description: 'Also return "coordinates": the variates used, which replay the draw without the generator.',
    type: 'boolean',
  },
} as const;

/** Records what a source handed out, so the draw can be replayed from its coordinates. */
class Recorder implements VariateSource {
  readonly used: number[] = [];
  constructor(private readonly inner: VariateSource) {}
  uniform(): number {
    const u = this.inner.uniform();
    this.used.push(u);
    return u;
  }
  normal(): number {
    const z = this.inner.normal();
    this.used.push(z);
    return z;
  }
}

/** Hands out given coordinates in order; refuses to run past their end. */
class Coordinates implements VariateSource {
  private k = 0;
  constructor(private readonly values: readonly number[], private readonly needed: number) {}
  private take(): number {
    if (this.k >= this.values.length) {
      throw new RhoError('dimension-mismatch', `This draw needs ${this.needed} coordinates; ${this.values.length} were given.`, 'coordinates', {
        needed: this.needed,
        given: this.values.length,
      });
    }
    return this.values[this.k++];
  }
  uniform(): number {
    const u = this.take();
    if (!(u >= 0 && u <= 1)) throw new RhoError('invalid-argument', `A uniform coordinate must lie in [0, 1], not ${u}.`, `coordinates[${this.k - 1}]`);
    return u;
  }
  normal(): number {
    return this.take();
  }
}

/** How many variates `draw` consumes (it is run once on a throwaway stream). */
function countVariates<T>(draw: (s: VariateSource) => T): number {
  const r = new Recorder(new PhiloxStream(0));
  draw(r);
  return r.used.length;
}

/**
 * Runs `draw` on the source the request names, after checking that it consumes at most `cost` variates.
 * Returns the drawn object and, when asked, the coordinates.
 */
function drawWith<T>(req: Record<string, any>, cost: number, draw: (s: VariateSource) => T): { object: T; coordinates?: number[] } {
  if (cost > MAX_COORDINATES) {
    throw new RhoError('too-large', `This draw would consume ${cost} variates, more than the limit ${MAX_COORDINATES}.`, '', { limit: MAX_COORDINATES });
  }
  const hasSeed = req.seed !== undefined, hasCoordinates = req.coordinates !== undefined;
  if (hasSeed === hasCoordinates) {
    throw new RhoError(hasSeed ? 'invalid-argument' : 'missing-argument', 'Give exactly one of "seed" (with an optional "stream") or "coordinates".', hasSeed ? 'coordinates' : 'seed');
  }
  if (req.stream !== undefined && !hasSeed) throw new RhoError('invalid-argument', '"stream" goes with "seed", not with "coordinates".', 'stream');
  let source: VariateSource;
  if (hasSeed) {
    source = new PhiloxStream(req.seed, req.stream ?? []);
  } else {
    const needed = cost;
    if (req.coordinates.length !== needed) {
      throw new RhoError('dimension-mismatch', `This draw needs ${needed} coordinates; ${req.coordinates.length} were given.`, 'coordinates', {
        needed,
        given: req.coordinates.length,
      });
    }
    source = new Coordinates(req.coordinates, needed);
  }
  if (req.withCoordinates === true) {
    const rec = new Recorder(source);
    const object = draw(rec);
    return { object, coordinates: rec.used };
  }
  return { object: draw(source) };
}

function positiveInt(value: unknown, path: string, max: number): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 1) {
    throw new RhoError('invalid-argument', `Expected a positive integer, not ${JSON.stringify(value)}.`, path);
  }
  if (value > max) throw new RhoError('too-large', `${value} is more than the limit ${max}.`, path, { limit: max });
  return value;
}

function dimsOf(req: Record<string, any>, field: string, required = true): number[] | undefined {
  if (req[field] === undefined) {
    if (required) throw new RhoError('missing-argument', `The field ${field} is required.`, field);
    return undefined;
  }
  const dims = readDims(req[field], field);
  const d = product(dims);
  if (d > MAX_DIMENSION) throw new RhoError('too-large', `The dimensions ${JSON.stringify(dims)} multiply to ${d}, more than ${MAX_DIMENSION}.`, field, { limit: MAX_DIMENSION });
  return dims;
}

function withCoords<T extends Record<string, unknown>>(out: T, coordinates?: number[]): T & { coordinates?: number[] } {
  return coordinates ? { ...out, coordinates } : out;
}

const dimsSchema = { ...schemas.dims, description: 'The subsystem dimensions of the object (their product is its order).' };

// ---------------------------------------------------------------------------------------------------

defineOp({
  name: 'random-state',
  summary:
    'A random density matrix: Haar-random pure ("haar-pure"), Hilbert–Schmidt, Bures, or induced by partial trace over an ancilla of dimension "ancilla" (Życzkowski–Sommers 2001); value is the state {matrix, dims}.',
  args: {
    type: 'object',
    properties: {
      ensemble: { enum: ['haar-pure', 'hilbert-schmidt', 'bures', 'induced'], description: 'The measure the state is drawn from.' },
      dims: dimsSchema,
      ancilla: { type: 'integer', minimum: 1, description: 'The ancilla dimension k of the induced measure (k = d is Hilbert–Schmidt).' },
      ...drawFields,
    },
    required: ['ensemble', 'dims'],
  },
  cost: (req) => {
    const d = orderOf(req.dims);
    const k = req.ensemble === 'induced' ? Math.min(Number(req.ancilla) || d, MAX_DIMENSION) : d;
    return plain(8 * d * d * k, 64 * d * Math.max(d, k), `drawing a ${d}×${d} state`);
  },
  run(req) {
    const dims = dimsOf(req, 'dims')!;
    const d = product(dims);
    if (req.ancilla !== undefined && req.ensemble !== 'induced') {
      throw new RhoError('invalid-argument', '"ancilla" applies to the induced ensemble only.', 'ancilla');
    }
    if (req.ensemble === 'haar-pure') {
      const { object: ket, coordinates } = drawWith(req, 2 * d, (s) => randomPureKet(d, s));
      return withCoords({ value: { matrix: writeMatrix(projectorOf(ket)), dims }, ket: ketOut(ket) }, coordinates);
    }
    let draw: (s: VariateSource) => CMatrix;
    let cost: number;
    if (req.ensemble === 'induced') {
      if (req.ancilla === undefined) throw new RhoError('missing-argument', 'The induced ensemble needs "ancilla", the dimension traced out.', 'ancilla');
      const k = positiveInt(req.ancilla, 'ancilla', MAX_COORDINATES);
      draw = (s) => randomInducedState(d, k, s);
      cost = 2 * d * k;
    } else if (req.ensemble === 'hilbert-schmidt') {
      draw = (s) => randomInducedState(d, d, s);
      cost = 2 * d * d;
    } else {
      draw = (s) => randomBuresState(d, s);
      cost = 4 * d * d;
    }
    const { object, coordinates } = drawWith(req, cost, draw);
    return withCoords({ value: { matrix: writeMatrix(object), dims } }, coordinates);
  },
});

function ketOut(ket: CMatrix): number[] | { re: number[]; im: number[] } {
  const re = Array.from(ket.re);
  return ket.im.some((x) => x !== 0) ? { re, im: Array.from(ket.im) } : re;
}

defineOp({
  name: 'random-unitary',
  summary: 'A Haar-random unitary of order d: QR of a complex Ginibre matrix with the phases of R\'s diagonal moved into Q (Mezzadri 2007).',
  args: {
    type: 'object',
    properties: { d: { type: 'integer', minimum: 1, description: 'The order of the unitary.' }, ...drawFields },
    required: ['d'],
  },
  cost: (req) => dense(Math.min(Number(req.d) || 1, MAX_DIMENSION), 1, 'a QR factorisation'),
  run(req) {
    const d = positiveInt(req.d, 'd', MAX_DIMENSION);
    const { object, coordinates } = drawWith(req, 2 * d * d, (s) => haarUnitary(d, s));
    return withCoords({ value: writeComplexMatrix(object) }, coordinates);
  },
});

defineOp({
  name: 'random-channel',
  summary:
    'A random channel: "stinespring" (Kraus operators of a Haar-random isometry C^from → C^to ⊗ C^environment, environment default d_in·d_out; trace preserving) or "unital" (Σ p_i U_i·U_i† of "unitaries" Haar unitaries, p uniform on the simplex; mixed unitary).',
  args: {
    type: 'object',
    properties: {
      kind: { enum: ['stinespring', 'unital'], description: 'How the channel is drawn.' },
      from: { ...schemas.dims, description: 'The input dimensions (for "unital" also the output).' },
      to: { ...schemas.dims, description: 'The output dimensions ("stinespring"); default equal to from.' },
      environment: { type: 'integer', minimum: 1, description: '"stinespring": the environment dimension (the number of Kraus operators); default d_in·d_out.' },
      unitaries: { type: 'integer', minimum: 1, description: '"unital": the number of unitaries mixed; default d_in.' },
      ...drawFields,
    },
    required: ['kind', 'from'],
  },
  cost: (req) => {
    const din = orderOf(req.from);
    const dout = req.to === undefined ? din : orderOf(req.to);
    const m = Math.min(Number(req.environment ?? req.unitaries) || din * dout, MAX_KRAUS);
    return plain(16 * (m * dout) * din * din, 64 * m * dout * din, `drawing ${m} Kraus operators ${dout}×${din}`);
  },
  run(req) {
    const from = dimsOf(req, 'from')!;
    const din = product(from);
    if (req.kind === 'unital') {
      if (req.to !== undefined) throw new RhoError('invalid-argument', 'A unital channel here maps a space to itself: leave "to" out.', 'to');
      if (req.environment !== undefined) throw new RhoError('invalid-argument', '"environment" applies to the stinespring kind.', 'environment');
      const n = req.unitaries === undefined ? din : positiveInt(req.unitaries, 'unitaries', MAX_KRAUS);
      if (n * din * din > MAX_CHANNEL_ENTRIES) throw new RhoError('too-large', 'The channel would have too many Kraus entries.', 'unitaries', { limit: MAX_CHANNEL_ENTRIES });
      const { object, coordinates } = drawWith(req, 2 * n + 2 * n * din * din, (s) => randomUnitalChannel(from, n, s));
      return withCoords({ value: writeChannel(object) }, coordinates);
    }
    if (req.unitaries !== undefined) throw new RhoError('invalid-argument', '"unitaries" applies to the unital kind.', 'unitaries');
    const to = dimsOf(req, 'to', false) ?? from;
    const dout = product(to);
    const m = req.environment === undefined ? din * dout : positiveInt(req.environment, 'environment', MAX_KRAUS);
    if (m > MAX_KRAUS) throw new RhoError('too-large', `The default environment d_in·d_out = ${m} exceeds ${MAX_KRAUS} Kraus operators; give a smaller "environment".`, 'environment', { limit: MAX_KRAUS });
    if (m * dout < din) {
      throw new RhoError('dimension-mismatch', `An isometry from dimension ${din} needs d_out·environment ≥ ${din}; here it is ${m * dout}.`, 'environment');
    }
    if (m * din * dout > MAX_CHANNEL_ENTRIES) throw new RhoError('too-large', 'The channel would have too many Kraus entries.', 'environment', { limit: MAX_CHANNEL_ENTRIES });
    const { object, coordinates } = drawWith(req, 2 * m * dout * din, (s) => randomStinespringChannel(from, to, m, s));
    return withCoords({ value: writeChannel(object) }, coordinates);
  },
});

defineOp({
  name: 'random-markov-state',
  summary:
    'A random quantum Markov chain state ρ_ABC = ⊕_j q_j ρ_{A b_j^L} ⊗ ρ_{b_j^R C} for H_B = ⊕_j H_{b_j^L} ⊗ H_{b_j^R} (Hayden–Jozsa–Petz–Winter 2004), blocks Hilbert–Schmidt, q uniform on the simplex; I(A;C|B) = 0. Value is the state with dims [a, Σ left·right, c].',
  args: {
    type: 'object',
    properties: {
      a: { type: 'integer', minimum: 1, description: 'The dimension of A.' },
      c: { type: 'integer', minimum: 1, description: 'The dimension of C.' },
      blocks: {
        description: 'The blocks of B: a list of [left, right] dimension pairs.',
        type: 'array',
        minItems: 1,
        maxItems: MAX_DIMENSION,
        items: { type: 'array', minItems: 2, maxItems: 2, items: { type: 'integer', minimum: 1 } },
      },
      rotate: { type: 'boolean', description: 'Apply a Haar-random unitary on B afterwards (keeps I(A;C|B) = 0); default false.' },
      ...drawFields,
    },
    required: ['a', 'blocks', 'c'],
  },
  cost: (req) => {
    const dB = Array.isArray(req.blocks) ? req.blocks.reduce((s: number, b: number[]) => s + (b[0] ?? 1) * (b[1] ?? 1), 0) : 1;
    return dense(Math.min((Number(req.a) || 1) * dB * (Number(req.c) || 1), MAX_DIMENSION), 2, 'drawing and rotating the blocks');
  },
  run(req) {
    const a = positiveInt(req.a, 'a', MAX_DIMENSION);
    const c = positiveInt(req.c, 'c', MAX_DIMENSION);
    const blocks = (req.blocks as number[][]).map(([left, right]) => ({ left, right }));
    const dB = blocks.reduce((s, b) => s + b.left * b.right, 0);
    if (a * dB * c > MAX_DIMENSION) {
      throw new RhoError('too-large', `The state would have order ${a * dB * c}, more than ${MAX_DIMENSION}.`, 'blocks', { limit: MAX_DIMENSION });
    }
    const rotate = req.rotate === true;
    const draw = (s: VariateSource) => randomMarkovState(a, blocks, c, s, rotate);
    const { object, coordinates } = drawWith(req, countVariates(draw), draw);
    return withCoords({ value: { matrix: writeMatrix(object.matrix), dims: object.dims } }, coordinates);
  },
});

defineOp({
  name: 'random-number',
  summary: 'A number drawn uniformly from [from, to) (coordinates: the uniform u ∈ [0, 1], giving from + (to − from)·u).',
  args: {
    type: 'object',
    properties: {
      from: { type: 'number', description: 'The lower end.' },
      to: { type: 'number', description: 'The upper end (greater than from).' },
      ...drawFields,
    },
    required: ['from', 'to'],
  },
  cost: () => plain(100, 1024, 'one uniform number'),
  run(req) {
    if (!(req.to > req.from)) throw new RhoError('invalid-argument', `"to" (${req.to}) must be greater than "from" (${req.from}).`, 'to');
    const { object, coordinates } = drawWith(req, 1, (s) => s.uniform());
    return withCoords({ value: req.from + (req.to - req.from) * object }, coordinates);
  },
});
