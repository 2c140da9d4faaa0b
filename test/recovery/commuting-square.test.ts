// Commuting squares of conditional expectations through the commuting-square op: tensor-product
// algebras commute, two subalgebras of a qubit in non-orthogonal, non-mutually-unbiased bases do not,
// with the Friedrichs cosine against scipy's principal angles and the convergence of (E₁E₂)^k against
// c^{2k−1}; relative entropies to the algebras against numpy entropies (subadditivity).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, kron, identity, scale, toRows, zeros } from '../../src/linalg/index.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, rng } from '../helpers/random.js';
import { python, numpyVersions } from '../quantum/numpy-reference.js';

const versions = numpyVersions();
const wire = (m: CMatrix) => toRows(m);
function ask(req: Record<string, unknown>): Record<string, any> {
  const a = handle(req) as Record<string, any>;
  assert.equal(a.ok, true, JSON.stringify(a.error));
  return a;
}
const unit = (d: number, i: number, j: number) => { const m = zeros(d, d); m.re[i * d + j] = 1; return m; };

/** X ↦ Tr_2 X ⊗ 1/2 (first = true) or 1/2 ⊗ Tr_1 X on C² ⊗ C², in Kraus form. */
function halfTrace(keepFirst: boolean) {
  const kraus = [];
  for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) {
    const k = keepFirst ? kron(identity(2), unit(2, i, j)) : kron(unit(2, i, j), identity(2));
    kraus.push(wire(scale(k, Math.SQRT1_2)));
  }
  return { kraus, from: [4], to: [4] };
}

/** The pinching of a qubit in the eigenbasis of n·σ, n = (sin θ, 0, cos θ). */
function pinching(theta: number) {
  const c = Math.cos(theta / 2);
  const s = Math.sin(theta / 2);
  const p = [[[c * c, c * s], [c * s, s * s]], [[s * s, -c * s], [-c * s, c * c]]];
  return { kraus: p, from: [2], to: [2] };
}

