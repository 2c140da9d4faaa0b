// Guessing probability p_guess(X|B): published facts (Helstrom–Holevo for two states, perfect
// discrimination of orthogonal states, the Holevo / Yuen–Kennedy–Lax optimality conditions) and the
// op through the plain-data door. The comparison with cvxopt is in guessing-cvxopt.test.ts.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, adjoint, eigvalsh, hermitianPart, mul, scale, sub, add, identity, traceNorm, zeros,
} from '../../src/linalg/index.js';
import { guessingProbability, holevoOperator } from '../../src/oneshot/guessing.js';
import '../../src/ops/guessing-ops.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, randomUnitary, rng } from '../helpers/random.js';

function maxAbs(m: CMatrix): number {
  let s = 0;
  for (let k = 0; k < m.re.length; k++) s = Math.max(s, Math.hypot(m.re[k], m.im[k]));
  return s;
}

describe('guessing probability p_guess(X|B) = max over POVMs of Σ_x p_x Tr M_x ρ_x', () => {
  it('equals the Helstrom–Holevo value ½(1 + ‖p₀ρ₀ − p₁ρ₁‖₁) for two random states (Helstrom 1976, Quantum Detection and Estimation Theory, Ch. IV)', () => {
    const r = rng(11);
    for (const d of [2, 3, 4]) {
      for (const rank of [1, d]) {
        const rho0 = randomDensity(d, r, rank);
        const rho1 = randomDensity(d, r);
        const p0 = 0.2 + 0.6 * r();
        const g = guessingProbability([p0, 1 - p0], [rho0, rho1]);
        const helstrom = 0.5 * (1 + traceNorm(sub(scale(rho0, p0), scale(rho1, 1 - p0))));
        assert.equal(g.certificate.status, 'optimal');
        assert.ok(Math.abs(g.value - helstrom) <= 1e-7, `d=${d} rank=${rank}: ${g.value} vs Helstrom ${helstrom}`);
        assert.ok(g.bounds.lower <= helstrom + 1e-9 && helstrom <= g.bounds.upper + 1e-9, 'the checkable bracket contains the closed form');
      }
    }
  });

  it('is 1 for mutually orthogonal states, whatever the prior (orthogonal states are perfectly distinguishable; Nielsen & Chuang, Box 2.3)', () => {
    const r = rng(12);
    const d = 4;
    const u = randomUnitary(d, r);
    // ρ_0 on span{u_0, u_1}, ρ_1 = |u_2⟩⟨u_2|, ρ_2 = |u_3⟩⟨u_3|: orthogonal supports.
    const col = (j: number) => {
      const v = zeros(d, 1);
      for (let i = 0; i < d; i++) {
        v.re[i] = u.re[i * d + j];
        v.im[i] = u.im[i * d + j];
      }
      return mul(v, adjoint(v));
    };
    const rho0 = add(scale(col(0), 0.3), scale(col(1), 0.7));
    const g = guessingProbability([0.5, 0.3, 0.2], [rho0, col(2), col(3)]);
    assert.ok(Math.abs(g.value - 1) <= 1e-7, `${g.value}`);
  });

  it('is max_x p_x when all states are equal (no side information: guess the likeliest x; common practice, no published source)', () => {
    const r = rng(13);
    const rho = randomDensity(3, r);
    const g = guessingProbability([0.25, 0.45, 0.3], [rho, rho, rho]);
    assert.ok(Math.abs(g.value - 0.45) <= 1e-7, `${g.value}`);
  });

  it('satisfies the Holevo / Yuen–Kennedy–Lax optimality conditions: Y = Σ_x p_x ρ_x M_x, Y ⪰ p_x ρ_x and (Y − p_x ρ_x) M_x = 0 (Holevo 1973; Yuen, Kennedy & Lax 1975)', () => {
    const r = rng(14);
    const states = [randomDensity(3, r), randomDensity(3, r, 1), randomDensity(3, r), randomDensity(3, r, 2)];
    const p = [0.1, 0.4, 0.3, 0.2];
    // An interior-point answer with duality gap g meets these conditions to about √g (‖S^½ M^½‖² = ⟨S, M⟩),
    // so the solver is asked for a gap of 1e-11 here and the conditions are checked to 2e-6.
    const g = guessingProbability(p, states, { sdp: { gapTolerance: 1e-11, feasibilityTolerance: 1e-11 } });
    const y = g.dual;
    const sum = holevoOperator(p, states, g.measurement);
    assert.ok(maxAbs(sub(sum, y)) <= 2e-6, `‖Σ p_x ρ_x M_x − Y‖ = ${maxAbs(sub(sum, y))}`);
    states.forEach((s, x) => {
      const slack = sub(y, scale(s, p[x]));
      assert.ok(eigvalsh(hermitianPart(slack))[0] >= -1e-8, `Y − p_${x} ρ_${x} has a negative eigenvalue`);
      assert.ok(maxAbs(mul(slack, g.measurement[x])) <= 2e-6, `complementary slackness for x = ${x}`);
    });
  });

  it('returns a POVM: every M_x ⪰ 0 and Σ_x M_x = 1 (definition of a POVM)', () => {
    const r = rng(15);
    const states = [randomDensity(4, r), randomDensity(4, r), randomDensity(4, r)];
    const g = guessingProbability([0.3, 0.3, 0.4], states);
    let s = zeros(4, 4);
    for (const m of g.measurement) {
      assert.ok(eigvalsh(m)[0] >= -1e-9);
      s = add(s, m);
    }
    assert.ok(maxAbs(sub(s, identity(4))) <= 1e-12);
    assert.ok(g.certificate.relativeGap <= 1e-8 && g.certificate.primalResidual <= 1e-8);
  });
});

