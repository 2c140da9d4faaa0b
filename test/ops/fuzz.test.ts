// Fuzz suite (fast-check): random malformed and oversized requests thrown at `handle`. Facts checked for
// every one: the answer is a protocol answer (it validates against the answer schema of
// schema/protocol.schema.json), a failure carries a code from the documented list, the answer survives
// JSON unchanged (no NaN, no undefined, no class instances), and it comes back in bounded time. Source:
// the project's protocol (docs/protocol.md, "Answers" and "Limits and deadlines"); no published source.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import fc from 'fast-check';
import Ajv2020Module from 'ajv/dist/2020.js';
import '../../src/ops/all.js';
import { ERROR_CODES, handle } from '../../src/ops/handle.js';
import { listOps } from '../../src/ops/registry.js';
import { generateSchema } from '../../scripts/write-schema.js';

const Ajv2020 = ((Ajv2020Module as unknown as { default?: unknown }).default ?? Ajv2020Module) as typeof Ajv2020Module.default;
const ajv = new Ajv2020({ strict: false, logger: false });
ajv.addSchema(generateSchema(), 'protocol');
const isAnswer = ajv.getSchema('protocol#/$defs/answer')!;

/** Longest time one fuzzed request may take (generous: a loaded machine; the point is "bounded"). */
const BOUND_MS = 5000;

function check(request: unknown): void {
  const t0 = performance.now();
  const a = handle(request, { defaultDeadline: 2000 });
  const ms = performance.now() - t0;
  assert.ok(ms < BOUND_MS, `${ms.toFixed(0)} ms for ${JSON.stringify(request).slice(0, 200)}`);
  assert.ok(isAnswer(a), `not a protocol answer: ${JSON.stringify(a).slice(0, 300)} ${JSON.stringify(isAnswer.errors)}`);
  if (!a.ok) assert.ok((ERROR_CODES as readonly string[]).includes(a.error.code), a.error.code);
  assert.deepEqual(JSON.parse(JSON.stringify(a)), a);
}

const opNames = listOps().map((o) => o.name);
const fieldNames = [...new Set(listOps().flatMap((o) => Object.keys(o.args.properties)))];

const scalar = fc.oneof(
  fc.double(),
  fc.integer({ min: -3, max: 1100 }),
  fc.constantFrom('1/2', 'i', 'sqrt(-1)', '1/0', 'x', 'Infinity', 'NaN', '', 'e^(i*pi)', '('.repeat(300)),
  fc.boolean(),
  fc.constant(null),
);
const rows = fc.array(fc.array(scalar, { maxLength: 4 }), { maxLength: 4 });
const square = fc.integer({ min: 1, max: 4 }).chain((n) =>
  fc.array(fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
);
const packed = fc.record({
  shape: fc.array(fc.oneof(fc.integer({ min: -2, max: 5000 }), fc.double()), { maxLength: 3 }),
  packed: fc.constantFrom('float64-le', 'float32', 1),
  re: fc.oneof(fc.base64String({ maxLength: 64 }), fc.string(), fc.integer()),
});
const matrixLike = fc.oneof(rows, square, packed, fc.record({ re: rows, im: rows }), fc.record({ matrix: square, dims: fc.array(fc.integer({ min: -1, max: 5 }), { maxLength: 3 }) }));
const channelLike = fc.oneof(
  fc.record({ kraus: fc.array(matrixLike, { maxLength: 3 }) }),
  fc.record({ choi: matrixLike, from: fc.array(fc.integer({ min: 0, max: 4 }), { maxLength: 2 }) }),
);
const fieldValue = fc.oneof(scalar, matrixLike, channelLike, fc.array(matrixLike, { maxLength: 3 }), fc.array(fc.integer({ min: -1, max: 4 }), { maxLength: 3 }));

/** A request naming a real op, with random fields drawn from every op's argument names and the common ones. */
const nearlyValid = fc.record({
  op: fc.constantFrom(...opNames),
  fields: fc.dictionary(fc.constantFrom(...fieldNames, 'tolerance', 'base', 'id', 'deadline', 'answerMatrices', '__proto__', 'constructor'), fieldValue, { maxKeys: 5 }),
}).map(({ op, fields }) => ({ ...fields, op }));

/** A random density matrix of side n as {re, im}: A A* / Tr(A A*) for A with entries in [−1, 1]. */
const density = (n: number) =>
  fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 2 * n * n, maxLength: 2 * n * n }).map((x) => {
    const re = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    const im = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    let tr = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        for (let k = 0; k < n; k++) {
          const [ar, ai, br, bi] = [x[2 * (i * n + k)], x[2 * (i * n + k) + 1], x[2 * (j * n + k)], -x[2 * (j * n + k) + 1]];
          re[i][j] += ar * br - ai * bi;
          im[i][j] += ar * bi + ai * br;
        }
      }
      tr += re[i][i];
    }
    if (!(tr > 1e-6)) return { re: [[1]], im: [[0]] };
    return { re: re.map((r) => r.map((v) => v / tr)), im: im.map((r) => r.map((v) => v / tr)) };
  });

