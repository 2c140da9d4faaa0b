// Facts about the distance, fidelity and metric ops, through `handle` (PROTOCOL.md answer shapes).
// Numerical sources as in the quantity tests: closed forms from the literature, named per it(...).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';

function ok(request: Record<string, unknown>): Record<string, any> {
  const a = handle(request) as Record<string, any>;
  assert.equal(a.ok, true, JSON.stringify(a));
  return a;
}

function fails(request: Record<string, unknown>): { code: string; path?: string; message: string } {
  const a = handle(request) as Record<string, any>;
  assert.equal(a.ok, false, JSON.stringify(a));
  return a.error;
}

// Qubits with Bloch vectors a = (0.3, 0, 0.4) and b = (0, 0.6, 0), written as expression matrices.
const rho = [['0.7', '0.15'], ['0.15', '0.3']];
const sigma = [['1/2', '-0.3*i'], ['0.3*i', '1/2']];

describe('distance ops', () => {
  it('fidelity answers F squared with its root, matching F = Tr ρσ + 2√(det ρ det σ) for qubits (Hübner 1992; Jozsa 1994)', () => {
    const a = ok({ op: 'fidelity', rho, sigma });
    // Tr ρσ = (1 + a·b)/2 = 0.5; det ρ = (1 − |a|²)/4 = 0.1875; det σ = (1 − 0.36)/4 = 0.16.
    const expected = 0.5 + 2 * Math.sqrt(0.1875 * 0.16);
    assert.ok(Math.abs(a.value - expected) < 1e-12);
    assert.ok(Math.abs(a.root - Math.sqrt(expected)) < 1e-12);
  });

  it('trace-distance is half the Euclidean distance of the Bloch vectors (Nielsen & Chuang, Sec. 9.2.1)', () => {
    const a = ok({ op: 'trace-distance', rho, sigma });
    assert.ok(Math.abs(a.value - 0.5 * Math.hypot(0.3, 0.6, 0.4)) < 1e-14);
  });

  it('bures-distance is √(2(1 − √F)) and its angle arccos √F (Nielsen & Chuang, Sec. 9.2.2)', () => {
    const f = ok({ op: 'fidelity', rho, sigma });
    const b = ok({ op: 'bures-distance', rho, sigma });
    assert.ok(Math.abs(b.value - Math.sqrt(2 * (1 - f.root))) < 1e-14);
    assert.ok(Math.abs(b.angle - Math.acos(f.root)) < 1e-14);
  });

  it('refuses a state that is not positive semidefinite, naming the argument (PROTOCOL.md)', () => {
    const e = fails({ op: 'fidelity', rho: [[1.2, 0], [0, -0.2]], sigma });
    assert.equal(e.code, 'not-positive');
    assert.match(e.path ?? '', /^rho/);
  });

  it('purified-distance accepts subnormalised states, √(1 − (‖√ρ√σ‖₁ + √((1−Tr ρ)(1−Tr σ)))²) (Tomamichel, thesis arXiv:1203.2142, Sec. 3.2; recalled from memory), and refuses trace above 1', () => {
    // Commuting diagonal operators: ‖√ρ√σ‖₁ = Σ √(p_i q_i).
    const a = ok({ op: 'purified-distance', rho: [[0.5, 0], [0, 0.3]], sigma: [[0.4, 0], [0, 0.4]] });
    const root = Math.sqrt(0.2) + Math.sqrt(0.12) + Math.sqrt(0.2 * 0.2);
    assert.ok(Math.abs(a.value - Math.sqrt(1 - root * root)) < 1e-13);
    assert.equal(fails({ op: 'purified-distance', rho: [[0.9, 0], [0, 0.3]], sigma }).code, 'invalid-argument');
  });

  it('chernoff-exponent answers "Infinity" with a reason for orthogonal pure states, and −log₂|⟨ψ|φ⟩|² otherwise (Audenaert et al., PRL 98, 160501 (2007))', () => {
    const inf = ok({ op: 'chernoff-exponent', rho: [[1, 0], [0, 0]], sigma: [[0, 0], [0, 1]] });
    assert.equal(inf.value, 'Infinity');
    assert.ok(typeof inf.reason === 'string');
    const fin = ok({ op: 'chernoff-exponent', rho: [[1, 0], [0, 0]], sigma: { ket: ['sqrt(3)/2', '1/2'] } });
    assert.ok(Math.abs(fin.value + Math.log2(0.75)) < 1e-12);
    const nats = ok({ op: 'chernoff-exponent', rho: [[1, 0], [0, 0]], sigma: { ket: ['sqrt(3)/2', '1/2'] }, base: 'e' });
    assert.ok(Math.abs(nats.value + Math.log(0.75)) < 1e-12);
  });
});

