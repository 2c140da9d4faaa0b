// The state forms the StateEditor accepts (src/ui/matrix-text.ts asStateValue): a bare matrix (rows) or a
// bare vector, {matrix}/{ket}, and {re, im} forms as answers carry them; anything else is refused with a
// TypeError saying what is accepted, instead of a crash deep in the grid. Forms as docs/protocol.md writes
// them ("Matrices"); the complex entry text is the reader's "a+b*i" (common practice, no published source).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { asStateValue } from '../../src/ui/matrix-text.js';

describe('StateEditor input forms', () => {
  it('reads a bare matrix as {matrix} and a bare vector as {ket}', () => {
    assert.deepEqual(asStateValue([[0.5, 0], [0, 0.5]]), { matrix: [[0.5, 0], [0, 0.5]] });
    assert.deepEqual(asStateValue([1, 0]), { ket: [1, 0] });
    assert.deepEqual(asStateValue(['1/sqrt(2)', 'i/sqrt(2)']), { ket: ['1/sqrt(2)', 'i/sqrt(2)'] });
  });

  it('keeps dims and labels and reads {re, im} matrices and kets', () => {
    assert.deepEqual(asStateValue({ matrix: { re: [[0.5, 0], [0, 0.5]], im: [[0, -0.25], [0.25, 0]] }, dims: [2], labels: ['A'] }), {
      matrix: [[0.5, '0-0.25*i'], ['0+0.25*i', 0.5]], dims: [2], labels: ['A'],
    });
    assert.deepEqual(asStateValue({ ket: { re: [1, 0], im: [0, 1] } }), { ket: [1, '0+1*i'] });
  });

  it('refuses what is not a state form with a TypeError that says what is accepted', () => {
    for (const bad of [null, 3, 'rho', {}, { matrix: 'x' }, { ket: [[1]] }, [[1], 2]]) {
      assert.throws(() => asStateValue(bad), (e: unknown) => e instanceof TypeError && /\{matrix: rows\}/.test((e as Error).message), JSON.stringify(bad));
    }
  });
});
