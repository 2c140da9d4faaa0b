// Facts about `handle`, the one door into the engine. Source: the answer shapes, error codes and the
// "Infinity"/no-NaN rule of PROTOCOL.md ("Requests and answers", "Values"); the rest (id echo, schema
// messages, internal-error wrapping) is the project's own contract, no published source. The ops named
// "test-..." below are real registry entries defined by this file to reach the result walker; they exist
// only in this test process.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle, compileAll, pointerToPath, type Answer } from '../../src/ops/handle.js';
import { defineOp, listOps } from '../../src/ops/registry.js';
import { RhoError } from '../../src/errors.js';
import { identity } from '../../src/linalg/index.js';

defineOp({
  name: 'test-echo-context',
  summary: 'Returns its context (test only).',
  base: true,
  args: { type: 'object', properties: { x: { type: 'number' }, inner: { type: 'object', properties: { y: { type: 'integer' } }, required: ['y'] } } },
  run: (_req, context) => ({ value: context.base, tolerance: context.tolerance }),
});
defineOp({
  name: 'test-odd-results',
  summary: 'Returns a chosen awkward result (test only).',
  args: { type: 'object', properties: { kind: { type: 'string' } }, required: ['kind'] },
  run(req) {
    switch (req.kind) {
      case 'infinite': return { value: Infinity, reason: 'support', list: [1, -Infinity], nested: { deep: [Infinity] } };
      case 'nan': return { value: 1, extra: [0, NaN] };
      case 'typed': return { value: new Float64Array([1, 2, Infinity]) };
      case 'cmatrix': return { value: identity(2) };
      case 'class': return { value: new Map() };
      case 'function': return { value: () => 1 };
      case 'no-value': return {} as never;
      case 'rho-error': throw new RhoError('not-positive', 'Made to fail.', 'rho.matrix', { eigenvalue: -1 });
      case 'type-error': throw new TypeError('x is undefined');
      case 'clash': return { value: 1, ok: false, op: 'other', id: 'forged' };
      default: return { value: null };
    }
  },
});

function roundTrips(a: Answer): void {
  assert.deepEqual(JSON.parse(JSON.stringify(a)), a, 'the answer is not plain JSON data');
}

function failed(a: Answer, code: string, path?: string): void {
  roundTrips(a);
  assert.equal(a.ok, false, JSON.stringify(a));
  if (a.ok) return;
  assert.equal(a.error.code, code, a.error.message);
  assert.equal(a.error.path, path, a.error.message);
  assert.ok(!/\n\s+at /.test(a.error.message), 'a stack trace leaked into the message');
}

describe('handle: requests that are not requests', () => {
  it('answers a non-object with invalid-argument and op null', () => {
    for (const r of [5, 'spectrum', null, [], [{ op: 'spectrum' }], true, undefined]) {
      const a = handle(r);
      failed(a, 'invalid-argument');
      assert.equal(a.op, null);
    }
  });

  it('answers a missing op with missing-argument at "op", and a non-string op with invalid-argument', () => {
    failed(handle({ matrix: [[1]] }), 'missing-argument', 'op');
    failed(handle({ op: 7 }), 'invalid-argument', 'op');
  });

  it('answers an unknown op with unknown-op and suggests the close names', () => {
    const a = handle({ op: 'spectrun', matrix: [[1]] });
    failed(a, 'unknown-op', 'op');
    assert.equal(a.op, 'spectrun');
    assert.match(!a.ok ? a.error.message : '', /"spectrum"/);
    const b = handle({ op: 'zzzzzzzzzzzz' });
    failed(b, 'unknown-op', 'op');
    assert.match(!b.ok ? b.error.message : '', /spectrum/, 'with no close name, the list of ops is given');
  });
});

