// Packed matrices over widget comms as binary buffers (src/widgets/buffers.ts). References from outside
// the project: numpy writes the float64 bytes and their base64 (numpy.ascontiguousarray(M, "<f8") and
// Python's base64 module), and @jupyter-widgets/base's own remove_buffers/put_buffers (what the widget
// manager runs on every comm message) split the state into JSON and buffers and put it back.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { remove_buffers, put_buffers } from '@jupyter-widgets/base/lib/utils.js';
import { packedFromBuffers, packedToBuffers, packedSerializers } from '../../src/widgets/buffers.js';
import { runPythonCode } from '../helpers/python.js';

const printed = runPythonCode<{ re: string; im: string; hex_re: string; shape: number[] }>(
  [
    'import base64, json, numpy as np',
    'rng = np.random.default_rng(3)',
    'm = rng.normal(size=(16, 16)) + 1j * rng.normal(size=(16, 16))',
    're = np.ascontiguousarray(m.real, "<f8").tobytes(); im = np.ascontiguousarray(m.imag, "<f8").tobytes()',
    'print(json.dumps({"re": base64.b64encode(re).decode(), "im": base64.b64encode(im).decode(), "hex_re": re.hex(), "shape": [16, 16]}))',
  ].join('\n'),
);

function hexOf(v: DataView): string {
  return Array.from(new Uint8Array(v.buffer, v.byteOffset, v.byteLength), (b) => b.toString(16).padStart(2, '0')).join('');
}

describe('packed matrices as binary comm buffers', () => {
  const packed = { shape: printed.shape, packed: 'float64-le', re: printed.re, im: printed.im };
  const state = { matrix: packed, dims: [4, 4], result: { ok: true, value: [{ choi: packed }], note: 'ρ' } };

  it('sends the exact float64 bytes that numpy writes, in buffers the widget manager extracts', () => {
    const out = packedToBuffers(state) as any;
    assert.ok(out.matrix.re instanceof DataView);
    assert.equal(hexOf(out.matrix.re), printed.hex_re);
    const split = remove_buffers(out);
    const paths = split.buffer_paths.map((p: (string | number)[]) => p.join('/')).sort();
    assert.deepEqual(paths, ['matrix/im', 'matrix/re', 'result/value/0/choi/im', 'result/value/0/choi/re']);
    // No base64 text is left in the JSON part of the message.
    assert.ok(!JSON.stringify(split.state).includes(printed.re.slice(0, 40)));
    // What arrives (put_buffers restores DataViews) reads back as the same protocol text.
    const arrived = structuredClone(split.state) as any;
    put_buffers(arrived, split.buffer_paths, split.buffers.map((b: ArrayBuffer | ArrayBufferView) => new DataView(b instanceof ArrayBuffer ? b : b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength))));
    // (compared as JSON text: structuredClone's objects come from another realm under jest)
    assert.ok(JSON.stringify(packedFromBuffers(arrived)) === JSON.stringify(state), 'the state read back differs');
  });

  it('leaves rows, plain strings and non-base64 packed text alone', () => {
    const rows = { matrix: [[0.5, '0.5*i'], ['-0.5*i', 0.5]], label: 're' };
    assert.deepEqual(packedToBuffers(rows), rows);
    const bad = { matrix: { shape: [1, 1], packed: 'float64-le', re: 'not base64!' } };
    assert.deepEqual(packedToBuffers(bad), bad); // the engine refuses it with its own message, unchanged
  });

  it('gives serializers for the named fields only', () => {
    const s = packedSerializers(['matrix']) as any;
    assert.deepEqual(Object.keys(s), ['matrix']);
    assert.ok(s.matrix.serialize(packed).re instanceof DataView);
    assert.equal(s.matrix.deserialize(s.matrix.serialize(packed)).re, printed.re);
  });
});
