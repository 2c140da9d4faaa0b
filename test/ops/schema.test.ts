// Facts about the published JSON Schema and the ops table. Sources: JSON Schema draft 2020-12 as implemented
// by ajv 8 (the validator named in the project rules) and PROTOCOL.md's request/answer shapes. The committed
// files must equal what scripts/write-schema.ts generates from the registry: whoever adds an op runs
// `npm run schema`.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import Ajv2020Module from 'ajv/dist/2020.js';
import { SCHEMA_FILE, DOC_FILE, VALIDATORS_FILE, schemaText, renderDoc, generateSchema, validatorsText } from '../../scripts/write-schema.js';
import { handle } from '../../src/ops/handle.js';
import { listOps } from '../../src/ops/registry.js';

const Ajv2020 = ((Ajv2020Module as unknown as { default?: unknown }).default ?? Ajv2020Module) as typeof Ajv2020Module.default;

describe('protocol schema and ops table', () => {
  it('schema/protocol.schema.json equals the schema generated from the registry (run `npm run schema` if not)', () => {
    assert.ok(readFileSync(SCHEMA_FILE, 'utf8') === schemaText(), 'schema/protocol.schema.json is stale: run `npm run schema`');
  });

  it('the ops table of docs/protocol.md equals the generated one (run `npm run schema` if not)', () => {
    const doc = readFileSync(DOC_FILE, 'utf8');
    assert.ok(doc === renderDoc(doc), 'the ops table in docs/protocol.md is stale: run `npm run schema`');
  });

  it('src/ops/validators.generated.ts equals the precompiled validators generated from the registry (run `npm run schema` if not)', () => {
    assert.ok(readFileSync(VALIDATORS_FILE, 'utf8') === validatorsText(), 'src/ops/validators.generated.ts is stale: run `npm run schema`');
  });

  it('the precompiled validators compile nothing at run time (no eval, no new Function: a strict Content-Security-Policy allows them)', () => {
    const code = readFileSync(VALIDATORS_FILE, 'utf8');
    assert.ok(!/new Function|\beval\(/.test(code));
  });

  it('is a valid 2020-12 schema (ajv strict mode) whose requests cover every registered op', () => {
    const schema = generateSchema() as { $defs: Record<string, unknown> };
    const ajv = new Ajv2020({ strict: true, strictTypes: false, strictTuples: false, strictRequired: false, logger: false });
    ajv.compile(schema);
    for (const op of listOps()) assert.ok(`op:${op.name}` in schema.$defs, op.name);
  });

  it('accepts a valid request and an array of them, and refuses an unknown op and an unknown field', () => {
    const ajv = new Ajv2020({ strict: false, logger: false });
    const validate = ajv.compile(generateSchema());
    const req = { op: 'entropy', rho: [['1/2', 0], [0, '1/2']], alpha: 2, id: 'a', base: 'e', deadline: 1000 };
    assert.ok(validate(req), JSON.stringify(validate.errors));
    assert.ok(validate([req, { op: 'spectrum', matrix: { re: [[1]] } }]));
    assert.ok(!validate({ op: 'no-such-op' }));
    assert.ok(!validate({ op: 'spectrum', matrix: [[1]], vector: true }));
    assert.ok(!validate({ op: 'spectrum', matrix: [[1]], base: 2 }), 'spectrum has no logarithm, so "base" is refused');
  });

  it('describes the answers handle() gives, both successes and failures', () => {
    const ajv = new Ajv2020({ strict: false, logger: false });
    ajv.addSchema(generateSchema(), 'protocol');
    const validate = ajv.getSchema('protocol#/$defs/answer')!;
    for (const req of [
      { op: 'spectrum', matrix: [[2, 1], [1, 2]], id: 3 },
      { op: 'spectrum', matrix: [[1, 2], [3, 4]] },
      { op: 'spectrum' },
      { matrix: [[1]] },
      { op: 'no-such-op' },
    ]) {
      const answer = handle(req);
      assert.ok(validate(answer), `${JSON.stringify(answer)}: ${JSON.stringify(validate.errors)}`);
    }
  });
});
