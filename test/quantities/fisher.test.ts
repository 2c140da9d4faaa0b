// Facts about the quantum Fisher information of one-parameter families. Sources in each it(...).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, add, sub, mul, scale, adjoint, diagonal, eigh, frobeniusNorm, fromRows, innerProduct,
  outer, columnVector, scaleComplex,
} from '../../src/linalg/index.js';
import { quantumFisherInformation, symmetricLogarithmicDerivative } from '../../src/quantities/fisher.js';
import {
  SLD_METRIC, KUBO_MORI_METRIC, WIGNER_YANASE_METRIC, HARMONIC_METRIC,
} from '../../src/quantities/metrics.js';
import { fidelity } from '../../src/quantities/fidelity.js';
import { rng, randomDensity, randomHermitian, randomComplex } from '../helpers/random.js';

/** e^{−iθH} as V e^{−iθΛ} V*. */
function unitary(h: CMatrix, theta: number): CMatrix {
  const { values, vectors } = eigh(h);
  const V = vectors!;
  const n = h.rows;
  const d = { rows: n, cols: n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
  for (let i = 0; i < n; i++) {
    d.re[i * n + i] = Math.cos(theta * values[i]);
    d.im[i * n + i] = -Math.sin(theta * values[i]);
  }
  return mul(mul(V, d), adjoint(V));
}

/** −i[H, ρ], the derivative of e^{−iθH} ρ e^{iθH} at θ = 0. */
function unitaryDerivative(rho: CMatrix, h: CMatrix): CMatrix {
  const c = sub(mul(h, rho), mul(rho, h));
  return scaleComplex(c, { re: 0, im: -1 });
}

describe('quantum Fisher information', () => {
  it('for a pure qubit family equals 4(⟨∂ψ|∂ψ⟩ − |⟨ψ|∂ψ⟩|²) (Braunstein & Caves, PRL 72, 3439 (1994))', () => {
    // |ψ(θ)⟩ = (cos θ, e^{iθ²} sin θ), normalised for every θ.
    for (const th of [0.3, 0.9, 1.4]) {
      const ph = th * th;
      const psi = columnVector([Math.cos(th), Math.cos(ph) * Math.sin(th)], [0, Math.sin(ph) * Math.sin(th)]);
      // ∂ψ = (−sin θ, e^{iθ²}(cos θ + 2iθ sin θ))
      const a = Math.cos(th);
      const b = 2 * th * Math.sin(th);
      const dpsi = columnVector(
        [-Math.sin(th), Math.cos(ph) * a - Math.sin(ph) * b],
        [0, Math.sin(ph) * a + Math.cos(ph) * b],
      );
      const rho = outer(psi, psi);
      const drho = add(outer(dpsi, psi), outer(psi, dpsi));
      const ip = innerProduct(psi, dpsi);
      const expected = 4 * (innerProduct(dpsi, dpsi).re - (ip.re * ip.re + ip.im * ip.im));
      const q = quantumFisherInformation(rho, drho);
      assert.ok(Math.abs(q.value - expected) < 1e-12, `θ=${th}: ${q.value} vs ${expected}`);
    }
  });

  it('for a pure state under e^{−iθH} equals 4 Var_ψ(H) (Braunstein & Caves 1994)', () => {
    const r = rng(51);
    const g = randomComplex(4, 1, r);
    const psi = scale(g, 1 / Math.sqrt(innerProduct(g, g).re));
    const h = randomHermitian(4, r);
    const rho = outer(psi, psi);
    const mean = innerProduct(psi, mul(h, psi)).re;
    const second = innerProduct(mul(h, psi), mul(h, psi)).re;
    const q = quantumFisherInformation(rho, unitaryDerivative(rho, h));
    assert.ok(Math.abs(q.value - 4 * (second - mean * mean)) < 1e-11);
  });

  it('for every normalised monotone metric equals the classical Fisher information Σ (∂p)²/p on commuting families (Čencov; Petz 1996)', () => {
    const p = [0.5, 0.3, 0.2, 0];
    const dp = [0.1, -0.04, -0.06, 0];
    const expected = 0.01 / 0.5 + 0.0016 / 0.3 + 0.0036 / 0.2;
    for (const m of [SLD_METRIC, KUBO_MORI_METRIC, WIGNER_YANASE_METRIC, HARMONIC_METRIC]) {
      const q = quantumFisherInformation(diagonal(p), diagonal(dp), { metric: m });
      assert.ok(Math.abs(q.value - expected) < 1e-14, `${m.name}: ${q.value}`);
    }
  });

  it('SLD QFI is 8(1 − √F(ρ_θ, ρ_{θ+δ}))/δ² to leading order, the Bures metric relation (Braunstein & Caves 1994), for full-rank and rank-deficient states', () => {
    const r = rng(52);
    for (const rank of [3, 2]) {
      const rho = randomDensity(3, r, rank);
      const h = randomHermitian(3, r);
      const d = 1e-4;
      const u = unitary(h, d);
      const moved = mul(mul(u, rho), adjoint(u));
      const fd = (8 * (1 - fidelity(rho, moved).root)) / (d * d);
      const q = quantumFisherInformation(rho, unitaryDerivative(rho, h)).value;
      assert.ok(Math.abs(q - fd) < 1e-4 * q, `rank ${rank}: ${q} vs ${fd}`);
    }
  });

  it('the SLD solves ∂ρ = (ρL + Lρ)/2 and Tr ∂ρ L is the SLD QFI (Helstrom 1976; Braunstein & Caves 1994)', () => {
    const r = rng(53);
    const rho = randomDensity(4, r);
    const drho = unitaryDerivative(rho, randomHermitian(4, r));
    const L = symmetricLogarithmicDerivative(rho, drho);
    const residual = sub(scale(add(mul(rho, L), mul(L, rho)), 0.5), drho);
    assert.ok(frobeniusNorm(residual) < 1e-12 * frobeniusNorm(drho));
    const tr = innerProduct(drho, L).re; // Tr ∂ρ* L = Tr ∂ρ L for Hermitian ∂ρ
    assert.ok(Math.abs(tr - quantumFisherInformation(rho, drho).value) < 1e-10 * tr);
  });

  it('for a pure family the Kubo–Mori QFI is infinite, with a reason, while the SLD one is finite (Petz 1996: the Bogoliubov metric blows up at pure states)', () => {
    const rho = fromRows([[1, 0], [0, 0]]);
    const drho = fromRows([[0, 1], [1, 0]]);
    const km = quantumFisherInformation(rho, drho, { metric: KUBO_MORI_METRIC });
    assert.equal(km.value, Infinity);
    assert.ok(km.reason && km.reason.length > 0);
    assert.ok(Number.isFinite(quantumFisherInformation(rho, drho).value));
  });

  it('drops a kernel–kernel block of the derivative with a warning, as the Braunstein–Caves sum over λ_i + λ_j > 0 does', () => {
    const rho = diagonal([0.6, 0.4, 0]);
    const drho = diagonal([0.1, -0.1, 0.5]);
    const q = quantumFisherInformation(rho, drho);
    assert.ok(Math.abs(q.value - (0.01 / 0.6 + 0.01 / 0.4)) < 1e-15);
    assert.ok(Math.abs(q.kernelBlock - 0.5) < 1e-15);
    assert.equal(q.warnings.length, 1);
  });
});
