// Facts about the codec between the protocol's plain data and the engine's objects. Sources: PROTOCOL.md
// (value forms, error codes, the Choi convention), the definitions of a density matrix and of a Choi matrix
// (Watrous, The Theory of Quantum Information, 2018, §2.2.2 Eq. (2.66) and Theorem 2.22: a map is completely
// positive iff its Choi matrix is positive semidefinite — theorem numbers recalled from memory), and the
// standard fact that the Choi matrix of the transpose map is the swap operator (checkable by hand from the
// definition: Σ_ij |i⟩⟨j| ⊗ |j⟩⟨i| = SWAP), whose eigenvalue −1 shows the transpose is not completely positive. The error paths are the protocol's
// own contract ("path: the place in the request"), no published source.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  readMatrix, readHermitian, readState, readOperatorState, readChannel, readSystems, readNumber, readDims, readKet,
  writeMatrix, writeNumber, writeState, writeChannel, MAX_DIMENSION, MAX_KRAUS, MAX_EXPRESSION_ENTRIES,
} from '../../src/ops/codec.js';
import { RhoError } from '../../src/errors.js';
import { CMatrix, fromRows, mul, adjoint, add, zeros, frobeniusNorm, sub } from '../../src/linalg/index.js';
import { runPythonCode } from '../helpers/python.js';

function fails(f: () => unknown, code: string, path: string): RhoError {
  try {
    f();
  } catch (err) {
    assert.ok(err instanceof RhoError, `expected a RhoError, got ${String(err)}`);
    assert.equal(err.code, code, `code (message: ${err.message})`);
    assert.equal(err.path, path, `path (message: ${err.message})`);
    return err;
  }
  assert.fail(`no error; expected ${code} at ${path}`);
}

function near(a: CMatrix, b: CMatrix, tol = 1e-12): void {
  assert.equal(a.rows, b.rows);
  assert.equal(a.cols, b.cols);
  const d = frobeniusNorm(sub(a, b));
  assert.ok(d <= tol, `matrices differ by ${d}`);
}

function apply(kraus: CMatrix[], rho: CMatrix): CMatrix {
  let out = zeros(kraus[0].rows, kraus[0].rows);
  for (const K of kraus) out = add(out, mul(mul(K, rho), adjoint(K)));
  return out;
}

