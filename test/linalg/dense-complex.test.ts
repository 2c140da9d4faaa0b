// The SDP solver's complex kernels for Hermitian blocks (src/linalg/dense-complex.ts, smallest-eigenvalue.ts) against closed forms and definitions.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { cCholesky, cMul, cMulH, cSvdJacobi, embedComplex, extractHermitian } from '../../src/linalg/dense-complex.js';
import { minEigHermitianInPlace } from '../../src/linalg/smallest-eigenvalue.js';
import { rng, gaussian } from '../helpers/random.js';

/** A random complex Householder reflection Q = 1 − 2 u u^H/‖u‖² (unitary), dense-complex.ts layout. */
function reflection(h: number, r: () => number): Float64Array {
  const ur = Array.from({ length: h }, () => gaussian(r));
  const ui = Array.from({ length: h }, () => gaussian(r));
  let nu = 0;
  for (let i = 0; i < h; i++) nu += ur[i] * ur[i] + ui[i] * ui[i];
  const q = new Float64Array(2 * h * h);
  for (let i = 0; i < h; i++) {
    for (let j = 0; j < h; j++) {
      // u_i conj(u_j)
      const re = ur[i] * ur[j] + ui[i] * ui[j];
      const im = ui[i] * ur[j] - ur[i] * ui[j];
      q[i * h + j] = (i === j ? 1 : 0) - (2 * re) / nu;
      q[h * h + i * h + j] = (-2 * im) / nu;
    }
  }
  return q;
}

/** Q A Q^H. */
function conjugate(q: Float64Array, a: Float64Array, h: number): Float64Array {
  const t = new Float64Array(2 * h * h);
  const out = new Float64Array(2 * h * h);
  cMul(q, a, h, t);
  cMulH(t, q, h, out);
  return out;
}

