// The entropy and divergence ops through `handle`, as a notebook or the command would call them.
// Expected values are textbook facts written out here (Nielsen & Chuang 2000, §11.2–11.3: entropy of the
// maximally mixed state, mutual information and conditional entropy of maximally entangled and GHZ
// states; Datta 2009 for D_max = log max p/q on commuting states); answer shapes, error codes and the
// "Infinity" rule are PROTOCOL.md's.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { extraDivergenceFamilies } from '../../src/ops/entropy-ops.js';

const bell = [[0.5, 0, 0, 0.5], [0, 0, 0, 0], [0, 0, 0, 0], [0.5, 0, 0, 0.5]];
function ghz(): number[][] {
  const m = Array.from({ length: 8 }, () => new Array<number>(8).fill(0));
  m[0][0] = m[0][7] = m[7][0] = m[7][7] = 0.5;
  return m;
}
const ok = (a: any) => {
  assert.equal(a.ok, true, JSON.stringify(a));
  return a;
};

describe('entropy and divergence ops', () => {
  it('entropy: log d for the maximally mixed state in bits and in nats, min-entropy with alpha "Infinity" (textbook)', () => {
    const mixed = [[1 / 3, 0, 0], [0, 1 / 3, 0], [0, 0, 1 / 3]];
    assert.ok(Math.abs(ok(handle({ op: 'entropy', rho: mixed })).value - Math.log2(3)) < 1e-14);
    assert.ok(Math.abs(ok(handle({ op: 'entropy', rho: mixed, base: 'e', alpha: 2 })).value - Math.log(3)) < 1e-14);
    const a = ok(handle({ op: 'entropy', rho: [[0.75, 0], [0, 0.25]], alpha: 'Infinity' }));
    assert.ok(Math.abs(a.value - -Math.log2(0.75)) < 1e-14);
    assert.equal(a.alpha, 'Infinity');
  });

  it('divergence: an infinite value is the string "Infinity" with a reason (PROTOCOL.md, "Values")', () => {
    const a = ok(handle({ op: 'divergence', family: 'umegaki', rho: [[1, 0], [0, 0]], sigma: [[0, 0], [0, 1]] }));
    assert.equal(a.value, 'Infinity');
    assert.equal(typeof a.reason, 'string');
  });

  it('divergence: σ of any trace is accepted, D_max of commuting inputs is log max p/q (Datta 2009)', () => {
    const a = ok(handle({ op: 'divergence', family: 'max', rho: [[0.5, 0], [0, 0.5]], sigma: [[1.8, 0], [0, 0.2]] }));
    assert.ok(Math.abs(a.value - Math.log2(0.5 / 0.2)) < 1e-13);
    const s = ok(handle({ op: 'divergence', family: 'sandwiched', alpha: 'Infinity', rho: [[0.5, 0], [0, 0.5]], sigma: [[1.8, 0], [0, 0.2]] }));
    assert.ok(Math.abs(s.value - a.value) < 1e-13);
  });

  it('divergence: alpha-z answers carry the dataProcessing flag of Zhang (2020)', () => {
    const pair = { rho: [[0.6, 0.1], [0.1, 0.4]], sigma: [[0.5, 0], [0, 0.5]] };
    assert.equal(ok(handle({ op: 'divergence', family: 'alpha-z', alpha: 2, z: 1.5, ...pair })).dataProcessing, true);
    assert.equal(ok(handle({ op: 'divergence', family: 'alpha-z', alpha: 2, z: 3, ...pair })).dataProcessing, false);
  });

  it('divergence: measured returns the measurement as a matrix and the run record (Berta, Fawzi & Tomamichel 2017)', () => {
    const a = ok(handle({ op: 'divergence', family: 'measured', rho: [[0.6, 0.2], [0.2, 0.4]], sigma: [[0.5, 0], [0, 0.5]] }));
    assert.ok(Array.isArray(a.measurement) && a.measurement.length === 2);
    assert.equal(typeof a.iterations, 'number');
    assert.equal(typeof a.stoppingRule, 'string');
  });

  it('divergence: unknown families and parameters outside a range are refused with codes and paths (PROTOCOL.md)', () => {
    const pair = { rho: [[0.5, 0], [0, 0.5]], sigma: [[0.5, 0], [0, 0.5]] };
    const u = handle({ op: 'divergence', family: 'nonsense', ...pair }) as any;
    assert.equal(u.ok, false);
    assert.equal(u.error.code, 'unknown-family');
    assert.match(u.error.message, /umegaki.*measured/);
    const b = handle({ op: 'divergence', family: 'sandwiched', alpha: 0.3, ...pair }) as any;
    assert.equal(b.error.code, 'invalid-argument');
    assert.equal(b.error.path, 'alpha');
    const z = handle({ op: 'divergence', family: 'alpha-z', alpha: 2, ...pair }) as any;
    assert.equal(z.error.code, 'missing-argument');
    const m = handle({ op: 'divergence', family: 'umegaki', rho: pair.rho, sigma: [[1, 0, 0], [0, 0, 0], [0, 0, 0]] }) as any;
    assert.equal(m.error.code, 'dimension-mismatch');
  });

  it('divergence: a family registered in extraDivergenceFamilies is dispatched to (the extension point)', () => {
    extraDivergenceFamilies.set('test-constant', ({ request }) => ({ value: request.epsilon * 2 }));
    try {
      const a = ok(handle({ op: 'divergence', family: 'test-constant', epsilon: 0.25, rho: [[1]], sigma: [[1]] }));
      assert.equal(a.value, 0.5);
    } finally {
      extraDivergenceFamilies.delete('test-constant');
    }
  });

  it('conditional entropy −1 and mutual information 2 for a Bell state (Nielsen & Chuang §11.3)', () => {
    const rho = { matrix: bell, dims: [2, 2], labels: ['A', 'B'] };
    assert.ok(Math.abs(ok(handle({ op: 'conditional-entropy', rho, a: ['A'], b: ['B'] })).value + 1) < 1e-13);
    assert.ok(Math.abs(ok(handle({ op: 'mutual-information', rho, a: [0], b: [1] })).value - 2) < 1e-13);
  });

  it('conditional mutual information of the GHZ state is 1 bit for any ordering of the groups (textbook: H(AB) = H(BC) = H(B) = 1, H(ABC) = 0)', () => {
    const rho = { matrix: ghz(), dims: [2, 2, 2] };
    for (const [a, b, c] of [[[0], [1], [2]], [[2], [0], [1]]]) {
      assert.ok(Math.abs(ok(handle({ op: 'conditional-mutual-information', rho, a, b, c })).value - 1) < 1e-13);
    }
    const e = handle({ op: 'conditional-mutual-information', rho, a: [0], b: [0], c: [2] }) as any;
    assert.equal(e.error.code, 'invalid-argument');
  });

  it('conditional Rényi entropy of a Bell state is −1 for both families, optimised or not (Tomamichel, Berta & Hayashi 2014)', () => {
    const rho = { matrix: bell, dims: [2, 2] };
    for (const family of ['petz', 'sandwiched']) {
      for (const optimized of [false, true]) {
        const a = ok(handle({ op: 'conditional-renyi-entropy', rho, a: [0], b: [1], family, alpha: 1.5, optimized }));
        assert.ok(Math.abs(a.value + 1) < 1e-10, `${family} ${optimized}: ${a.value}`);
        assert.ok(Array.isArray(a.sigmaB));
      }
    }
  });
});
