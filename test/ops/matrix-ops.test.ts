// Facts about the matrix ops, through `handle`. Outside references: numpy (from PyPI in .venv; its
// version is printed into each failure message) for eigenvalues (numpy.linalg.eigvalsh) and for the subsystem
// operations (reshape/transpose/trace on the tensor indices); the definition of an eigendecomposition
// (M V = V diag(λ), V unitary); Peres, Phys. Rev. Lett. 77, 1413 (1996): the partial transpose of a Bell
// state has the eigenvalue −1/2; the reduced state of a Bell state is I/2 (Nielsen & Chuang, §2.4.3).
import { describe, it, beforeAll } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { python, numpyVersions } from '../quantum/numpy-reference.js';
import { randomComplex, randomHermitian, rng } from '../helpers/random.js';
import { adjoint, diagonal, frobeniusNorm, fromRows, identity, mul, sub, toRows } from '../../src/linalg/index.js';

let versions = '';
beforeAll(() => {
  const v = numpyVersions();
  versions = `numpy ${v.numpy}`;
});

type Cx = { re: number[][]; im: number[][] };
function asCx(m: unknown): Cx {
  if (Array.isArray(m)) return { re: m as number[][], im: (m as number[][]).map((r) => r.map(() => 0)) };
  return m as Cx;
}
function maxDiff(a: Cx, b: Cx): number {
  let d = 0;
  a.re.forEach((row, i) => row.forEach((x, j) => {
    d = Math.max(d, Math.hypot(x - b.re[i][j], a.im[i][j] - b.im[i][j]));
  }));
  return d;
}
function ok(a: ReturnType<typeof handle>): Record<string, any> {
  assert.equal(a.ok, true, JSON.stringify(a));
  return a as Record<string, any>;
}

describe('spectrum op', () => {
  it('gives the eigenvalues of random Hermitian matrices in ascending order, as numpy.linalg.eigvalsh does', () => {
    const r = rng(11);
    for (const n of [1, 2, 3, 5, 8, 13]) {
      const h = toRows(randomHermitian(n, r));
      const got: number[] = ok(handle({ op: 'spectrum', matrix: h })).value;
      const want: number[] = python('result = np.linalg.eigvalsh(M(data)).tolist()', h);
      const scale = Math.max(1, ...want.map(Math.abs));
      got.forEach((x, k) => assert.ok(Math.abs(x - want[k]) <= 1e-12 * n * scale, `${versions}, n=${n}: λ${k} ${x} vs ${want[k]}`));
    }
  });

  it('returns eigenvectors V with M V = V diag(λ) and V*V = I (definition of an eigendecomposition)', () => {
    const h = randomHermitian(6, rng(3));
    const a = ok(handle({ op: 'spectrum', matrix: toRows(h), vectors: true }));
    const V = fromRows(a.vectors.re, a.vectors.im);
    const residual = frobeniusNorm(sub(mul(h, V), mul(V, diagonal(a.value))));
    assert.ok(residual < 1e-12 * 6 * frobeniusNorm(h), `residual ${residual}`);
    assert.ok(frobeniusNorm(sub(mul(adjoint(V), V), identity(6))) < 1e-12 * 6);
  });

  it('always writes the eigenvectors as {re, im}, even for a real matrix', () => {
    const a = ok(handle({ op: 'spectrum', matrix: [[2, 0], [0, 1]], vectors: true }));
    assert.deepEqual(a.value, [1, 2]);
    assert.ok(Array.isArray(a.vectors.re) && Array.isArray(a.vectors.im));
  });

  it('reads expression matrices: the Pauli Y matrix [[0, -i], [i, 0]] has eigenvalues ±1 (textbook)', () => {
    const a = ok(handle({ op: 'spectrum', matrix: [[0, '-i'], ['i', 0]] }));
    assert.ok(Math.abs(a.value[0] + 1) < 1e-15 && Math.abs(a.value[1] - 1) < 1e-15);
  });

  it('refuses a non-Hermitian matrix with not-hermitian at the entry at fault, and honours the tolerance', () => {
    const a = handle({ op: 'spectrum', matrix: [[1, 2], [2.5, 1]] });
    assert.equal(a.ok, false);
    assert.deepEqual(!a.ok && [a.error.code, a.error.path], ['not-hermitian', 'matrix[1][0]']);
    ok(handle({ op: 'spectrum', matrix: [[1, 2], [2 + 1e-8, 1]], tolerance: 1e-6 }));
  });
});