describe('codec: matrices', () => {
  it('round-trips real rows and {re, im} matrices unchanged (PROTOCOL.md value forms)', () => {
    const real = [[0.5, -0.25], [0.25, 1e-300], [3, 4]];
    assert.deepEqual(writeMatrix(readMatrix(real, 'm')), real);
    const complex = { re: [[1, 0], [0, 2]], im: [[0, -0.5], [0.5, 0]] };
    assert.deepEqual(writeMatrix(readMatrix(complex, 'm')), complex);
  });

  it('drops the imaginary part on output when it is zero, and accepts {re} without im', () => {
    assert.deepEqual(writeMatrix(readMatrix({ re: [[1, 2]], im: [[0, 0]] }, 'm')), [[1, 2]]);
    assert.deepEqual(writeMatrix(readMatrix({ re: [[1, 2]] }, 'm')), [[1, 2]]);
  });

  it('reads the expression-matrix example of PROTOCOL.md as the matrix it denotes', () => {
    const m = readMatrix([['1/2', 'i/2'], ['-i/2', '1/2']], 'rho.matrix');
    near(m, fromRows([[0.5, 0], [0, 0.5]], [[0, 0.5], [-0.5, 0]]));
  });

  it('mixes numbers and expression strings within a row', () => {
    near(readMatrix([[1, 'sqrt(2)'], ['exp(i*pi)', 0]], 'm'), fromRows([[1, Math.SQRT2], [-1, 0]], [[0, 0], [1.2246467991473532e-16, 0]]), 1e-15);
  });

  it('names the exact entry of a bad expression', () => {
    fails(() => readMatrix([[1, 0], [0, 'one']], 'rho.matrix'), 'parse-error', 'rho.matrix[1][1]');
  });

  it('refuses ragged rows with dimension-mismatch at the offending row', () => {
    fails(() => readMatrix([[1, 0], [0]], 'rho.matrix'), 'dimension-mismatch', 'rho.matrix[1]');
    fails(() => readMatrix({ re: [[1, 0], [0, 1]], im: [[0, 0], [0, 0, 0]] }, 'm'), 'dimension-mismatch', 'm.im[1]');
    fails(() => readMatrix({ re: [[1, 0], [0, 1]], im: [[0, 0]] }, 'm'), 'dimension-mismatch', 'm.im');
  });

  it('refuses empty matrices and empty rows', () => {
    fails(() => readMatrix([], 'm'), 'invalid-argument', 'm');
    fails(() => readMatrix([[]], 'm'), 'invalid-argument', 'm[0]');
    fails(() => readMatrix({ re: [] }, 'm'), 'invalid-argument', 'm.re');
  });

  it('refuses NaN and infinite entries at their exact path', () => {
    fails(() => readMatrix([[1, 0], [NaN, 1]], 'rho.matrix'), 'invalid-argument', 'rho.matrix[1][0]');
    fails(() => readMatrix({ re: [[1, Infinity]] }, 'm'), 'invalid-argument', 'm.re[0][1]');
    fails(() => readMatrix({ re: [[1, 0]], im: [[0, -Infinity]] }, 'm'), 'invalid-argument', 'm.im[0][1]');
  });

  it('refuses entries and containers of the wrong type', () => {
    fails(() => readMatrix([[1, true]], 'm'), 'invalid-argument', 'm[0][1]');
    fails(() => readMatrix([[1, null]], 'm'), 'invalid-argument', 'm[0][1]');
    fails(() => readMatrix([[1, { re: 1 }]], 'm'), 'invalid-argument', 'm[0][1]');
    fails(() => readMatrix([[1], 2], 'm'), 'invalid-argument', 'm[1]');
    fails(() => readMatrix('[[1]]', 'm'), 'invalid-argument', 'm');
    fails(() => readMatrix({ re: [['1/2']] }, 'm'), 'invalid-argument', 'm.re[0][0]');
    fails(() => readMatrix({ re: [[1]], imag: [[0]] }, 'm'), 'invalid-argument', 'm.imag');
    fails(() => readMatrix({ matrix: [[1]] }, 'm'), 'invalid-argument', 'm');
  });

  it('refuses too-large matrices from their lengths, before reading any entry', () => {
    const longRow = new Array(MAX_DIMENSION + 1).fill(0);
    fails(() => readMatrix(new Array(MAX_DIMENSION + 1).fill([0]), 'm'), 'too-large', 'm');
    fails(() => readMatrix([longRow], 'm'), 'too-large', 'm[0]');
    // Entries that would fail to parse are never reached: the size check comes first.
    fails(() => readMatrix(new Array(MAX_DIMENSION + 1).fill(['not read']), 'm'), 'too-large', 'm');
  });

  it(`refuses more than ${MAX_EXPRESSION_ENTRIES} expression strings in one matrix, naming the first one over`, () => {
    const side = Math.ceil(Math.sqrt(MAX_EXPRESSION_ENTRIES + 1));
    const rows = new Array(side).fill(new Array(side).fill('0'));
    const over = MAX_EXPRESSION_ENTRIES; // zero-based index of the first string over the limit
    fails(() => readMatrix(rows, 'm'), 'too-large', `m[${Math.floor(over / side)}][${over % side}]`);
  });

  it('reads a Hermitian matrix and refuses a non-Hermitian one at the entry at fault', () => {
    readHermitian([[1, 'i'], ['-i', 1]], 'matrix', 1e-9);
    fails(() => readHermitian([[1, 'i'], ['i', 1]], 'matrix', 1e-9), 'not-hermitian', 'matrix[1][0]');
    fails(() => readHermitian([[1, 2, 3]], 'matrix', 1e-9), 'dimension-mismatch', 'matrix');
  });
});

