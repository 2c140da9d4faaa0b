// Facts about the state constructors. Each check names its source beside it.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, adjoint, combine, identity, kron, mul, scale, trace, traceOfProductRe, zeros, columnVector,
  eigvalsh, maxAbs, sub, reorderSubsystems, diagonal,
} from '../../src/linalg/index.js';
import {
  stateFromKet, blochState, mixture, maximallyMixed, maximallyEntangled, wernerState, isotropicState,
  ghzState, wState, thermalState, thermalStateWithPartition, tensorStates, reducedState, reorderState,
  relabelState, swapOperator, checkDensityMatrix, applyKraus, groupTwirl, doubled,
} from '../../src/quantum/index.js';
import { RhoError } from '../../src/errors.js';
import { rng, randomDensity, randomHermitian, eigenbasisUnitary } from '../helpers/random.js';
import { close, qubitClifford, qutritClifford } from './fixtures.js';
import { fromData, numpyVersions, python, toData } from './numpy-reference.js';

const versions = numpyVersions();

function pauli(which: 'x' | 'y' | 'z'): CMatrix {
  if (which === 'x') return { rows: 2, cols: 2, re: Float64Array.from([0, 1, 1, 0]), im: new Float64Array(4) };
  if (which === 'y') return { rows: 2, cols: 2, re: new Float64Array(4), im: Float64Array.from([0, -1, 1, 0]) };
  return diagonal([1, -1]);
}

function throwsCode(f: () => unknown, code: string, path?: string): void {
  assert.throws(f, (e: unknown) => e instanceof RhoError && e.code === code && (path === undefined || e.path === path));
}

describe('states from kets, Bloch vectors and mixtures', () => {
  it('a unit ket gives the rank-one projector |ψ⟩⟨ψ| (definition of a pure state)', () => {
    const v = columnVector([0.6, 0], [0, 0.8]);
    const s = stateFromKet(v);
    assert.ok(close(s.matrix, mul(v, adjoint(v))));
    assert.deepEqual(s.dims, [2]);
    checkDensityMatrix(s.matrix);
  });

  it('a ket whose norm is not one is refused, not normalised', () => {
    throwsCode(() => stateFromKet(columnVector([1, 1])), 'invalid-argument', 'ket');
  });

  it('the Bloch state (I + r·σ)/2 has Pauli expectations Tr(ρσ_i) = r_i (Nielsen & Chuang, Bloch sphere; recalled from memory)', () => {
    const r = [0.3, -0.4, 0.5];
    const s = blochState(r);
    (['x', 'y', 'z'] as const).forEach((w, i) => assert.ok(Math.abs(traceOfProductRe(s.matrix, pauli(w)) - r[i]) < 1e-15));
    checkDensityMatrix(s.matrix);
  });

  it('a Bloch vector longer than one is refused (it lies outside the Bloch ball)', () => {
    throwsCode(() => blochState([0.8, 0.8, 0]), 'invalid-argument', 'bloch');
  });

  it('a mixture Σ w_k ρ_k needs a probability vector of weights (definition of a convex combination)', () => {
    const r = rng(1);
    const a = { matrix: randomDensity(3, r), dims: [3] };
    const b = { matrix: randomDensity(3, r), dims: [3] };
    const m = mixture([0.25, 0.75], [a, b]);
    assert.ok(close(m.matrix, combine([0.25, 0.75], [a.matrix, b.matrix])));
    throwsCode(() => mixture([0.5, 0.6], [a, b]), 'invalid-argument', 'weights');
    throwsCode(() => mixture([1.5, -0.5], [a, b]), 'invalid-argument', 'weights[1]');
  });

  it('the maximally mixed state is I/D on the product of the given dimensions', () => {
    const s = maximallyMixed([2, 3]);
    assert.ok(close(s.matrix, scale(identity(6), 1 / 6)));
    assert.deepEqual(s.dims, [2, 3]);
  });
});

