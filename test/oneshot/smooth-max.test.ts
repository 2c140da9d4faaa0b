// Smooth max-relative entropy D_max^ε(ρ‖σ) over the purified-distance ball of subnormalised states
// (Tomamichel, "Quantum Information Processing with Finite Resources", 2016): against cvxopt,
// closed forms derived from the definition, and its limit ε → 0.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { diagonal, eigvalsh, scale, sub, trace } from '../../src/linalg/index.js';
import { RhoError } from '../../src/errors.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { smoothMaxRelativeEntropy } from '../../src/oneshot/smooth-max.js';
import { maxRelativeEntropy, fidelity } from '../../src/quantities/index.js';
import { randomDensity, rng } from '../helpers/random.js';
import { assertClose, committedCases, liveCases, matrixOf, origin, type OneShotReference } from './oneshot-reference.js';

function check(ref: OneShotReference, label: string): void {
  for (const c of ref.cases) {
    const where = origin(ref, c, label);
    assert.equal(c.cvxoptStatus, 'optimal', `${where}: cvxopt status`);
    const ans = smoothMaxRelativeEntropy(matrixOf(c.rho), matrixOf(c.sigma!), c.epsilon!);
    const b = ans.certificate.bounds;
    assert.ok(ans.certificate.accuracy.relative <= 1e-5, `${where}: certified to ${ans.certificate.accuracy.relative}`);
    assert.ok(b.lower <= c.value + 1e-9 * Math.abs(c.value) + 1e-12 && c.value <= b.upper + 1e-9 * Math.abs(c.value) + 1e-12, `${where}: cvxopt's ${c.value} outside [${b.lower}, ${b.upper}]`);
    assertClose(ans.value, c.value, 1e-6, where);
  }
}

