// Diamond-norm distance ½‖N − M‖_⋄ by Watrous's SDP: unitary channels (numerical-range formula),
// the maximally entangled input as a lower bound, replacement channels, identity vs completely
// depolarizing, and the diamond-distance op. The comparison with cvxopt is in guessing-cvxopt.test.ts.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, adjoint, mul, scale, sub, traceNorm, zeros, identity, eigvalsh, sqrtm,
} from '../../src/linalg/index.js';
import { krausToChoi } from '../../src/quantum/channels.js';
import { depolarizing, amplitudeDamping, dephasing } from '../../src/quantum/presets.js';
import type { Channel } from '../../src/quantum/types.js';
import { diamondDistance } from '../../src/oneshot/diamond.js';
import '../../src/ops/guessing-ops.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, randomUnitary, rng } from '../helpers/random.js';

/** Q diag(e^{iθ}) Q*. */
function unitaryWithPhases(q: CMatrix, theta: readonly number[]): CMatrix {
  const d = theta.length;
  const D = zeros(d, d);
  theta.forEach((t, k) => {
    D.re[k * d + k] = Math.cos(t);
    D.im[k * d + k] = Math.sin(t);
  });
  return mul(mul(q, D), adjoint(q));
}

/**
 * Distance from the origin to the convex hull of the points e^{iθ_k} (computed here from scratch):
 * 0 when the origin is inside (no gap between consecutive angles exceeds π), otherwise the smallest
 * distance from the origin to a segment between two of the points (the hull's boundary edges are
 * among these segments and all of them lie in the hull).
 */