describe('codec: the packed matrix form (protocol 1.1)', () => {
  // Outside reference: numpy's own serialisation, base64.b64encode(np.asarray(M, dtype='<f8').tobytes())
  // (row-major, little-endian float64: numpy's documented C order and dtype '<f8').
  const packed = runPythonCode<{ re: string; im: string; rows: number[][]; imRows: number[][] }>(
    `import base64, json, sys, numpy as np
rng = np.random.default_rng(3)
m = rng.standard_normal((3, 5)) + 1j * rng.standard_normal((3, 5))
enc = lambda a: base64.b64encode(np.ascontiguousarray(a, dtype='<f8').tobytes()).decode()
json.dump({"re": enc(m.real), "im": enc(m.imag), "rows": m.real.tolist(), "imRows": m.imag.tolist()}, sys.stdout)`,
  );

  it('reads numpy\'s row-major little-endian float64 bytes (base64) as the same matrix as its rows, bit for bit', () => {
    const m = readMatrix({ shape: [3, 5], packed: 'float64-le', re: packed.re, im: packed.im }, 'm');
    const want = fromRows(packed.rows, packed.imRows);
    assert.deepEqual([...m.re], [...want.re]);
    assert.deepEqual([...m.im], [...want.im]);
    const realOnly = readMatrix({ shape: [3, 5], packed: 'float64-le', re: packed.re }, 'm');
    assert.ok(realOnly.im.every((x) => x === 0));
  });

  it('refuses a wrong length, bad base64, a NaN, an unknown encoding and a shape over the limit, before decoding (common practice)', () => {
    fails(() => readMatrix({ shape: [5, 3], packed: 'float64-le', re: packed.re.slice(4) }, 'm'), 'dimension-mismatch', 'm.re');
    fails(() => readMatrix({ shape: [3, 5], packed: 'float64-le', re: `*${packed.re.slice(1)}` }, 'm'), 'parse-error', 'm.re');
    const nan = Buffer.from(new Float64Array([1, Number.NaN]).buffer).toString('base64');
    fails(() => readMatrix({ shape: [1, 2], packed: 'float64-le', re: nan }, 'm'), 'invalid-argument', 'm.re');
    fails(() => readMatrix({ shape: [3, 5], packed: 'float32-le', re: packed.re }, 'm'), 'invalid-argument', 'm.packed');
    fails(() => readMatrix({ shape: [MAX_DIMENSION + 1, 1], packed: 'float64-le', re: 'AAAA' }, 'm'), 'too-large', 'm.shape[0]');
  });
});

