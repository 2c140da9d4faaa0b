// Facts about the random ensembles (src/quantum/random.ts) drawn through their ops (src/ops/random-ops.ts).
// Sources: Życzkowski and Sommers, J. Phys. A 34 (2001) 7111 (induced measures: mean purity (d + k)/(dk + 1),
// so 2d/(d² + 1) for Hilbert–Schmidt); Sommers and Życzkowski, J. Phys. A 37 (2004) 8457 (Bures measure: mean
// purity (5d² + 1)/(2d(d² + 2)); recalled from memory, and it gives 7/8 for d = 2, which the Bures density
// ∝ r²/√(1 − r²) on the Bloch ball confirms); Hayden, Jozsa, Petz and Winter, Commun. Math. Phys. 246 (2004)
// 359, Theorem 6 (the block states have I(A;C|B) = 0) and Petz's theorem (Petz 1988: then the Petz map recovers
// exactly); a Haar isometry averages every input to the maximally mixed output (Schur's lemma, common practice).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { handle } from '../../src/ops/handle.js';
import '../../src/ops/all.js';
import { readMatrix } from '../../src/ops/codec.js';
import { mul } from '../../src/linalg/cmatrix.js';

function ok(req: Record<string, unknown>): any {
  const a = handle(req) as any;
  assert.ok(a.ok, JSON.stringify(a).slice(0, 400));
  return a;
}

function purity(matrix: unknown): number {
  const m = readMatrix(matrix, 'm');
  const p = mul(m, m);
  let t = 0;
  for (let i = 0; i < m.rows; i++) t += p.re[i * m.rows + i];
  return t;
}

function meanAndError(xs: number[]): { mean: number; error: number } {
  const n = xs.length;
  const mean = xs.reduce((a, b) => a + b, 0) / n;
  return { mean, error: Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1) / n) };
}

function meanPurity(req: Record<string, unknown>, n: number): { mean: number; error: number } {
  return meanAndError(Array.from({ length: n }, (_, k) => purity(ok({ ...req, seed: 77, stream: [k] }).value.matrix)));
}

describe('random states', () => {
  it('induced states with ancilla k have mean purity (d + k)/(dk + 1) (Życzkowski–Sommers 2001)', () => {
    for (const [d, k] of [[2, 1], [2, 3], [3, 2], [4, 5]]) {
      const { mean, error } = meanPurity({ op: 'random-state', ensemble: 'induced', dims: [d], ancilla: k }, 2000);
      const want = (d + k) / (d * k + 1);
      assert.ok(Math.abs(mean - want) < 5 * error + 1e-12, `d=${d}, k=${k}: ${mean} ± ${error}, expected ${want}`);
    }
  });

  it('Hilbert–Schmidt states have mean purity 2d/(d² + 1) (Życzkowski–Sommers 2001)', () => {
    for (const dims of [[2], [2, 2], [3]]) {
      const d = dims.reduce((a, b) => a * b, 1);
      const { mean, error } = meanPurity({ op: 'random-state', ensemble: 'hilbert-schmidt', dims }, 2000);
      assert.ok(Math.abs(mean - (2 * d) / (d * d + 1)) < 5 * error, `d=${d}: ${mean} ± ${error}`);
    }
  });

  it('Bures states have mean purity (5d² + 1)/(2d(d² + 2)) (Sommers–Życzkowski 2004, from memory; 7/8 at d = 2)', () => {
    for (const d of [2, 3]) {
      const { mean, error } = meanPurity({ op: 'random-state', ensemble: 'bures', dims: [d] }, 2000);
      const want = (5 * d * d + 1) / (2 * d * (d * d + 2));
      assert.ok(Math.abs(mean - want) < 5 * error, `d=${d}: ${mean} ± ${error}, expected ${want}`);
    }
  });

  it('Haar pure states are pure, and are accepted as states by every op (common practice)', () => {
    const a = ok({ op: 'random-state', ensemble: 'haar-pure', dims: [2, 3], seed: 1 });
    assert.ok(Math.abs(purity(a.value.matrix) - 1) < 1e-12);
    assert.deepEqual(a.value.dims, [2, 3]);
    const h = ok({ op: 'entropy', rho: a.value });
    assert.ok(Math.abs(h.value) < 1e-9);
  });

  it('a draw is replayed exactly from its coordinates, and the same seed and stream give the same state (common practice)', () => {
    for (const req of [
      { op: 'random-state', ensemble: 'bures', dims: [3] },
      { op: 'random-channel', kind: 'stinespring', from: [2], to: [3], environment: 2 },
      { op: 'random-channel', kind: 'unital', from: [2], unitaries: 3 },
      { op: 'random-markov-state', a: 2, blocks: [[1, 2], [2, 1]], c: 2, rotate: true },
      { op: 'random-unitary', d: 3 },
      { op: 'random-number', from: -1, to: 2 },
    ]) {
      const drawn = ok({ ...req, seed: 5, stream: [3, 1], withCoordinates: true });
      const again = ok({ ...req, seed: 5, stream: [3, 1] });
      assert.deepEqual(again.value, drawn.value);
      const replay = ok({ ...req, coordinates: drawn.coordinates });
      assert.deepEqual(replay.value, drawn.value, req.op);
      const other = ok({ ...req, seed: 5, stream: [4, 1] });
      assert.notDeepEqual(other.value, drawn.value);
    }
  });
});

