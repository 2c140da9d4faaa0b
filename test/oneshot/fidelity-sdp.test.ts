// Fidelity by Watrous's SDP against the closed form ‖√ρ√σ‖₁² (src/quantities/fidelity.ts, itself
// checked against numpy/scipy in test/quantities), on full-rank and rank-deficient states, and the
// fidelity-sdp op.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { hermitianPart, eigvalsh, zeros, toRows, diagonal } from '../../src/linalg/index.js';
import { fidelity } from '../../src/quantities/fidelity.js';
import { fidelitySdp } from '../../src/oneshot/fidelity-sdp.js';
import '../../src/ops/guessing-ops.js';
import '../../src/ops/distance-ops.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, rng } from '../helpers/random.js';

describe('fidelity as an SDP: √F = max Re Tr X s.t. [[ρ, X], [X*, σ]] ⪰ 0 (Watrous 2013; The Theory of Quantum Information, Thm 3.17)', () => {
  it('equals the closed form F = ‖√ρ√σ‖₁² for random states of dimension 2–5, full rank and rank-deficient (Uhlmann 1976; Watrous Thm 3.17)', () => {
    const r = rng(71);
    for (const [d, ra, rb] of [[2, 2, 2], [3, 1, 3], [4, 2, 3], [4, 4, 4], [5, 1, 1], [5, 3, 2]]) {
      const rho = randomDensity(d, r, ra);
      const sigma = randomDensity(d, r, rb);
      const s = fidelitySdp(rho, sigma);
      const c = fidelity(rho, sigma);
      assert.equal(s.certificate.status, 'optimal');
      assert.ok(Math.abs(s.value - c.value) <= 1e-7, `d=${d} ranks ${ra},${rb}: SDP ${s.value}, closed form ${c.value}`);
      assert.equal(s.rankRho, ra);
      assert.equal(s.rankSigma, rb);
    }
  });

  it('returns a feasible X: the block matrix [[ρ, X], [X*, σ]] is positive semidefinite and Re Tr X = √F (definition)', () => {
    const r = rng(72);
    const rho = randomDensity(3, r);
    const sigma = randomDensity(3, r, 2);
    const s = fidelitySdp(rho, sigma);
    const n = 3;
    const big = zeros(2 * n, 2 * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const put = (row: number, col: number, re: number, im: number) => {
        big.re[row * 2 * n + col] = re;
        big.im[row * 2 * n + col] = im;
      };
      put(i, j, rho.re[i * n + j], rho.im[i * n + j]);
      put(n + i, n + j, sigma.re[i * n + j], sigma.im[i * n + j]);
      put(i, n + j, s.offDiagonal.re[i * n + j], s.offDiagonal.im[i * n + j]);
      put(n + j, i, s.offDiagonal.re[i * n + j], -s.offDiagonal.im[i * n + j]);
    }
    assert.ok(eigvalsh(hermitianPart(big))[0] >= -1e-14, 'the returned X is feasible to rounding (it is the shrunk point)');
    let tr = 0;
    for (let i = 0; i < n; i++) tr += s.offDiagonal.re[i * n + i];
    // Re Tr X is the certified lower bound of √F: within the certified accuracy of the value.
    const b = s.certificate.bounds;
    assert.ok(tr >= Math.sqrt(b.lower) - 1e-15 && tr <= Math.sqrt(b.upper) + 1e-15, `Re Tr X = ${tr}, bracket of √F [${Math.sqrt(b.lower)}, ${Math.sqrt(b.upper)}]`);
    assert.ok(Math.abs(tr - s.root) <= Math.sqrt(b.upper) - Math.sqrt(b.lower) + 1e-15);
  });

  it('of commuting nearly orthogonal states is the Bhattacharyya coefficient squared, (Σ √(p_i q_i))², bracketed (Nielsen & Chuang §9.2.2): diag(1 − 2e-8, 1e-8, 1e-8) and diag(1e-8, 1e-8, 1 − 2e-8)', () => {
    const rho = diagonal([1 - 2e-8, 1e-8, 1e-8]);
    const sigma = diagonal([1e-8, 1e-8, 1 - 2e-8]);
    const root = 2 * Math.sqrt((1 - 2e-8) * 1e-8) + 1e-8;
    const exact = root * root;
    const s = fidelitySdp(rho, sigma);
    const b = s.certificate.bounds;
    assert.ok(b.lower <= exact && exact <= b.upper, `exact ${exact} outside [${b.lower}, ${b.upper}]`);
    assert.ok(Math.abs(s.value - exact) <= 1e-6 * exact, `${s.value} vs ${exact}`);
    const X = s.offDiagonal;
    // |X_ij|² ≤ ρ_ii σ_jj for a positive semidefinite block (2×2 minors).
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      const x2 = X.re[i * 3 + j] ** 2 + X.im[i * 3 + j] ** 2;
      assert.ok(x2 <= rho.re[i * 4] * sigma.re[j * 4] * (1 + 1e-12), `X_${i}${j} exceeds √(ρ_ii σ_jj)`);
    }
  });

  it('is 0 for states with orthogonal supports (Nielsen & Chuang §9.2.2)', () => {
    const s = fidelitySdp(
      { rows: 2, cols: 2, re: new Float64Array([1, 0, 0, 0]), im: new Float64Array(4) },
      { rows: 2, cols: 2, re: new Float64Array([0, 0, 0, 1]), im: new Float64Array(4) },
    );
    assert.ok(Math.abs(s.value) <= 1e-9);
  });
});

describe('fidelity-sdp op', () => {
  it('agrees with the fidelity op (closed form) and carries the certificate', () => {
    const r = rng(73);
    const rho = toRows(randomDensity(3, r));
    const sigma = toRows(randomDensity(3, r));
    const a = handle({ op: 'fidelity-sdp', rho, sigma }) as Record<string, any>;
    const b = handle({ op: 'fidelity', rho, sigma }) as Record<string, any>;
    assert.equal(a.ok, true, JSON.stringify(a.error));
    assert.ok(Math.abs(a.value - b.value) <= 1e-7);
    assert.ok(Math.abs(a.root - b.root) <= 1e-7);
    assert.equal(a.certificate.status, 'optimal');
  });
});
