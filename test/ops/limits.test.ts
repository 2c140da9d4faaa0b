// Facts about the engine's limits and deadlines (docs/protocol.md, "Limits and deadlines"; issue 7): every
// op declares its cost, every request above an op's limits is refused with 'too-large' naming the
// estimate and the limit before any work (within a second), the same size gets the same code in every
// matrix form, presets refuse what they would build above the limits, and the long loops stop at the
// deadline with what they had. These are the project's own contract (common practice for a service that
// takes untrusted input), no published source; the SDP sizes (block sides, constraint counts) are those
// of the problems in src/oneshot, src/recovery and src/guessing.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle, type Answer } from '../../src/ops/handle.js';
import { listOps } from '../../src/ops/registry.js';
import { MAX_BYTES, MAX_STEP_WORK, MAX_WORK } from '../../src/limits.js';

/** A packed matrix of the given shape; its bytes are never read when the request is refused first. */
const packed = (n: number, m = n) => ({ shape: [n, m], packed: 'float64-le', re: 'AAAA' });
const mixed = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? 1 / d : 0)));
const identity = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? 1 : 0)));
const shift = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => ((j + 1) % d === i ? 1 : 0)));

function refusedQuickly(request: Record<string, unknown>, code = 'too-large'): Answer {
  const t0 = performance.now();
  const a = handle(request);
  const ms = performance.now() - t0;
  assert.equal(a.ok, false, `${request.op} was answered: ${JSON.stringify(a).slice(0, 200)}`);
  if (!a.ok) assert.equal(a.error.code, code, `${request.op}: ${a.error.message}`);
  assert.ok(ms < 1000, `${request.op} took ${ms.toFixed(0)} ms to refuse`);
  return a;
}

/** For each op, a request above its limits (sizes or estimated cost). */
const OVERSIZED: Record<string, Record<string, unknown> | null> = {
  'apply-channel': { channel: { kraus: [packed(1025)] }, rho: packed(1025) },
  'bures-distance': { rho: packed(1025), sigma: packed(1025) },
  'channel-check': { channel: { kraus: [packed(1025, 4)] } },
  'channel-convert': { channel: { kraus: [packed(1025, 4)] }, form: 'choi' },
  'channel-preset': { name: 'depolarizing', d: 33, p: 0.5 },
  'chernoff-exponent': { rho: packed(1025), sigma: packed(1025) },
  'complementary-channel': { channel: { kraus: [packed(1025, 4)] } },
  'compose-channels': { channels: [{ kraus: [packed(1025, 4)] }] },
  'conditional-entropy': { rho: packed(1025), a: [0], b: [] },
  'conditional-max-entropy': { rho: { matrix: packed(512), dims: [4, 128] }, a: [0], b: [1] },
  'conditional-min-entropy': { rho: { matrix: packed(128), dims: [1, 128] }, a: [0], b: [1] },
  'conditional-mutual-information': { rho: packed(1025), a: [0], b: [], c: [0] },
  'conditional-renyi-entropy': { rho: { matrix: packed(1024), dims: [2, 512] }, a: [0], b: [1], family: 'sandwiched', alpha: 2, optimized: true },
  'diamond-distance': { a: { kraus: [identity(12)] }, b: { kraus: [shift(12)] } },
  divergence: { family: 'measured', rho: packed(1024), sigma: packed(1024) },
  entropy: { rho: packed(1025) },
  'expectation-divergence': { rho: packed(1025), blocks: [1025] },
  fidelity: { rho: packed(1025), sigma: packed(1025) },
  'fidelity-of-recovery': { rho: { matrix: packed(96), dims: [4, 4, 6] }, a: [0], b: [1], c: [2] },
  'fidelity-sdp': { rho: packed(64), sigma: packed(64) },
  'fisher-information': { rho: packed(1025), derivative: packed(1025) },
  'guessing-probability': { probabilities: [0.25, 0.25, 0.25, 0.25], states: [packed(128), packed(128), packed(128), packed(128)] },
  guesswork: { probabilities: [0.2, 0.2, 0.2, 0.2, 0.2], states: [packed(128), packed(128), packed(128), packed(128), packed(128)] },
  'success-within-guesses': { probabilities: [0.2, 0.2, 0.2, 0.2, 0.2], states: [packed(128), packed(128), packed(128), packed(128), packed(128)], guesses: 1 },
  'max-information': { rho: { matrix: packed(128), dims: [1, 128] }, a: [0], b: [1] },
  'monotone-metric': { rho: packed(1025), x: packed(1025) },
  'mutual-information': { rho: packed(1025), a: [0], b: [0] },
  'partial-trace': { matrix: packed(1025), dims: [1025], over: [0] },
  'partial-transpose': { matrix: packed(1025), dims: [1025], on: [0] },
  'petz-recovery': { rho: packed(1025), a: [0], b: [], c: [] },
  'commuting-square': { first: { kraus: [packed(64)] }, second: { kraus: [packed(64)] } },
  'markov-structure': { rho: { matrix: packed(512), dims: [2, 64, 4] }, a: [0], b: [1], c: [2] },
  'petz-map': { sigma: packed(1025), channel: { kraus: [packed(1025)] } },
  'data-processing': { family: 'umegaki', rho: packed(1025), sigma: packed(1025), channel: { kraus: [packed(1025)] } },
  'purified-distance': { rho: packed(1025), sigma: packed(1025) },
  'reorder-subsystems': { matrix: packed(1025), dims: [1025], order: [0] },
  'smooth-max-divergence': { rho: packed(1025), sigma: packed(1025), epsilon: 0.1 },
  spectrum: { matrix: packed(1025) },
  'state-preset': { name: 'maximally-mixed', d: 1e9 },
  'trace-distance': { rho: packed(1025), sigma: packed(1025) },
  'verify-answer': { request: { op: 'fidelity-sdp', rho: packed(1025), sigma: packed(1025) }, answer: { ok: true } },
  'random-state': { ensemble: 'hilbert-schmidt', dims: [2048], seed: 1 },
  'random-unitary': { d: 2048, seed: 1 },
  'random-channel': { kind: 'stinespring', from: [64], to: [64], seed: 1 },
  'random-markov-state': { a: 1024, blocks: [[2, 2]], c: 1, seed: 1 },
  // random-number has no size: its cost is the same for every request.
  'random-number': null,
  'state-check': { state: { matrix: packed(1025) } },
  'repair-state': { state: { matrix: packed(1025) }, actions: ['clip'] },
  // data-processing-region's size is bounded by its schema (at most 4096 sampled points).
  'data-processing-region': null,
};