describe('subsystem ops', () => {
  const bell = [[0.5, 0, 0, 0.5], [0, 0, 0, 0], [0, 0, 0, 0], [0.5, 0, 0, 0.5]];

  it('partial-trace of a Bell state over either qubit is I/2 (Nielsen & Chuang §2.4.3)', () => {
    for (const over of [[0], [1]]) {
      const a = ok(handle({ op: 'partial-trace', matrix: bell, dims: [2, 2], over }));
      assert.deepEqual(a.value, [[0.5, 0], [0, 0.5]]);
      assert.deepEqual(a.dims, [2]);
    }
  });

  it('partial-trace agrees with numpy on a random 2x3x2 operator, for "over" and for "keep" in a chosen order', () => {
    const m = toRows(randomComplex(12, 12, rng(7)));
    const over = ok(handle({ op: 'partial-trace', matrix: m, dims: [2, 3, 2], over: [1] }));
    const want: Cx = python('t = M(data).reshape(2,3,2,2,3,2)\nresult = W(np.einsum("abcdbf->acdf", t).reshape(4,4))', m);
    assert.ok(maxDiff(asCx(over.value), want) < 1e-12, versions);
    assert.deepEqual(over.dims, [2, 2]);
    const keep = ok(handle({ op: 'partial-trace', matrix: m, dims: [2, 3, 2], keep: [2, 0], labels: ['A', 'B', 'C'] }));
    const want2: Cx = python('t = M(data).reshape(2,3,2,2,3,2)\nresult = W(np.einsum("abcdbf->cafd", t).reshape(4,4))', m);
    assert.ok(maxDiff(asCx(keep.value), want2) < 1e-12, versions);
    assert.deepEqual(keep.labels, ['C', 'A']);
  });

  it('partial-transpose of a Bell state has the eigenvalue −1/2 (Peres 1996)', () => {
    const pt = ok(handle({ op: 'partial-transpose', matrix: bell, dims: [2, 2], on: [1] }));
    const spec = ok(handle({ op: 'spectrum', matrix: pt.value }));
    assert.ok(Math.abs(spec.value[0] + 0.5) < 1e-15, String(spec.value));
  });

  it('partial-transpose and reorder-subsystems agree with numpy index permutations on a random 3x2x2 operator', () => {
    const m = toRows(randomComplex(12, 12, rng(9)));
    const pt = ok(handle({ op: 'partial-transpose', matrix: m, dims: [3, 2, 2], on: [0, 2] }));
    const wantPt: Cx = python('t = M(data).reshape(3,2,2,3,2,2)\nresult = W(t.transpose(3,1,5,0,4,2).reshape(12,12))', m);
    assert.ok(maxDiff(asCx(pt.value), wantPt) < 1e-15, versions);
    const re = ok(handle({ op: 'reorder-subsystems', matrix: m, dims: [3, 2, 2], order: [2, 0, 1] }));
    const wantRe: Cx = python('t = M(data).reshape(3,2,2,3,2,2)\nresult = W(t.transpose(2,0,1,5,3,4).reshape(12,12))', m);
    assert.ok(maxDiff(asCx(re.value), wantRe) < 1e-15, versions);
    assert.deepEqual(re.dims, [2, 3, 2]);
  });

  it('refuses inconsistent requests with the exact path', () => {
    const cases: [Record<string, unknown>, string, string][] = [
      [{ op: 'partial-trace', matrix: bell, dims: [2, 2] }, 'invalid-argument', 'over'],
      [{ op: 'partial-trace', matrix: bell, dims: [2, 2], over: [0], keep: [1] }, 'invalid-argument', 'keep'],
      [{ op: 'partial-trace', matrix: bell, dims: [2, 3], over: [0] }, 'dimension-mismatch', 'dims'],
      [{ op: 'partial-trace', matrix: bell, dims: [2, 2], over: [2] }, 'invalid-argument', 'over[0]'],
      [{ op: 'partial-transpose', matrix: bell, dims: [2, 2], on: [0, 0] }, 'invalid-argument', 'on[1]'],
      [{ op: 'reorder-subsystems', matrix: bell, dims: [2, 2], order: [1] }, 'invalid-argument', 'order'],
      [{ op: 'reorder-subsystems', matrix: [[1, 2]], dims: [2], order: [0] }, 'dimension-mismatch', 'matrix'],
    ];
    for (const [req, code, path] of cases) {
      const a = handle(req);
      assert.equal(a.ok, false, JSON.stringify(req));
      if (!a.ok) assert.deepEqual([a.error.code, a.error.path], [code, path], a.error.message);
    }
  });
});
