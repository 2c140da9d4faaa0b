// Known facts found by search (issue 12): data processing D̃_α(N(ρ)‖N(σ)) ≤ D̃_α(ρ‖σ) of the sandwiched Rényi
// divergence holds for α ≥ 1/2 (Frank and Lieb, "Monotonicity of a relative Rényi entropy", J. Math. Phys. 54
// (2013) 122201; Beigi, "Sandwiched Rényi divergence satisfies data processing inequality", J. Math. Phys. 54
// (2013) 122202) and fails for some α < 1/2 (the same papers note the range is sharp; Berta, Scholz and
// Tomamichel, Ann. Henri Poincaré 19 (2018) 1843, give counterexamples). D̃_α is the α-z divergence at z = α
// (Audenaert and Datta, J. Math. Phys. 56 (2015) 022202), which the engine defines for every α > 0.
// A counterexample must replay: its requests, given to `rhosigma compute`, answer exactly as in the sweep.
import { afterAll, describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { dataProcessingSpec, rhosigma, tempFolder } from './helpers.js';

const tmp = tempFolder();
afterAll(() => tmp.remove());

const lines = (path: string) => readFileSync(path, 'utf8').trim().split('\n').map((l) => JSON.parse(l));

/** Replays a line's requests in a separate `rhosigma compute` and returns the two sides it answers. */
function replay(row: { reproduce: unknown[] }): { left: number; right: number } {
  const r = rhosigma(['compute'], { input: JSON.stringify(row.reproduce) });
  assert.equal(r.code, 0, r.stderr);
  const answers = JSON.parse(r.stdout) as { id: string; value: number }[];
  const side = (id: string) => answers.find((a) => a.id === id)!.value;
  return { left: side('inequality.left'), right: side('inequality.right') };
}

describe('data processing of the sandwiched Rényi divergence, searched', () => {
  it('fails for α = 0.05 < 1/2: first-violation mode stops at a counterexample, the same with one or two workers, and it replays exactly (Frank–Lieb 2013; Berta–Scholz–Tomamichel 2018)', () => {
    const spec = tmp.file('low.json', dataProcessingSpec([0.05], 200, 2013, { mode: 'first-violation' }));
    const one = tmp.file('low1.jsonl'), two = tmp.file('low2.jsonl');
    assert.equal(rhosigma(['sweep', spec, '-o', one, '--workers', '1']).code, 0);
    assert.equal(rhosigma(['sweep', spec, '-o', two, '--workers', '2']).code, 0);
    assert.ok(readFileSync(one, 'utf8') === readFileSync(two, 'utf8'));
    const rows = lines(one);
    const end = rows[rows.length - 1].end;
    const last = rows[rows.length - 2];
    assert.equal(last.violated, true);
    assert.equal(end.stoppedAt, last.index);
    assert.ok(last.index < 199, 'stopped before the end');
    assert.ok(rows.slice(1, -2).every((r) => r.violated === false), 'no earlier violation');
    assert.ok(last.left > last.right + 1e-6, `D̃(Nρ‖Nσ) = ${last.left} > D̃(ρ‖σ) = ${last.right}`);
    const again = replay(last);
    assert.equal(again.left, last.left);
    assert.equal(again.right, last.right);
    // The replayed requests are self-contained: the channel and states are inlined as plain data.
    assert.ok(JSON.stringify(last.reproduce).indexOf('"$"') < 0);
  });

  it('the search mode finds a violation at α = 0.1 that the sampled points miss, and it replays (Frank–Lieb 2013)', () => {
    const spec = tmp.file('search.json', dataProcessingSpec([0.1], 40, 2013, { mode: { search: { refine: 2, evaluations: 400 } } }));
    const out = tmp.file('search.jsonl');
    const r = rhosigma(['sweep', spec, '-o', out, '--workers', '2']);
    assert.equal(r.code, 0, r.stderr);
    const rows = lines(out);
    const sampled = rows.filter((x) => x.index !== undefined && x.refined === undefined);
    const refined = rows.filter((x) => x.refined !== undefined);
    assert.equal(sampled.length, 40);
    assert.equal(refined.length, 2);
    assert.ok(sampled.every((x) => x.violated === false), 'sampling alone finds no violation here');
    const hit = refined.find((x) => x.violated === true);
    assert.ok(hit, `no refined violation: ${refined.map((x) => x.gap).join(', ')}`);
    assert.ok(hit.gap < hit.start && hit.gap < -1e-3);
    const again = replay(hit);
    assert.equal(again.left, hit.left);
    assert.equal(again.right, hit.right);
    const s = JSON.parse(rhosigma(['sweep', 'summary', out, '--json']).stdout);
    assert.equal(s.violations.count, 1);
    assert.equal(s.violations.first[0].refined, hit.refined);
  });

  it('holds for α ≥ 1/2 at every sampled and every refined point (Frank–Lieb 2013; Beigi 2013)', () => {
    const spec = tmp.file('high.json', dataProcessingSpec([0.5, 0.75, 2, 10], 60, 99, { mode: { search: { refine: 3, evaluations: 150 } } }));
    const out = tmp.file('high.jsonl');
    const r = rhosigma(['sweep', spec, '-o', out, '--workers', '2']);
    assert.equal(r.code, 0, r.stderr);
    const rows = lines(out).slice(1, -1);
    assert.equal(rows.length, 240 + 3);
    for (const x of rows) {
      assert.equal(x.failed, undefined, JSON.stringify(x.failed));
      assert.equal(x.violated, false, `point ${x.index}${x.refined !== undefined ? ` (refined)` : ''}: gap ${x.gap}`);
      assert.ok(x.gap >= -1e-9 * Math.max(1, Math.abs(x.left), Math.abs(x.right)));
    }
  });
});
