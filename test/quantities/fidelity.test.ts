// Facts about the Uhlmann fidelity F(ρ,σ) = ‖√ρ√σ‖₁² (squared; the root alongside).
// Sources are named in each it(...): closed forms from the literature and an independent computation
// with scipy 1.17.1 / numpy 2.4.6 (pinned in requirements.txt, run through .venv/bin/python).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, columnVector, outer, mul, trace, toRows, scale, innerProduct, adjoint, eigh,
} from '../../src/linalg/index.js';
import { fidelity, generalizedFidelity } from '../../src/quantities/fidelity.js';
import { rng, randomDensity, randomComplex, randomKet } from '../helpers/random.js';
import { runPythonCode } from '../helpers/python.js';
import { extend } from './divergence-fixtures.js';

function det2(m: CMatrix): number {
  // Determinant of a 2x2 Hermitian matrix: a d − |b|².
  return m.re[0] * m.re[3] - (m.re[1] * m.re[1] + m.im[1] * m.im[1]);
}

function scipyFidelities(pairs: [CMatrix, CMatrix][]): number[] {
  const payload = JSON.stringify(pairs.map(([a, b]) => [toRows(a), toRows(b)]));
  const script = [
    'import json, sys, numpy as np, scipy.linalg as sl',
    'out = []',
    'for a, b in json.load(sys.stdin):',
    '    r = np.array(a["re"]) + 1j * np.array(a["im"])',
    '    s = np.array(b["re"]) + 1j * np.array(b["im"])',
    // scipy's sqrtm may return a wider complex type for complex input; cast back and take the Hermitian
    // part before the second root, otherwise its Schur method loses about 1e-7 on the product.
    '    q = np.asarray(sl.sqrtm(r), dtype=complex)',
    '    m = q @ s @ q',
    '    m = np.asarray((m + m.conj().T) / 2, dtype=complex)',
    '    out.append(float(np.real(np.trace(np.asarray(sl.sqrtm(m), dtype=complex)))) ** 2)',
    'print(json.dumps(out))',
  ].join('\n');
  return runPythonCode(script, payload);
}