describe('cost declarations', () => {
  it('every registered op declares its cost (so that handle can refuse a request before its work)', () => {
    const missing = listOps().filter((op) => typeof op.cost !== 'function').map((op) => op.name);
    assert.deepEqual(missing, []);
  });

  it('every registered op has an oversized request in this test, refused with too-large within a second', () => {
    for (const op of listOps()) {
      const req = OVERSIZED[op.name];
      assert.ok(req !== undefined, `no oversized request for ${op.name}: add one to OVERSIZED (or null for an op without sizes)`);
      if (req) refusedQuickly({ op: op.name, ...req });
    }
  });

  it('a refusal of the estimated cost names the estimate, the limit and what it was estimated from', () => {
    const a = refusedQuickly({ op: 'diamond-distance', a: { kraus: [identity(12)] }, b: { kraus: [shift(12)] } });
    assert.ok(!a.ok);
    const detail = a.error.detail as { estimate: { bytes: number; operations: number }; limit: Record<string, number>; basis: string };
    assert.deepEqual(detail.limit, { operations: MAX_WORK, bytes: MAX_BYTES, step: MAX_STEP_WORK });
    // Watrous's SDP for d = 12: blocks 144, 12, 144 and 144² + 1 = 20737 constraints.
    assert.match(detail.basis, /20737 constraints/);
    assert.ok(detail.estimate.bytes > MAX_BYTES);
    assert.match(a.error.message, /estimated memory .* GiB, above the limit of 1\.0 GiB/);
  });
});

describe('the same size gets the same code in every form', () => {
  it('a 1025 × 1025 rho is too-large as rows, as {"re", "im"}, as {"matrix"} and packed, naming the place', () => {
    const rows = Array.from({ length: 1025 }, () => [0]);
    const forms: [unknown, string][] = [
      [rows, 'rho'],
      [{ re: rows }, 'rho.re'],
      [{ matrix: rows }, 'rho.matrix'],
      [{ matrix: { re: rows, im: rows } }, 'rho.matrix.re'],
      [packed(1025), 'rho.shape[0]'],
      [{ matrix: packed(4, 1025) }, 'rho.matrix.shape[1]'],
    ];
    for (const [rho, path] of forms) {
      const a = refusedQuickly({ op: 'entropy', rho });
      assert.ok(!a.ok);
      assert.equal(a.error.path, path);
    }
  });

  it('a ket of 1025 amplitudes is too-large, as a list and as {"re"}', () => {
    const ket = new Array(1025).fill(0);
    assert.equal((refusedQuickly({ op: 'entropy', rho: { ket } }) as { error: { path: string } }).error.path, 'rho.ket');
    assert.equal((refusedQuickly({ op: 'entropy', rho: { ket: { re: ket } } }) as { error: { path: string } }).error.path, 'rho.ket.re');
  });

  it('a request of too many expression strings is refused before the first is parsed', () => {
    const rows = Array.from({ length: 257 }, () => new Array(256).fill('1/2'));
    const a = refusedQuickly({ op: 'spectrum', matrix: rows });
    assert.ok(!a.ok && /expression strings/.test(a.error.message));
    const long = `(${'1+'.repeat(240)}1)`;
    const b = refusedQuickly({ op: 'spectrum', matrix: Array.from({ length: 64 }, () => new Array(64).fill(long)) });
    assert.ok(!b.ok && /total length of the expression strings/.test(b.error.message));
  });
});