describe('smooth max-relative entropy', () => {
  it('matches cvxopt.solvers.sdp (uncompressed formulation) on the committed random instances, d = 2..4 (1e-6 relative)', () => {
    check(committedCases('smooth-max-divergence'), 'committed');
  });

  it('matches cvxopt.solvers.sdp on a fresh batch generated in this run (seed 14)', () => {
    const ref = liveCases('smooth-max-divergence', 14, 2);
    if (ref) check(ref, 'live');
  });

  it('of a state against itself is log(1 − ε²) (derived: ρ̃ ⪯ λρ gives ‖√ρ√ρ̃‖₁ ≤ √λ by operator monotonicity of the square root; ρ̃ = (1−ε²)ρ attains it)', () => {
    const r = rng(61);
    const rho = randomDensity(3, r);
    for (const eps of [0.1, 0.4]) {
      assertClose(smoothMaxRelativeEntropy(rho, rho, eps).value, Math.log2(1 - eps * eps), 1e-7, `ε=${eps}`);
    }
  });

  it('approaches D_max(ρ‖σ) as ε → 0, from below and monotonically (continuity of the smoothing; DESIGN.md limits)', () => {
    const r = rng(62);
    for (let k = 0; k < 2; k++) {
      const rho = randomDensity(2 + k, r);
      const sigma = randomDensity(2 + k, r);
      const dmax = maxRelativeEntropy(rho, sigma).value;
      let previous = -Infinity;
      for (const eps of [1e-1, 1e-2, 1e-3, 1e-4]) {
        const v = smoothMaxRelativeEntropy(rho, sigma, eps).value;
        assert.ok(v <= dmax + 1e-7, `ε=${eps}: ${v} > D_max ${dmax}`);
        assert.ok(v >= previous - 1e-7, `ε=${eps}: ${v} < value at larger ε ${previous}`);
        previous = v;
      }
      assert.ok(dmax - previous <= 1e-2, `ε=1e-4: D_max − D_max^ε = ${dmax - previous}`);
    }
  });

  it('returns a smoothed state inside the ball that fits under 2^{D_max^ε} σ, with strong duality (SDP duality, common practice)', () => {
    const r = rng(63);
    for (let k = 0; k < 3; k++) {
      const d = 2 + k;
      const rho = randomDensity(d, r);
      const sigma = scale(randomDensity(d, r), 0.5 + r());
      const eps = 0.05 + 0.3 * r();
      const ans = smoothMaxRelativeEntropy(rho, sigma, eps);
      const c = ans.certificate;
      assert.ok(c.accuracy.relative <= 1e-5, JSON.stringify(c.accuracy));
      assert.ok(trace(ans.smoothed).re <= 1 + 1e-7 && eigvalsh(ans.smoothed)[0] >= -1e-7, 'ρ̃ is subnormalised');
      assert.ok(fidelity(rho, ans.smoothed).root >= Math.sqrt(1 - eps * eps) - 1e-6, 'ρ̃ lies in the purified-distance ball');
      const slack = eigvalsh(sub(scale(sigma, 2 ** ans.value), ans.smoothed));
      assert.ok(slack[0] >= -1e-6 * (1 + 2 ** ans.value), `2^D σ − ρ̃ has eigenvalue ${slack[0]}`);
    }
  });

  it('is +∞ exactly when Tr Π_σ ρ < 1 − ε², else given by the best state on supp σ (derived: ρ = I/2, σ = |0⟩⟨0|, ε = 0.8 gives log 0.72)', () => {
    const rho = diagonal([0.5, 0.5]);
    const sigma = diagonal([1, 0]);
    const inf = smoothMaxRelativeEntropy(rho, sigma, 0.5);
    assert.equal(inf.value, Infinity);
    assert.match(inf.reason!, /supp σ/);
    // ρ̃ = p|0⟩⟨0| has ‖√ρ√ρ̃‖₁ = √(p/2) ≥ √(1 − 0.64) = 0.6 iff p ≥ 0.72, and D_max(ρ̃‖σ) = log p.
    const fin = smoothMaxRelativeEntropy(rho, sigma, 0.8);
    assertClose(fin.value, Math.log2(0.72), 1e-6, 'ε = 0.8');
  });

  it('brackets log(1 − ε²) for ρ = σ at both ends of ε, ε ∈ {1e-9, 1e-6, 1e-3, 0.999, 1 − 1e-6, 1 − 1e-9} (closed form derived above; 1 − ε² as (1 − ε)(1 + ε))', () => {
    const r = rng(64);
    for (const d of [2, 4]) {
      const rho = randomDensity(d, r);
      for (const eps of [1e-9, 1e-6, 1e-3, 0.999, 1 - 1e-6, 1 - 1e-9]) {
        const exact = Math.log2((1 - eps) * (1 + eps));
        const ans = smoothMaxRelativeEntropy(rho, rho, eps);
        const b = ans.certificate.bounds;
        assert.ok(b.lower <= exact && exact <= b.upper, `d=${d} ε=${eps}: exact ${exact} outside [${b.lower}, ${b.upper}]`);
        assert.ok(Math.abs(ans.value - exact) <= 1e-6 * Math.abs(exact) + 1e-9, `d=${d} ε=${eps}: ${ans.value} vs ${exact}`);
      }
    }
  });

  it('returns ρ̃ inside the ball to rounding even for ε = 1e-6 (‖√ρ√ρ̃‖₁ ≥ √(1 − ε²) − 1e-14), and its λ fits: λσ − ρ̃ ⪰ 0 (the definition)', () => {
    const r = rng(65);
    for (let k = 0; k < 3; k++) {
      const rho = randomDensity(3, r);
      const sigma = randomDensity(3, r);
      for (const eps of [1e-6, 1e-3, 1 - 1e-6]) {
        const ans = smoothMaxRelativeEntropy(rho, sigma, eps);
        assert.ok(fidelity(rho, ans.smoothed).root >= Math.sqrt((1 - eps) * (1 + eps)) - 1e-14, `ε=${eps}: root fidelity ${fidelity(rho, ans.smoothed).root}`);
        const slack = eigvalsh(sub(scale(sigma, ans.lambda), ans.smoothed));
        assert.ok(slack[0] >= -1e-14 * ans.lambda, `ε=${eps}: λσ − ρ̃ has eigenvalue ${slack[0]}`);
        assert.ok(Math.log2(ans.lambda) >= ans.value - 1e-12, 'the value does not exceed what ρ̃ gives');
      }
    }
  });

  it('at the degenerate boundary Tr Π_σ ρ = 1 − ε² takes the single feasible state: ρ = I/2, σ = |0⟩⟨0|, ε = 1/√2 gives 0 (derived: ρ̃ = |0⟩⟨0|)', () => {
    const ans = smoothMaxRelativeEntropy(diagonal([0.5, 0.5]), diagonal([1, 0]), Math.SQRT1_2);
    const b = ans.certificate.bounds;
    assert.ok(b.lower <= 0 && 0 <= b.upper && b.upper - b.lower <= 1e-9, JSON.stringify(b));
    assert.ok(Math.abs(ans.value) <= 1e-9);
  });

  it('refuses ε outside (0, 1)', () => {
    const rho = diagonal([0.5, 0.5]);
    for (const eps of [0, 1, 2]) {
      assert.throws(() => smoothMaxRelativeEntropy(rho, rho, eps), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument' && e.path === 'epsilon');
    }
  });
});

describe('smooth-max-divergence op (through the protocol)', () => {
  it('gives log(1 − ε²) for ρ = σ with the smoothed state and the certificate (derived above)', () => {
    const rho = [[0.7, 0.2], [0.2, 0.3]];
    const a = handle({ op: 'smooth-max-divergence', rho, sigma: rho, epsilon: 0.3 });
    assert.ok(a.ok, JSON.stringify(a));
    assert.ok(Math.abs((a.value as number) - Math.log2(1 - 0.09)) <= 1e-7);
    assert.equal((a.certificate as Record<string, unknown>).status, 'optimal');
    assert.ok(Array.isArray(a.smoothed));
  });

  it('answers "Infinity" with a reason when no state of the ball fits under σ, and refuses ε = 1', () => {
    const inf = handle({ op: 'smooth-max-divergence', rho: [[0.5, 0], [0, 0.5]], sigma: [[1, 0], [0, 0]], epsilon: 0.5 });
    assert.ok(inf.ok && inf.value === 'Infinity' && typeof inf.reason === 'string', JSON.stringify(inf));
    assert.equal((inf.certificate as Record<string, unknown>).primalObjective, 'Infinity');
    const bad = handle({ op: 'smooth-max-divergence', rho: [[1, 0], [0, 0]], sigma: [[1, 0], [0, 0]], epsilon: 1 });
    assert.ok(!bad.ok && bad.error.path === 'epsilon', JSON.stringify(bad));
  });
});