function distanceToHull(theta: readonly number[]): number {
  const a = theta.map((t) => ((t % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI)).sort((x, y) => x - y);
  let gap = 0;
  for (let k = 0; k < a.length; k++) gap = Math.max(gap, (k + 1 < a.length ? a[k + 1] : a[0] + 2 * Math.PI) - a[k]);
  if (gap <= Math.PI) return 0;
  let best = Infinity;
  const pts = a.map((t) => [Math.cos(t), Math.sin(t)]);
  for (let i = 0; i < pts.length; i++) {
    for (let j = i; j < pts.length; j++) {
      const [px, py] = pts[i];
      const [qx, qy] = pts[j];
      const dx = qx - px;
      const dy = qy - py;
      const len2 = dx * dx + dy * dy;
      const s = len2 === 0 ? 0 : Math.min(1, Math.max(0, -(px * dx + py * dy) / len2));
      best = Math.min(best, Math.hypot(px + s * dx, py + s * dy));
    }
  }
  return best;
}

const unitaryChannel = (u: CMatrix): Channel => ({ kraus: [u], fromDims: [u.rows], toDims: [u.rows] });

describe('diamond-norm distance ½‖N − M‖_⋄ (Watrous 2009/2013 SDP)', () => {
  it('equals √(1 − ν²) for unitary channels U·U*, V·V*, with ν the distance from 0 to the convex hull of the eigenvalues of U*V (Aharonov, Kitaev & Nisan 1998; Watrous, The Theory of Quantum Information, Thm 3.55; recalled)', () => {
    const r = rng(61);
    const cases: number[][] = [[0.3, 1.1], [0, 0.8, 2.0], [0.2, 2.9, 4.5], [0.1, 0.5, 0.9, 1.3], [0, Math.PI]];
    for (const theta of cases) {
      const d = theta.length;
      const u = randomUnitary(d, r);
      const w = unitaryWithPhases(randomUnitary(d, r), theta);
      const v = mul(u, w); // U*V = W
      const nu = distanceToHull(theta);
      const expected = Math.sqrt(Math.max(0, 1 - nu * nu));
      const got = diamondDistance(unitaryChannel(u), unitaryChannel(v));
      assert.equal(got.certificate.status, 'optimal');
      assert.ok(Math.abs(got.value - expected) <= 1e-6, `phases ${theta}: SDP ${got.value}, formula ${expected}`);
    }
  });

  it('is at least the trace distance of the outputs on the maximally entangled input, ½‖J(N) − J(M)‖₁ / d (definition of the diamond norm)', () => {
    const r = rng(62);
    const pairs: [Channel, Channel][] = [
      [amplitudeDamping(0.3), depolarizing(2, 0.4)],
      [dephasing(3, 0.5), depolarizing(3, 0.2)],
      [amplitudeDamping(0.9), unitaryChannel(randomUnitary(2, r))],
    ];
    for (const [a, b] of pairs) {
      const d = a.fromDims[0];
      const entangled = 0.5 * traceNorm(sub(krausToChoi(a), krausToChoi(b))) / d;
      const got = diamondDistance(a, b);
      assert.ok(got.value >= entangled - 1e-8, `${got.value} < ${entangled}`);
      assert.ok(got.value <= 1 + 1e-8);
    }
  });

  it('brackets its value: the returned input achieves it (lower bound by the definition) and the repaired dual point bounds it from above (weak duality)', () => {
    const a = amplitudeDamping(0.25);
    const b = dephasing(2, 0.6);
    const got = diamondDistance(a, b);
    assert.ok(got.bounds.lower <= got.value + 1e-8 && got.value <= got.bounds.upper + 1e-8);
    assert.ok(got.bounds.upper - got.bounds.lower <= 1e-6, `bracket ${JSON.stringify(got.bounds)}`);
    assert.ok(eigvalsh(got.input)[0] >= -1e-12);
  });

  it('equals the trace distance ½‖ρ − σ‖₁ for the replacement channels X ↦ Tr(X) ρ and X ↦ Tr(X) σ (the output does not depend on the input; common practice, no published source)', () => {
    const r = rng(63);
    const rho = randomDensity(3, r);
    const sigma = randomDensity(3, r, 2);
    const replace = (s: CMatrix): Channel => {
      // Kraus operators K_ij = s^{1/2}|j⟩⟨i|: Σ_ij K_ij X K_ij* = Tr(X) s and Σ_ij K_ij* K_ij = Tr(s) 1.
      const root = sqrtm(s);
      const kraus: CMatrix[] = [];
      for (let i = 0; i < 2; i++) {
        for (let j = 0; j < 3; j++) {
          const k = zeros(3, 2);
          for (let row = 0; row < 3; row++) {
            k.re[row * 2 + i] = root.re[row * 3 + j];
            k.im[row * 2 + i] = root.im[row * 3 + j];
          }
          kraus.push(k);
        }
      }
      return { kraus, fromDims: [2], toDims: [3] };
    };
    const got = diamondDistance(replace(rho), replace(sigma));
    const td = 0.5 * traceNorm(sub(rho, sigma));
    assert.ok(Math.abs(got.value - td) <= 1e-7, `${got.value} vs ${td}`);
  });

  it('equals 1 − 1/d² between the identity and the completely depolarizing channel, d = 2 (maximally entangled input is optimal; recalled from memory)', () => {
    const got = diamondDistance(unitaryChannel(identity(2)), depolarizing(2, 1));
    assert.ok(Math.abs(got.value - 0.75) <= 1e-7, `${got.value}`);
  });

  it('is 0 between a channel and itself', () => {
    const got = diamondDistance(amplitudeDamping(0.4), amplitudeDamping(0.4));
    assert.ok(Math.abs(got.value) <= 1e-7, `${got.value}`);
  });

  it('refuses a map that is not trace preserving and channels with different dimensions', () => {
    const half: Channel = { kraus: [scale(identity(2), 0.9)], fromDims: [2], toDims: [2] };
    assert.throws(() => diamondDistance(half, amplitudeDamping(0.1)), (e: any) => e.code === 'not-trace-preserving' && e.path === 'a');
    const big = unitaryChannel(identity(3));
    assert.throws(() => diamondDistance(amplitudeDamping(0.1), big), (e: any) => e.code === 'dimension-mismatch');
  });
});

describe('diamond-distance op', () => {
  it('answers 1 for the identity against the bit flip X·X* (orthogonal outputs on |0⟩; common practice), with the optimal input and the certificate', () => {
    const a = handle({
      op: 'diamond-distance',
      a: { kraus: [[[1, 0], [0, 1]]] },
      b: { kraus: [[[0, 1], [1, 0]]] },
    }) as Record<string, any>;
    assert.equal(a.ok, true, JSON.stringify(a.error));
    assert.ok(Math.abs(a.value - 1) <= 1e-7);
    assert.equal(a.certificate.status, 'optimal');
    assert.ok(Array.isArray(a.input) || a.input.re);
    assert.ok(a.bounds.lower <= a.bounds.upper + 1e-9);
  });

  it('stays in its range [0, 1] (½‖N − M‖_⋄ ≤ ½(‖N‖_⋄ + ‖M‖_⋄) = 1 for channels; Watrous, The Theory of Quantum Information, Ch. 3) at distance 1, with the bracket containing the value and any excess stated in certificate.clipped', () => {
    // Identity against the bit flip, and the replacement channels onto |0⟩ and |1⟩ (orthogonal outputs: distance 1).
    const pairs = [
      [{ kraus: [[[1, 0], [0, 1]]] }, { kraus: [[[0, 1], [1, 0]]] }],
      [{ kraus: [[[1, 0], [0, 0]], [[0, 1], [0, 0]]] }, { kraus: [[[0, 0], [1, 0]], [[0, 0], [0, 1]]] }],
    ];
    for (const [a, b] of pairs) {
      const ans = handle({ op: 'diamond-distance', a, b }) as Record<string, any>;
      assert.equal(ans.ok, true, JSON.stringify(ans.error));
      const { lower, upper } = ans.certificate.bounds;
      assert.ok(ans.value >= 0 && ans.value <= 1, `value ${ans.value}`);
      assert.ok(lower >= 0 && upper <= 1 && lower <= ans.value && ans.value <= upper, JSON.stringify(ans.certificate.bounds));
      assert.ok(Math.abs(ans.value - 1) <= 1e-7);
      const c = ans.certificate.clipped;
      if (c) {
        // What was clipped is stated: the raw estimate or the raw bracket left [0, 1] by `excess`, which is small.
        assert.deepEqual(c.range, [0, 1]);
        assert.ok(c.excess > 0 && c.excess <= 1e-6, JSON.stringify(c));
        assert.ok(Math.max(c.from - 1, c.bracket.upper - 1) > 0);
        assert.ok(Math.abs(Math.max(c.from, c.bracket.upper) - 1 - c.excess) <= 1e-15, JSON.stringify(c));
        assert.ok(typeof ans.warning === 'string' && ans.warning.includes('clipped'), ans.warning);
      }
    }
  });

  it('refuses a Kraus family that is not trace preserving, naming the channel', () => {
    const a = handle({ op: 'diamond-distance', a: { kraus: [[[0.5, 0], [0, 0.5]]] }, b: { kraus: [[[1, 0], [0, 1]]] } }) as Record<string, any>;
    assert.equal(a.ok, false);
    assert.equal(a.error.code, 'not-trace-preserving');
    assert.equal(a.error.path, 'a');
  });
});
