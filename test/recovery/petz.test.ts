// The Petz recovery map and its rotated versions: perfect recovery on quantum Markov chains
// (Hayden, Jozsa, Petz & Winter 2004), recovery of the reference state, the channel property, the
// recovered state against numpy/scipy, and the petz-recovery op through the plain-data door.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, adjoint, eigvalsh, identity, kron, mul, sub, zeros, marginal, reorderSubsystems,
} from '../../src/linalg/index.js';
import { petzRecovery, petzRecoveryMap } from '../../src/recovery/petz.js';
import { applyKraus, krausSum } from '../../src/quantum/channels.js';
import '../../src/ops/recovery-ops.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, rng } from '../helpers/random.js';
import { python, numpyVersions, toData, fromData } from '../quantum/numpy-reference.js';
import { cmi, markovChain } from './fixtures.js';

function maxAbs(m: CMatrix): number {
  let s = 0;
  for (let k = 0; k < m.re.length; k++) s = Math.max(s, Math.hypot(m.re[k], m.im[k]));
  return s;
}

const versions = numpyVersions();

describe('Petz recovery map R_{B→BC}(X) = ρ_BC^{1/2}(ρ_B^{−1/2} X ρ_B^{−1/2} ⊗ 1_C)ρ_BC^{1/2}', () => {
  it('recovers ρ_ABC = ρ_A ⊗ ρ_BC perfectly, F = 1 (a quantum Markov chain; Hayden, Jozsa, Petz & Winter 2004, Thm 6)', () => {
    const r = rng(21);
    const rho = kron(randomDensity(2, r), randomDensity(6, r));
    const p = petzRecovery(rho, [2, 3, 2], [0], [1], [2]);
    assert.ok(Math.abs(p.value - 1) <= 1e-9, `F = ${p.value}`);
  });

  it('recovers Markov states ⊕_j q_j ρ_{A b_j^L} ⊗ ρ_{b_j^R C} perfectly, F = 1, where I(A;C|B) = 0 (Hayden, Jozsa, Petz & Winter 2004, Thm 6)', () => {
    const r = rng(22);
    for (const blocks of [[[1, 2], [2, 1]], [[2, 2], [1, 1], [1, 2]]] as [number, number][][]) {
      const { rho, dB } = markovChain(2, 2, blocks, r);
      const dims = [2, dB, 2];
      assert.ok(Math.abs(cmi(rho, dims, [0], [1], [2])) <= 1e-9, 'the construction has I(A;C|B) = 0 (strong subadditivity saturated)');
      const p = petzRecovery(rho, dims, [0], [1], [2]);
      assert.ok(Math.abs(p.value - 1) <= 1e-9, `blocks ${JSON.stringify(blocks)}: F = ${p.value}`);
    }
  });

  it('recovers Markov states perfectly with every rotated map R^t too (Petz\'s equality condition; Junge, Renner, Sutter, Wilde & Winter 2018, Sec. 1; recalled)', () => {
    const r = rng(23);
    const { rho, dB } = markovChain(2, 2, [[1, 2], [2, 1]], r);
    for (const t of [-3, -0.7, 0.4, 2.5]) {
      const p = petzRecovery(rho, [2, dB, 2], [0], [1], [2], { t });
      assert.ok(Math.abs(p.value - 1) <= 1e-9, `t = ${t}: F = ${p.value}`);
    }
  });

  it('maps ρ_B to ρ_BC: the Petz map recovers its own reference state, R(Tr_C σ) = σ (Petz 1988; definition)', () => {
    const r = rng(24);
    const rhoBC = randomDensity(6, r);
    for (const t of [0, 1.3]) {
      const { channel } = petzRecoveryMap(rhoBC, 3, 2, { t });
      const rhoB = marginal(rhoBC, [3, 2], [0]);
      assert.ok(maxAbs(sub(applyKraus(channel, rhoB), rhoBC)) <= 1e-12, `t = ${t}`);
    }
  });

  it('is a channel: Σ_k K_k* K_k = 1_B, also for rank-deficient ρ_B once completed on the kernel (definition of trace preservation)', () => {
    const r = rng(25);
    // ρ_BC supported on a subspace whose B-marginal has rank 2 < d_B = 3.
    const v = zeros(6, 2);
    for (let k = 0; k < 4; k++) {
      v.re[k * 2 + (k % 2)] = 1 + r();
      v.im[k * 2 + ((k + 1) % 2)] = r() - 0.5;
    }
    let rhoBC = mul(mul(v, randomDensity(2, r)), adjoint(v));
    const tr = eigvalsh(rhoBC).reduce((s, x) => s + x, 0);
    rhoBC = { ...rhoBC, re: rhoBC.re.map((x) => x / tr), im: rhoBC.im.map((x) => x / tr) };
    for (const t of [0, -0.9]) {
      const m = petzRecoveryMap(rhoBC, 3, 2, { t });
      assert.equal(m.diagnostics.rankB, 2);
      assert.equal(m.diagnostics.kernelDimension, 1);
      assert.ok(maxAbs(sub(krausSum(m.channel, 'KstarK'), identity(3))) <= 1e-10, `t = ${t}`);
    }
  });

  it(`gives the recovered state ρ_BC^{1/2}(ρ_B^{−1/2} ρ_AB ρ_B^{−1/2} ⊗ 1)ρ_BC^{1/2} computed by numpy ${versions.numpy} / scipy ${versions.scipy} (scipy.linalg.fractional_matrix_power), with the subsystems permuted`, () => {
    const r = rng(26);
    const rho = randomDensity(12, r);
    // dims [3, 2, 2] with A = [2], B = [0], C = [1]: the engine has to reorder.
    const p = petzRecovery(rho, [3, 2, 2], [2], [0], [1]);
    const ref = python(
      [
        'rho = M(data["rho"]).reshape(3, 2, 2, 3, 2, 2)',
        '# to the order A, B, C = subsystems 2, 0, 1',
        'abc = rho.transpose(2, 0, 1, 5, 3, 4).reshape(12, 12)',
        'r6 = abc.reshape(2, 3, 2, 2, 3, 2)',
        'ab = np.einsum("abcdec->abde", r6).reshape(6, 6)',
        'bc = np.einsum("abcade->bcde", r6).reshape(6, 6)',
        'b = np.einsum("bcdc->bd", bc.reshape(3, 2, 3, 2))',
        'sbc = scipy.linalg.sqrtm(bc)',
        'ib = scipy.linalg.fractional_matrix_power(b, -0.5)',
        'inner = np.kron(np.kron(np.eye(2), ib) @ ab @ np.kron(np.eye(2), ib), np.eye(2))',
        'outer = np.kron(np.eye(2), sbc)',
        'rec = outer @ inner @ outer',
        'result = {"rec": W(rec), "abc": W(abc)}',
      ].join('\n'),
      { rho: toData(rho) },
    );
    assert.ok(maxAbs(sub(p.parts.rho, fromData(ref.abc))) <= 1e-14, 'ρ_ABC in the A, B, C order');
    assert.ok(maxAbs(sub(p.recovered, fromData(ref.rec))) <= 1e-9, `max deviation ${maxAbs(sub(p.recovered, fromData(ref.rec)))}`);
  });

  it('recovers imperfectly when A and C are correlated beyond B: F < 1 for a random state (I(A;C|B) > 0; common practice, no published source)', () => {
    const r = rng(27);
    const rho = randomDensity(8, r);
    const p = petzRecovery(rho, [2, 2, 2], [0], [1], [2]);
    assert.ok(cmi(rho, [2, 2, 2], [0], [1], [2]) > 1e-3);
    assert.ok(p.value < 1 - 1e-6 && p.value > 0, `F = ${p.value}`);
  });
});

