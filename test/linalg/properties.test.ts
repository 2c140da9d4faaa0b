// Property tests (fast-check) for linalg identities. Each identity is a textbook fact of matrix
// analysis (Horn & Johnson, Matrix Analysis, 2nd ed., ch. 4 for Kronecker products; Nielsen & Chuang
// §2.4.3 for the partial trace; Bhatia, Matrix Analysis, ch. IV for unitarily invariant norms).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import fc from 'fast-check';
import {
  CMatrix, adjoint, kron, mul, sub, frobeniusNorm, partialTrace, reorderSubsystems, partialTranspose, trace,
  transpose, traceNorm, operatorNorm, eigh, fromSpectrum, sqrtm, expm, logm, add, identity, marginal, scale,
} from '../../src/linalg/index.js';
import { randomComplex, randomHermitian, randomDensity, rng } from '../helpers/random.js';

const RUNS = { numRuns: 40 };
const close = (a: CMatrix, b: CMatrix, tol = 1e-10) => {
  const d = frobeniusNorm(sub(a, b));
  assert.ok(d <= tol * Math.max(1, frobeniusNorm(a)), `differ by ${d}`);
};
const dimsArb = fc.array(fc.integer({ min: 1, max: 3 }), { minLength: 1, maxLength: 3 });
const seedArb = fc.integer({ min: 1, max: 2 ** 30 });
const product = (d: number[]) => d.reduce((a, b) => a * b, 1);

describe('linalg identities (property tests)', () => {
  it('(AB)* = B*A* (Horn & Johnson §0.2)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 6 }), seedArb, (n, m, p, s) => {
      const r = rng(s);
      const A = randomComplex(n, m, r);
      const B = randomComplex(m, p, r);
      close(adjoint(mul(A, B)), mul(adjoint(B), adjoint(A)));
    }), RUNS);
  });

  it('mixed-product rule (A⊗B)(C⊗D) = AC ⊗ BD and Tr(A⊗B) = Tr A · Tr B (Horn & Johnson §4.2)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 4 }), fc.integer({ min: 1, max: 4 }), seedArb, (n, m, s) => {
      const r = rng(s);
      const [A, C] = [randomComplex(n, n, r), randomComplex(n, n, r)];
      const [B, D] = [randomComplex(m, m, r), randomComplex(m, m, r)];
      close(mul(kron(A, B), kron(C, D)), kron(mul(A, C), mul(B, D)));
      const t = trace(kron(A, B));
      const ta = trace(A);
      const tb = trace(B);
      assert.ok(Math.abs(t.re - (ta.re * tb.re - ta.im * tb.im)) < 1e-9 * (1 + Math.abs(t.re)));
      assert.ok(Math.abs(t.im - (ta.re * tb.im + ta.im * tb.re)) < 1e-9 * (1 + Math.abs(t.im)));
    }), RUNS);
  });

  it('partial trace of a product: Tr_B(X ⊗ Y) = X · Tr Y, and the partial trace preserves the trace (Nielsen & Chuang §2.4.3)', () => {
    fc.assert(fc.property(dimsArb, dimsArb, seedArb, (da, db, s) => {
      const r = rng(s);
      const X = randomComplex(product(da), product(da), r);
      const Y = randomHermitian(product(db), r);
      const dims = [...da, ...db];
      const traced = db.map((_, k) => da.length + k);
      close(partialTrace(kron(X, Y), dims, traced), scale(X, trace(Y).re));
      const Z = randomComplex(product(dims), product(dims), r);
      const full = trace(Z);
      const part = trace(partialTrace(Z, dims, [0]));
      assert.ok(Math.hypot(full.re - part.re, full.im - part.im) < 1e-9 * (1 + Math.hypot(full.re, full.im)));
    }), RUNS);
  });

  it('reordering subsystems is a unitary conjugation: the inverse order undoes it and the spectrum is unchanged (common practice)', () => {
    fc.assert(fc.property(dimsArb, seedArb, (dims, s) => {
      const r = rng(s);
      const n = product(dims);
      const H = randomHermitian(n, r);
      const perm = dims.map((_, k) => k).reverse();
      const newDims = perm.map((k) => dims[k]);
      const inverse = perm.map((_, k) => perm.indexOf(k));
      const P = reorderSubsystems(H, dims, perm);
      close(reorderSubsystems(P, newDims, inverse), H);
      const a = eigh(H, { vectors: false }).values;
      const b = eigh(P, { vectors: false }).values;
      a.forEach((x, i) => assert.ok(Math.abs(x - b[i]) < 1e-9 * (1 + Math.abs(x))));
      // The reordered product of factors is the product in the new order.
      if (dims.length === 2) {
        const [X, Y] = [randomComplex(dims[0], dims[0], r), randomComplex(dims[1], dims[1], r)];
        close(reorderSubsystems(kron(X, Y), dims, [1, 0]), kron(Y, X));
      }
    }), RUNS);
  });

  it('marginal keeps the listed subsystems in the order listed (common practice)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 3 }), fc.integer({ min: 1, max: 3 }), fc.integer({ min: 1, max: 3 }), seedArb, (a, b, c, s) => {
      const r = rng(s);
      const [X, Y, Z] = [randomDensity(a, r), randomDensity(b, r), randomDensity(c, r)];
      close(marginal(kron(kron(X, Y), Z), [a, b, c], [2, 0]), kron(Z, X));
    }), RUNS);
  });

  it('partial transpose is an involution, and on every subsystem it is the full transpose (common practice)', () => {
    fc.assert(fc.property(dimsArb, seedArb, (dims, s) => {
      const r = rng(s);
      const n = product(dims);
      const M = randomComplex(n, n, r);
      close(partialTranspose(partialTranspose(M, dims, [0]), dims, [0]), M);
      close(partialTranspose(M, dims, dims.map((_, k) => k)), transpose(M));
    }), RUNS);
  });

  it('trace norm: ‖A‖_op ≤ ‖A‖₁ ≤ rank·‖A‖_op, the triangle inequality and unitary invariance (Bhatia ch. IV)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 6 }), seedArb, (n, s) => {
      const r = rng(s);
      const A = randomComplex(n, n, r);
      const B = randomComplex(n, n, r);
      const U = eigh(randomHermitian(n, r)).vectors!;
      const t = traceNorm(A);
      const o = operatorNorm(A);
      assert.ok(o <= t * (1 + 1e-12) && t <= n * o * (1 + 1e-12));
      assert.ok(traceNorm(add(A, B)) <= (t + traceNorm(B)) * (1 + 1e-12));
      assert.ok(Math.abs(traceNorm(mul(mul(U, A), adjoint(U))) - t) < 1e-9 * (1 + t));
    }), RUNS);
  });

  it('spectral calculus: V diag(λ) V* = H, (√P)² = P and exp(log P) = P for positive P (spectral theorem)', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 8 }), seedArb, (n, s) => {
      const r = rng(s);
      const H = randomHermitian(n, r);
      const { values, vectors } = eigh(H);
      close(fromSpectrum(vectors!, values), H, 1e-12 * n);
      const P = add(randomDensity(n, r), scale(identity(n), 0.01));
      const root = sqrtm(P);
      close(mul(root, root), P, 1e-10);
      close(expm(logm(P)), P, 1e-10);
    }), RUNS);
  });
});
