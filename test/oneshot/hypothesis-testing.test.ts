// Hypothesis-testing relative entropy D_H^ε(ρ‖σ) = −log min{Tr σΛ : 0 ≤ Λ ≤ I, Tr ρΛ ≥ 1−ε}
// (Wang & Renner, PRL 108, 200501 (2012), un-normalised convention): against cvxopt, the
// Neyman–Pearson closed form, and textbook properties.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  diagonal, eigvalsh, scale, traceOfProductRe,
} from '../../src/linalg/index.js';
import { RhoError } from '../../src/errors.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { hypothesisTestingDivergence, neymanPearson } from '../../src/oneshot/hypothesis-testing.js';
import { umegakiRelativeEntropy, minRelativeEntropy } from '../../src/quantities/index.js';
import { applyKraus, depolarizing } from '../../src/quantum/index.js';
import { eigenbasisUnitary, inBasis, randomDensity, randomProbabilities, rng } from '../helpers/random.js';
import { assertClose, committedCases, liveCases, matrixOf, origin, type OneShotReference } from './oneshot-reference.js';

function binaryEntropy(e: number): number {
  return -e * Math.log2(e) - (1 - e) * Math.log2(1 - e);
}

function checkAgainst(ref: OneShotReference, label: string): void {
  for (const c of ref.cases) {
    const where = origin(ref, c, label);
    assert.equal(c.cvxoptStatus, 'optimal', `${where}: cvxopt status`);
    const ans = hypothesisTestingDivergence(matrixOf(c.rho), matrixOf(c.sigma!), c.epsilon!, { method: 'sdp' });
    assert.equal(ans.certificate.status, 'optimal', `${where}: our status`);
    assert.ok(ans.certificate.relativeGap <= 1e-7, `${where}: duality gap ${ans.certificate.relativeGap}`);
    assertClose(ans.value, c.value, 1e-6, where);
    assertClose(ans.beta, c.optimum, 1e-6, `${where} (β)`);
  }
}