describe('commuting-square: E₁E₂ = E₂E₁ = E₁₂ for two conditional expectations', () => {
  it('recognizes tensor-product algebras (M₂ ⊗ 1 and 1 ⊗ M₂) as a commuting square with the scalars as intersection and c = 0 (common practice, no published source)', () => {
    const a = ask({ op: 'commuting-square', first: halfTrace(true), second: halfTrace(false) });
    assert.equal(a.value, true);
    assert.equal(a.intersection.dimension, 1);
    assert.ok(a.friedrichsCosine <= 1e-10 && a.commutatorNorm <= 1e-12);
    assert.ok(a.convergence.every((s: any) => s.distance <= 1e-10));
    // E₁₂ is the complete depolarization X ↦ Tr X · 1/4: apply it.
    const rho = randomDensity(4, rng(601));
    const out = ask({ op: 'apply-channel', channel: a.intersection.kraus, rho: wire(rho) }).value;
    const re = Array.isArray(out) ? out : out.re;
    const im = Array.isArray(out) ? out.map((row: number[]) => row.map(() => 0)) : out.im;
    re.forEach((row: number[], i: number) => row.forEach((x: number, j: number) => assert.ok(Math.abs(x - (i === j ? 0.25 : 0)) <= 1e-12 && Math.abs(im[i][j]) <= 1e-12)));
  });

  it('recognizes pinchings on different tensor factors as commuting, with the diagonal algebra (dimension 4) as intersection (common practice, no published source)', () => {
    const z = [[[1, 0], [0, 0]], [[0, 0], [0, 1]]];
    const first = { kraus: z.map((p) => wire(kron({ rows: 2, cols: 2, re: Float64Array.from(p.flat()), im: new Float64Array(4) }, identity(2)))), from: [4], to: [4] };
    const second = { kraus: z.map((p) => wire(kron(identity(2), { rows: 2, cols: 2, re: Float64Array.from(p.flat()), im: new Float64Array(4) }))), from: [4], to: [4] };
    const a = ask({ op: 'commuting-square', first, second });
    assert.equal(a.value, true);
    assert.equal(a.intersection.dimension, 4);
  });

  for (const theta of [0.4, 1.1]) {
    it(`finds that the diagonal algebras of a qubit in bases at angle θ = ${theta} do not commute, with the Friedrichs cosine of scipy ${versions.scipy}'s principal angles (= |cos θ|) and ‖(E₁E₂)^k − E₁₂‖ = c^{2k−1} (Kayalar & Weinert 1988; recalled)`, () => {
      const first = pinching(0);
      const second = pinching(theta);
      const a = ask({ op: 'commuting-square', first, second, steps: 5 });
      assert.equal(a.value, false);
      assert.equal(a.intersection.dimension, 1);
      const ref = python(
        [
          'def S(ks):',
          '    return sum(np.kron(k, k.conj()) for k in ks)',
          'S1 = S([np.array(k, dtype=complex) for k in data["first"]])',
          'S2 = S([np.array(k, dtype=complex) for k in data["second"]])',
          'def rng_(s):',
          '    w, v = np.linalg.eigh((s + s.conj().T) / 2)',
          '    return v[:, w > 0.5]',
          'ang = scipy.linalg.subspace_angles(rng_(S1), rng_(S2))',
          'cos = np.cos(ang)',
          'result = float(max(c for c in cos if c < 1 - 1e-9))',
        ].join('\n'),
        { first: first.kraus, second: second.kraus },
      );
      assert.ok(Math.abs(a.friedrichsCosine - ref) <= 1e-10, `c = ${a.friedrichsCosine} vs scipy ${ref}`);
      assert.ok(Math.abs(ref - Math.abs(Math.cos(theta))) <= 1e-10, 'the cosine is |cos θ| (HS angle between Z and n·σ; derived)');
      for (const s of a.convergence) assert.ok(Math.abs(s.distance - s.predicted) <= 1e-10, `k = ${s.k}: ${s.distance} vs ${s.predicted}`);
    });
  }

  it(`gives D(ρ‖E(ρ)) for both tensor factors and the intersection equal to numpy ${versions.numpy} entropy differences, with ratio ≤ 1 (subadditivity; Araki & Lieb 1970)`, () => {
    const r = rng(602);
    const states = [0, 1, 2].map(() => randomDensity(4, r));
    const a = ask({ op: 'commuting-square', first: halfTrace(true), second: halfTrace(false), states: states.map(wire) });
    const ref = python(
      [
        'def S(x):',
        '    w = np.linalg.eigvalsh(x); w = w[w > 1e-14]',
        '    return float(-(w * np.log2(w)).sum())',
        'out = []',
        'for s in data:',
        '    rho = M(s); R = rho.reshape(2, 2, 2, 2)',
        '    r1 = np.einsum("ajbj->ab", R); r2 = np.einsum("iaib->ab", R)',
        '    out.append([1 + S(r1) - S(rho), 1 + S(r2) - S(rho), 2 - S(rho)])',
        'result = out',
      ].join('\n'),
      states.map((s) => ({ re: toRows(s).re, im: toRows(s).im })),
    );
    a.states.forEach((s: any, k: number) => {
      assert.ok(Math.abs(s.toFirst - ref[k][0]) <= 1e-10 && Math.abs(s.toSecond - ref[k][1]) <= 1e-10 && Math.abs(s.toIntersection - ref[k][2]) <= 1e-10, `state ${k}`);
      assert.ok(s.ratio <= 1 + 1e-12);
    });
    assert.ok(a.quasiFactorizationEstimate <= 1 + 1e-12 && a.quasiFactorizationEstimate > 0);
  });

  it('says when a map is not a trace-preserving conditional expectation (amplitude damping is not idempotent)', () => {
    const g = 0.3;
    const amp = { kraus: [[[1, 0], [0, Math.sqrt(1 - g)]], [[0, Math.sqrt(g)], [0, 0]]], from: [2], to: [2] };
    const a = ask({ op: 'commuting-square', first: amp, second: pinching(0) });
    assert.ok(a.defects.first.idempotence > 1e-3);
    assert.match(a.notes.join(' '), /first is not a trace-preserving conditional expectation/);
  });
});