describe('entangled families', () => {
  it('the maximally entangled state has both marginals maximally mixed (textbook fact, e.g. Nielsen & Chuang ch. 2)', () => {
    for (const d of [2, 3, 4]) {
      const s = maximallyEntangled(d);
      assert.ok(close(reducedState(s, [0]).matrix, scale(identity(d), 1 / d)));
      assert.ok(close(reducedState(s, [1]).matrix, scale(identity(d), 1 / d)));
      assert.ok(Math.abs(traceOfProductRe(s.matrix, s.matrix) - 1) < 1e-14, 'pure');
    }
  });

  it('the Werner state has antisymmetric weight p and swap expectation 1 − 2p (Werner, PRA 40, 4277 (1989))', () => {
    for (const d of [2, 3]) {
      for (const p of [0, 0.3, 1]) {
        const s = wernerState(d, p);
        checkDensityMatrix(s.matrix);
        const F = swapOperator(d);
        const anti = combine([0.5, -0.5], [identity(d * d), F]);
        assert.ok(Math.abs(traceOfProductRe(s.matrix, anti) - p) < 1e-14);
        assert.ok(Math.abs(traceOfProductRe(s.matrix, F) - (1 - 2 * p)) < 1e-14);
      }
    }
  });

  it('for qubits the Werner state with p = 1 is the singlet (the antisymmetric subspace of C²⊗C² is the singlet)', () => {
    const singlet = columnVector([0, Math.SQRT1_2, -Math.SQRT1_2, 0]);
    assert.ok(close(wernerState(2, 1).matrix, mul(singlet, adjoint(singlet))));
  });

  it('the Werner state is invariant under U ⊗ U (Werner 1989)', () => {
    const r = rng(2);
    const s = wernerState(3, 0.4);
    for (let t = 0; t < 3; t++) {
      const U = eigenbasisUnitary(3, r);
      const UU = kron(U, U);
      assert.ok(close(mul(mul(UU, s.matrix), adjoint(UU)), s.matrix, 1e-12));
    }
  });

  it('the Werner state equals its twirl over U ⊗ U, U in the Clifford group, a unitary 2-design (Werner 1989; 2-design property of the Clifford group: DiVincenzo, Leung & Terhal, IEEE TIT 48, 580 (2002))', () => {
    for (const [d, group] of [[2, qubitClifford()], [3, qutritClifford()]] as const) {
      const twirl = groupTwirl(doubled(group, false), [d, d]);
      const s = wernerState(d, 0.35);
      assert.ok(close(applyKraus(twirl, s.matrix), s.matrix, 1e-12), `d=${d}`);
      // The twirl of any state is the Werner state with the same antisymmetric weight.
      const rho = randomDensity(d * d, rng(3));
      const anti = combine([0.5, -0.5], [identity(d * d), swapOperator(d)]);
      const p = traceOfProductRe(rho, anti);
      assert.ok(close(applyKraus(twirl, rho), wernerState(d, p).matrix, 1e-12), `twirl d=${d}`);
    }
  });

  it('the isotropic state has fidelity F with the maximally entangled state and is invariant under U ⊗ Ū (Horodecki & Horodecki, PRA 59, 4206 (1999))', () => {
    const r = rng(4);
    for (const d of [2, 3]) {
      const s = isotropicState(d, 0.7);
      checkDensityMatrix(s.matrix);
      assert.ok(Math.abs(traceOfProductRe(s.matrix, maximallyEntangled(d).matrix) - 0.7) < 1e-14);
      const [UUbar] = doubled([eigenbasisUnitary(d, r)], true);
      assert.ok(close(mul(mul(UUbar, s.matrix), adjoint(UUbar)), s.matrix, 1e-12));
    }
  });

  it('the isotropic state equals its twirl over U ⊗ Ū with U Clifford, and twirling any state gives the isotropic state of the same fidelity (Horodecki & Horodecki 1999)', () => {
    for (const [d, group] of [[2, qubitClifford()], [3, qutritClifford()]] as const) {
      const twirl = groupTwirl(doubled(group, true), [d, d]);
      const s = isotropicState(d, 0.2);
      assert.ok(close(applyKraus(twirl, s.matrix), s.matrix, 1e-12));
      const rho = randomDensity(d * d, rng(5));
      const f = traceOfProductRe(rho, maximallyEntangled(d).matrix);
      assert.ok(close(applyKraus(twirl, rho), isotropicState(d, f).matrix, 1e-12));
    }
  });

  it('every single-party marginal of a GHZ state is maximally mixed, and of a W state on n qubits is diag((n−1)/n, 1/n) (Dür, Vidal & Cirac, PRA 62, 062314 (2000); recalled from memory)', () => {
    for (const [n, d] of [[3, 2], [4, 2], [3, 3]]) {
      const g = ghzState(n, d);
      checkDensityMatrix(g.matrix);
      for (let k = 0; k < n; k++) assert.ok(close(reducedState(g, [k]).matrix, scale(identity(d), 1 / d)));
    }
    for (const n of [2, 3, 5]) {
      const w = wState(n);
      for (let k = 0; k < n; k++) assert.ok(close(reducedState(w, [k]).matrix, diagonal([(n - 1) / n, 1 / n])));
    }
  });
});