describe('metric ops', () => {
  const base = [[0.6, 0.1], [0.1, 0.4]];
  const x = [[0.1, 0.05], [0.05, -0.1]];

  it('monotone-metric with the expression (1+t)/2 equals the "sld" preset, and (t-1)/log(t) the "kubo-mori" preset (Petz 1996)', () => {
    const a = ok({ op: 'monotone-metric', rho: base, x, metric: 'sld' });
    const b = ok({ op: 'monotone-metric', rho: base, x, metric: '(1+t)/2' });
    assert.ok(Math.abs(a.value - b.value) < 1e-15);
    const c = ok({ op: 'monotone-metric', rho: base, x, metric: 'kubo-mori' });
    const d = ok({ op: 'monotone-metric', rho: base, x, metric: '(t-1)/log(t)' });
    assert.ok(Math.abs(c.value - d.value) < 1e-13 * c.value);
  });

  it('monotone-metric refuses a non-symmetric f and an unreadable expression (Petz 1996: monotone metrics need f(t) = t f(1/t))', () => {
    assert.equal(fails({ op: 'monotone-metric', rho: base, x, metric: 't' }).code, 'invalid-argument');
    const e = fails({ op: 'monotone-metric', rho: base, x, metric: 'sqrt(s)' });
    assert.equal(e.code, 'parse-error');
    assert.match(e.message, /t\)/);
  });

  it('fisher-information of the pure family cos θ|0⟩ + sin θ|1⟩ is 4 for SLD and "Infinity" for Kubo–Mori (Braunstein & Caves 1994; Petz 1996)', () => {
    // At θ = 0: ρ = |0⟩⟨0|, ∂ρ = |0⟩⟨1| + |1⟩⟨0|; 4(⟨∂ψ|∂ψ⟩ − |⟨ψ|∂ψ⟩|²) = 4.
    const sld = ok({ op: 'fisher-information', rho: [[1, 0], [0, 0]], derivative: [[0, 1], [1, 0]], sld: true });
    assert.ok(Math.abs(sld.value - 4) < 1e-14);
    assert.deepEqual(sld.sld, [[0, 2], [2, 0]]);
    const km = ok({ op: 'fisher-information', rho: [[1, 0], [0, 0]], derivative: [[0, 1], [1, 0]], metric: 'kubo-mori' });
    assert.equal(km.value, 'Infinity');
    assert.ok(typeof km.reason === 'string');
  });

  it('expectation-divergence by blocks and by the pinching channel agree and equal H(diag ρ) − H(ρ) (Baumgratz, Cramer & Plenio, PRL 113, 140401 (2014))', () => {
    const a = ok({ op: 'expectation-divergence', rho: base, blocks: [1, 1] });
    const b = ok({ op: 'expectation-divergence', rho: base, channel: { kraus: [[[1, 0], [0, 0]], [[0, 0], [0, 1]]] } });
    const h = (p: number[]) => -p.reduce((s, v) => s + (v > 0 ? v * Math.log2(v) : 0), 0);
    const disc = Math.sqrt(0.01 + 0.01); // eigenvalues 0.5 ± √(0.1² + 0.1²)
    const expected = h([0.6, 0.4]) - h([0.5 + disc, 0.5 - disc]);
    assert.ok(Math.abs(a.value - expected) < 1e-13 && Math.abs(b.value - expected) < 1e-13);
    assert.equal(fails({ op: 'expectation-divergence', rho: base }).code, 'invalid-argument');
  });
});
