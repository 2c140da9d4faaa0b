// Facts about reproducibility (issue 12, "Determinism"): a point's line depends only on the seed and its
// index, so one worker, two workers, the calling thread and four shards merged give the same file, byte for
// byte. Source: the design of counter-based generators (Salmon et al., SC 2011: a stream is a function of
// key and counter alone), checked here end to end through the real command.
import { afterAll, describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { dataProcessingSpec, rhosigma, tempFolder } from './helpers.js';

const tmp = tempFolder();
afterAll(() => tmp.remove());

describe('sweep determinism', () => {
  const spec = tmp.file('dpi.json', dataProcessingSpec([0.05, 0.3, 0.7, 2], 9, 424242, { record: ['Nrho'] }));

  it('one worker, two workers, the calling thread and four shards merged write byte-identical files (Salmon et al. 2011)', () => {
    const one = tmp.file('one.jsonl'), two = tmp.file('two.jsonl'), zero = tmp.file('zero.jsonl'), merged = tmp.file('merged.jsonl');
    for (const [out, workers] of [[one, '1'], [two, '2'], [zero, '0']]) {
      const r = rhosigma(['sweep', spec, '-o', out, '--workers', workers]);
      assert.equal(r.code, 0, r.stderr);
    }
    const shards = [0, 1, 2, 3].map((k) => {
      const out = tmp.file(`part${k}.jsonl`);
      const r = rhosigma(['sweep', spec, '--shard', `${k}/4`, '-o', out, '--workers', k % 2 === 0 ? '1' : '0']);
      assert.equal(r.code, 0, r.stderr);
      return out;
    });
    const m = rhosigma(['sweep', 'merge', shards[2], shards[0], shards[3], shards[1], '-o', merged]);
    assert.equal(m.code, 0, m.stderr);
    const text = readFileSync(one, 'utf8');
    const lines = text.trim().split('\n');
    assert.equal(lines.length, 1 + 36 + 1, 'header, 36 points, end line');
    assert.ok(lines.slice(1, -1).every((l, i) => JSON.parse(l).index === i));
    assert.ok(readFileSync(two, 'utf8') === text, 'two workers differ from one');
    assert.ok(readFileSync(zero, 'utf8') === text, 'the calling thread differs from one worker');
    assert.ok(readFileSync(merged, 'utf8') === text, 'four shards merged differ from one run');
    // A shard holds the indices ≡ k mod 4, and knows which shard it is.
    const part1 = readFileSync(shards[1], 'utf8').trim().split('\n').map((l) => JSON.parse(l));
    assert.deepEqual(part1[0].shard, { index: 1, count: 4 });
    assert.deepEqual(part1.slice(1, -1).map((p) => p.index), [1, 5, 9, 13, 17, 21, 25, 29, 33]);
  });

  it('another seed gives other draws, the same seed the same (common practice)', () => {
    const a = tmp.file('a.jsonl'), b = tmp.file('b.jsonl'), c = tmp.file('c.jsonl');
    const other = tmp.file('other.json', dataProcessingSpec([0.05, 0.3, 0.7, 2], 9, 424243, { record: ['Nrho'] }));
    assert.equal(rhosigma(['sweep', spec, '-o', a, '--workers', '0']).code, 0);
    assert.equal(rhosigma(['sweep', other, '-o', b, '--workers', '0']).code, 0);
    const la = readFileSync(a, 'utf8').split('\n'), lb = readFileSync(b, 'utf8').split('\n');
    assert.notEqual(la[1], lb[1]);
    assert.equal(rhosigma(['sweep', spec, '-o', c, '--workers', '0']).code, 0);
    assert.ok(readFileSync(c, 'utf8') === readFileSync(a, 'utf8'));
  });

  it('merge refuses a missing shard, a shard twice and shards of another spec, naming the file', () => {
    const p0 = tmp.file('q0.jsonl'), p1 = tmp.file('q1.jsonl'), x = tmp.file('x0.jsonl');
    assert.equal(rhosigma(['sweep', spec, '--shard', '0/2', '-o', p0, '--workers', '0']).code, 0);
    assert.equal(rhosigma(['sweep', spec, '--shard', '1/2', '-o', p1, '--workers', '0']).code, 0);
    const other = tmp.file('other2.json', dataProcessingSpec([0.7], 3, 1));
    assert.equal(rhosigma(['sweep', other, '--shard', '0/2', '-o', x, '--workers', '0']).code, 0);
    let r = rhosigma(['sweep', 'merge', p0]);
    assert.equal(r.code, 2);
    assert.match(r.stderr, /Shards 1\/2 are missing/);
    r = rhosigma(['sweep', 'merge', p0, p0]);
    assert.match(r.stderr, /both shard 0\/2/);
    r = rhosigma(['sweep', 'merge', p1, x]);
    assert.match(r.stderr, /x0\.jsonl is from another sweep/);
  });
});
