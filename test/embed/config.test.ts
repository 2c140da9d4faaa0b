// Facts about the embed's configuration and its sharing formats, in Node (the browser suite,
// test/embed/browser.test.ts, checks the same in Chromium on a real page).
// Sources: JSON Schema draft 2020-12 as ajv 8 implements it (the validator named in the project rules);
// RFC 1951 (deflate) and RFC 4648 §5 (base64url) as Python's zlib and base64 modules read them; the
// rhosigma Python package (kernel-bridge/rhosigma/functions.py) for the snippet; `handle` for the engine's
// answer to the same request.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { EMBED_SCHEMA_FILE, EMBED_VALIDATOR_FILE, embedSchemaText, embedValidatorText } from '../../scripts/write-embed-schema.js';
import { ConfigError, readConfig, checkConfig } from '../../src/embed/config.js';
import { decodeShared, encodeShared, linkTo, pythonLiteral, pythonSnippet, requestText, sharedEntries } from '../../src/embed/share.js';
import { handle } from '../../src/ops/index.js';
import { PYTHON } from '../helpers/python.js';

const root = fileURLToPath(new URL('../..', import.meta.url));
const BELL_MIX = { matrix: [[0.4, 0, 0, 0.3], [0, 0.1, 0, 0], [0, 0, 0.1, 0], [0.3, 0, 0, 0.4]], dims: [2, 2] };
const good = { calculator: 'divergence', inputs: { rho: BELL_MIX, sigma: { matrix: [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]] }, family: 'petz', alpha: 0.5 } };

function refusal(text: string): ConfigError {
  try {
    readConfig(text);
  } catch (err) {
    assert.ok(err instanceof ConfigError, String(err));
    return err;
  }
  assert.fail(`accepted: ${text}`);
}

describe('embed configuration', () => {
  it('schema/embed.schema.json and the precompiled validator equal what the generator writes (run `npm run schema` if not)', () => {
    assert.ok(readFileSync(EMBED_SCHEMA_FILE, 'utf8') === embedSchemaText(), 'schema/embed.schema.json is stale');
    assert.ok(readFileSync(EMBED_VALIDATOR_FILE, 'utf8') === embedValidatorText(), 'src/embed/config-validator.generated.ts is stale');
  });

  it('the validator compiles nothing at run time (no eval, no new Function), so a strict Content-Security-Policy allows it', () => {
    assert.ok(!/new Function|\beval\(/.test(readFileSync(EMBED_VALIDATOR_FILE, 'utf8')));
  });

  it('accepts a configuration whose inputs the engine accepts as a request of the same op', () => {
    const c = readConfig(JSON.stringify(good));
    const answer = handle({ op: 'divergence', ...(c.inputs as object) }) as { ok: boolean };
    assert.equal(answer.ok, true, JSON.stringify(answer));
  });

  it('names the field at fault: unknown calculator, missing input, wrong type deep in a matrix, bad α, unknown field', () => {
    assert.equal(refusal('{"calculator":"divergance","inputs":{}}').field, 'calculator');
    assert.equal(refusal('{"calculator":"divergence","inputs":{"rho":[[1]]}}').field, 'inputs.sigma');
    assert.equal(refusal('{"calculator":"divergence","inputs":{"rho":{"matrix":[[1,{}],[0,0]]},"sigma":[[1]]}}').field, 'inputs.rho.matrix[0][1]');
    assert.equal(refusal('{"calculator":"divergence","inputs":{"rho":[[1]],"sigma":[[1]],"alpha":-1}}').field, 'inputs.alpha');
    assert.equal(refusal('{"calculator":"guessing","inputs":{"probabilities":[0.5]},"colour":"red"}').field, 'colour');
    assert.equal(refusal('{"calculator":"one-shot","inputs":{"rho":[[1]],"quantity":"x"}}').field, 'inputs.quantity');
    assert.match(refusal('not json').message, /not valid JSON/);
  });

  it('refuses prototype keys anywhere (__proto__, constructor, prototype), naming where they are', () => {
    assert.equal(refusal('{"calculator":"divergence","inputs":{"rho":[[1]],"sigma":[[1]],"__proto__":{"polluted":1}}}').field, 'inputs.__proto__');
    assert.equal(refusal('{"__proto__":{"calculator":"divergence"}}').field, '__proto__');
    assert.equal(refusal('{"calculator":"divergence","inputs":{"rho":{"matrix":[[1]],"constructor":{"prototype":{}}},"sigma":[[1]]}}').field, 'inputs.rho.constructor');
    assert.equal(({} as Record<string, unknown>).polluted, undefined);
  });
});

describe('shared links', () => {
  it('reopen the same inputs (encode, then decode through the same checks)', async () => {
    const data = await encodeShared('divergence', good.inputs);
    const back = await decodeShared(data);
    assert.deepEqual(back, { calculator: 'divergence', inputs: good.inputs });
    const link = linkTo('https://wiki.example/page.html#old', 'calc-1', data);
    assert.equal(sharedEntries(new URL(link).hash).get('calc-1'), data);
    assert.ok(!link.includes('#old'));
  });

  it('are deflate-raw (RFC 1951) in base64url (RFC 4648 §5): Python\'s zlib and base64 read the inputs back', async () => {
    const data = await encodeShared('divergence', good.inputs);
    assert.equal(data[0], 'z');
    const r = spawnSync(PYTHON, ['-c', 'import sys, zlib, base64, json; d = sys.argv[1]; d += "=" * (-len(d) % 4); print(json.dumps(json.loads(zlib.decompress(base64.urlsafe_b64decode(d), -15))))', data.slice(1)], { encoding: 'utf8' });
    assert.equal(r.status, 0, r.stderr);
    assert.deepEqual(JSON.parse(r.stdout), { calculator: 'divergence', inputs: good.inputs });
  });

  it('are untrusted input: a damaged link, or one carrying a prototype key, is refused with a ConfigError', async () => {
    await assert.rejects(decodeShared('z!!!'), ConfigError);
    await assert.rejects(decodeShared('zAAAA'), ConfigError);
    const hostile = `j${Buffer.from('{"calculator":"divergence","inputs":{"rho":[[1]],"sigma":[[1]],"__proto__":{}}}').toString('base64url')}`;
    await assert.rejects(decodeShared(hostile), (e: unknown) => e instanceof ConfigError && e.field === 'inputs.__proto__');
  });
});

describe('the Python snippet', () => {
  it('writes JSON data as Python literals (True/False/None; JSON string escapes are Python\'s)', () => {
    assert.equal(pythonLiteral([true, false, null, 1e-9, 'a"\\b\u03c1']), '[True, False, None, 1e-9, "a\\"\\\\bρ"]');
  });

  it('recreates the computation with the rhosigma package: the same value as the engine (to 1e-12 relative)', () => {
    const request = { op: 'divergence', family: 'petz', alpha: 0.5, rho: BELL_MIX, sigma: good.inputs.sigma, id: 7 };
    const engine = handle(request) as { ok: boolean; value: number };
    assert.equal(engine.ok, true);
    const { id: _id, ...withoutId } = request;
    assert.deepEqual(JSON.parse(requestText(request)), withoutId);
    const r = spawnSync(PYTHON, ['-c', pythonSnippet(request)], {
      encoding: 'utf8',
      cwd: root,
    });
    assert.equal(r.status, 0, r.stderr);
    const value = Number(r.stdout.trim());
    assert.ok(Math.abs(value - engine.value) <= 1e-12 * Math.abs(engine.value), `${value} vs ${engine.value}`);
  });
});
