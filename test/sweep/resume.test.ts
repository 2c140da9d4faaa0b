// Facts about interrupted runs (issue 12, "Resume"): a sweep killed with SIGKILL mid-way and started again on
// the same output file loses and duplicates nothing: the file is then byte-identical to one uninterrupted
// run. A torn last line (a kill during a write) is cut off; a file of another sweep is never touched.
// Source: the file format's contract (docs/sweeps.md), common practice for append-only logs.
import { afterAll, describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { appendFileSync, readFileSync, writeFileSync } from 'node:fs';
import { rhosigma, startRhosigma, tempFolder } from './helpers.js';

const tmp = tempFolder();
afterAll(() => tmp.remove());

const spec = {
  sweep: 1,
  seed: 31,
  samples: 4000,
  draws: {
    rho: { op: 'random-state', ensemble: 'bures', dims: [2] },
    sigma: { op: 'random-state', ensemble: 'haar-pure', dims: [2] },
  },
  quantity: { op: 'trace-distance', rho: { $: 'rho' }, sigma: { $: 'sigma' } },
};

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const count = (path: string) => {
  try {
    return readFileSync(path, 'utf8').split('\n').length - 1;
  } catch {
    return 0;
  }
};

describe('resuming a sweep', () => {
  const specFile = tmp.file('td.json', spec);
  const reference = tmp.file('reference.jsonl');

  it('killed with SIGKILL mid-way and run again, it writes exactly the file of an uninterrupted run (common practice)', async () => {
    assert.equal(rhosigma(['sweep', specFile, '-o', reference, '--workers', '0']).code, 0);
    const out = tmp.file('killed.jsonl');
    for (const workers of ['2', '1']) {
      const child = startRhosigma(['sweep', specFile, '-o', out, '--workers', workers]);
      const exited = new Promise((r) => child.once('exit', r));
      const before = count(out);
      const deadline = Date.now() + 120_000;
      while (count(out) < before + 300 && Date.now() < deadline) await sleep(20);
      child.kill('SIGKILL');
      await exited;
      const text = readFileSync(out, 'utf8');
      assert.ok(!text.includes('"end"'), 'the run finished before it could be killed');
      assert.ok(count(out) > before, 'the run wrote nothing before the kill');
    }
    const r = rhosigma(['sweep', specFile, '-o', out, '--workers', '2']);
    assert.equal(r.code, 0, r.stderr);
    assert.match(r.stderr, /resumed after \d+ lines/);
    assert.ok(readFileSync(out, 'utf8') === readFileSync(reference, 'utf8'), 'the resumed file differs from an uninterrupted run');
    // Run again: nothing to do, nothing changes.
    const again = rhosigma(['sweep', specFile, '-o', out]);
    assert.equal(again.code, 0);
    assert.match(again.stderr, /already complete/);
    assert.ok(readFileSync(out, 'utf8') === readFileSync(reference, 'utf8'));
  });

  it('cuts off a torn last line and goes on from the last whole one (common practice)', () => {
    const full = readFileSync(reference, 'utf8').split('\n');
    const torn = tmp.file('torn.jsonl', `${full.slice(0, 101).join('\n')}\n${full[101].slice(0, 37)}`);
    const r = rhosigma(['sweep', specFile, '-o', torn, '--workers', '1']);
    assert.equal(r.code, 0, r.stderr);
    assert.ok(readFileSync(torn, 'utf8') === readFileSync(reference, 'utf8'));
  });

  it('refuses a file of another sweep or a damaged one, and leaves it as it was (common practice)', () => {
    const other = tmp.file('other.json', { ...spec, seed: 32 });
    const target = tmp.file('target.jsonl', readFileSync(reference, 'utf8').split('\n').slice(0, 20).join('\n') + '\n');
    const before = readFileSync(target, 'utf8');
    let r = rhosigma(['sweep', other, '-o', target]);
    assert.equal(r.code, 2);
    assert.match(r.stderr, /holds another sweep: it was written for another spec/);
    assert.ok(readFileSync(target, 'utf8') === before);
    const notSweep = tmp.file('notes.txt', 'my notes\n');
    r = rhosigma(['sweep', specFile, '-o', notSweep]);
    assert.equal(r.code, 2);
    assert.match(r.stderr, /does not start with a sweep header/);
    assert.equal(readFileSync(notSweep, 'utf8'), 'my notes\n');
    const damaged = tmp.file('damaged.jsonl', before);
    appendFileSync(damaged, '{"index": 99}\n');
    r = rhosigma(['sweep', specFile, '-o', damaged]);
    assert.equal(r.code, 2);
    assert.match(r.stderr, /is point 99, expected 19: the file is damaged/);
    writeFileSync(damaged, before);
  });
});
