// Facts about the preset channels. Each names its source.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, adjoint, identity, kron, mul, scale, zeros, combine, diagonal, partialTrace, fromRows, traceOfProductRe,
  innerProduct, trace,
} from '../../src/linalg/index.js';
import {
  depolarizing, dephasing, amplitudeDamping, generalizedAmplitudeDamping, erasure, unitaryChannel,
  partialTraceChannel, measurePrepare, pinchingByProjectors, pinchingInBasis, conditionalExpectation, groupTwirl,
  channelDiagnostics, applyKraus, composeChannels, weylOperator, adjointChannel, applyChannel,
  maximallyEntangled, isotropicState,
} from '../../src/quantum/index.js';
import type { Channel } from '../../src/quantum/index.js';
import { RhoError } from '../../src/errors.js';
import { rng, randomDensity, randomComplex, randomHermitian, eigenbasisUnitary } from '../helpers/random.js';
import { close, qubitClifford, hadamard } from './fixtures.js';
import { fromData, numpyVersions, python, toData } from './numpy-reference.js';

const versions = numpyVersions();

function throwsParam(f: () => unknown, path: string, code = 'invalid-argument'): void {
  assert.throws(f, (e: unknown) => e instanceof RhoError && e.code === code && e.path === path);
}

function tpAndUnital(ch: Channel): { tp: boolean; unital: boolean } {
  const d = channelDiagnostics(ch, 1e-12);
  return { tp: d.tracePreserving && d.completelyPositive, unital: d.unital };
}

describe('depolarizing and dephasing', () => {
  it('depolarizing with p = 1 sends every state to the maximally mixed state (Nielsen & Chuang §8.3.4)', () => {
    const r = rng(1);
    for (const d of [2, 3, 4]) {
      const rho = randomDensity(d, r);
      assert.ok(close(applyKraus(depolarizing(d, 1), rho), scale(identity(d), 1 / d), 1e-14));
    }
  });

  it('depolarizing acts as (1 − p)ρ + p I/d for p across its completely positive range [0, d²/(d²−1)] (Nielsen & Chuang §8.3.4)', () => {
    const r = rng(2);
    for (const [d, p] of [[2, 0], [2, 0.4], [3, 0.7], [2, 4 / 3], [3, 9 / 8]]) {
      const rho = randomDensity(d, r);
      const ch = depolarizing(d, p);
      assert.ok(close(applyKraus(ch, rho), combine([1 - p, p / d], [rho, identity(d)]), 1e-13));
      assert.ok(channelDiagnostics(ch).completelyPositive);
    }
    throwsParam(() => depolarizing(2, 1.4), 'p');
    throwsParam(() => depolarizing(0, 0.5), 'd');
  });

  it('the Weyl operators X^a Z^b are unitary and trace-orthogonal: Tr(W_ab* W_cd) = d δ_ac δ_bd (Weyl–Schwinger basis; recalled from memory)', () => {
    const d = 3;
    for (let a = 0; a < d; a++) for (let b = 0; b < d; b++) for (let c = 0; c < d; c++) for (let e = 0; e < d; e++) {
      const ip = innerProduct(weylOperator(d, a, b), weylOperator(d, c, e));
      const expected = a === c && b === e ? d : 0;
      assert.ok(Math.abs(ip.re - expected) < 1e-12 && Math.abs(ip.im) < 1e-12);
    }
  });

  it('dephasing multiplies the off-diagonal entries by 1 − p and keeps the diagonal (definition; qubit case: phase flip with probability p/2, Nielsen & Chuang §8.3.3)', () => {
    const r = rng(3);
    const rho = randomDensity(3, r);
    const out = applyKraus(dephasing(3, 0.25), rho);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      const f = i === j ? 1 : 0.75;
      assert.ok(Math.abs(out.re[i * 3 + j] - f * rho.re[i * 3 + j]) < 1e-14);
      assert.ok(Math.abs(out.im[i * 3 + j] - f * rho.im[i * 3 + j]) < 1e-14);
    }
    const q = randomDensity(2, r);
    const Z = diagonal([1, -1]);
    assert.ok(close(applyKraus(dephasing(2, 0.6), q), combine([0.7, 0.3], [q, mul(mul(Z, q), Z)]), 1e-14));
  });
});