describe('codec: states', () => {
  const plus = [[0.5, 0.5], [0.5, 0.5]];

  it('reads {matrix, dims, labels} and writes it back unchanged', () => {
    const bell = [[0.5, 0, 0, 0.5], [0, 0, 0, 0], [0, 0, 0, 0], [0.5, 0, 0, 0.5]];
    const s = readState({ matrix: bell, dims: [2, 2], labels: ['A', 'B'] }, 'rho', 1e-9);
    assert.deepEqual(writeState(s), { matrix: bell, dims: [2, 2], labels: ['A', 'B'] });
  });

  it('defaults dims to one system and accepts a bare matrix as a state', () => {
    assert.deepEqual(readState({ matrix: plus }, 'rho', 1e-9).dims, [2]);
    assert.deepEqual(writeState(readState(plus, 'rho', 1e-9)), { matrix: plus, dims: [2] });
  });

  it('builds |ψ⟩⟨ψ| from a ket of numbers, of expressions or of {re, im} (definition of a pure state)', () => {
    near(readState({ ket: [Math.SQRT1_2, Math.SQRT1_2] }, 'rho', 1e-9).matrix, fromRows(plus), 1e-15);
    const y = readState({ ket: ['1/sqrt(2)', 'i/sqrt(2)'] }, 'rho', 1e-9).matrix;
    near(y, fromRows([[0.5, 0], [0, 0.5]], [[0, -0.5], [0.5, 0]]), 1e-15);
    near(readState({ ket: { re: [Math.SQRT1_2, 0], im: [0, Math.SQRT1_2] } }, 'rho', 1e-9).matrix, y, 1e-15);
  });

  it('refuses a ket that is not of unit norm with trace-not-one (kets are never normalised for you)', () => {
    fails(() => readState({ ket: [1, 1] }, 'rho', 1e-9), 'trace-not-one', 'rho.ket');
    fails(() => readKet([], 'v'), 'invalid-argument', 'v');
    fails(() => readKet({ re: [1, 0], im: [0] }, 'v'), 'dimension-mismatch', 'v.im');
    fails(() => readKet(new Array(MAX_DIMENSION + 1).fill(0), 'v'), 'too-large', 'v');
  });

  it('refuses a matrix that is not Hermitian, not positive or not of unit trace, with the matching code', () => {
    fails(() => readState({ matrix: [[0.5, 0.5], [0, 0.5]] }, 'rho', 1e-9), 'not-hermitian', 'rho.matrix[1][0]');
    fails(() => readState({ matrix: [[1.5, 0], [0, -0.5]] }, 'rho', 1e-9), 'not-positive', 'rho.matrix');
    fails(() => readState({ matrix: [[0.5, 0], [0, 0.6]] }, 'rho', 1e-9), 'trace-not-one', 'rho.matrix');
  });

  it('uses the request tolerance: a trace off by 1e-7 passes at 1e-6 and fails at 1e-9', () => {
    const m = [[0.5 + 1e-7, 0], [0, 0.5]];
    readState({ matrix: m }, 'rho', 1e-6);
    fails(() => readState({ matrix: m }, 'rho', 1e-9), 'trace-not-one', 'rho.matrix');
  });

  it('refuses dims that do not multiply to the size, or are not positive integers', () => {
    fails(() => readState({ matrix: plus, dims: [2, 2] }, 'rho', 1e-9), 'dimension-mismatch', 'rho.dims');
    fails(() => readState({ matrix: plus, dims: [2, 0.5] }, 'rho', 1e-9), 'invalid-argument', 'rho.dims[1]');
    fails(() => readState({ matrix: plus, dims: [] }, 'rho', 1e-9), 'invalid-argument', 'rho.dims');
    fails(() => readDims('2', 'dims'), 'invalid-argument', 'dims');
  });

  it('refuses malformed state objects: both forms, neither, unknown fields, bad labels', () => {
    fails(() => readState({ matrix: plus, ket: [1, 0] }, 'rho', 1e-9), 'invalid-argument', 'rho');
    fails(() => readState({ dims: [2] }, 'rho', 1e-9), 'missing-argument', 'rho.matrix');
    fails(() => readState({ matrix: plus, dim: [2] }, 'rho', 1e-9), 'invalid-argument', 'rho.dim');
    fails(() => readState({ matrix: plus, labels: ['A', 'B'] }, 'rho', 1e-9), 'dimension-mismatch', 'rho.labels');
    fails(() => readState({ matrix: plus, dims: [1, 2], labels: ['A', 'A'] }, 'rho', 1e-9), 'invalid-argument', 'rho.labels[1]');
    fails(() => readState(3, 'rho', 1e-9), 'invalid-argument', 'rho');
    fails(() => readState(null, 'rho', 1e-9), 'invalid-argument', 'rho');
  });

  it('reads a positive operator of any trace for σ, and still refuses a non-positive one', () => {
    const s = readOperatorState({ matrix: [[2, 0], [0, 0]] }, 'sigma', 1e-9);
    assert.equal(s.matrix.re[0], 2);
    fails(() => readOperatorState({ matrix: [[1, 0], [0, -1]] }, 'sigma', 1e-9), 'not-positive', 'sigma.matrix');
  });
});

