// Facts about warming a long-lived engine (src/ops/warm-up.ts): every warming request is a valid request
// the engine answers (so warming keeps exercising the hot paths as ops change), warming gives way while
// the engine is busy and stops when asked, and it changes no answer. The project's own contract (issue 6
// §3); the speed it buys is measured in bench/warmup.ts, not here.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { handle, mayNeedExpressions } from '../../src/ops/handle.js';
import { warmUp, warmUpRequests } from '../../src/ops/warm-up.js';

describe('warmUp', () => {
  it('every warming request is answered ok (none has gone stale)', () => {
    for (const r of warmUpRequests()) {
      const a = handle(r);
      assert.ok(a.ok, `${String(r.op)}: ${JSON.stringify(a).slice(0, 300)}`);
    }
  });

  it('runs every step, waits while busy, and leaves the answers unchanged', async () => {
    const request = { op: 'fidelity-sdp', rho: [[0.7, 0.1], [0.1, 0.3]], sigma: [[0.5, 0], [0, 0.5]] };
    const before = handle(request);
    let busyUntil = performance.now() + 50;
    const report = await warmUp({ rounds: 1, busy: () => performance.now() < busyUntil });
    assert.deepEqual(report.failed, []);
    assert.equal(report.steps, warmUpRequests().length);
    assert.ok(report.elapsedMs >= 50);
    assert.deepEqual(handle(request), before);
    busyUntil = 0;
  });

  it('with expressions: false, skips exactly the steps that hold an expression string (mayNeedExpressions)', async () => {
    const report = await warmUp({ rounds: 1, expressions: false });
    assert.deepEqual(report.failed, []);
    const withExpressions = warmUpRequests().filter((r) => mayNeedExpressions(r)).length;
    assert.ok(withExpressions >= 1);
    assert.equal(report.steps, warmUpRequests().length - withExpressions);
  });

  it('stops after the current step once its signal is aborted', async () => {
    const signal = { aborted: true };
    const report = await warmUp({ signal });
    assert.equal(report.steps, 0);
  });
});
