// Facts about the Hermitian eigensolver. Source for each: the defining property of an
// eigendecomposition (common practice, no published source beyond the definition), with the
// accuracy goal of the project's issue: residual and loss of orthogonality below 1e-12·n·‖H‖;
// eigenvalues are also compared with numpy.linalg.eigvalsh run by .venv/bin/python.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, eigh, mul, adjoint, sub, identity, frobeniusNorm, zeros, diagonal, scale, operatorNorm,
} from '../../src/linalg/index.js';
import { randomHermitian, rng, randomComplex, randomDensity } from '../helpers/random.js';
import { eighContract, numpyEigvalsh, numpySkip, numpyVersion, randomUnitary } from '../helpers/eigh-reference.js';

const NUMPY = numpyVersion();

/** Direct sum diag(a, b). */
function directSum(a: CMatrix, b: CMatrix): CMatrix {
  const n = a.rows + b.rows;
  const m = zeros(n, n);
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.rows; j++) {
      m.re[i * n + j] = a.re[i * a.rows + j];
      m.im[i * n + j] = a.im[i * a.rows + j];
    }
  }
  const o = a.rows;
  for (let i = 0; i < b.rows; i++) {
    for (let j = 0; j < b.rows; j++) {
      m.re[(o + i) * n + o + j] = b.re[i * b.rows + j];
      m.im[(o + i) * n + o + j] = b.im[i * b.rows + j];
    }
  }
  return m;
}

