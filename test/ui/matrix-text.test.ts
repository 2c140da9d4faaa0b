// Matrices pasted as text become the protocol's rows, read back by the engine's own expression reader:
// each format below is what numpy 2 (repr and str of an array), a spreadsheet (tab-separated), CSV and
// MATLAB-style text look like (common practice, no published source; the numpy forms are checked
// against numpy itself in .venv), and the engine's reading of the result must equal the numbers meant.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { parsePastedMatrix, toEntry } from '../../src/ui/matrix-text.js';
import { handle } from '../../src/ops/index.js';
import { runPythonCode } from '../helpers/python.js';

function readBack(rows: string[][]): { re: number[][]; im: number[][] } {
  const a = handle({ op: 'partial-trace', matrix: rows.map((r) => r.map(toEntry)), dims: [rows.length], keep: [0] }) as Record<string, any>;
  assert.equal(a.ok, true, JSON.stringify(a));
  const v = a.value;
  return Array.isArray(v) ? { re: v, im: v.map((r: number[]) => r.map(() => 0)) } : { re: v.re, im: v.im };
}

describe('paste of a matrix copied as text', () => {
  it("reads numpy's repr and str of a complex array (printed by numpy in .venv)", () => {
    const printed = runPythonCode<{ repr: string; str: string }>(
      'import json, numpy as np\nm = np.array([[0.5, -0.25j], [0.25j, 0.5]])\nprint(json.dumps({"repr": repr(m), "str": str(m)}))',
    );
    for (const text of [printed.repr, printed.str]) {
      const p = parsePastedMatrix(text);
      assert.ok('rows' in p, text);
      const m = readBack(p.rows);
      assert.deepEqual(m.re, [[0.5, 0], [0, 0.5]]);
      assert.deepEqual(m.im, [[0, -0.25], [0.25, 0]]);
    }
  });

  it('reads tab-separated rows (a spreadsheet), CSV and MATLAB-style text', () => {
    for (const text of ['0.5\t0.5\n0.5\t0.5', '0.5, 0.5\n0.5, 0.5', '[0.5 0.5; 0.5 0.5]', '[[0.5, 0.5], [0.5, 0.5]]']) {
      const p = parsePastedMatrix(text);
      assert.ok('rows' in p, text);
      assert.deepEqual(readBack(p.rows).re, [[0.5, 0.5], [0.5, 0.5]]);
    }
  });

  it('keeps expressions for the engine and says which row is ragged', () => {
    const p = parsePastedMatrix('1/2\tsqrt(2)/4\nsqrt(2)/4\t1/2');
    assert.ok('rows' in p);
    assert.ok(Math.abs(readBack(p.rows).re[0][1] - Math.SQRT2 / 4) < 1e-16);
    const bad = parsePastedMatrix('1 2\n3');
    assert.ok('error' in bad && /Row 2/.test(bad.error));
  });
});
