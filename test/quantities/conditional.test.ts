// Conditional entropies, mutual informations and conditional Rényi entropies. Sources in each it(...):
// Nielsen & Chuang (2000) §11.3 (conditional entropy, mutual information); Lieb & Ruskai,
// J. Math. Phys. 14, 1938 (1973) (strong subadditivity); Tomamichel, Berta & Hayashi, J. Math. Phys. 55,
// 082206 (2014) [TBH] (conditional Rényi entropies, the closed form of the optimised Petz one and the
// duality H̄↑_α(A|B) = −H̃↓_{1/α}(A|C) for pure ρ_ABC); Müller-Lennert, Dupuis, Szehr, Fehr & Tomamichel,
// J. Math. Phys. 54, 122203 (2013), Thm 9, and Beigi, J. Math. Phys. 54, 122202 (2013) (duality
// H̃↑_α(A|B) = −H̃↑_β(A|C) with 1/α + 1/β = 2 for pure ρ_ABC); Arimoto (1977) for the classical case.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, zeros, kron, diagonal } from '../../src/linalg/index.js';
import {
  conditionalEntropy, mutualInformation, conditionalMutualInformation, conditionalRenyiEntropy,
} from '../../src/quantities/conditional.js';
import { RhoError } from '../../src/errors.js';
import { randomDensity, rng } from '../helpers/random.js';
import { close } from './divergence-fixtures.js';

function maximallyEntangled(d: number): CMatrix {
  const m = zeros(d * d, d * d);
  for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) m.re[(i * d + i) * d * d + (j * d + j)] = 1 / d;
  return m;
}

