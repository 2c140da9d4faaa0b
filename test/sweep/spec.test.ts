// Facts about reading sweep specs (issue 12: "Bad specs get a clear error naming the field; a point whose op
// fails is recorded as a failure line, never dropped"). Sources: JSON Schema 2020-12 as ajv 8 implements it
// (schema/sweep.schema.json), docs/sweeps.md; the grids are the arithmetic and geometric sequences with both
// ends included (common practice).
import { afterAll, describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import Ajv2020Module from 'ajv/dist/2020.js';
import { RhoError } from '../../src/errors.js';
import { pointAt, readSpec, specHash, specSchemaText, SPEC_SCHEMA } from '../../src/sweep/spec.js';
import { evaluatePoint } from '../../src/sweep/point.js';
import { SPEC_VALIDATOR_FILE, specValidatorText } from '../../scripts/write-schema.js';
import { rhosigma, tempFolder } from './helpers.js';

const Ajv2020 = ((Ajv2020Module as unknown as { default?: unknown }).default ?? Ajv2020Module) as typeof Ajv2020Module.default;
const tmp = tempFolder();
afterAll(() => tmp.remove());

const good = {
  sweep: 1,
  seed: 3,
  samples: 2,
  parameters: { alpha: { from: 0.5, to: 2, count: 4 }, family: { values: ['petz', 'sandwiched'] } },
  draws: { rho: { op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2] }, sigma: { op: 'random-state', ensemble: 'bures', dims: [2] } },
  quantity: { op: 'divergence', family: { $: 'family' }, alpha: { $: 'alpha' }, rho: { $: 'rho' }, sigma: { $: 'sigma' } },
};

function refusal(spec: unknown): RhoError {
  try {
    readSpec(spec);
  } catch (e) {
    assert.ok(e instanceof RhoError, String(e));
    return e;
  }
  assert.fail('the spec was accepted');
}

