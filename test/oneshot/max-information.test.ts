// Max-information I_max(A:B) = min_σ D_max(ρ_AB ‖ ρ_A ⊗ σ_B) (Berta, Christandl & Renner, Commun.
// Math. Phys. 306, 579 (2011)): against cvxopt, closed forms and the bound by the mutual information.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { eigvalsh, kron, partialTrace, scale, sub, trace, zeros } from '../../src/linalg/index.js';
import { RhoError } from '../../src/errors.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { maxInformation } from '../../src/oneshot/max-information.js';
import { mutualInformation } from '../../src/quantities/conditional.js';
import { maximallyEntangled } from '../../src/quantum/index.js';
import { randomDensity, rng } from '../helpers/random.js';
import { assertClose, committedCases, liveCases, matrixOf, origin, type OneShotReference } from './oneshot-reference.js';

function check(ref: OneShotReference, label: string): void {
  for (const c of ref.cases) {
    const where = origin(ref, c, label);
    assert.equal(c.cvxoptStatus, 'optimal', `${where}: cvxopt status`);
    const ans = maxInformation(matrixOf(c.rho), c.dims!, [0], [1]);
    assert.equal(ans.certificate.status, 'optimal', `${where}: our status`);
    assert.ok(ans.certificate.relativeGap <= 1e-7, `${where}: duality gap ${ans.certificate.relativeGap}`);
    assertClose(ans.value, c.value, 1e-6, where);
  }
}

describe('max-information', () => {
  it('matches cvxopt.solvers.sdp (definition form min Tr σ, ρ_A ⊗ σ ⪰ ρ_AB) on the committed random instances (1e-6 relative)', () => {
    check(committedCases('max-information'), 'committed');
  });

  it('matches cvxopt.solvers.sdp on a fresh batch generated in this run (seed 15)', () => {
    const ref = liveCases('max-information', 15, 2);
    if (ref) check(ref, 'live');
  });

  it('vanishes on product states (Berta, Christandl & Renner 2011: I_max ≥ I(A:B) ≥ 0, and σ_B = ρ_B attains 0)', () => {
    const r = rng(71);
    const rhoA = randomDensity(2, r);
    const rhoB = randomDensity(3, r);
    const ans = maxInformation(kron(rhoA, rhoB), [2, 3], [0], [1]);
    assert.ok(Math.abs(ans.value) <= 1e-7, `${ans.value}`);
  });

  it('is 2 log d for a maximally entangled state (Berta, Christandl & Renner 2011; recalled from memory, and 2^{I_max} = d·2^{−H_min(A|B)} = d²)', () => {
    for (const d of [2, 3]) {
      assertClose(maxInformation(maximallyEntangled(d).matrix, [d, d], [0], [1]).value, 2 * Math.log2(d), 1e-7, `d=${d}`);
    }
  });

  it('handles a rank-deficient ρ_A: ½(|00⟩⟨00| + |11⟩⟨11|) with A of dimension 3 has I_max = 1 bit (derived: p_x σ ⪰ p_x|x⟩⟨x| for x = 0, 1)', () => {
    const rho = zeros(6, 6);
    rho.re[0 * 6 + 0] = 0.5; // |0⟩_A|0⟩_B
    rho.re[3 * 6 + 3] = 0.5; // |1⟩_A|1⟩_B
    const ans = maxInformation(rho, [3, 2], [0], [1]);
    assert.equal(ans.rankA, 2);
    assertClose(ans.value, 1, 1e-7, 'I_max');
  });

  it('is at least the mutual information I(A:B) (D_max ≥ D, and min_σ D(ρ_AB‖ρ_A⊗σ_B) = I(A:B); Tomamichel 2016)', () => {
    const r = rng(72);
    for (const [dA, dB] of [[2, 2], [2, 3], [3, 2]]) {
      const rho = randomDensity(dA * dB, r);
      const imax = maxInformation(rho, [dA, dB], [0], [1]).value;
      const mi = mutualInformation(rho, [dA, dB], [0], [1]).value;
      assert.ok(imax >= mi - 1e-7, `${imax} < ${mi}`);
    }
  });

  it('returns a state σ_B with ρ_AB ⪯ 2^{I_max} ρ_A ⊗ σ_B and strong duality (SDP duality, common practice)', () => {
    const r = rng(73);
    for (const [dA, dB] of [[2, 2], [3, 2]]) {
      const rho = randomDensity(dA * dB, r);
      const ans = maxInformation(rho, [dA, dB], [0], [1]);
      const c = ans.certificate;
      assert.ok(c.relativeGap <= 1e-7 && c.primalResidual <= 1e-7 && c.dualResidual <= 1e-7, JSON.stringify(c));
      assertClose(trace(ans.sigma).re, 1, 1e-12, 'Tr σ_B');
      const rhoA = partialTrace(rho, [dA, dB], [1]);
      const slack = eigvalsh(sub(scale(kron(rhoA, ans.sigma), 2 ** ans.value), rho));
      assert.ok(slack[0] >= -1e-7, `smallest eigenvalue ${slack[0]}`);
    }
  });

  it('refuses an empty B', () => {
    assert.throws(() => maxInformation(maximallyEntangled(2).matrix, [2, 2], [0], []), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument');
  });
});

describe('max-information op (through the protocol)', () => {
  it('gives 2 bits for a Bell state given by labels, with σ_B = I/2 and the certificate (BCR 2011)', () => {
    const a = handle({ op: 'max-information', rho: { ket: ['1/sqrt(2)', 0, 0, '1/sqrt(2)'], dims: [2, 2], labels: ['A', 'B'] }, a: ['A'], b: ['B'] });
    assert.ok(a.ok, JSON.stringify(a));
    assert.ok(Math.abs((a.value as number) - 2) <= 1e-7);
    const s = a.sigma as number[][];
    assert.ok(Math.abs(s[0][0] - 0.5) <= 1e-6 && Math.abs(s[1][1] - 0.5) <= 1e-6);
    assert.equal((a.certificate as Record<string, unknown>).status, 'optimal');
  });

  it('refuses an empty B and a system too large for the SDP', () => {
    const bell = { ket: ['1/sqrt(2)', 0, 0, '1/sqrt(2)'], dims: [2, 2] };
    const empty = handle({ op: 'max-information', rho: bell, a: [0], b: [] });
    assert.ok(!empty.ok && empty.error.path === 'b', JSON.stringify(empty));
    const n = 128;
    const big = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 / n : 0)));
    const large = handle({ op: 'max-information', rho: { matrix: big, dims: [2, 64] }, a: [0], b: [1] });
    assert.ok(!large.ok && large.error.code === 'too-large', JSON.stringify(large));
  });
});