describe('presets refuse what they would build above the limits, before building it', () => {
  it('state-preset maximally-mixed with d = 1e9, channel-preset partial-trace on [1024, 1024], erasure d = 1024', () => {
    refusedQuickly({ op: 'state-preset', name: 'maximally-mixed', d: 1e9 });
    refusedQuickly({ op: 'state-preset', name: 'ghz', n: 11 });
    refusedQuickly({ op: 'state-preset', name: 'werner', d: 33, p: 0.5 });
    refusedQuickly({ op: 'channel-preset', name: 'partial-trace', dims: [1024, 1024], traceOut: [1] });
    refusedQuickly({ op: 'channel-preset', name: 'erasure', d: 1024, p: 0.1 });
  });

  it('fidelity-of-recovery: (2,4,4) and (4,2,4) are within the limits (their Schur complement is N² + d_B² = 1040 and 1028 rows once the ρ block is eliminated, src/sdp/elimination.ts), (4,4,6) is refused', () => {
    const op = listOps().find((o) => o.name === 'fidelity-of-recovery')!;
    for (const dims of [[2, 4, 4], [4, 2, 4]]) {
      const c = op.cost!({ rho: { matrix: packed(32), dims }, a: [0], b: [1], c: [2] } as any);
      assert.ok(c.flops <= MAX_WORK && c.bytes <= MAX_BYTES && (c.step ?? 0) <= MAX_STEP_WORK, `${dims}: ${JSON.stringify(c)}`);
      assert.match(c.basis ?? '', /Schur complement is 10(40|28)×10(40|28)/);
    }
    refusedQuickly({ op: 'fidelity-of-recovery', rho: { matrix: packed(96), dims: [4, 4, 6] }, a: [0], b: [1], c: [2] });
  });

  it('depolarizing d = 33 would have 1089 Kraus operators, above the 1024 the engine takes as input', () => {
    const a = refusedQuickly({ op: 'channel-preset', name: 'depolarizing', d: 33, p: 0.5 });
    assert.ok(!a.ok && /1089 Kraus operators/.test(a.error.message) && a.error.path === 'd');
    assert.equal(handle({ op: 'channel-preset', name: 'depolarizing', d: 32, p: 0.5 }).ok, true);
  });
});

describe('deadlines', () => {
  it('an SDP still running at its deadline stops with deadline-exceeded, its status and both objectives', () => {
    const t0 = performance.now();
    const a = handle({ op: 'fidelity-of-recovery', rho: { matrix: mixed(18), dims: [2, 3, 3] }, a: [0], b: [1], c: [2], deadline: 30 });
    const ms = performance.now() - t0;
    assert.ok(!a.ok, 'answered before its deadline');
    assert.equal(a.error.code, 'deadline-exceeded');
    assert.equal(a.error.path, 'deadline');
    const d = a.error.detail as Record<string, unknown>;
    assert.equal(d.deadline, 30);
    assert.equal(d.status, 'stopped at the deadline');
    for (const k of ['iterations', 'primalObjective', 'dualObjective', 'relativeGap']) assert.equal(typeof d[k], 'number', k);
    assert.ok(ms < 30 + 5000, `stopped after ${ms.toFixed(0)} ms`);
  });

  it('the measured relative entropy stops at its deadline, saying how many steps it took', () => {
    const n = 96;
    const rho = mixed(n);
    const sigma = { re: Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 / n : i === j + 1 || j === i + 1 ? 0.2 / n : 0))) };
    const a = handle({ op: 'divergence', family: 'measured', rho, sigma, deadline: 1 });
    assert.ok(!a.ok && a.error.code === 'deadline-exceeded', JSON.stringify(a).slice(0, 300));
    const d = a.error.detail as { iterations: number; deadline: number };
    assert.equal(typeof d.iterations, 'number');
    assert.equal(d.deadline, 1);
  });

  it('a deadline must be a positive number of milliseconds, at most one day', () => {
    for (const deadline of [0, -5, 'soon', 86_400_001]) {
      const a = handle({ op: 'spectrum', matrix: [[1]], deadline });
      assert.ok(!a.ok && a.error.code === 'invalid-argument' && a.error.path === 'deadline', JSON.stringify(a));
    }
    assert.equal(handle({ op: 'spectrum', matrix: [[1]], deadline: 5 }).ok, true);
  });
});