describe('conditional entropies and mutual informations', () => {
  it('the maximally entangled state of two d-level systems has H(A|B) = −log d and I(A:B) = 2 log d (Nielsen & Chuang §11.3)', () => {
    for (const d of [2, 3, 4]) {
      const phi = maximallyEntangled(d);
      close(conditionalEntropy(phi, [d, d], [0], [1]).value, -Math.log2(d), 1e-12, `H(A|B), d=${d}`);
      close(mutualInformation(phi, [d, d], [0], [1]).value, 2 * Math.log2(d), 1e-12, `I(A:B), d=${d}`);
    }
  });

  it('a product state has I(A:B) = 0 and H(A|B) = H(A) (textbook)', () => {
    const r = rng(61);
    const a = randomDensity(2, r);
    const b = randomDensity(3, r);
    const ab = kron(a, b);
    assert.ok(Math.abs(mutualInformation(ab, [2, 3], [0], [1]).value) <= 1e-12);
    close(conditionalEntropy(ab, [2, 3], [0], [1]).value, conditionalEntropy(ab, [2, 3], [0], []).value, 1e-12, 'H(A|B) = H(A)');
  });

  it('I(A;C|B) ≥ 0 on random tripartite states for every grouping of subsystems (strong subadditivity, Lieb & Ruskai 1973)', () => {
    const r = rng(62);
    for (let k = 0; k < 6; k++) {
      const dims = [2, 2, 2, 2];
      const rho = randomDensity(16, r, 1 + (k % 4) * 3);
      for (const [a, b, c] of [[[0], [1], [2]], [[0, 3], [1], [2]], [[2], [0, 1], [3]], [[1], [], [3]], [[3], [2], [1, 0]]]) {
        const v = conditionalMutualInformation(rho, dims, a, b, c).value;
        assert.ok(v >= -1e-12, `I(${a};${c}|${b}) = ${v}`);
      }
    }
  });

  it('I(A;C|B) = 0 for ρ_AB ⊗ ρ_C, and the chain rule I(A;BC) = I(A;B) + I(A;C|B) holds (Nielsen & Chuang §11.3)', () => {
    const r = rng(63);
    const ab = randomDensity(4, r);
    const c = randomDensity(2, r);
    const rho = kron(ab, c);
    assert.ok(Math.abs(conditionalMutualInformation(rho, [2, 2, 2], [0], [1], [2]).value) <= 1e-12);
    // Chain rule: I(A;BC) = I(A;B) + I(A;C|B).
    const s = randomDensity(8, r);
    const lhs = mutualInformation(s, [2, 2, 2], [0], [1, 2]).value;
    const rhs = mutualInformation(s, [2, 2, 2], [0], [1]).value + conditionalMutualInformation(s, [2, 2, 2], [0], [1], [2]).value;
    close(lhs, rhs, 1e-12, 'chain rule');
  });

  it('overlapping groups are refused with invalid-argument (common practice, no published source)', () => {
    const rho = randomDensity(8, rng(64));
    assert.throws(() => conditionalMutualInformation(rho, [2, 2, 2], [0], [0], [2]), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument' && e.path === 'b[0]');
    assert.throws(() => conditionalEntropy(rho, [2, 2, 2], [3], [0]), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument');
  });
});

describe('conditional Rényi entropies', () => {
  it('for classical ρ_AB the optimised Petz entropy is Arimoto\'s α/(1−α) log Σ_b (Σ_a p(a,b)^α)^{1/α} (TBH 2014 Lemma 1; Arimoto 1977)', () => {
    const r = rng(65);
    const p = Array.from({ length: 6 }, () => 0.1 + r());
    const s = p.reduce((x, y) => x + y, 0);
    const q = p.map((x) => x / s); // p(a,b) with a ∈ {0,1}, b ∈ {0,1,2}, index a·3 + b
    const rho = diagonal(q);
    for (const a of [0.5, 0.8, 1.5, 3]) {
      let sum = 0;
      for (let b = 0; b < 3; b++) sum += (q[b] ** a + q[3 + b] ** a) ** (1 / a);
      const want = (a / (1 - a)) * Math.log2(sum);
      close(conditionalRenyiEntropy(rho, [2, 3], [0], [1], { family: 'petz', alpha: a, optimized: true }).value, want, 1e-12, `petz α=${a}`);
      close(conditionalRenyiEntropy(rho, [2, 3], [0], [1], { family: 'sandwiched', alpha: a, optimized: true }).value, want, 1e-9, `sandwiched α=${a}`);
    }
  });

  it('optimised ≥ non-optimised, and sandwiched ≥ Petz, for both variants (TBH 2014, Cor. 4 and §3)', () => {
    const r = rng(66);
    for (let k = 0; k < 4; k++) {
      const rho = randomDensity(6, r, 2 + k);
      for (const a of [0.6, 0.9, 1.3, 2]) {
        const o = { alpha: a };
        const pUp = conditionalRenyiEntropy(rho, [2, 3], [0], [1], { ...o, family: 'petz', optimized: true }).value;
        const pDown = conditionalRenyiEntropy(rho, [2, 3], [0], [1], { ...o, family: 'petz', optimized: false }).value;
        const sUp = conditionalRenyiEntropy(rho, [2, 3], [0], [1], { ...o, family: 'sandwiched', optimized: true }).value;
        const sDown = conditionalRenyiEntropy(rho, [2, 3], [0], [1], { ...o, family: 'sandwiched', optimized: false }).value;
        assert.ok(pUp >= pDown - 1e-12, `petz α=${a}: ${pUp} < ${pDown}`);
        assert.ok(sUp >= sDown - 1e-12, `sandwiched α=${a}: ${sUp} < ${sDown}`);
        assert.ok(sUp >= pUp - 1e-12 && sDown >= pDown - 1e-12, `sandwiched ≥ petz at α=${a}`);
      }
    }
  });

  it('all four conditional Rényi entropies tend to H(A|B) as α → 1 from both sides (TBH 2014, §3)', () => {
    const rho = randomDensity(6, rng(67), 4);
    const h = conditionalEntropy(rho, [3, 2], [0], [1]).value;
    for (const a of [1 - 1e-7, 1 + 1e-7]) {
      for (const family of ['petz', 'sandwiched'] as const) {
        for (const optimized of [false, true]) {
          const v = conditionalRenyiEntropy(rho, [3, 2], [0], [1], { family, alpha: a, optimized }).value;
          assert.ok(Math.abs(v - h) <= 1e-6, `${family} ${optimized ? '↑' : '↓'} α=${a}: ${v} vs ${h}`);
        }
      }
    }
  });

  it('duality for pure ρ_ABC: H̄↑_α(A|B) = −H̃↓_{1/α}(A|C) (TBH 2014, Prop. 8)', () => {
    const r = rng(68);
    const rho = randomDensity(12, r, 1);
    const dims = [2, 2, 3];
    for (const a of [0.7, 1.3, 1.8]) {
      const up = conditionalRenyiEntropy(rho, dims, [0], [1], { family: 'petz', alpha: a, optimized: true }).value;
      const down = conditionalRenyiEntropy(rho, dims, [0], [2], { family: 'sandwiched', alpha: 1 / a, optimized: false }).value;
      close(up, -down, 1e-11, `α=${a}`);
    }
  });

  it('duality for pure ρ_ABC: H̃↑_α(A|B) = −H̃↑_β(A|C) with 1/α + 1/β = 2, which checks the sandwiched optimisation (Müller-Lennert et al. 2013 Thm 9; Beigi 2013)', () => {
    const r = rng(69);
    const rho = randomDensity(12, r, 1);
    const dims = [2, 2, 3];
    for (const a of [0.6, 0.8, 1.5, 2, 3]) {
      const b = 1 / (2 - 1 / a);
      const x = conditionalRenyiEntropy(rho, dims, [0], [1], { family: 'sandwiched', alpha: a, optimized: true });
      const y = conditionalRenyiEntropy(rho, dims, [0], [2], { family: 'sandwiched', alpha: b, optimized: true });
      close(x.value, -y.value, 1e-9, `α=${a}, β=${b}`);
      assert.ok(typeof x.iterations === 'number' && typeof x.stoppingRule === 'string' && typeof x.gapBound === 'number');
      assert.ok((x.gapBound as number) >= 0 && (x.gapBound as number) < 1e-5, `gap bound ${x.gapBound}`);
    }
  });

  it('conditional Rényi entropy of the maximally entangled state is −log d for every α (TBH 2014; textbook)', () => {
    const phi = maximallyEntangled(3);
    for (const a of [0.5, 0.8, 2]) {
      for (const family of ['petz', 'sandwiched'] as const) {
        for (const optimized of [false, true]) {
          close(conditionalRenyiEntropy(phi, [3, 3], [0], [1], { family, alpha: a, optimized }).value, -Math.log2(3), 1e-9, `${family} ${optimized} α=${a}`);
        }
      }
    }
  });
});