describe('amplitude damping and erasure', () => {
  it('amplitude damping maps [[a, b], [b*, c]] to [[a + γc, √(1−γ) b], [√(1−γ) b*, (1−γ)c]] (Nielsen & Chuang §8.3.5; equation recalled from memory)', () => {
    const rho = randomDensity(2, rng(4));
    const g = 0.35;
    const out = applyKraus(amplitudeDamping(g), rho);
    const [a, c] = [rho.re[0], rho.re[3]];
    const s = Math.sqrt(1 - g);
    const expected = fromRows([[a + g * c, s * rho.re[1]], [s * rho.re[2], (1 - g) * c]], [[0, s * rho.im[1]], [s * rho.im[2], 0]]);
    assert.ok(close(out, expected, 1e-15));
  });

  it('amplitude damping is trace preserving but not unital, with unitality defect ‖N(I) − I‖ = γ (N(I) = diag(1+γ, 1−γ))', () => {
    const d = channelDiagnostics(amplitudeDamping(0.2));
    assert.ok(d.tracePreserving);
    assert.ok(Math.abs(d.unitalDefect - 0.2) < 1e-14);
    throwsParam(() => amplitudeDamping(1.2), 'gamma');
  });

  it('generalized amplitude damping has the fixed point diag(1 − N, N) and reduces to amplitude damping at N = 0 (Nielsen & Chuang §8.3.5; recalled from memory)', () => {
    const ch = generalizedAmplitudeDamping(0.4, 0.3);
    const fixed = diagonal([0.7, 0.3]);
    assert.ok(close(applyKraus(ch, fixed), fixed, 1e-15));
    assert.ok(channelDiagnostics(ch).tracePreserving);
    const rho = randomDensity(2, rng(5));
    assert.ok(close(applyKraus(generalizedAmplitudeDamping(0.4, 0), rho), applyKraus(amplitudeDamping(0.4), rho), 1e-15));
    throwsParam(() => generalizedAmplitudeDamping(0.4, -0.1), 'N');
  });

  it('erasure outputs (1 − p)ρ ⊕ p|e⟩⟨e| with the flag as the last level (Grassl, Beth & Pellizzari, PRA 56, 33 (1997); recalled from memory)', () => {
    const rho = randomDensity(3, rng(6));
    const out = applyKraus(erasure(3, 0.2), rho);
    const expected = zeros(4, 4);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      expected.re[i * 4 + j] = 0.8 * rho.re[i * 3 + j];
      expected.im[i * 4 + j] = 0.8 * rho.im[i * 3 + j];
    }
    expected.re[15] = 0.2;
    assert.ok(close(out, expected, 1e-15));
    assert.ok(channelDiagnostics(erasure(3, 0.2)).tracePreserving);
  });
});

describe('unitary, partial trace, measure-and-prepare', () => {
  it('a unitary channel is trace preserving and unital; a non-unitary matrix is refused', () => {
    assert.deepEqual(tpAndUnital(unitaryChannel(eigenbasisUnitary(3, rng(7)))), { tp: true, unital: true });
    throwsParam(() => unitaryChannel(fromRows([[1, 1], [0, 1]])), 'unitary');
  });

  it('the partial-trace channel from A⊗B⊗C to A⊗C agrees with the partial trace (definition)', () => {
    const r = rng(8);
    const rho = randomDensity(12, r);
    const ch = partialTraceChannel([2, 3, 2], [1]);
    assert.deepEqual(ch.toDims, [2, 2]);
    assert.ok(close(applyKraus(ch, rho), partialTrace(rho, [2, 3, 2], [1]), 1e-14));
    assert.ok(channelDiagnostics(ch).tracePreserving);
  });

  it('measure-and-prepare outputs Σ_x Tr(M_x ρ) σ_x (Horodecki, Shor & Ruskai, Rev. Math. Phys. 15, 629 (2003))', () => {
    const r = rng(9);
    // A three-outcome POVM on a qubit: trine-like elements from a random unitary split.
    const U = eigenbasisUnitary(2, r);
    const P0 = mul(mul(U, diagonal([1, 0])), adjoint(U));
    const P1 = mul(mul(U, diagonal([0, 1])), adjoint(U));
    const povm = [scale(P0, 0.5), scale(P1, 0.5), scale(identity(2), 0.5)];
    const states = [randomDensity(3, r), randomDensity(3, r, 1), randomDensity(3, r, 2)];
    const ch = measurePrepare(povm, states);
    const rho = randomDensity(2, r);
    const expected = combine(povm.map((M) => traceOfProductRe(M, rho)), states);
    assert.ok(close(applyKraus(ch, rho), expected, 1e-13));
    assert.ok(channelDiagnostics(ch).tracePreserving);
    throwsParam(() => measurePrepare([scale(identity(2), 0.5)], [randomDensity(3, r)]), 'povm');
  });
});

