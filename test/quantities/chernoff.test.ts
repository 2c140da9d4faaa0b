// Facts about the quantum Chernoff exponent ξ = −log min_s Tr ρ^s σ^{1−s}. Sources in each it(...).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { diagonal, kron, outer, columnVector, scale, fromRows, toRows } from '../../src/linalg/index.js';
import { chernoffExponent, chernoffTrace } from '../../src/quantities/chernoff.js';
import { fidelity } from '../../src/quantities/fidelity.js';
import { traceDistance } from '../../src/quantities/distances.js';
import { rng, randomDensity, randomProbabilities } from '../helpers/random.js';
import { runPythonCode } from '../helpers/python.js';

describe('quantum Chernoff exponent', () => {
  it('equals the classical Chernoff information −log min_λ Σ p^λ q^{1−λ} for commuting states (Cover & Thomas, Elements of Information Theory, 2nd ed., Thm 11.9.1), reference minimised by scipy 1.17.1 minimize_scalar', () => {
    const r = rng(31);
    const cases: [number[], number[]][] = [];
    for (const n of [2, 3, 5, 8]) cases.push([randomProbabilities(n, r), randomProbabilities(n, r)]);
    cases.push([randomProbabilities(4, r, [0]), randomProbabilities(4, r)]); // p has a zero: support end point matters
    const script = [
      'import json, sys, numpy as np',
      'from scipy.optimize import minimize_scalar',
      'out = []',
      'for p, q in json.load(sys.stdin):',
      '    p = np.array(p); q = np.array(q); m = (p > 0) & (q > 0)',
      '    f = lambda l: np.log(np.sum(p[m] ** l * q[m] ** (1 - l)))',
      '    res = minimize_scalar(f, bounds=(0, 1), method="bounded", options={"xatol": 1e-12})',
      '    best = min([(res.fun, res.x), (f(0.0), 0.0), (f(1.0), 1.0)])',
      '    out.append([-best[0] / np.log(2), best[1]])',
      'print(json.dumps(out))',
    ].join('\n');
    const expected: [number, number][] = runPythonCode(script, cases);
    cases.forEach(([p, q], k) => {
      const c = chernoffExponent(diagonal(p), diagonal(q));
      assert.ok(Math.abs(c.value - expected[k][0]) < 1e-10, `case ${k}: ${c.value} vs ${expected[k][0]}`);
      assert.ok(Math.abs(c.s - expected[k][1]) < 1e-4, `case ${k}: s ${c.s} vs ${expected[k][1]}`);
    });
  });

  it('agrees on non-commuting full-rank states with min_s Tr ρ^s σ^{1−s} from numpy 2.4.6 eigh powers and scipy 1.17.1 minimize_scalar', () => {
    const r = rng(36);
    const pairs = [2, 3, 4, 6].map((n) => [randomDensity(n, r), randomDensity(n, r)]);
    const script = [
      'import json, sys, numpy as np',
      'from scipy.optimize import minimize_scalar',
      'def power(m, s):',
      '    w, v = np.linalg.eigh(m)',
      '    return (v * w ** s) @ v.conj().T',
      'out = []',
      'for a, b in json.load(sys.stdin):',
      '    R = np.array(a["re"]) + 1j * np.array(a["im"])',
      '    S = np.array(b["re"]) + 1j * np.array(b["im"])',
      '    f = lambda s: np.real(np.trace(power(R, s) @ power(S, 1 - s)))',
      '    res = minimize_scalar(f, bounds=(0, 1), method="bounded", options={"xatol": 1e-12})',
      '    out.append([-np.log2(res.fun), res.x])',
      'print(json.dumps(out))',
    ].join('\n');
    const payload = JSON.stringify(pairs.map(([a, b]) => [toRows(a), toRows(b)]));
    const expected: [number, number][] = runPythonCode(script, payload);
    pairs.forEach(([a, b], k) => {
      const c = chernoffExponent(a, b);
      assert.ok(Math.abs(c.value - expected[k][0]) < 1e-10, `pair ${k}: ${c.value} vs ${expected[k][0]}`);
      assert.ok(Math.abs(c.s - expected[k][1]) < 1e-4, `pair ${k}: s ${c.s} vs ${expected[k][1]}`);
    });
  });

  it('equals −log |⟨ψ|φ⟩|² for pure states (Audenaert et al., PRL 98, 160501 (2007))', () => {
    const r = rng(32);
    for (const n of [2, 3, 6]) {
      const rho = randomDensity(n, r, 1);
      const sigma = randomDensity(n, r, 1);
      const overlap = fidelity(rho, sigma).value; // |⟨ψ|φ⟩|² for pure states
      const c = chernoffExponent(rho, sigma);
      assert.ok(Math.abs(c.value + Math.log2(overlap)) < 1e-10, `${c.value} vs ${-Math.log2(overlap)}`);
    }
  });

  it('lies between −log(1 − T) and −log Tr √ρ√σ, since 1 − T ≤ Q_s (Audenaert et al. 2007, Theorem 1; recalled from memory) and Q_min ≤ Q_{1/2}', () => {
    const r = rng(33);
    for (const n of [2, 3, 4]) {
      for (let k = 0; k < 4; k++) {
        const rho = randomDensity(n, r, 1 + (k % n));
        const sigma = randomDensity(n, r);
        const c = chernoffExponent(rho, sigma, { base: Math.E });
        assert.ok(c.minimum >= 1 - traceDistance(rho, sigma) - 1e-12);
        assert.ok(c.minimum <= chernoffTrace(rho, sigma, 0.5) + 1e-14);
        assert.ok(Math.abs(Math.exp(-c.value) - c.minimum) < 1e-14);
      }
    }
  });

  it('is additive over copies, ξ(ρ⊗ρ, σ⊗σ) = 2 ξ(ρ,σ), because Q_s factorises (Audenaert et al. 2007)', () => {
    const r = rng(34);
    const rho = randomDensity(3, r);
    const sigma = randomDensity(3, r, 2);
    const one = chernoffExponent(rho, sigma);
    const two = chernoffExponent(kron(rho, rho), kron(sigma, sigma));
    assert.ok(Math.abs(two.value - 2 * one.value) < 1e-10);
    assert.ok(Math.abs(two.s - one.s) < 1e-6);
  });

  it('is 0 for identical states and Infinity, with a reason, for orthogonal supports (Audenaert et al. 2007)', () => {
    const r = rng(35);
    const rho = randomDensity(3, r);
    assert.ok(Math.abs(chernoffExponent(rho, rho).value) < 1e-12);
    const a = outer(columnVector([1, 0, 0]), columnVector([1, 0, 0]));
    const b = scale(fromRows([[0, 0, 0], [0, 1, 1], [0, 1, 1]]), 0.5);
    const c = chernoffExponent(a, b);
    assert.equal(c.value, Infinity);
    assert.match(c.reason ?? '', /orthogonal/);
  });
});
