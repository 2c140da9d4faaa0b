// The real dense kernels of src/linalg (dense.ts, smallest-eigenvalue.ts) against closed forms and definitions.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { choleskyInPlaceGuarded } from '../../src/linalg/dense.js';
import { minEig } from '../../src/linalg/smallest-eigenvalue.js';
import { rng, gaussian } from '../helpers/random.js';

/** Q T Qᵀ with Q = 1 − 2 u uᵀ/‖u‖² (a Householder reflection: orthogonal, so the spectrum of T is kept). */
function reflect(t: Float64Array, n: number, u: number[]): Float64Array {
  const nu = u.reduce((s, x) => s + x * x, 0);
  const q = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) q[i * n + j] = (i === j ? 1 : 0) - (2 * u[i] * u[j]) / nu;
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) s += q[i * n + a] * t[a * n + b] * q[j * n + b];
      out[i * n + j] = s;
    }
  }
  return out;
}

describe('real dense kernels (src/linalg)', () => {
  it('smallest eigenvalue of the second-difference matrix tridiag(−1, 2, −1) of size n is 2 − 2cos(π/(n+1)), also after an orthogonal change of basis (Strang, Introduction to Applied Mathematics, §1.5; recalled from memory)', () => {
    const r = rng(3);
    for (const n of [3, 5, 8, 16, 32]) {
      const t = new Float64Array(n * n);
      for (let i = 0; i < n; i++) {
        t[i * n + i] = 2;
        if (i + 1 < n) t[i * n + i + 1] = t[(i + 1) * n + i] = -1;
      }
      const expected = 2 - 2 * Math.cos(Math.PI / (n + 1));
      assert.ok(Math.abs(minEig(t, n) - expected) < 1e-13, `n = ${n}: ${minEig(t, n)} vs ${expected}`);
      const u = Array.from({ length: n }, () => gaussian(r));
      const dense = reflect(t, n, u);
      assert.ok(Math.abs(minEig(dense, n) - expected) < 1e-12, `n = ${n} dense: ${minEig(dense, n)} vs ${expected}`);
      // Shifted by −3·1 the smallest eigenvalue is negative (the step-length case).
      for (let i = 0; i < n; i++) dense[i * n + i] -= 3;
      assert.ok(Math.abs(minEig(dense, n) - (expected - 3)) < 1e-12);
    }
  });

  it('smallest eigenvalue of a diagonal matrix is its smallest entry, with repeated entries (definition)', () => {
    const n = 7;
    const d = [4, -1, 3, -1, 0, 2, 5];
    const a = new Float64Array(n * n);
    d.forEach((v, i) => (a[i * n + i] = v));
    assert.equal(Math.abs(minEig(a, n) - -1) < 1e-15, true);
  });

  it('guarded Cholesky reproduces A = L Lᵀ for a positive definite A and flags a duplicated row as dependent (definition of the factorization; common practice, no published source)', () => {
    const r = rng(9);
    // 131 and 200 take the blocked path (panels of 64 columns, an odd last panel for 131).
    for (const n of [1, 3, 6, 13, 37, 131, 200]) {
      const g = Array.from({ length: n * n }, () => gaussian(r));
      const a = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        let s = i === j ? 1 : 0;
        for (let k = 0; k < n; k++) s += g[i * n + k] * g[j * n + k];
        a[i * n + j] = s;
      }
      const l = a.slice();
      assert.equal(choleskyInPlaceGuarded(l, n), 0);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        let s = 0;
        for (let k = 0; k <= Math.min(i, j); k++) s += l[i * n + k] * l[j * n + k];
        assert.ok(Math.abs(s - a[i * n + j]) < 1e-11 * (1 + Math.abs(a[i * n + j])), `n = ${n} (${i}, ${j})`);
      }
    }
    // Gram matrix of vectors v0, v1, v0 (third row depends on the first).
    const v = [[1, 2, 0], [0, 1, 1], [1, 2, 0]];
    const gram = new Float64Array(9);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) gram[i * 3 + j] = v[i].reduce((s, x, k) => s + x * v[j][k], 0);
    assert.equal(choleskyInPlaceGuarded(gram, 3), 1);
    // The same on the blocked path: rows 150 and 199 of a 200×200 Gram matrix repeat rows 3 and 70.
    const n = 200;
    const vs = Array.from({ length: n }, (_, i) => Array.from({ length: n }, () => gaussian(r)));
    vs[150] = vs[3];
    vs[199] = vs[70];
    const big = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) big[i * n + j] = vs[i].reduce((s, x, k) => s + x * vs[j][k], 0);
    assert.equal(choleskyInPlaceGuarded(big, n), 2);
  });
});