describe('pinching, conditional expectation and twirl', () => {
  it('pinching in a basis keeps only the diagonal in that basis and is idempotent (Bhatia, Matrix Analysis, pinching; recalled from memory)', () => {
    const r = rng(10);
    const U = eigenbasisUnitary(3, r);
    const ch = pinchingInBasis(U);
    const rho = randomDensity(3, r);
    const out = applyKraus(ch, rho);
    const inBasis = mul(mul(adjoint(U), out), U);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) if (i !== j) assert.ok(Math.hypot(inBasis.re[i * 3 + j], inBasis.im[i * 3 + j]) < 1e-14);
    assert.ok(close(applyKraus(ch, out), out, 1e-14));
    assert.deepEqual(tpAndUnital(ch), { tp: true, unital: true });
  });

  it('pinching with given orthogonal projectors gives Σ P_k ρ P_k; non-orthogonal projectors are refused', () => {
    const P = diagonal([1, 1, 0]);
    const Q = diagonal([0, 0, 1]);
    const rho = randomDensity(3, rng(11));
    const out = applyKraus(pinchingByProjectors([P, Q]), rho);
    assert.ok(close(out, combine([1, 1], [mul(mul(P, rho), P), mul(mul(Q, rho), Q)]), 1e-15));
    throwsParam(() => pinchingByProjectors([P, diagonal([0, 1, 1])]), 'projectors[1]');
  });

  it(`the conditional expectation onto ⊕_k M_{n_k} ⊗ I_{m_k} is ⊕_k Tr_{m_k}(P_k X P_k) ⊗ I/m_k, checked against numpy ${versions.numpy} (standard construction; Petz 2008, recalled from memory)`, () => {
    const r = rng(12);
    const blocks = [2, 1];
    const mults = [2, 3];
    const D = 2 * 2 + 1 * 3;
    const E = conditionalExpectation(blocks, mults);
    const X = randomComplex(D, D, r);
    const ref = python(
      [
        'X = M(data["X"]); out = np.zeros_like(X); o = 0',
        'for n, m in zip(data["blocks"], data["mults"]):',
        '    B = X[o:o + n * m, o:o + n * m].reshape(n, m, n, m)',
        '    red = np.einsum("iaja->ij", B)',
        '    out[o:o + n * m, o:o + n * m] = np.kron(red, np.eye(m) / m)',
        '    o += n * m',
        'result = W(out)',
      ].join('\n'),
      { X: toData(X), blocks, mults },
    );
    assert.ok(close(applyKraus(E, X), fromData(ref), 1e-13));
  });

  it('the conditional expectation is a trace-preserving, unital, self-adjoint idempotent that fixes the algebra (defining properties; Umegaki 1954, Tomiyama 1957)', () => {
    const r = rng(13);
    const U = eigenbasisUnitary(5, r);
    const E = conditionalExpectation([1, 1], [2, 3], U);
    assert.deepEqual(tpAndUnital(E), { tp: true, unital: true });
    const X = randomComplex(5, 5, r);
    const EX = applyKraus(E, X);
    assert.ok(close(applyKraus(E, EX), EX, 1e-13), 'idempotent');
    assert.ok(close(applyKraus(adjointChannel(E), X), EX, 1e-13), 'self-adjoint');
    // An element of the algebra U(a I_2 ⊕ b I_3)U* is fixed.
    const A = mul(mul(U, diagonal([0.3, 0.3, -1.2, -1.2, -1.2])), adjoint(U));
    assert.ok(close(applyKraus(E, A), A, 1e-13));
    // The bimodule property E(A X) = A E(X) for A in the algebra.
    assert.ok(close(applyKraus(E, mul(A, X)), mul(A, EX), 1e-13));
  });

  it('with all multiplicities one the conditional expectation is the pinching onto the blocks (definition)', () => {
    const rho = randomDensity(4, rng(14));
    const E = conditionalExpectation([1, 3], [1, 1]);
    const P = pinchingByProjectors([diagonal([1, 0, 0, 0]), diagonal([0, 1, 1, 1])]);
    assert.ok(close(applyKraus(E, rho), applyKraus(P, rho), 1e-15));
  });

  it('the twirl over the qubit Pauli group is the completely depolarizing channel (Pauli group is a unitary 1-design; common practice)', () => {
    const paulis = [identity(2), weylOperator(2, 1, 0), weylOperator(2, 0, 1), weylOperator(2, 1, 1)];
    const rho = randomDensity(2, rng(15));
    assert.ok(close(applyKraus(groupTwirl(paulis), rho), scale(identity(2), 0.5), 1e-15));
  });

  it('the twirl over the Clifford group is idempotent and commutes with every group element (projection onto the commutant; common practice)', () => {
    const group = qubitClifford();
    const T = groupTwirl(group);
    const X = randomHermitian(2, rng(16));
    const TX = applyKraus(T, X);
    assert.ok(close(applyKraus(T, TX), TX, 1e-14));
    assert.ok(close(mul(hadamard, TX), mul(TX, hadamard), 1e-14));
    assert.deepEqual(tpAndUnital(T), { tp: true, unital: true });
    throwsParam(() => groupTwirl([identity(2), fromRows([[1, 0], [0, 2]])]), 'unitaries[1]');
  });

  it('every preset is trace preserving; the unital ones are exactly the depolarizing, dephasing, unitary, pinching, conditional-expectation and twirl channels (textbook facts)', () => {
    const r = rng(17);
    const unital = [depolarizing(3, 0.4), dephasing(2, 0.5), unitaryChannel(eigenbasisUnitary(2, r)), pinchingInBasis(3),
      conditionalExpectation([2], [2]), groupTwirl(qubitClifford())];
    const notUnital = [amplitudeDamping(0.3), generalizedAmplitudeDamping(0.3, 0.2), erasure(2, 0.1), partialTraceChannel([2, 2], [0]),
      measurePrepare([diagonal([1, 0]), diagonal([0, 1])], [diagonal([1, 0]), diagonal([1, 0])])];
    for (const ch of unital) assert.deepEqual(tpAndUnital(ch), { tp: true, unital: true });
    for (const ch of notUnital) assert.deepEqual(tpAndUnital(ch), { tp: true, unital: false });
  });

  it('composing amplitude damping γ₁ then γ₂ gives amplitude damping 1 − (1−γ₁)(1−γ₂) (semigroup property; common practice)', () => {
    const rho = randomDensity(2, rng(18));
    const c = composeChannels(amplitudeDamping(0.3), amplitudeDamping(0.5));
    assert.ok(close(applyKraus(c, rho), applyKraus(amplitudeDamping(1 - 0.7 * 0.5), rho), 1e-14));
  });

  it('depolarizing one half of a maximally entangled pair gives the isotropic state of fidelity 1 − p(d²−1)/d² (Horodecki & Horodecki 1999; derived from the definitions)', () => {
    const d = 3;
    const p = 0.6;
    const Phi = maximallyEntangled(d).matrix;
    const out = applyChannel(depolarizing(d, p), { matrix: Phi, dims: [d, d] }, [1]);
    const F = 1 - (p * (d * d - 1)) / (d * d);
    assert.ok(Math.abs(traceOfProductRe(out.matrix, Phi) - F) < 1e-14);
    assert.ok(close(out.matrix, isotropicState(d, F).matrix, 1e-14));
    assert.ok(Math.abs(trace(out.matrix).re - 1) < 1e-14);
  });
});