/** Requests that mostly pass validation: real states, random families and orders, so that ops compute. */
const computing = fc.integer({ min: 1, max: 4 }).chain((n) =>
  fc.record({
    op: fc.constantFrom('entropy', 'divergence', 'fidelity', 'trace-distance', 'bures-distance', 'chernoff-exponent', 'spectrum', 'fidelity-sdp', 'smooth-max-divergence'),
    rho: density(n),
    sigma: density(n),
    family: fc.constantFrom('umegaki', 'petz', 'sandwiched', 'alpha-z', 'geometric', 'max', 'min', 'measured', 'hypothesis-testing'),
    alpha: fc.oneof(fc.double({ min: 0, max: 300, noNaN: true }), fc.constant('Infinity')),
    z: fc.double({ min: 1e-3, max: 10, noNaN: true }),
    epsilon: fc.double({ min: 0.01, max: 0.99, noNaN: true }),
  }).map((r) => {
    if (r.op === 'spectrum') return { op: r.op, matrix: r.rho };
    if (r.op === 'entropy') return { op: r.op, rho: r.rho, alpha: r.alpha };
    if (r.op === 'smooth-max-divergence') return { op: r.op, rho: r.rho, sigma: r.sigma, epsilon: r.epsilon };
    if (r.op !== 'divergence') return { op: r.op, rho: r.rho, sigma: r.sigma };
    const uses: Record<string, string[]> = { petz: ['alpha'], sandwiched: ['alpha'], 'alpha-z': ['alpha', 'z'], geometric: ['alpha'], 'hypothesis-testing': ['epsilon'] };
    const extra = Object.fromEntries((uses[r.family] ?? []).map((k) => [k, (r as Record<string, unknown>)[k]]));
    return { op: r.op, family: r.family, rho: r.rho, sigma: r.sigma, ...extra };
  }),
);

describe('fuzzed requests always get a protocol answer in bounded time', () => {
  it('valid states with random families, orders and parameters (the ops compute, or refuse with a documented code)', () => {
    fc.assert(fc.property(computing, check), { numRuns: 200, seed: 5 });
  });

  it('arbitrary JSON values as requests', () => {
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 4 }), check), { numRuns: 300, seed: 7 });
  });

  it('requests naming a real op with random fields (malformed, oversized, odd strings)', () => {
    fc.assert(fc.property(nearlyValid, check), { numRuns: 1500, seed: 11 });
  });

  it('oversized shapes in every matrix form', () => {
    const big = fc.integer({ min: 1025, max: 1 << 20 });
    const oversized = fc.tuple(fc.constantFrom(...opNames), big, fc.constantFrom('packed', 'rows-count', 'ket')).map(([op, n, form]) => {
      const m = form === 'packed' ? { shape: [n, 2], packed: 'float64-le', re: 'AAAA' } : form === 'ket' ? { ket: new Array(Math.min(n, 5000)).fill(0) } : Array.from({ length: Math.min(n, 2000) }, () => [0]);
      return { op, rho: m, sigma: m, matrix: m, states: [m], channel: { kraus: [m] }, a: { kraus: [m] }, b: { kraus: [m] } };
    });
    fc.assert(fc.property(oversized, check), { numRuns: 150, seed: 13 });
  });
});