describe('guessing-probability op (PROTOCOL.md fields: probabilities, states)', () => {
  it('answers ½(1 + ‖ρ₀ − ρ₁‖₁/2) for |0⟩ and |+⟩ with equal priors, i.e. ½(1 + 1/√2) (Helstrom 1976; recalled)', () => {
    const a = handle({
      op: 'guessing-probability',
      probabilities: [0.5, 0.5],
      states: [[[1, 0], [0, 0]], { ket: ['1/sqrt(2)', '1/sqrt(2)'] }],
    }) as Record<string, any>;
    assert.equal(a.ok, true, JSON.stringify(a));
    assert.ok(Math.abs(a.value - 0.5 * (1 + Math.SQRT1_2)) <= 1e-7);
    assert.equal(a.measurement.length, 2);
    assert.equal(a.certificate.status, 'optimal');
    for (const k of ['primalObjective', 'dualObjective', 'gap', 'relativeGap', 'primalResidual', 'dualResidual']) {
      assert.equal(typeof a.certificate[k], 'number', k);
    }
    assert.doesNotThrow(() => JSON.parse(JSON.stringify(a)));
  });

  it('stays in its range [max_x p_x, 1] (guessing the likeliest x is a strategy; every Tr M_x ρ_x ≤ 1; common practice), the excess stated in certificate.clipped', () => {
    // Orthogonal states (p_guess = 1, Nielsen & Chuang Box 2.3) and equal states (p_guess = max_x p_x): both ends of the range.
    const cases: [number[], number[][][], number][] = [
      [[0.5, 0.5], [[[1, 0], [0, 0]], [[0, 0], [0, 1]]], 1],
      [[0.7, 0.3], [[[0.6, 0], [0, 0.4]], [[0.6, 0], [0, 0.4]]], 0.7],
    ];
    for (const [probabilities, states, exact] of cases) {
      const a = handle({ op: 'guessing-probability', probabilities, states }) as Record<string, any>;
      assert.equal(a.ok, true, JSON.stringify(a.error));
      const { lower, upper } = a.certificate.bounds;
      assert.ok(lower >= Math.max(...probabilities) && upper <= 1, JSON.stringify(a.certificate.bounds));
      assert.ok(lower <= a.value && a.value <= upper);
      assert.ok(Math.abs(a.value - exact) <= 1e-7, `${a.value} vs ${exact}`);
      if (a.certificate.clipped) {
        assert.deepEqual(a.certificate.clipped.range, [Math.max(...probabilities), 1]);
        assert.ok(a.certificate.clipped.excess > 0 && a.certificate.clipped.excess <= 1e-6);
      }
    }
  });

  it('refuses probabilities that do not sum to 1, and negative ones, naming the field', () => {
    const states = [[[1, 0], [0, 0]], [[0, 0], [0, 1]]];
    const a = handle({ op: 'guessing-probability', probabilities: [0.5, 0.6], states }) as Record<string, any>;
    assert.equal(a.ok, false);
    assert.equal(a.error.code, 'invalid-argument');
    assert.equal(a.error.path, 'probabilities');
    const b = handle({ op: 'guessing-probability', probabilities: [1.2, -0.2], states }) as Record<string, any>;
    assert.equal(b.ok, false);
    assert.equal(b.error.path, 'probabilities[1]');
  });

  it('refuses states of different dimensions and a count that does not match the probabilities', () => {
    const a = handle({
      op: 'guessing-probability', probabilities: [0.5, 0.5], states: [[[1, 0], [0, 0]], [[1, 0, 0], [0, 0, 0], [0, 0, 0]]],
    }) as Record<string, any>;
    assert.equal(a.ok, false);
    assert.equal(a.error.code, 'dimension-mismatch');
    assert.equal(a.error.path, 'states[1]');
    const b = handle({ op: 'guessing-probability', probabilities: [1], states: [[[1, 0], [0, 0]], [[0, 0], [0, 1]]] }) as Record<string, any>;
    assert.equal(b.ok, false);
    assert.equal(b.error.code, 'dimension-mismatch');
  });

  it('refuses a state that is not a density matrix (trace 2), naming it', () => {
    const a = handle({ op: 'guessing-probability', probabilities: [0.5, 0.5], states: [[[1, 0], [0, 0]], [[1, 0], [0, 1]]] }) as Record<string, any>;
    assert.equal(a.ok, false);
    assert.equal(a.error.code, 'trace-not-one');
    assert.ok(String(a.error.path).startsWith('states[1]'));
  });
});