describe('Hermitian eigensolver', () => {
  it('decomposes random Hermitian matrices to residual and orthogonality within 1e-12·n·‖H‖', () => {
    const r = rng(1);
    for (const n of [1, 2, 3, 4, 7, 16, 33, 64]) eighContract(randomHermitian(n, r), `random n=${n}`);
  });

  it('handles degenerate and clustered spectra (U diag(λ) U* with repeated and near-equal λ)', () => {
    const r = rng(2);
    for (const n of [4, 12, 40]) {
      const U = randomUnitary(n, r);
      const degenerate = Array.from({ length: n }, (_, i) => (i < n / 2 ? 1 : -2));
      const clustered = Array.from({ length: n }, (_, i) => 1 + 1e-13 * i);
      for (const [name, lam] of [['degenerate', degenerate], ['clustered', clustered]] as const) {
        const h = mul(mul(U, diagonal(lam)), adjoint(U));
        eighContract(h, `${name} n=${n}`);
        const { values } = eigh(h, { vectors: false });
        const sorted = [...lam].sort((a, b) => a - b);
        values.forEach((v, i) => assert.ok(Math.abs(v - sorted[i]) < 1e-12 * n * 2, `${name}: eigenvalue ${i}`));
      }
    }
  });

  it('handles badly scaled matrices (entries from 1e-150 to 1e150 in separate problems, and mixed scales)', () => {
    const r = rng(3);
    for (const s of [1e-150, 1e-20, 1e20, 1e150]) eighContract(scale(randomHermitian(10, r), s), `scaled ${s}`);
    const U = randomUnitary(12, r);
    const lam = Array.from({ length: 12 }, (_, i) => 10 ** (i - 6));
    eighContract(mul(mul(U, diagonal(lam)), adjoint(U)), 'graded spectrum');
  });

  it('decomposes random Hermitian matrices of size 128 and 256 to the same accuracy', () => {
    const r = rng(11);
    for (const n of [128, 256]) eighContract(randomHermitian(n, r), `random n=${n}`);
  });

  it('handles degenerate and clustered spectra at n = 128 (deflation in divide and conquer)', () => {
    const r = rng(12);
    const n = 128;
    const U = randomUnitary(n, r);
    const spectra: [string, number[]][] = [
      ['two values', Array.from({ length: n }, (_, i) => (i % 2 ? 1 : -2))],
      ['clustered', Array.from({ length: n }, (_, i) => 1 + 1e-13 * i)],
      ['three values, two 1e-9 apart', Array.from({ length: n }, (_, i) => [0, 1, 1 + 1e-9][i % 3])],
    ];
    for (const [name, lam] of spectra) eighContract(mul(mul(U, diagonal(lam)), adjoint(U)), `${name} n=${n}`);
  });

  it('handles many tiny eigenvalues: a rank-5 density matrix and a spectrum with 1e-14-sized eigenvalues', () => {
    const r = rng(13);
    const n = 128;
    const rho = randomDensity(n, r, 5);
    eighContract(rho, 'rank-5 density matrix n=128');
    const { values } = eigh(rho);
    // A positive semidefinite matrix: computed eigenvalues may dip below zero only by rounding.
    for (const v of values) assert.ok(v >= -1e-12 * n * operatorNorm(rho), `eigenvalue ${v} of a PSD matrix`);
    const U = randomUnitary(n, r);
    const lam = Array.from({ length: n }, (_, i) => (i < 4 ? i + 1 : 1e-14 * r()));
    eighContract(mul(mul(U, diagonal(lam)), adjoint(U)), 'tiny eigenvalues n=128');
  });

  it('decomposes a direct sum of two blocks (the tridiagonal form splits) and the Wilkinson matrix W+ of order 101', () => {
    const r = rng(14);
    eighContract(directSum(randomHermitian(70, r), randomHermitian(58, r)), 'direct sum 70+58');
    // Wilkinson's W+_{2m+1}: diagonal |i - m|, unit off-diagonal; its largest eigenvalues come in
    // pairs agreeing to many digits (Wilkinson, The Algebraic Eigenvalue Problem, 1965, ch. 5,
    // recalled from memory), which exercises the close-pair deflation.
    const n = 101;
    const w = zeros(n, n);
    for (let i = 0; i < n; i++) {
      w.re[i * n + i] = Math.abs(i - 50);
      if (i + 1 < n) {
        w.re[i * n + i + 1] = 1;
        w.re[(i + 1) * n + i] = 1;
      }
    }
    eighContract(w, 'Wilkinson W+ 101');
  });

  (numpySkip(NUMPY) ? it.skip : it)(`agrees with numpy.linalg.eigvalsh (numpy ${NUMPY ?? 'not available'}, LAPACK) on random matrices, with and without vectors`, () => {
    const r = rng(15);
    const ms: CMatrix[] = [];
    for (const n of [5, 24, 25, 60, 128, 200]) ms.push(randomHermitian(n, r));
    const U = randomUnitary(90, r);
    ms.push(mul(mul(U, diagonal(Array.from({ length: 90 }, (_, i) => (i % 3) - 1 + 1e-10 * i))), adjoint(U)));
    ms.push(scale(randomHermitian(40, r), 1e-30));
    const ref = numpyEigvalsh(ms);
    ms.forEach((m, k) => {
      const n = m.rows;
      const tol = 1e-12 * n * operatorNorm(m);
      const withVectors = eigh(m).values;
      const only = eigh(m, { vectors: false }).values;
      for (let i = 0; i < n; i++) {
        assert.ok(Math.abs(withVectors[i] - ref[k][i]) <= tol, `matrix ${k} (n=${n}) eigenvalue ${i}: ${withVectors[i]} vs numpy ${ref[k][i]}`);
        assert.ok(Math.abs(only[i] - ref[k][i]) <= tol, `matrix ${k} (n=${n}) values-only eigenvalue ${i}: ${only[i]} vs numpy ${ref[k][i]}`);
      }
    });
  });

  it('returns zeros and the identity for the zero matrix, and rejects non-finite input', () => {
    const { values, vectors } = eigh(zeros(3, 3));
    assert.deepEqual(Array.from(values), [0, 0, 0]);
    assert.equal(frobeniusNorm(sub(vectors!, identity(3))), 0);
    const bad = randomComplex(2, 2, rng(4));
    bad.re[1] = NaN;
    assert.throws(() => eigh(bad));
  });
});
