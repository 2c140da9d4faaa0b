// Facts about the transport path of large matrices: requests as text with repeated keys, matrices given as
// rows of numbers (read once by the size walk, validated through stand-ins), and the pass over a square
// matrix that runs in the eigensolver's kernels from order 16. Sources: RFC 8259 (§4: an object's names
// SHOULD be unique; §7: an escape such as \u0062 stands for the same character as "b"), numpy.linalg.eigvalsh
// through .venv (the spectrum of a 20 × 20 Hermitian matrix given as rows), and the definition of a
// Hermitian matrix (M_ij = conj(M_ji), common practice). The error codes and paths are the protocol's own
// contract ("path: the place in the request"; docs/protocol.md), no published source: each check here
// compares the answer for a matrix of order 20 (kernels on) with the one for the same fault at order 4
// (TypeScript loops), or with the place where the fault was put.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { findDuplicateKeys } from '../../src/ops/json-text.js';
import { runPythonCode } from '../helpers/python.js';

function hermitianRows(n: number, seed: number): { re: number[][]; im: number[][] } {
  let s = seed >>> 0;
  const rand = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32) - 0.5;
  const re = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const im = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const a = rand();
      const b = i === j ? 0 : rand();
      re[i][j] = a;
      re[j][i] = a;
      im[i][j] = b;
      im[j][i] = -b;
    }
  }
  return { re, im };
}

function errorOf(request: Record<string, unknown>): { code: string; path?: string } {
  const a = handle(request) as { ok: boolean; error?: { code: string; path?: string } };
  assert.equal(a.ok, false, 'the request is refused');
  return a.error!;
}

describe('duplicate keys in request text (RFC 8259 §4, §7)', () => {
  it('finds a repeated key with its place, in an object nested in a list', () => {
    assert.deepEqual(findDuplicateKeys('[{"k": 1}, {"k": 2, "k" : 3}]'), [{ path: '[1].k', key: 'k' }]);
  });

  it('treats an escaped key as the character it stands for ("a\\u0062" is "ab")', () => {
    assert.deepEqual(findDuplicateKeys('{"a\\u0062": 1, "ab": 2}'), [{ path: 'ab', key: 'ab' }]);
  });

  it('ignores braces, quotes and key-like text inside strings, and equal keys in different objects', () => {
    assert.deepEqual(findDuplicateKeys('{"s": "}{\\"s\\": 1", "t": "\\\\", "u": {"s": 1}, "v": [{"x": 1}, {"x": 2}]}'), []);
  });

  it('finds no duplicate in a 256 × 256 matrix given as rows', () => {
    const text = JSON.stringify({ op: 'spectrum', matrix: hermitianRows(256, 7) });
    assert.deepEqual(findDuplicateKeys(text), []);
    assert.equal(findDuplicateKeys(text.replace('"matrix"', '"op": "entropy", "matrix"')).length, 1);
  });
});

describe('matrices given as rows of numbers', () => {
  it('spectrum of a 20 × 20 Hermitian matrix as {re, im} rows agrees with numpy.linalg.eigvalsh', () => {
    const m = hermitianRows(20, 11);
    const a = handle({ op: 'spectrum', matrix: m }) as { ok: boolean; value: number[] };
    assert.equal(a.ok, true);
    const ref = runPythonCode<number[]>(
      'import json, sys, numpy as np\nm = json.load(sys.stdin)\nh = np.array(m["re"]) + 1j * np.array(m["im"])\nprint(json.dumps(np.linalg.eigvalsh(h).tolist()))',
      m,
    );
    for (let i = 0; i < 20; i++) assert.ok(Math.abs(a.value[i] - ref[i]) <= 1e-12 * 20, `eigenvalue ${i}`);
  });

  it('refuses a string among the numbers with the same code and path as for a small matrix', () => {
    const big = hermitianRows(20, 3);
    (big.im[5] as unknown[])[7] = 'x';
    const small = hermitianRows(4, 3);
    (small.im[1] as unknown[])[2] = 'x';
    const e = errorOf({ op: 'spectrum', matrix: big });
    const f = errorOf({ op: 'spectrum', matrix: small });
    assert.equal(e.code, f.code);
    assert.equal(f.path, 'matrix.im[1][2]');
    assert.equal(e.path, 'matrix.im[5][7]');
  });

  it('refuses an unknown field beside rows of numbers, and rows of unequal length, at their places', () => {
    const m = hermitianRows(20, 5);
    assert.equal(errorOf({ op: 'spectrum', matrix: { ...m, extra: 1 } }).path, 'matrix');
    const short = { re: m.re.map((r, i) => (i === 9 ? r.slice(1) : r)), im: m.im };
    assert.deepEqual(errorOf({ op: 'spectrum', matrix: short }).path, 'matrix.re[9]');
    assert.equal(errorOf({ op: 'spectrum', matrix: short }).code, 'dimension-mismatch');
  });
});

describe('the pass over a square matrix (kernels from order 16)', () => {
  it('names the entry that breaks Hermiticity most, as the definition M_ij = conj(M_ji) says', () => {
    for (const n of [4, 20]) {
      const m = hermitianRows(n, 9);
      m.re[n - 1][2] += 0.5;
      const e = errorOf({ op: 'spectrum', matrix: m });
      assert.equal(e.code, 'not-hermitian');
      assert.equal(e.path, `matrix[${n - 1}][2]`);
    }
  });

  it('refuses an entry too large to square at its place, for order 4 and order 20 alike', () => {
    for (const n of [4, 20]) {
      const m = hermitianRows(n, 13);
      m.im[3][1] = 1e200;
      const e = errorOf({ op: 'spectrum', matrix: m });
      assert.equal(e.code, 'invalid-argument');
      assert.equal(e.path, 'matrix[3][1]');
    }
  });
});