describe('handle: schema validation', () => {
  it('reports a missing required field as missing-argument with its path', () => {
    failed(handle({ op: 'spectrum' }), 'missing-argument', 'matrix');
    failed(handle({ op: 'test-echo-context', inner: {} }), 'missing-argument', 'inner.y');
  });

  it('reports an unknown field (a typo) as invalid-argument naming it', () => {
    const a = handle({ op: 'spectrum', matrix: [[1]], vector: true });
    failed(a, 'invalid-argument', 'vector');
    assert.match(!a.ok ? a.error.message : '', /vectors/);
  });

  it('converts the JSON pointer of a schema failure into the protocol path form', () => {
    failed(handle({ op: 'spectrum', matrix: [[1, 0], [0, false]] }), 'invalid-argument', 'matrix[1][1]');
    failed(handle({ op: 'test-echo-context', inner: { y: 0.5 } }), 'invalid-argument', 'inner.y');
    assert.equal(pointerToPath('/rho/matrix/1/0'), 'rho.matrix[1][0]');
    assert.equal(pointerToPath('/a~1b/c~0d/10'), 'a/b.c~d[10]');
    assert.equal(pointerToPath(''), '');
  });

  it('reports an over-long list from the schema as too-large', () => {
    failed(handle({ op: 'spectrum', matrix: new Array(5000).fill([0]) }), 'too-large', 'matrix');
  });

  it('checks the common fields: tolerance positive, base positive and not 1 or "e", id string or number', () => {
    failed(handle({ op: 'test-echo-context', tolerance: 0 }), 'invalid-argument', 'tolerance');
    failed(handle({ op: 'test-echo-context', tolerance: 'small' }), 'invalid-argument', 'tolerance');
    failed(handle({ op: 'test-echo-context', base: 1 }), 'invalid-argument', 'base');
    failed(handle({ op: 'test-echo-context', base: -2 }), 'invalid-argument', 'base');
    failed(handle({ op: 'test-echo-context', base: 'ten' }), 'invalid-argument', 'base');
    failed(handle({ op: 'test-echo-context', id: { n: 1 } }), 'invalid-argument', 'id');
  });

  it('hands the op tolerance 1e-9 and base 2 by default, and base e for "e" (PROTOCOL.md defaults)', () => {
    assert.deepEqual(handle({ op: 'test-echo-context' }), { ok: true, op: 'test-echo-context', value: 2, tolerance: 1e-9 });
    const a = handle({ op: 'test-echo-context', base: 'e', tolerance: 1e-6 });
    assert.deepEqual(a, { ok: true, op: 'test-echo-context', value: Math.E, tolerance: 1e-6 });
    assert.deepEqual(handle({ op: 'test-echo-context', base: 10 }), { ok: true, op: 'test-echo-context', value: 10, tolerance: 1e-9 });
  });

  it('compiles the schema of every registered op', () => {
    compileAll();
    assert.ok(listOps().length >= 1);
  });
});

describe('handle: answers', () => {
  it('echoes a string or number id in success and in failure answers', () => {
    assert.equal(handle({ op: 'spectrum', matrix: [[1]], id: 'first' }).id, 'first');
    assert.equal(handle({ op: 'spectrum', matrix: [[1]], id: 42 }).id, 42);
    assert.equal(handle({ op: 'spectrum', matrix: [[1, 2], [3, 4]], id: 'bad' }).id, 'bad');
    assert.equal(handle({ op: 'no-such-op', id: 3 }).id, 3);
    assert.equal(handle({ id: 3 }).id, 3);
    assert.equal(handle({ op: 'spectrum', matrix: [[1]] }).id, undefined);
  });

  it('turns infinite values anywhere in the result into "Infinity" / "-Infinity" (PROTOCOL.md)', () => {
    const a = handle({ op: 'test-odd-results', kind: 'infinite' });
    roundTrips(a);
    assert.deepEqual(a, {
      ok: true, op: 'test-odd-results', value: 'Infinity', reason: 'support', list: [1, '-Infinity'], nested: { deep: ['Infinity'] },
    });
  });

  it('never lets a NaN through: the whole answer becomes internal-error', () => {
    const a = handle({ op: 'test-odd-results', kind: 'nan' });
    failed(a, 'internal-error');
    assert.match(!a.ok ? a.error.message : '', /NaN at extra\[1\]/);
  });

  it('turns typed arrays into lists and an engine matrix into the protocol matrix form', () => {
    assert.deepEqual((handle({ op: 'test-odd-results', kind: 'typed' }) as Record<string, unknown>).value, [1, 2, 'Infinity']);
    assert.deepEqual((handle({ op: 'test-odd-results', kind: 'cmatrix' }) as Record<string, unknown>).value, [[1, 0], [0, 1]]);
  });

  it('refuses non-plain results (class instances, functions, a missing value) as internal-error', () => {
    for (const kind of ['class', 'function', 'no-value']) failed(handle({ op: 'test-odd-results', kind }), 'internal-error');
  });

  it('passes a RhoError through as code, message, path and detail', () => {
    const a = handle({ op: 'test-odd-results', kind: 'rho-error', id: 1 });
    assert.deepEqual(a, {
      ok: false, op: 'test-odd-results', id: 1,
      error: { code: 'not-positive', message: 'Made to fail.', path: 'rho.matrix', detail: { eigenvalue: -1 } },
    });
  });

  it('wraps any other exception as internal-error with a short message and no stack trace', () => {
    const a = handle({ op: 'test-odd-results', kind: 'type-error' });
    failed(a, 'internal-error');
    assert.match(!a.ok ? a.error.message : '', /TypeError: x is undefined/);
  });

  it('keeps ok, op and id its own even if an op returns fields of those names', () => {
    assert.deepEqual(handle({ op: 'test-odd-results', kind: 'clash', id: 'mine' }), { ok: true, op: 'test-odd-results', id: 'mine', value: 1 });
  });
});
