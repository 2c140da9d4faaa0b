// The measured relative entropy D_M(ρ‖σ) = sup over measurements of the classical relative entropy.
// Sources: Berta, Fawzi & Tomamichel, Lett. Math. Phys. 107, 2239 (2017) [BFT]: D_M ≤ D (Umegaki), the
// variational formula, and optimality of projective measurements; for qubits a direct search over
// projective measurements (Bloch-sphere grid) is the reference (common practice, no published source).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, mul, adjoint } from '../../src/linalg/index.js';
import { divergence } from '../../src/quantities/divergences.js';
import { measuredRelativeEntropy } from '../../src/quantities/measured.js';
import { randomDensity, rng } from '../helpers/random.js';

/** ⟨v|M|v⟩ for a unit vector v = (c, e^{iφ} s). */
function expectation(M: CMatrix, c: number, s: number, ph: number): number {
  const vr = [c, s * Math.cos(ph)];
  const vi = [0, s * Math.sin(ph)];
  let t = 0;
  for (let a = 0; a < 2; a++) {
    for (let b = 0; b < 2; b++) {
      const mr = M.re[a * 2 + b];
      const mi = M.im[a * 2 + b];
      // conj(v_a) M_ab v_b
      const xr = vr[a] * mr + vi[a] * mi;
      const xi = vr[a] * mi - vi[a] * mr;
      t += xr * vr[b] - xi * vi[b];
    }
  }
  return t;
}

function kl(p: number[], q: number[]): number {
  return p.reduce((s, x, i) => (x > 0 ? s + x * Math.log2(x / q[i]) : s), 0);
}

describe('measured relative entropy', () => {
  it('D_M ≤ D (Umegaki) on random pairs, and the returned measurement attains the returned value (BFT 2017, Prop. 5)', () => {
    const r = rng(91);
    for (let k = 0; k < 6; k++) {
      const n = 2 + (k % 3);
      const rho = randomDensity(n, r);
      const sigma = randomDensity(n, r);
      const m = measuredRelativeEntropy(rho, sigma);
      assert.ok(m.value <= divergence('umegaki', rho, sigma).value + 1e-12, `n=${n}`);
      assert.ok(Math.abs(kl(m.p, m.q) - m.value) <= 1e-12, 'value is the classical relative entropy of the measurement');
      const B = m.measurement;
      const gram = mul(adjoint(B), B);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        assert.ok(Math.abs(gram.re[i * n + j] - (i === j ? 1 : 0)) < 1e-12 && Math.abs(gram.im[i * n + j]) < 1e-12, 'orthonormal basis');
      }
    }
  });

  it('for qubits it matches a direct search over projective measurements to the grid resolution and is never below it (BFT 2017)', () => {
    const r = rng(92);
    for (let k = 0; k < 4; k++) {
      const rho = randomDensity(2, r, k % 2 ? 1 : 2);
      const sigma = randomDensity(2, r);
      let best = -Infinity;
      const N = 300;
      for (let i = 0; i <= N; i++) {
        const th = (Math.PI * i) / N;
        for (let j = 0; j < 2 * N; j++) {
          const ph = (Math.PI * j) / N;
          const p0 = expectation(rho, Math.cos(th / 2), Math.sin(th / 2), ph);
          const q0 = expectation(sigma, Math.cos(th / 2), Math.sin(th / 2), ph);
          best = Math.max(best, kl([p0, 1 - p0], [q0, 1 - q0]));
        }
      }
      const m = measuredRelativeEntropy(rho, sigma);
      assert.ok(m.value >= best - 1e-12, `below the grid search: ${m.value} < ${best}`);
      assert.ok(m.value - best <= 1e-3, `far above the grid search: ${m.value} vs ${best}`);
    }
  });

  it('measured Rényi: for qubits it matches a direct search over projective measurements, and D^M_α ≤ D̃_α on random pairs (BFT 2017; data processing of the sandwiched divergence, MDSFT 2013)', () => {
    const r = rng(95);
    const renyi = (p: number[], q: number[], a: number) =>
      Math.log2(p.reduce((s, x, i) => (x > 0 && q[i] > 0 ? s + x ** a * q[i] ** (1 - a) : s), 0)) / (a - 1);
    for (let k = 0; k < 4; k++) {
      const rho = randomDensity(2, r);
      const sigma = randomDensity(2, r);
      for (const a of [0.5, 0.75, 2, 4]) {
        let best = -Infinity;
        const N = 200;
        for (let i = 0; i <= N; i++) {
          const th = (Math.PI * i) / N;
          for (let j = 0; j < 2 * N; j++) {
            const ph = (Math.PI * j) / N;
            const p0 = expectation(rho, Math.cos(th / 2), Math.sin(th / 2), ph);
            const q0 = expectation(sigma, Math.cos(th / 2), Math.sin(th / 2), ph);
            best = Math.max(best, renyi([p0, 1 - p0], [q0, 1 - q0], a));
          }
        }
        const m = divergence('measured', rho, sigma, { alpha: a });
        assert.ok(m.value >= best - 1e-12, `α=${a}: below the grid search: ${m.value} < ${best}`);
        assert.ok(m.value - best <= 1e-3, `α=${a}: far above the grid search: ${m.value} vs ${best}`);
        assert.ok(Math.abs(renyi(m.p as number[], m.q as number[], a) - m.value) <= 1e-12, 'the value is that of the returned measurement');
      }
    }
    for (let k = 0; k < 4; k++) {
      const n = 3 + (k % 2);
      const rho = randomDensity(n, r);
      const sigma = randomDensity(n, r);
      for (const a of [0.6, 2.5]) {
        const m = divergence('measured', rho, sigma, { alpha: a }).value;
        assert.ok(m <= divergence('sandwiched', rho, sigma, { alpha: a }).value + 1e-12, `n=${n} α=${a}: D^M ≤ D̃`);
      }
    }
  });

  it('measured Rényi refuses α < 1/2 with invalid-argument naming alpha (outside the range of the variational formula, BFT 2017)', () => {
    const rho = randomDensity(2, rng(96));
    assert.throws(() => divergence('measured', rho, rho, { alpha: 0.3 }), (e: { code?: string; path?: string }) => e.code === 'invalid-argument' && e.path === 'alpha');
  });

  it('is +∞ with the measurement {Π_σ, 1 − Π_σ} when supp ρ ⊄ supp σ (BFT 2017, Def. 2)', () => {
    const rho = randomDensity(3, rng(93));
    const sigma = randomDensity(3, rng(94), 2);
    const m = measuredRelativeEntropy(rho, sigma);
    assert.equal(m.value, Infinity);
    assert.ok(typeof m.reason === 'string');
  });
});