describe('SDP complex kernels (Hermitian blocks)', () => {
  it('smallest eigenvalue of tridiag(−1, 2, −1) after a unitary change of basis is 2 − 2cos(π/(n+1)) (Strang, Introduction to Applied Mathematics, §1.5; recalled from memory)', () => {
    const r = rng(5);
    for (const h of [2, 3, 4, 8, 16]) {
      const t = new Float64Array(2 * h * h);
      for (let i = 0; i < h; i++) {
        t[i * h + i] = 2;
        if (i + 1 < h) t[i * h + i + 1] = t[(i + 1) * h + i] = -1;
      }
      const expected = 2 - 2 * Math.cos(Math.PI / (h + 1));
      const a = conjugate(reflection(h, r), t, h);
      const got = minEigHermitianInPlace(a.slice(), h, new Float64Array(h), new Float64Array(h), new Float64Array(2 * h));
      assert.ok(Math.abs(got - expected) < 1e-12, `h = ${h}: ${got} vs ${expected}`);
      for (let i = 0; i < h; i++) a[i * h + i] -= 3; // the step-length case: a negative smallest eigenvalue
      const shifted = minEigHermitianInPlace(a, h, new Float64Array(h), new Float64Array(h), new Float64Array(2 * h));
      assert.ok(Math.abs(shifted - (expected - 3)) < 1e-12);
    }
  });

  it('with a floor, the smallest eigenvalue is returned exactly when it lies below the floor, and the floor otherwise (without one, always), for every size including 1×1 (the contract a step length min(1, f·α_max) relies on; definition)', () => {
    const r = rng(7);
    for (const h of [1, 2, 3, 5]) {
      const t = new Float64Array(2 * h * h);
      for (let i = 0; i < h; i++) {
        t[i * h + i] = 2;
        if (i + 1 < h) t[i * h + i + 1] = t[(i + 1) * h + i] = -1;
      }
      // tridiag(−1, 2, −1) has smallest eigenvalue 2 − 2cos(π/(h+1)) (as in the test above); shift it to −1.1 and to −0.2.
      const base = 2 - 2 * Math.cos(Math.PI / (h + 1));
      for (const target of [-1.1, -0.2]) {
        const a = conjugate(reflection(h, r), t, h);
        for (let i = 0; i < h; i++) a[i * h + i] += target - base;
        const got = minEigHermitianInPlace(a, h, new Float64Array(h), new Float64Array(h), new Float64Array(2 * h), -0.49);
        const want = target < -0.49 ? target : -0.49;
        assert.ok(Math.abs(got - want) < 1e-12, `h = ${h}, smallest eigenvalue ${target}: got ${got}, want ${want}`);
        const b = conjugate(reflection(h, r), t, h);
        for (let i = 0; i < h; i++) b[i * h + i] += target - base;
        const plain = minEigHermitianInPlace(b, h, new Float64Array(h), new Float64Array(h), new Float64Array(2 * h));
        assert.ok(Math.abs(plain - target) < 1e-12, `h = ${h}, no floor: got ${plain}, want ${target}`);
      }
    }
  });

  it('one-sided Jacobi returns the singular values of U diag(s) V^H and a unitary V with B V having orthogonal columns (definition of the SVD)', () => {
    const r = rng(11);
    for (const h of [1, 3, 5, 8]) {
      const s = Array.from({ length: h }, (_, i) => 10 ** (-i) * (1 + i));
      const d = new Float64Array(2 * h * h);
      s.forEach((v, i) => (d[i * h + i] = v));
      const u = reflection(h, r);
      const v = reflection(h, r);
      const t = new Float64Array(2 * h * h);
      const b = new Float64Array(2 * h * h);
      cMul(u, d, h, t);
      cMulH(t, v, h, b);
      const V = new Float64Array(2 * h * h);
      const sigma = new Float64Array(h);
      cSvdJacobi(b, h, V, sigma, new Float64Array(2 * h * h));
      const got = Array.from(sigma).sort((x, y) => y - x);
      got.forEach((g, i) => assert.ok(Math.abs(g - s[i]) <= 1e-13 * s[i] + 1e-15, `h = ${h}, σ_${i}: ${g} vs ${s[i]}`));
      // V^H V = 1 and (BV)^H (BV) diagonal
      const bv = new Float64Array(2 * h * h);
      cMul(b, V, h, bv);
      const hh = h * h;
      for (let i = 0; i < h; i++) {
        for (let j = 0; j < h; j++) {
          let vr = 0;
          let vi = 0;
          let gr = 0;
          let gi = 0;
          for (let k = 0; k < h; k++) {
            vr += V[k * h + i] * V[k * h + j] + V[hh + k * h + i] * V[hh + k * h + j];
            vi += V[k * h + i] * V[hh + k * h + j] - V[hh + k * h + i] * V[k * h + j];
            gr += bv[k * h + i] * bv[k * h + j] + bv[hh + k * h + i] * bv[hh + k * h + j];
            gi += bv[k * h + i] * bv[hh + k * h + j] - bv[hh + k * h + i] * bv[k * h + j];
          }
          assert.ok(Math.abs(vr - (i === j ? 1 : 0)) < 1e-13 && Math.abs(vi) < 1e-13);
          if (i !== j) assert.ok(Math.hypot(gr, gi) < 1e-14 * s[0] * s[0]);
        }
      }
    }
  });

  it('complex Cholesky reproduces A = L L^H with L lower triangular and a positive real diagonal, and refuses an indefinite matrix (definition of the factorization)', () => {
    const r = rng(13);
    for (const h of [1, 2, 5, 9]) {
      const g = new Float64Array(2 * h * h);
      for (let e = 0; e < g.length; e++) g[e] = gaussian(r);
      const a = new Float64Array(2 * h * h);
      cMulH(g, g, h, a);
      for (let i = 0; i < h; i++) a[i * h + i] += 1;
      const l = new Float64Array(2 * h * h);
      assert.equal(cCholesky(a, h, l), true);
      const back = new Float64Array(2 * h * h);
      cMulH(l, l, h, back);
      for (let e = 0; e < a.length; e++) assert.ok(Math.abs(back[e] - a[e]) < 1e-12 * (1 + Math.abs(a[e])));
      for (let i = 0; i < h; i++) {
        assert.ok(l[i * h + i] > 0 && l[h * h + i * h + i] === 0);
        for (let j = i + 1; j < h; j++) assert.ok(l[i * h + j] === 0 && l[h * h + i * h + j] === 0);
      }
      a[0] = -1;
      assert.equal(cCholesky(a, h, l), false);
    }
  });

  it('the real embedding [[Re, −Im], [Im, Re]] round-trips a complex matrix (definition of the embedding)', () => {
    const r = rng(17);
    const h = 4;
    const c = new Float64Array(2 * h * h);
    for (let e = 0; e < c.length; e++) c[e] = gaussian(r);
    const emb = new Float64Array(4 * h * h);
    embedComplex(c, h, emb);
    const back = new Float64Array(2 * h * h);
    extractHermitian(emb, h, back);
    for (let e = 0; e < c.length; e++) assert.ok(Math.abs(back[e] - c[e]) < 1e-15);
  });
});
