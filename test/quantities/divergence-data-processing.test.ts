// Data processing D(N(ρ)‖N(σ)) ≤ D(ρ‖σ) under random channels N(X) = Σ K X K* (Kraus operators drawn
// at random and made trace preserving in the test; divergence-fixtures.ts). Sources: Lindblad (1975) and
// Uhlmann (1977) for Umegaki; Petz (1986) for Petz–Rényi with α ∈ [0, 2]; Frank & Lieb (2013) and
// Beigi (2013) for sandwiched with α ≥ 1/2; Matsumoto (2018) for geometric with α ∈ (0, 2];
// H. Zhang, Adv. Math. 365, 107053 (2020), Theorem 1.2, for the α-z region
// {0<α<1, z ≥ max(α,1−α)} ∪ {α>1, max(α/2, α−1) ≤ z ≤ α}; Berta, Fawzi & Tomamichel (2017) for measured.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { divergence, alphaZDataProcessing } from '../../src/quantities/divergences.js';
import { randomDensity, rng } from '../helpers/random.js';
import { randomChannel } from './divergence-fixtures.js';

function trials(seed: number, count: number) {
  const r = rng(seed);
  return Array.from({ length: count }, (_, k) => {
    const n = 2 + (k % 3);
    const m = 2 + ((k + 1) % 2);
    return { r, rho: randomDensity(n, r, k % 4 === 3 ? 1 : n), sigma: randomDensity(n, r), N: randomChannel(n, m, 1 + (k % 3), r) };
  });
}

describe('data processing under random channels', () => {
  it('holds for Umegaki, Petz (α ≤ 2), sandwiched (α ≥ 1/2), geometric (α ≤ 2), max, min and measured', () => {
    for (const { rho, sigma, N } of trials(71, 12)) {
      const r1 = N(rho);
      const s1 = N(sigma);
      const cases: [string, number?][] = [
        ['umegaki'], ['max'], ['min'], ['petz', 0.4], ['petz', 1.8], ['sandwiched', 0.5], ['sandwiched', 3], ['sandwiched', Infinity],
        ['geometric', 0.5], ['geometric', 1.5], ['geometric', 2],
      ];
      for (const [fam, alpha] of cases) {
        const before = divergence(fam, rho, sigma, { alpha }).value;
        const after = divergence(fam, r1, s1, { alpha }).value;
        assert.ok(after <= before + 1e-9, `${fam} α=${alpha}: ${after} > ${before}`);
      }
    }
    for (const { rho, sigma, N } of trials(72, 3)) {
      const before = divergence('measured', rho, sigma).value;
      const after = divergence('measured', N(rho), N(sigma)).value;
      assert.ok(after <= before + 1e-7, `measured: ${after} > ${before}`);
    }
  });

  it('holds for α-z at random (α, z) inside Zhang\'s region (Zhang 2020, Thm 1.2)', () => {
    const r = rng(73);
    for (const { rho, sigma, N } of trials(74, 40)) {
      let alpha: number;
      let z: number;
      if (r() < 0.5) {
        alpha = 0.05 + 0.9 * r();
        z = Math.max(alpha, 1 - alpha) + 2 * r();
      } else {
        alpha = 1.05 + 3 * r();
        const lo = Math.max(alpha / 2, alpha - 1);
        z = lo + (alpha - lo) * r();
      }
      assert.ok(alphaZDataProcessing(alpha, z));
      const before = divergence('alpha-z', rho, sigma, { alpha, z }).value;
      const after = divergence('alpha-z', N(rho), N(sigma), { alpha, z }).value;
      assert.ok(after <= before + 1e-9, `α=${alpha}, z=${z}: ${after} > ${before}`);
    }
  });

  it('fails outside Zhang\'s region: a seeded search finds violations at (α, z) = (3, 1) and (0.3, 0.3)', () => {
    for (const [alpha, z] of [[3, 1], [0.3, 0.3]]) {
      assert.equal(alphaZDataProcessing(alpha, z), false);
      let worst = -Infinity;
      let witness = '';
      const r = rng(101);
      for (let k = 0; k < 300; k++) {
        const n = 2 + (k % 2);
        const rho = randomDensity(n, r);
        const sigma = randomDensity(n, r);
        const N = randomChannel(n, 2, 1 + (k % 3), r);
        const before = divergence('alpha-z', rho, sigma, { alpha, z }).value;
        const after = divergence('alpha-z', N(rho), N(sigma), { alpha, z }).value;
        if (after - before > worst) {
          worst = after - before;
          witness = `trial ${k} (${rho.rows}→${N(rho).rows} dimensions): D before ${before}, after ${after}`;
        }
      }
      console.log(`α=${alpha}, z=${z}: largest increase ${worst} bits at ${witness}`);
      assert.ok(worst > 1e-3, `no violation found at α=${alpha}, z=${z} (largest increase ${worst})`);
    }
  });
});