describe('fidelity', () => {
  // Full-rank qubits only: for a rank-one σ the closed form's √(det ρ det σ) turns rounding in det σ
  // into errors of order √ε; rank-one states are covered by the pure-state and numpy checks.
  it('matches the qubit closed form F = Tr ρσ + 2√(det ρ det σ) (Hübner, Phys. Lett. A 163, 239 (1992); Jozsa, J. Mod. Opt. 41, 2315 (1994))', () => {
    const r = rng(11);
    for (let k = 0; k < 20; k++) {
      const rho = randomDensity(2, r);
      const sigma = randomDensity(2, r);
      const closed = trace(mul(rho, sigma)).re + 2 * Math.sqrt(Math.max(det2(rho) * det2(sigma), 0));
      const f = fidelity(rho, sigma);
      assert.ok(Math.abs(f.value - closed) < 1e-12, `F ${f.value} vs closed form ${closed}`);
      assert.ok(Math.abs(f.root * f.root - f.value) < 1e-15);
    }
  });

  it('reduces to |⟨ψ|φ⟩|² for pure states (Nielsen & Chuang, Sec. 9.2.2)', () => {
    const r = rng(12);
    for (const n of [2, 3, 5]) {
      for (let k = 0; k < 5; k++) {
        const psi = randomKet(n, r);
        const phi = randomKet(n, r);
        const ip = innerProduct(psi, phi);
        const expected = ip.re * ip.re + ip.im * ip.im;
        const f = fidelity(outer(psi, psi), outer(phi, phi));
        assert.ok(Math.abs(f.value - expected) < 1e-12, `n=${n}: ${f.value} vs ${expected}`);
      }
    }
  });

  it('is symmetric, F(ρ,σ) = F(σ,ρ) (Uhlmann 1976; Jozsa 1994)', () => {
    const r = rng(13);
    for (const n of [2, 4, 6]) {
      const rho = randomDensity(n, r, Math.max(1, n - 2));
      const sigma = randomDensity(n, r);
      assert.ok(Math.abs(fidelity(rho, sigma).value - fidelity(sigma, rho).value) < 1e-12);
    }
  });

  it('equals 1 for identical states and 0 for states with orthogonal supports (Jozsa 1994)', () => {
    const r = rng(14);
    const rho = randomDensity(4, r);
    assert.ok(Math.abs(fidelity(rho, rho).value - 1) < 1e-12);
    const a = outer(columnVector([1, 0, 0]), columnVector([1, 0, 0]));
    const b = scale(outer(columnVector([0, 1, 1]), columnVector([0, 1, 1])), 0.5);
    assert.equal(fidelity(a, b).value, 0);
  });

  it('agrees with (Tr √(√ρ σ √ρ))² from scipy.linalg.sqrtm (scipy 1.17.1) on full-rank states', () => {
    const r = rng(15);
    const pairs: [CMatrix, CMatrix][] = [];
    for (const n of [2, 3, 4, 5, 8]) pairs.push([randomDensity(n, r), randomDensity(n, r)]);
    const expected = scipyFidelities(pairs);
    pairs.forEach(([rho, sigma], k) => {
      const f = fidelity(rho, sigma).value;
      assert.ok(Math.abs(f - expected[k]) < 1e-10, `pair ${k}: ${f} vs scipy ${expected[k]}`);
    });
  });

  // For rank-deficient states the reference avoids matrix square roots (whose √ε rounding would
  // dominate): with ρ = AA*, σ = BB*, ‖√ρ√σ‖₁ = ‖A*B‖₁ for any such factors (polar decomposition;
  // Watrous, The Theory of Quantum Information, 2018, Sec. 3.2 — recalled from memory), and numpy's
  // nuclear norm is SVD-based.
  it('agrees with ‖A*B‖₁² from numpy 2.4.6 (ρ = AA*, σ = BB*) on rank-deficient states', () => {
    const r = rng(18);
    const factors: [CMatrix, CMatrix][] = [];
    for (const [n, ka, kb] of [[3, 1, 2], [4, 2, 4], [5, 5, 2], [6, 3, 3], [8, 1, 1], [8, 4, 7]]) {
      const a = randomComplex(n, ka, r);
      const b = randomComplex(n, kb, r);
      factors.push([scale(a, 1 / Math.sqrt(innerProduct(a, a).re)), scale(b, 1 / Math.sqrt(innerProduct(b, b).re))]);
    }
    const payload = JSON.stringify(factors.map(([a, b]) => [toRows(a), toRows(b)]));
    const script = [
      'import json, sys, numpy as np',
      'out = []',
      'for a, b in json.load(sys.stdin):',
      '    A = np.array(a["re"]) + 1j * np.array(a["im"])',
      '    B = np.array(b["re"]) + 1j * np.array(b["im"])',
      '    out.append(float(np.linalg.norm(A.conj().T @ B, "nuc")) ** 2)',
      'print(json.dumps(out))',
    ].join('\n');
    const expected: number[] = runPythonCode(script, payload);
    factors.forEach(([a, b], k) => {
      const f = fidelity(mul(a, adjoint(a)), mul(b, adjoint(b)));
      assert.ok(Math.abs(f.value - expected[k]) < 1e-12, `pair ${k}: ${f.value} vs numpy ${expected[k]}`);
      assert.equal(f.truncationBound < 1e-6, true);
    });
  });

  it('generalized fidelity of subnormalised states equals the fidelity of ρ ⊕ (1 − Tr ρ) and σ ⊕ (1 − Tr σ) (Tomamichel, thesis arXiv:1203.2142, Sec. 3.2; recalled from memory)', () => {
    const r = rng(16);
    for (const n of [2, 3, 5]) {
      const rho = scale(randomDensity(n, r), 0.7);
      const sigma = scale(randomDensity(n, r, 1), 0.9);
      const g = generalizedFidelity(rho, sigma);
      const direct = fidelity(extend(rho, 0.3), extend(sigma, 0.1)).value;
      assert.ok(Math.abs(g.value - direct) < 1e-12, `${g.value} vs ${direct}`);
      const full = randomDensity(n, r);
      assert.ok(Math.abs(generalizedFidelity(full, sigma).value - fidelity(full, sigma).value) < 1e-14);
    }
  });

  it('is invariant under a common unitary conjugation (Jozsa 1994)', () => {
    const r = rng(17);
    const rho = randomDensity(4, r, 2);
    const sigma = randomDensity(4, r);
    // A unitary from the QR-free route: the eigenvectors of a random Hermitian matrix.
    const h = randomDensity(4, r);
    const U = eigh(h).vectors!;
    const f1 = fidelity(rho, sigma).value;
    const f2 = fidelity(mul(mul(U, rho), adjoint(U)), mul(mul(U, sigma), adjoint(U))).value;
    assert.ok(Math.abs(f1 - f2) < 1e-12);
  });
});