describe('codec: channels', () => {
  const g = 0.3; // amplitude damping with decay probability γ (Nielsen & Chuang, Eq. 8.108)
  const damping = { kraus: [[[1, 0], [0, Math.sqrt(1 - g)]], [[0, Math.sqrt(g)], [0, 0]]] };

  it('reads Kraus operators with dims defaulting to their shape, and writes them back', () => {
    const c = readChannel(damping, 'channel', 1e-9);
    assert.deepEqual(c.fromDims, [2]);
    assert.deepEqual(c.toDims, [2]);
    assert.deepEqual(writeChannel(c), { ...damping, from: [2], to: [2] });
  });

  it('turns the Choi matrix I⊗I/2 of the completely depolarising qubit channel into Kraus operators that map every state to I/2 (Choi convention of PROTOCOL.md)', () => {
    const J = [[0.5, 0, 0, 0], [0, 0.5, 0, 0], [0, 0, 0.5, 0], [0, 0, 0, 0.5]];
    const c = readChannel({ choi: J, from: [2], to: [2] }, 'channel', 1e-9);
    const rho = fromRows([[0.7, 0.2], [0.2, 0.3]], [[0, -0.1], [0.1, 0]]);
    near(apply(c.kraus, rho), fromRows([[0.5, 0], [0, 0.5]]), 1e-14);
  });

  it('recovers the amplitude-damping channel from its Choi matrix Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input factor first', () => {
    // J built by hand from N(|i⟩⟨j|) = Σ_k K_k |i⟩⟨j| K_k*.
    const K = [fromRows(damping.kraus[0]), fromRows(damping.kraus[1])];
    const J = zeros(4, 4);
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < 2; j++) {
        const E = zeros(2, 2);
        E.re[i * 2 + j] = 1;
        const NE = apply(K, E);
        for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) J.re[(i * 2 + a) * 4 + (j * 2 + b)] = NE.re[a * 2 + b];
      }
    }
    const c = readChannel({ choi: writeMatrix(J), from: [2] }, 'channel', 1e-9);
    assert.deepEqual(c.toDims, [2]);
    const rho = fromRows([[0.4, 0.1], [0.1, 0.6]], [[0, 0.2], [-0.2, 0]]);
    near(apply(c.kraus, rho), apply(K, rho), 1e-14);
  });

  it('refuses the Choi matrix of the transpose map (the swap operator) as not completely positive (Watrous 2018, Thm 2.22)', () => {
    const swap = [[1, 0, 0, 0], [0, 0, 1, 0], [0, 1, 0, 0], [0, 0, 0, 1]];
    fails(() => readChannel({ choi: swap, from: [2], to: [2] }, 'channel', 1e-9), 'not-completely-positive', 'channel.choi');
  });

  it('refuses malformed channels with the exact path', () => {
    fails(() => readChannel({ kraus: [[[1, 0], [0, 1]], [[1, 0, 0]]] }, 'ch', 1e-9), 'dimension-mismatch', 'ch.kraus[1]');
    fails(() => readChannel({ kraus: [] }, 'ch', 1e-9), 'invalid-argument', 'ch.kraus');
    fails(() => readChannel({ kraus: [[[1]]], choi: [[1]] }, 'ch', 1e-9), 'invalid-argument', 'ch');
    // Protocol 1.1 (shared PROTOCOL.md) renamed the channel's dims to from/to; the old names are refused by name.
    fails(() => readChannel({ kraus: [[[1, 0], [0, 1]]], inputDims: [2] }, 'ch', 1e-9), 'invalid-argument', 'ch.inputDims');
    fails(() => readChannel({ from: [2] }, 'ch', 1e-9), 'missing-argument', 'ch.kraus');
    fails(() => readChannel({ kraus: [[[1, 0], [0, 1]]], from: [3] }, 'ch', 1e-9), 'dimension-mismatch', 'ch.from');
    fails(() => readChannel({ kraus: [[[1, 0], [0, 1]]], to: [4] }, 'ch', 1e-9), 'dimension-mismatch', 'ch.to');
    fails(() => readChannel({ choi: [[1, 0], [0, 1]] }, 'ch', 1e-9), 'missing-argument', 'ch.from');
    fails(() => readChannel({ choi: [[1, 0, 0], [0, 1, 0], [0, 0, 1]], from: [2] }, 'ch', 1e-9), 'dimension-mismatch', 'ch.from');
    fails(() => readChannel({ kraus: [[[1, 'q']]] }, 'ch', 1e-9), 'parse-error', 'ch.kraus[0][0][1]');
    fails(() => readChannel({ kraus: [[[1]]], inputdims: [1] }, 'ch', 1e-9), 'invalid-argument', 'ch.inputdims');
    fails(() => readChannel([[1]], 'ch', 1e-9), 'invalid-argument', 'ch');
  });

  it('refuses too many Kraus operators, or too many entries in all, before reading them', () => {
    fails(() => readChannel({ kraus: new Array(MAX_KRAUS + 1).fill([[1]]) }, 'ch', 1e-9), 'too-large', 'ch.kraus');
    const big = new Array(MAX_DIMENSION).fill(new Array(MAX_DIMENSION).fill('never parsed'));
    fails(() => readChannel({ kraus: [big, big, big, big, big] }, 'ch', 1e-9), 'too-large', 'ch.kraus');
  });
});

