// The demo report of `rhosigma demo`, run as a real process: it must answer every request it makes,
// and its numbers must obey facts from outside the project.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const launch = fileURLToPath(new URL('./launch.ts', import.meta.url));

function run(args: string[]) {
  return spawnSync(process.execPath, ['--import', 'tsx', launch, ...args], { cwd: root, encoding: 'utf8' });
}

describe('rhosigma demo', () => {
  it('prints a readable report and exits 0 when every request is answered', () => {
    const r = run(['demo']);
    assert.equal(r.status, 0, r.stderr);
    assert.match(r.stdout, /The link/);
    assert.match(r.stdout, /guessing probability/);
    assert.doesNotMatch(r.stdout, /refused|undefined|NaN/);
  });

  it('with --json lists requests and ok answers; the SDP guessing probability equals Helstrom–Holevo ½(1 + T) (Helstrom 1976)', () => {
    const r = run(['demo', '--json']);
    assert.equal(r.status, 0, r.stderr);
    const log = JSON.parse(r.stdout) as { request: { op: string }; answer: { ok: boolean; value: unknown } }[];
    assert.ok(log.length > 20);
    for (const { request, answer } of log) assert.ok(answer.ok, `${request.op} failed: ${JSON.stringify(answer)}`);
    const guess = log.find((e) => e.request.op === 'guessing-probability')!;
    const distances = log.filter((e) => e.request.op === 'trace-distance');
    const T = distances[distances.length - 1].answer.value as number;
    assert.ok(Math.abs((guess.answer.value as number) - 0.5 * (1 + T)) < 1e-6);
  });

  it('shows data processing: every divergence between the two preparations decreases through the link (Lindblad 1975; Frank & Lieb 2013; Beigi 2013)', () => {
    const r = run(['demo']);
    const lines = r.stdout.split('\n').filter((l) => /decreased|INCREASED/.test(l));
    assert.equal(lines.length, 3);
    for (const l of lines) assert.match(l, /decreased, as it must/);
  });
});