describe('random channels', () => {
  it('Stinespring channels are trace preserving and average every input to the maximally mixed output (Schur\'s lemma)', () => {
    const n = 1000;
    const sum = new Float64Array(9);
    const rho = [[1, 0], [0, 0]];
    for (let k = 0; k < n; k++) {
      const ch = ok({ op: 'random-channel', kind: 'stinespring', from: [2], to: [3], seed: 8, stream: [k] }).value;
      if (k < 5) assert.ok(ok({ op: 'channel-check', channel: ch }).value === true);
      const out = readMatrix(ok({ op: 'apply-channel', channel: ch, rho }).value, 'out');
      for (let i = 0; i < 9; i++) sum[i] += out.re[i];
    }
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      assert.ok(Math.abs(sum[i * 3 + j] / n - (i === j ? 1 / 3 : 0)) < 0.03, `entry ${i},${j}: ${sum[i * 3 + j] / n}`);
    }
  });

  it('random unital channels are channels that fix the identity (mixed-unitary; common practice)', () => {
    for (let k = 0; k < 5; k++) {
      const ch = ok({ op: 'random-channel', kind: 'unital', from: [3], unitaries: 4, seed: 9, stream: [k] }).value;
      const check = ok({ op: 'channel-check', channel: ch });
      assert.equal(check.value, true);
      const out = readMatrix(ok({ op: 'apply-channel', channel: ch, rho: [[1 / 3, 0, 0], [0, 1 / 3, 0], [0, 0, 1 / 3]] }).value, 'o');
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) assert.ok(Math.abs(out.re[i * 3 + j] - (i === j ? 1 / 3 : 0)) < 1e-12);
    }
  });
});

describe('random Markov states', () => {
  it('have I(A;C|B) = 0 and are recovered exactly by the Petz map, with or without a unitary on B (HJPW 2004, Theorem 6; Petz 1988)', () => {
    for (const [blocks, rotate] of [[[[1, 2], [2, 1]], false], [[[2, 2]], true], [[[1, 1], [1, 2], [2, 1]], true]] as const) {
      const s = ok({ op: 'random-markov-state', a: 2, blocks, c: 2, rotate, seed: 10 }).value;
      const cmi = ok({ op: 'conditional-mutual-information', rho: s, a: [0], b: [1], c: [2] });
      assert.ok(Math.abs(cmi.value) < 1e-9, `I(A;C|B) = ${cmi.value}`);
      const rec = ok({ op: 'petz-recovery', rho: s, a: [0], b: [1], c: [2] });
      assert.ok(Math.abs(rec.value - 1) < 1e-9, `F = ${rec.value}`);
    }
    // A generic Hilbert–Schmidt state of the same shape is not Markov.
    const g = ok({ op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 3, 2], seed: 10 }).value;
    assert.ok(ok({ op: 'conditional-mutual-information', rho: g, a: [0], b: [1], c: [2] }).value > 1e-3);
  });
});

describe('random-draw requests', () => {
  it('refuse a missing seed, wrong coordinates and misplaced fields with the field named (common practice)', () => {
    const cases: [Record<string, unknown>, string, string][] = [
      [{ op: 'random-state', ensemble: 'bures', dims: [2] }, 'missing-argument', 'seed'],
      [{ op: 'random-state', ensemble: 'bures', dims: [2], seed: 1, coordinates: [1] }, 'invalid-argument', 'coordinates'],
      [{ op: 'random-state', ensemble: 'bures', dims: [2], coordinates: [1, 2] }, 'dimension-mismatch', 'coordinates'],
      [{ op: 'random-state', ensemble: 'induced', dims: [2], seed: 1 }, 'missing-argument', 'ancilla'],
      [{ op: 'random-state', ensemble: 'bures', dims: [2], seed: -1 }, 'invalid-argument', 'seed'],
      [{ op: 'random-state', ensemble: 'gaussian', dims: [2], seed: 1 }, 'invalid-argument', 'ensemble'],
      [{ op: 'random-channel', kind: 'unital', from: [2], to: [2], seed: 1 }, 'invalid-argument', 'to'],
      [{ op: 'random-number', from: 1, to: 1, seed: 1 }, 'invalid-argument', 'to'],
      [{ op: 'random-number', from: 0, to: 1, coordinates: [1.5] }, 'invalid-argument', 'coordinates[0]'],
      [{ op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2048], seed: 1 }, 'too-large', 'dims'],
    ];
    for (const [req, code, path] of cases) {
      const a = handle(req) as any;
      assert.equal(a.ok, false, JSON.stringify(req));
      assert.equal(a.error.code, code, JSON.stringify(a));
      assert.equal(a.error.path, path, JSON.stringify(a));
    }
  });
});
