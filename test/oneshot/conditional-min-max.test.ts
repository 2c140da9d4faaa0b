// Conditional min- and max-entropy (König, Renner & Schaffner, IEEE Trans. Inf. Theory 55, 4337 (2009))
// as SDPs: against cvxopt, published closed forms and the min/max duality for pure states.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  adjoint, eigh, eigvalsh, kron, marginal, mul, sub, trace, identity, zeros,
} from '../../src/linalg/index.js';
import { RhoError } from '../../src/errors.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { conditionalMinEntropy, conditionalMaxEntropy } from '../../src/oneshot/conditional-min-max.js';
import { conditionalEntropy } from '../../src/quantities/conditional.js';
import { maximallyEntangled } from '../../src/quantum/index.js';
import { randomDensity, rng } from '../helpers/random.js';
import { assertClose, committedCases, liveCases, matrixOf, origin, type OneShotReference } from './oneshot-reference.js';

/** 1/d on the diagonal. */
function scaleIdentity(d: number) {
  const m = identity(d);
  for (let i = 0; i < d; i++) m.re[i * d + i] = 1 / d;
  return m;
}

/** Rows {re, im} of a matrix, the protocol's form. */
function rowsOf(m: ReturnType<typeof identity>) {
  const n = m.rows;
  const part = (a: Float64Array) => Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, (i + 1) * n)));
  return { re: part(m.re), im: part(m.im) };
}

function checkMin(ref: OneShotReference, label: string): void {
  for (const c of ref.cases) {
    const where = origin(ref, c, label);
    assert.equal(c.cvxoptStatus, 'optimal', `${where}: cvxopt status`);
    const ans = conditionalMinEntropy(matrixOf(c.rho), c.dims!, [0], [1]);
    assert.equal(ans.certificate.status, 'optimal', `${where}: our status`);
    assert.ok(ans.certificate.relativeGap <= 1e-7, `${where}: duality gap ${ans.certificate.relativeGap}`);
    assertClose(ans.value, c.value, 1e-6, where);
    assertClose(trace(ans.sigma).re, c.optimum, 1e-6, `${where} (Tr σ_B)`);
  }
}

function checkMax(ref: OneShotReference, label: string): void {
  for (const c of ref.cases) {
    const where = origin(ref, c, label);
    assert.equal(c.cvxoptStatus, 'optimal', `${where}: cvxopt status`);
    const ans = conditionalMaxEntropy(matrixOf(c.rho), c.dims!, [0], [1]);
    assert.equal(ans.certificate.status, 'optimal', `${where}: our status`);
    assert.ok(ans.certificate.relativeGap <= 1e-7, `${where}: duality gap ${ans.certificate.relativeGap}`);
    assertClose(ans.value, c.value, 1e-6, where);
    assertClose(ans.rootFidelity, c.optimum, 1e-6, `${where} (√F)`);
  }
}