describe('codec: subsystems and numbers', () => {
  it('reads distinct in-range subsystem indices, and labels when given', () => {
    assert.deepEqual(readSystems([2, 0], 'a', 3), [2, 0]);
    assert.deepEqual(readSystems(['C', 'A'], 'a', 3, { labels: ['A', 'B', 'C'] }), [2, 0]);
    assert.deepEqual(readSystems([], 'a', 3), []);
  });

  it('refuses out-of-range, repeated, non-integer and unknown-label subsystems at their index', () => {
    fails(() => readSystems([0, 3], 'a', 3), 'invalid-argument', 'a[1]');
    fails(() => readSystems([1, 1], 'a', 3), 'invalid-argument', 'a[1]');
    fails(() => readSystems([0.5], 'a', 3), 'invalid-argument', 'a[0]');
    fails(() => readSystems(['D'], 'a', 3, { labels: ['A', 'B', 'C'] }), 'invalid-argument', 'a[0]');
    fails(() => readSystems(['A'], 'a', 3), 'invalid-argument', 'a[0]');
    fails(() => readSystems([], 'a', 3, { allowEmpty: false }), 'invalid-argument', 'a');
    fails(() => readSystems(1, 'a', 3), 'invalid-argument', 'a');
  });

  it('reads numbers within a range and refuses others', () => {
    assert.equal(readNumber(0.5, 'alpha', { min: 0, minExclusive: true }), 0.5);
    fails(() => readNumber(0, 'alpha', { min: 0, minExclusive: true }), 'invalid-argument', 'alpha');
    fails(() => readNumber(2, 'alpha', { max: 1 }), 'invalid-argument', 'alpha');
    fails(() => readNumber('1', 'alpha'), 'invalid-argument', 'alpha');
    fails(() => readNumber(NaN, 'alpha'), 'invalid-argument', 'alpha');
  });

  it('writes ±Infinity as the strings of PROTOCOL.md and refuses NaN', () => {
    assert.equal(writeNumber(Infinity), 'Infinity');
    assert.equal(writeNumber(-Infinity), '-Infinity');
    assert.equal(writeNumber(-0), 0);
    assert.ok(Object.is(writeNumber(-0), 0));
    assert.throws(() => writeNumber(NaN));
  });
});