describe('petz-recovery op (PROTOCOL.md fields: rho with dims, a, b, c; value, recovered)', () => {
  it('answers F = 1 with labels for ρ_A ⊗ ρ_BC given in the order C, A, B, and returns the recovered state in that order (Hayden, Jozsa, Petz & Winter 2004)', () => {
    const r = rng(28);
    const rhoA = randomDensity(2, r);
    const rhoBC = randomDensity(4, r);
    const abc = kron(rhoA, rhoBC);
    const cab = reorderSubsystems(abc, [2, 2, 2], [2, 0, 1]);
    const plain = (m: CMatrix) => ({ re: Array.from({ length: m.rows }, (_, i) => Array.from(m.re.slice(i * m.cols, (i + 1) * m.cols))), im: Array.from({ length: m.rows }, (_, i) => Array.from(m.im.slice(i * m.cols, (i + 1) * m.cols))) });
    const a = handle({
      op: 'petz-recovery',
      rho: { matrix: plain(cab), dims: [2, 2, 2], labels: ['C', 'A', 'B'] },
      a: ['A'], b: ['B'], c: ['C'],
    }) as Record<string, any>;
    assert.equal(a.ok, true, JSON.stringify(a.error));
    assert.ok(Math.abs(a.value - 1) <= 1e-9);
    assert.ok(Math.abs(a.root - 1) <= 1e-9);
    assert.deepEqual(a.recovered.dims, [2, 2, 2]);
    assert.deepEqual(a.recovered.labels, ['C', 'A', 'B']);
    const rec = a.recovered.matrix;
    const m = Array.isArray(rec) ? { re: rec, im: rec.map((row: number[]) => row.map(() => 0)) } : rec;
    let dev = 0;
    for (let i = 0; i < 8; i++) for (let j = 0; j < 8; j++) {
      dev = Math.max(dev, Math.hypot(m.re[i][j] - cab.re[i * 8 + j], m.im[i][j] - cab.im[i * 8 + j]));
    }
    assert.ok(dev <= 1e-10, `recovered differs from ρ by ${dev}`);
    assert.equal(a.map.kraus.length >= 2, true);
  });

  it('accepts the rotation parameter t and refuses overlapping groups, naming the field', () => {
    const rho = { matrix: [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]], dims: [2, 2] };
    const ok = handle({ op: 'petz-recovery', rho, a: [0], b: [], c: [1], t: 0.5 }) as Record<string, any>;
    assert.equal(ok.ok, true, JSON.stringify(ok.error));
    assert.ok(Math.abs(ok.value - 1) <= 1e-12, 'a product state is recovered from nothing (ρ_A ⊗ ρ_C)');
    const bad = handle({ op: 'petz-recovery', rho, a: [0], b: [0], c: [1] }) as Record<string, any>;
    assert.equal(bad.ok, false);
    assert.equal(bad.error.code, 'invalid-argument');
    assert.equal(bad.error.path, 'b[0]');
  });
});