describe('thermal states', () => {
  it(`exp(−βH)/Z agrees with scipy.linalg.expm (numpy ${versions.numpy}, scipy ${versions.scipy})`, () => {
    const r = rng(6);
    const H = randomHermitian(5, r);
    const beta = 0.8;
    const ref = python(
      'H = M(data["H"]); E = scipy.linalg.expm(-data["beta"] * H); result = {"rho": W(E / np.trace(E)), "logZ": float(np.log(np.trace(E).real))}',
      { H: toData(H), beta },
    );
    const { state, logPartition } = thermalStateWithPartition(H, beta);
    assert.ok(close(state.matrix, fromData(ref.rho), 1e-12));
    assert.ok(Math.abs(logPartition - ref.logZ) < 1e-12);
  });

  it('at very large β the thermal state is the normalised ground-space projector, without overflow (limit T → 0, common practice)', () => {
    const H = diagonal([3, -2, -2, 5]);
    const s = thermalState(H, 1e4);
    assert.ok(close(s.matrix, diagonal([0, 0.5, 0.5, 0]), 1e-15));
    const neg = thermalState(H, -1e4); // negative temperature: the top eigenvector
    assert.ok(close(neg.matrix, diagonal([0, 0, 0, 1]), 1e-15));
  });

  it('at β = 0 the thermal state is maximally mixed (definition)', () => {
    assert.ok(close(thermalState(randomHermitian(4, rng(7)), 0).matrix, scale(identity(4), 0.25), 1e-14));
  });

  it('a non-Hermitian Hamiltonian is refused', () => {
    const H = zeros(2, 2);
    H.re[1] = 1;
    throwsCode(() => thermalState(H, 1), 'not-hermitian');
  });
});

describe('tensor products, reduced states and reordering', () => {
  it('the reduced states of ρ ⊗ σ are ρ and σ (Tr_B(ρ⊗σ) = ρ Tr σ, definition of the partial trace)', () => {
    const r = rng(8);
    const a = { matrix: randomDensity(2, r), dims: [2], labels: ['A'] };
    const b = { matrix: randomDensity(3, r), dims: [3], labels: ['B'] };
    const ab = tensorStates(a, b);
    assert.deepEqual(ab.dims, [2, 3]);
    assert.deepEqual(ab.labels, ['A', 'B']);
    assert.ok(close(reducedState(ab, [0]).matrix, a.matrix));
    assert.ok(close(reducedState(ab, [1]).matrix, b.matrix));
  });

  it('reordering subsystems of ρ_A ⊗ ρ_B ⊗ ρ_C by [2, 0, 1] gives ρ_C ⊗ ρ_A ⊗ ρ_B with labels following', () => {
    const r = rng(9);
    const [a, b, c] = [2, 3, 2].map((d, k) => ({ matrix: randomDensity(d, r), dims: [d], labels: ['ABC'[k]] }));
    const s = reorderState(tensorStates(a, b, c), [2, 0, 1]);
    assert.deepEqual(s.dims, [2, 2, 3]);
    assert.deepEqual(s.labels, ['C', 'A', 'B']);
    assert.ok(close(s.matrix, kron(kron(c.matrix, a.matrix), b.matrix)));
    // The reduced state in a chosen order equals the permuted marginal.
    const rho = { matrix: randomDensity(12, r), dims: [2, 3, 2] };
    const red = reducedState(rho, [2, 1]);
    assert.ok(close(red.matrix, reorderSubsystems(reducedState(rho, [1, 2]).matrix, [3, 2], [1, 0])));
  });

  it('relabelling changes names only, and wrong counts or indices are refused', () => {
    const s = relabelState(maximallyMixed([2, 2]), ['X', 'Y']);
    assert.deepEqual(s.labels, ['X', 'Y']);
    throwsCode(() => relabelState(s, ['X']), 'dimension-mismatch');
    throwsCode(() => reducedState(s, [2]), 'invalid-argument', 'keep[0]');
    throwsCode(() => reorderState(s, [0, 0]), 'invalid-argument');
  });

  it('the thermal state of a sum of local Hamiltonians is the product of the local thermal states (exp of commuting sums factorises)', () => {
    const r = rng(10);
    const h1 = randomHermitian(2, r);
    const h2 = randomHermitian(3, r);
    const H = combine([1, 1], [kron(h1, identity(3)), kron(identity(2), h2)]);
    const joint = thermalState(H, 1.3, [2, 3]);
    const prod = tensorStates(thermalState(h1, 1.3), thermalState(h2, 1.3));
    assert.ok(close(joint.matrix, prod.matrix, 1e-12));
    assert.ok(maxAbs(sub(joint.matrix, adjoint(joint.matrix))) < 1e-15);
    assert.ok(eigvalsh(joint.matrix)[0] > 0 && Math.abs(trace(joint.matrix).re - 1) < 1e-14);
  });
});