describe('conditional min-entropy', () => {
  it('matches cvxopt.solvers.sdp (definition form min Tr σ_B, I_A⊗σ_B ⪰ ρ_AB) on the committed random instances (1e-6 relative)', () => {
    checkMin(committedCases('conditional-min-entropy'), 'committed');
  });

  it('matches cvxopt.solvers.sdp on a fresh batch generated in this run (seed 12)', () => {
    const ref = liveCases('conditional-min-entropy', 12, 2);
    if (ref) checkMin(ref, 'live');
  });

  it('is −log d for a maximally entangled state (König, Renner & Schaffner 2009)', () => {
    for (const d of [2, 3]) {
      const ans = conditionalMinEntropy(maximallyEntangled(d).matrix, [d, d], [0], [1]);
      assertClose(ans.value, -Math.log2(d), 1e-7, `d=${d}`);
    }
  });

  it('never leaves [−log d_A, log d_A] at the ends of its range: value and bracket inside, any excess stated, and the answer still re-checks (Tomamichel 2016, from memory)', () => {
    for (const d of [2, 3, 4]) {
      const ends = [
        { name: 'maximally entangled', rho: maximallyEntangled(d).matrix, end: -Math.log2(d) },
        { name: 'maximally mixed product', rho: kron(scaleIdentity(d), scaleIdentity(d)), end: Math.log2(d) },
      ];
      for (const { name, rho, end } of ends) {
        const request = { op: 'conditional-min-entropy', rho: { matrix: rowsOf(rho), dims: [d, d] }, a: [0], b: [1] };
        const ans = handle(request) as Record<string, any>;
        assert.equal(ans.ok, true, `${name} d=${d}`);
        const { lower, upper } = ans.certificate.bounds;
        assert.ok(ans.value >= -Math.log2(d) && ans.value <= Math.log2(d), `${name} d=${d}: ${ans.value}`);
        assert.ok(lower >= -Math.log2(d) && upper <= Math.log2(d), `${name} d=${d}: [${lower}, ${upper}]`);
        assertClose(ans.value, end, 1e-7, `${name} d=${d}`);
        if (ans.certificate.clipped) assert.ok(ans.certificate.clipped.excess > 0);
        const check = handle({ op: 'verify-answer', request, answer: ans }) as Record<string, any>;
        assert.equal(check.value, true, `${name} d=${d}: ${JSON.stringify(check.checks?.filter((c: { ok: boolean }) => !c.ok))}`);
      }
    }
  });

  it('is −log λ_max(ρ_A) for a product state ρ_A ⊗ ρ_B, in either order of the subsystems (KRS 2009; Tomamichel 2016)', () => {
    const r = rng(51);
    for (const [dA, dB] of [[2, 2], [3, 2], [2, 3]]) {
      const rhoA = randomDensity(dA, r);
      const rhoB = randomDensity(dB, r);
      const expected = -Math.log2(Math.max(...eigvalsh(rhoA)));
      assertClose(conditionalMinEntropy(kron(rhoA, rhoB), [dA, dB], [0], [1]).value, expected, 1e-7, `${dA}x${dB}`);
      assertClose(conditionalMinEntropy(kron(rhoB, rhoA), [dB, dA], [1], [0]).value, expected, 1e-7, `${dB}x${dA} swapped`);
    }
  });

  it('returns a feasible σ_B with Tr σ_B = 2^{−H_min} and strong duality (SDP duality, common practice)', () => {
    const r = rng(52);
    for (const [dA, dB] of [[2, 2], [2, 3], [3, 2]]) {
      const rho = randomDensity(dA * dB, r);
      const ans = conditionalMinEntropy(rho, [dA, dB], [0], [1]);
      const c = ans.certificate;
      assert.ok(c.relativeGap <= 1e-7 && c.primalResidual <= 1e-7 && c.dualResidual <= 1e-7, JSON.stringify(c));
      const slack = eigvalsh(sub(kron(identity(dA), ans.sigma), rho));
      assert.ok(slack[0] >= -1e-7, `I⊗σ − ρ has eigenvalue ${slack[0]}`);
      assertClose(trace(ans.sigma).re, 2 ** -ans.value, 1e-7, 'Tr σ_B');
      assertClose(traceProduct(rho, ans.dualOperator), 2 ** -ans.value, 1e-7, 'Tr ρX');
    }
  });

  it('refuses overlapping groups and an empty A', () => {
    const rho = maximallyEntangled(2).matrix;
    assert.throws(() => conditionalMinEntropy(rho, [2, 2], [0], [0]), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument');
    assert.throws(() => conditionalMinEntropy(rho, [2, 2], [], [1]), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument');
  });
});

function traceProduct(a: ReturnType<typeof identity>, b: ReturnType<typeof identity>): number {
  return trace(mul(a, b)).re;
}

describe('conditional max-entropy', () => {
  it('matches cvxopt.solvers.sdp (uncompressed fidelity SDP) on the committed random instances (1e-6 relative)', () => {
    checkMax(committedCases('conditional-max-entropy'), 'committed');
  });

  it('matches cvxopt.solvers.sdp on a fresh batch generated in this run (seed 13)', () => {
    const ref = liveCases('conditional-max-entropy', 13, 2);
    if (ref) checkMax(ref, 'live');
  });

  it('satisfies the duality H_max(A|B)_ρ = −H_min(A|C)_ρ for a random pure ρ_ABC (KRS 2009, Theorem 3)', () => {
    const r = rng(53);
    for (const dims of [[2, 2, 2], [2, 3, 2]]) {
      const n = dims[0] * dims[1] * dims[2];
      const psi = randomDensity(n, r, 1); // a random pure state
      const hmax = conditionalMaxEntropy(psi, dims, [0], [1]).value;
      const hmin = conditionalMinEntropy(psi, dims, [0], [2]).value;
      assertClose(hmax, -hmin, 1e-6, `dims ${dims}`);
    }
  });

  it('satisfies the duality H_max(A|B) = −H_min(A|C) on nearly pure ρ_AB, eigenvalues (1 − 2δ, δ, δ), δ ∈ {1e-8, 1e-6}: the certified brackets overlap (KRS 2009, Theorem 3)', () => {
    const r = rng(54);
    for (const delta of [1e-8, 1e-6]) {
      // ψ_ABC = Σ_k √λ_k |u_k⟩_AB |k⟩_C with orthonormal u_k (eigenvectors of a random state on AB).
      const u = eigh(randomDensity(4, r), { vectors: true }).vectors!;
      const lam = [1 - 2 * delta, delta, delta];
      const psi = zeros(12, 1);
      for (let k = 0; k < 3; k++) {
        for (let i = 0; i < 4; i++) {
          psi.re[i * 3 + k] = Math.sqrt(lam[k]) * u.re[i * 4 + k];
          psi.im[i * 3 + k] = Math.sqrt(lam[k]) * u.im[i * 4 + k];
        }
      }
      const rho = mul(psi, adjoint(psi));
      const hmax = conditionalMaxEntropy(rho, [2, 2, 3], [0], [1]);
      const hmin = conditionalMinEntropy(rho, [2, 2, 3], [0], [2]);
      const a = hmax.certificate.bounds;
      const b = hmin.certificate.bounds;
      assert.ok(a.lower <= -b.lower && -b.upper <= a.upper, `δ=${delta}: H_max ∈ [${a.lower}, ${a.upper}], −H_min ∈ [${-b.upper}, ${-b.lower}]`);
      assertClose(hmax.value, -hmin.value, 1e-6, `δ=${delta}`);
    }
  });

  it('is −log d for a maximally entangled state (KRS 2009, via the duality with a trivial purifying system)', () => {
    for (const d of [2, 3]) {
      const ans = conditionalMaxEntropy(maximallyEntangled(d).matrix, [d, d], [0], [1]);
      assertClose(ans.value, -Math.log2(d), 1e-7, `d=${d}`);
    }
  });

  it('without side information is the Rényi-1/2 entropy 2 log Tr √ρ_A (KRS 2009)', () => {
    const r = rng(54);
    const rho = randomDensity(6, r);
    const rhoA = marginal(rho, [3, 2], [0]);
    const expected = 2 * Math.log2([...eigvalsh(rhoA)].reduce((s, x) => s + Math.sqrt(Math.max(0, x)), 0));
    assertClose(conditionalMaxEntropy(rho, [3, 2], [0], []).value, expected, 1e-7, 'H_max(A)');
  });

  it('bounds the conditional von Neumann entropy: H_min(A|B) ≤ H(A|B) ≤ H_max(A|B) (Tomamichel 2016, ordering of entropies)', () => {
    const r = rng(55);
    for (const [dA, dB] of [[2, 2], [2, 3]]) {
      const rho = randomDensity(dA * dB, r);
      const h = conditionalEntropy(rho, [dA, dB], [0], [1]).value;
      const hmin = conditionalMinEntropy(rho, [dA, dB], [0], [1]).value;
      const hmax = conditionalMaxEntropy(rho, [dA, dB], [0], [1]);
      assert.ok(hmin <= h + 1e-7 && h <= hmax.value + 1e-7, `${hmin} ≤ ${h} ≤ ${hmax.value}`);
      assertClose(trace(hmax.sigma).re, 1, 1e-7, 'σ_B is a state');
      assert.ok(eigvalsh(hmax.sigma)[0] >= -1e-7);
    }
  });
});

describe('conditional-min-entropy and conditional-max-entropy ops (through the protocol)', () => {
  const bell = { ket: ['1/sqrt(2)', 0, 0, '1/sqrt(2)'], dims: [2, 2], labels: ['A', 'B'] };

  it('give −1 bit for both entropies of a Bell state, with σ_B and the certificate (KRS 2009)', () => {
    const mn = handle({ op: 'conditional-min-entropy', rho: bell, a: ['A'], b: ['B'] });
    const mx = handle({ op: 'conditional-max-entropy', rho: bell, a: [0], b: [1] });
    assert.ok(mn.ok && mx.ok, JSON.stringify([mn, mx]));
    assert.ok(Math.abs((mn.value as number) + 1) <= 1e-7 && Math.abs((mx.value as number) + 1) <= 1e-7);
    for (const a of [mn, mx]) {
      const c = a.certificate as Record<string, unknown>;
      assert.equal(c.status, 'optimal');
      for (const k of ['primalObjective', 'dualObjective', 'gap', 'primalResidual', 'dualResidual', 'iterations']) assert.equal(typeof c[k], 'number', k);
      assert.ok(Array.isArray(a.sigma) || typeof a.sigma === 'object');
    }
  });

  it('refuse overlapping groups and an empty A', () => {
    const overlap = handle({ op: 'conditional-min-entropy', rho: bell, a: [0], b: [0] });
    assert.ok(!overlap.ok && overlap.error.code === 'invalid-argument');
    const empty = handle({ op: 'conditional-max-entropy', rho: bell, a: [], b: [1] });
    assert.ok(!empty.ok && empty.error.path === 'a', JSON.stringify(empty));
  });
});