describe('sweep specs', () => {
  it('enumerate the Cartesian product of the parameters, the last fastest, each repeated `samples` times (common practice)', () => {
    const s = readSpec(good);
    assert.equal(s.total, 4 * 2 * 2);
    assert.deepEqual(s.parameterValues[0], [0.5, 1, 1.5, 2]);
    assert.deepEqual(pointAt(s, 0), { parameters: { alpha: 0.5, family: 'petz' }, sample: 0 });
    assert.deepEqual(pointAt(s, 1), { parameters: { alpha: 0.5, family: 'petz' }, sample: 1 });
    assert.deepEqual(pointAt(s, 2), { parameters: { alpha: 0.5, family: 'sandwiched' }, sample: 0 });
    assert.deepEqual(pointAt(s, 15), { parameters: { alpha: 2, family: 'sandwiched' }, sample: 1 });
    const log = readSpec({ ...good, quantity: { op: 'entropy', rho: { $: 'rho' } }, parameters: { t: { from: 0.01, to: 100, count: 5, scale: 'log' }, u: { from: 0, to: 1, step: 0.25 } } });
    log.parameterValues[0].forEach((v, k) => assert.ok(Math.abs((v as number) - 10 ** (k - 2)) < 1e-12 * 10 ** (k - 2)));
    assert.deepEqual(log.parameterValues[1], [0, 0.25, 0.5, 0.75, 1]);
  });

  it('hash the spec, not its layout: whitespace does not change the hash, a changed value does (common practice)', () => {
    const a = readSpec(JSON.parse(JSON.stringify(good, null, 4)));
    assert.equal(a.hash, specHash(good));
    assert.notEqual(readSpec({ ...good, seed: 4 }).hash, a.hash);
    assert.match(a.hash, /^sha256:[0-9a-f]{64}$/);
  });

  it('src/sweep/spec-validator.generated.ts is the validator ajv 8 compiles from the schema (run `npm run schema` if not)', () => {
    assert.ok(readFileSync(SPEC_VALIDATOR_FILE, 'utf8') === specValidatorText(), 'src/sweep/spec-validator.generated.ts is stale: run `npm run schema`');
  });

  it('the hash is the SHA-256 of the compact JSON text (FIPS 180-4; node:crypto as the outside reference)', () => {
    for (const spec of [good, { ...good, title: 'α-z over a grid, ρ ≥ 0' }]) {
      assert.equal(specHash(spec), `sha256:${createHash('sha256').update(JSON.stringify(spec)).digest('hex')}`);
    }
  });

  it('refuse bad specs with a clear error naming the field (ajv 8, JSON Schema 2020-12)', () => {
    const cases: [unknown, string, RegExp][] = [
      [{ ...good, sweep: 2 }, 'sweep', /version 1/],
      [{ ...good, seed: undefined }, 'seed', /required/],
      [{ ...good, seed: -1 }, 'seed', /seed/],
      [{ ...good, sample: 3 }, 'sample', /Unknown field sample/],
      [{ ...good, samples: 0 }, 'samples', /samples/],
      [{ ...good, parameters: { alpha: { from: 0, to: 1 } } }, 'parameters.alpha', /Expected: A parameter/],
      [{ ...good, parameters: { 'al.pha': { values: [1] } } }, 'parameters.al.pha', /must start with a letter/],
      [{ ...good, parameters: { t: { from: 0, to: 1, count: 3, scale: 'log' } } }, 'parameters.t.from', /log-spaced/],
      [{ ...good, draws: { rho: { op: 'random-stat', ensemble: 'bures', dims: [2] } } }, 'draws.rho.op', /Did you mean "random-state"/],
      [{ ...good, draws: { rho: { op: 'trace-distance' } } }, 'draws.rho.op', /random op/],
      [{ ...good, draws: { rho: { op: 'random-state', ensemble: 'bures', dims: [2], seed: 1 } } }, 'draws.rho.seed', /leave "seed" out/],
      [{ ...good, quantity: { ...good.quantity, rhoo: 1 } }, 'quantity.rhoo', /Unknown field quantity\.rhoo/],
      [{ ...good, quantity: { ...good.quantity, sigma: { $: 'tau' } } }, 'quantity.sigma.$', /"tau" names no parameter, draw or earlier step/],
      [{ ...good, steps: { s: { op: 'entropy', rho: { $: 't' } }, t: { op: 'entropy', rho: { $: 'rho' } } } }, 'steps.s.rho.$', /defined later/],
      [{ ...good, draws: { alpha: good.draws.rho } }, 'draws.alpha', /used twice/],
      [{ ...good, quantity: undefined }, 'quantity', /needs a "quantity" or an "inequality"/],
      [{ ...good, mode: 'first-violation' }, 'mode', /no "inequality"/],
      [{ ...good, inequality: { left: 0, relation: '<=', right: 1 }, mode: { search: { refine: 0 } } }, 'mode.search.refine', /must be >= 1/],
      [{ ...good, inequality: { left: 1, relation: '<', right: 2 } }, 'inequality.relation', /one of "<=", ">="/],
      [{ ...good, inequality: { left: { times: 2 }, relation: '<=', right: 2 } }, 'inequality.left', /One side of the inequality/],
      [{ ...good, record: ['nothing'] }, 'record[0].$', /"nothing" names no/],
      [[1, 2], '', /must be a JSON object/],
    ];
    for (const [spec, path, message] of cases) {
      const e = refusal(spec);
      assert.equal(e.path, path, `${JSON.stringify(spec).slice(0, 200)} → ${e.message}`);
      assert.match(e.message, message);
    }
  });

  it('schema/sweep.schema.json is the schema the reader uses, and accepts the README\'s examples (ajv 8)', () => {
    assert.ok(readFileSync(new URL('../../schema/sweep.schema.json', import.meta.url), 'utf8') === specSchemaText(), 'run `npm run schema`');
    const validate = new Ajv2020({ strict: true, strictTypes: false, logger: false }).compile(SPEC_SCHEMA);
    assert.ok(validate(good), JSON.stringify(validate.errors));
    for (const name of ['data-processing.json', 'strong-subadditivity.json']) {
      const example = JSON.parse(readFileSync(new URL(`../../docs/sweeps/${name}`, import.meta.url), 'utf8'));
      assert.ok(validate(example), `${name}: ${JSON.stringify(validate.errors)}`);
      readSpec(example);
    }
  });

  it('record a point whose op fails as a failure line with the request and the error, never dropping it; exit code 1 (docs/sweeps.md)', () => {
    const spec = { ...good, parameters: { alpha: { values: [0.3, 0.7] }, family: { values: ['sandwiched'] } } };
    const o = evaluatePoint(readSpec(spec), 0);
    assert.equal(o.failed?.at, 'quantity');
    assert.equal(o.failed?.error.code, 'invalid-argument');
    assert.equal(o.failed?.error.path, 'alpha');
    const file = tmp.file('fail.json', spec);
    const out = tmp.file('fail.jsonl');
    const r = rhosigma(['sweep', file, '-o', out, '--workers', '0']);
    assert.equal(r.code, 1, r.stderr);
    const rows = readFileSync(out, 'utf8').trim().split('\n').map((l) => JSON.parse(l));
    assert.equal(rows.length, 1 + 4 + 1);
    assert.deepEqual(rows.slice(1, 5).map((x) => x.index), [0, 1, 2, 3]);
    assert.ok(rows[1].failed && rows[2].failed && !rows[3].failed && !rows[4].failed);
    assert.equal(rows[1].failed.request.alpha, 0.3);
    assert.deepEqual(rows[5], { end: { points: 4, failures: 2, violations: 0 } });
    const bad = tmp.file('bad.json', { ...good, seed: 'x' });
    const b = rhosigma(['sweep', bad, '-o', tmp.file('bad.jsonl')]);
    assert.equal(b.code, 2);
    assert.match(b.stderr, /^rhosigma sweep: seed: /);
  });
});