describe('hypothesis-testing relative entropy', () => {
  it('matches cvxopt.solvers.sdp on the committed random instances, d = 2..4 (values to 1e-6 relative)', () => {
    checkAgainst(committedCases('hypothesis-testing'), 'committed');
  });

  it('matches cvxopt.solvers.sdp on a fresh batch generated in this run (seed 11)', () => {
    const ref = liveCases('hypothesis-testing', 11, 3);
    if (ref) checkAgainst(ref, 'live');
  });

  it('of commuting states equals the Neyman–Pearson value, by the SDP and by the closed form (Neyman & Pearson 1933)', () => {
    const r = rng(41);
    for (let d = 2; d <= 4; d++) {
      for (const eps of [0.05, 0.3, 0.7]) {
        const u = eigenbasisUnitary(d, r);
        const p = randomProbabilities(d, r);
        const q = randomProbabilities(d, r);
        const rho = inBasis(u, p);
        const sigma = inBasis(u, q);
        const classical = neymanPearson(p, q, eps);
        const closed = hypothesisTestingDivergence(rho, sigma, eps);
        const sdp = hypothesisTestingDivergence(rho, sigma, eps, { method: 'sdp' });
        assert.equal(closed.method, 'neyman-pearson');
        assert.equal(sdp.method, 'sdp');
        assert.ok(Math.abs(closed.value + Math.log2(classical.beta)) <= 1e-10, `d=${d} ε=${eps}: closed form ${closed.value}`);
        assertClose(sdp.value, closed.value, 1e-6, `d=${d} ε=${eps}: SDP vs Neyman–Pearson`);
      }
    }
  });

  it('Neyman–Pearson by hand: p = (.5, .3, .2), q = (.2, .3, .5), ε = 1/4 gives β = 0.45 (likelihood-ratio order, boundary randomised; hand computation)', () => {
    const np = neymanPearson([0.5, 0.3, 0.2], [0.2, 0.3, 0.5], 0.25);
    assert.ok(Math.abs(np.beta - 0.45) <= 1e-15);
    assert.ok(Math.abs(np.t[1] - 0.25 / 0.3) <= 1e-15 && np.t[0] === 1 && np.t[2] === 0);
    assert.ok(Math.abs(np.dual - np.beta) <= 1e-15, 'the closed-form LP dual value equals β');
    const ans = hypothesisTestingDivergence(diagonal([0.5, 0.3, 0.2]), diagonal([0.2, 0.3, 0.5]), 0.25);
    assert.ok(Math.abs(ans.value + Math.log2(0.45)) <= 1e-14);
  });

  it('obeys the Wang–Renner converse D_H^ε ≤ (D(ρ‖σ) + h(ε))/(1 − ε) on random states (Wang & Renner 2012, in this convention)', () => {
    const r = rng(42);
    for (let k = 0; k < 6; k++) {
      const d = 2 + (k % 3);
      const rho = randomDensity(d, r);
      const sigma = randomDensity(d, r);
      const eps = 0.05 + 0.4 * r();
      const dh = hypothesisTestingDivergence(rho, sigma, eps).value;
      const bound = (umegakiRelativeEntropy(rho, sigma).value + binaryEntropy(eps)) / (1 - eps);
      assert.ok(dh <= bound + 1e-7, `d=${d} ε=${eps}: D_H ${dh} > bound ${bound}`);
    }
  });

  it('is at least D_min(ρ‖σ) = −log Tr Π_ρ σ, since Λ = Π_ρ is a feasible test (Datta 2009, definition of D_min)', () => {
    const r = rng(43);
    for (let k = 0; k < 4; k++) {
      const rho = randomDensity(3, r, 1 + (k % 2));
      const sigma = randomDensity(3, r);
      const dh = hypothesisTestingDivergence(rho, sigma, 0.1).value;
      assert.ok(dh >= minRelativeEntropy(rho, sigma).value - 1e-7);
    }
  });

  it('of a state against itself is −log(1 − ε) (common practice, no published source: β = min Tr ρΛ = 1 − ε)', () => {
    const r = rng(44);
    const rho = randomDensity(3, r);
    for (const eps of [0.1, 0.5]) {
      const ans = hypothesisTestingDivergence(rho, rho, eps);
      assertClose(ans.value, -Math.log2(1 - eps), 1e-7, `ε=${eps}`);
    }
  });

  it('does not increase under a channel (data processing; Wang & Renner 2012)', () => {
    const r = rng(45);
    const ch = depolarizing(3, 0.3);
    for (let k = 0; k < 3; k++) {
      const rho = randomDensity(3, r);
      const sigma = randomDensity(3, r);
      const before = hypothesisTestingDivergence(rho, sigma, 0.2).value;
      const after = hypothesisTestingDivergence(applyKraus(ch, rho), applyKraus(ch, sigma), 0.2).value;
      assert.ok(after <= before + 1e-7, `${after} > ${before}`);
    }
  });

  it('has strong duality and returns a feasible optimal test on random instances: 0 ⪯ Λ ⪯ I, Tr ρΛ ≥ 1 − ε, Tr σΛ = β (SDP duality, common practice)', () => {
    const r = rng(46);
    for (let k = 0; k < 4; k++) {
      const d = 2 + (k % 3);
      const rho = randomDensity(d, r);
      const sigma = scale(randomDensity(d, r), 0.5 + r());
      const eps = 0.1 + 0.3 * r();
      const ans = hypothesisTestingDivergence(rho, sigma, eps);
      const c = ans.certificate;
      assert.equal(c.status, 'optimal');
      assert.ok(c.relativeGap <= 1e-7 && c.primalResidual <= 1e-7 && c.dualResidual <= 1e-7, JSON.stringify(c));
      const ev = eigvalsh(ans.test);
      assert.ok(ev[0] >= -1e-7 && ev[d - 1] <= 1 + 1e-7, `Λ eigenvalues ${ev}`);
      assert.ok(ans.acceptance >= 1 - eps - 1e-7);
      assert.ok(Math.abs(traceOfProductRe(sigma, ans.test) - ans.beta) <= 1e-7 * (1 + ans.beta));
    }
  });

  it('is +∞ exactly when the kernel of σ carries at least 1 − ε of ρ, and finite just below (support condition, derived from the definition)', () => {
    const rho = diagonal([0.5, 0.5]);
    const sigma = diagonal([1, 0]);
    const inf = hypothesisTestingDivergence(rho, sigma, 0.6);
    assert.equal(inf.value, Infinity);
    assert.match(inf.reason!, /kernel of σ/);
    assert.ok(Math.abs(inf.acceptance - 0.4) <= 1e-15 && traceOfProductRe(sigma, inf.test) === 0);
    // ε = 0.4: accept the kernel outcome fully (p = .5), then 0.2 of the other: β = 0.2.
    const fin = hypothesisTestingDivergence(rho, sigma, 0.4);
    assert.ok(Math.abs(fin.value - Math.log2(5)) <= 1e-12);
  });

  it('refuses ε outside (0, 1) and the closed form for non-commuting inputs', () => {
    const r = rng(47);
    const rho = randomDensity(2, r);
    const sigma = randomDensity(2, r);
    for (const eps of [0, 1, -0.1, Number.NaN]) {
      assert.throws(() => hypothesisTestingDivergence(rho, sigma, eps), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument' && e.path === 'epsilon');
    }
    assert.throws(
      () => hypothesisTestingDivergence(rho, sigma, 0.1, { method: 'neyman-pearson' }),
      (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument',
    );
  });
});

describe('hypothesis-testing family of the divergence op (through the protocol)', () => {
  it('answers the Neyman–Pearson example −log 0.45 with the test, β, the method and a certificate (hand computation)', () => {
    const a = handle({ op: 'divergence', family: 'hypothesis-testing', rho: [[0.5, 0, 0], [0, 0.3, 0], [0, 0, 0.2]], sigma: [[0.2, 0, 0], [0, 0.3, 0], [0, 0, 0.5]], epsilon: 0.25 });
    assert.ok(a.ok, JSON.stringify(a));
    assert.ok(Math.abs((a.value as number) + Math.log2(0.45)) <= 1e-12);
    assert.equal(a.method, 'neyman-pearson');
    assert.ok(Math.abs((a.beta as number) - 0.45) <= 1e-12);
    const c = a.certificate as Record<string, unknown>;
    for (const k of ['status', 'primalObjective', 'dualObjective', 'gap', 'primalResidual', 'dualResidual', 'iterations']) assert.ok(k in c, k);
    assert.equal(c.status, 'optimal');
    assert.ok(Array.isArray(a.test));
  });

  it('solves non-commuting inputs by the SDP and honours "base": "e" (nats = bits · ln 2)', () => {
    const rho = { re: [[0.6, 0.1], [0.1, 0.4]], im: [[0, 0.2], [-0.2, 0]] };
    const sigma = [[0.3, 0], [0, 0.7]];
    const bits = handle({ op: 'divergence', family: 'hypothesis-testing', rho, sigma, epsilon: 0.1 });
    const nats = handle({ op: 'divergence', family: 'hypothesis-testing', rho, sigma, epsilon: 0.1, base: 'e' });
    assert.ok(bits.ok && nats.ok);
    assert.equal(bits.method, 'sdp');
    assert.ok(Math.abs((nats.value as number) - (bits.value as number) * Math.LN2) <= 1e-9);
  });

  it('answers "Infinity" with a reason when the kernel of σ carries 1 − ε of ρ', () => {
    const a = handle({ op: 'divergence', family: 'hypothesis-testing', rho: [[0.5, 0], [0, 0.5]], sigma: [[1, 0], [0, 0]], epsilon: 0.6 });
    assert.ok(a.ok);
    assert.equal(a.value, 'Infinity');
    assert.equal(typeof a.reason, 'string');
  });

  it('refuses a missing ε and ε at the ends of (0, 1), naming "epsilon"', () => {
    const base = { op: 'divergence', family: 'hypothesis-testing', rho: [[1, 0], [0, 0]], sigma: [[0.5, 0], [0, 0.5]] };
    const missing = handle(base);
    assert.ok(!missing.ok && missing.error.code === 'missing-argument' && missing.error.path === 'epsilon');
    for (const epsilon of [0, 1]) {
      const a = handle({ ...base, epsilon });
      assert.ok(!a.ok && a.error.path === 'epsilon', JSON.stringify(a));
    }
  });

  it('turns a solve stopped before convergence into RhoError solver-failed carrying the status (engine rule, common practice)', () => {
    const r = rng(48);
    const rho = randomDensity(3, r);
    const sigma = randomDensity(3, r);
    assert.throws(
      () => hypothesisTestingDivergence(rho, sigma, 0.1, { method: 'sdp', solver: { maxIterations: 2 } }),
      (e: unknown) => e instanceof RhoError && e.code === 'solver-failed' && (e.detail as { status: string }).status === 'iteration-limit',
    );
  });
});
