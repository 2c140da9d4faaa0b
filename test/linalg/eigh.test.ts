// Facts about the Hermitian eigensolver. Source for each: the defining property of an
// eigendecomposition (common practice, no published source beyond the definition), with the
// accuracy goal of the project's issue: residual and loss of orthogonality below 1e-12·n·‖H‖.
import { describe, it } from 'node:test';
import assert from 'node:assert/strict';
import {
  CMatrix, eigh, mul, adjoint, sub, identity, frobeniusNorm, zeros, diagonal, scale, operatorNorm,
} from '../../src/linalg/index.js';
import { randomHermitian, rng, randomComplex } from '../helpers/random.js';

function unitary(n: number, r: () => number): CMatrix {
  return eigh(randomHermitian(n, r)).vectors!;
}

function check(h: CMatrix, label: string): void {
  const n = h.rows;
  const { values, vectors } = eigh(h);
  const V = vectors!;
  const norm = Math.max(operatorNorm(h), Number.MIN_VALUE);
  const residual = frobeniusNorm(sub(mul(h, V), mul(V, diagonal(values))));
  const orth = frobeniusNorm(sub(mul(adjoint(V), V), identity(n)));
  assert.ok(residual <= 1e-12 * n * norm, `${label}: residual ${residual} vs ${1e-12 * n * norm}`);
  assert.ok(orth <= 1e-12 * n, `${label}: orthogonality ${orth}`);
  for (let i = 1; i < n; i++) assert.ok(values[i - 1] <= values[i], `${label}: eigenvalues not ascending`);
}

describe('Hermitian eigensolver', () => {
  it('decomposes random Hermitian matrices to residual and orthogonality within 1e-12·n·‖H‖', () => {
    const r = rng(1);
    for (const n of [1, 2, 3, 4, 7, 16, 33, 64]) check(randomHermitian(n, r), `random n=${n}`);
  });

  it('handles degenerate and clustered spectra (U diag(λ) U* with repeated and near-equal λ)', () => {
    const r = rng(2);
    for (const n of [4, 12, 40]) {
      const U = unitary(n, r);
      const degenerate = Array.from({ length: n }, (_, i) => (i < n / 2 ? 1 : -2));
      const clustered = Array.from({ length: n }, (_, i) => 1 + 1e-13 * i);
      for (const [name, lam] of [['degenerate', degenerate], ['clustered', clustered]] as const) {
        const h = mul(mul(U, diagonal(lam)), adjoint(U));
        check(h, `${name} n=${n}`);
        const { values } = eigh(h, { vectors: false });
        const sorted = [...lam].sort((a, b) => a - b);
        values.forEach((v, i) => assert.ok(Math.abs(v - sorted[i]) < 1e-12 * n * 2, `${name}: eigenvalue ${i}`));
      }
    }
  });

  it('handles badly scaled matrices (entries from 1e-150 to 1e150 in separate problems, and mixed scales)', () => {
    const r = rng(3);
    for (const s of [1e-150, 1e-20, 1e20, 1e150]) check(scale(randomHermitian(10, r), s), `scaled ${s}`);
    const U = unitary(12, r);
    const lam = Array.from({ length: 12 }, (_, i) => 10 ** (i - 6));
    check(mul(mul(U, diagonal(lam)), adjoint(U)), 'graded spectrum');
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
