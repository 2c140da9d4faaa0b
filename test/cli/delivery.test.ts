// Facts about delivery through the `rhosigma` command, run as a real process (test/cli/launch.ts): every
// answer reaches the reader or the exit code says it did not, and no input of any size or encoding
// crashes the command or loses the other answers (issue 7; docs/protocol.md, "The command" and "Limits
// and deadlines"). Sources: the project's protocol; RFC 8259 §8.1 (JSON text exchanged between systems
// is UTF-8) and §4 (names within an object SHOULD be unique; behaviour with duplicates is unpredictable).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const launcher = fileURLToPath(new URL('./launch.ts', import.meta.url));

interface Run {
  code: number | null;
  stdout: string;
  stderr: string;
  peakKiB: number;
}

/** Peak resident memory of a live process, from /proc (Linux). */
function peakOf(pid: number | undefined): number {
  try {
    const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) : 0;
  } catch {
    return 0;
  }
}

/**
 * Runs the command with `feed` writing its standard input (with back-pressure); `readSlowly` pauses
 * that long after each chunk read from its standard output.
 */
function run(args: string[], feed: (write: (b: Buffer | string) => Promise<void>) => Promise<void>, readSlowly = 0): Promise<Run> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', launcher, ...args], { cwd: root });
    const out: Buffer[] = [];
    let stderr = '';
    let peakKiB = 0;
    const watch = setInterval(() => (peakKiB = Math.max(peakKiB, peakOf(child.pid))), 50);
    child.stdout.on('data', (d: Buffer) => {
      out.push(d);
      if (readSlowly > 0) {
        child.stdout.pause();
        setTimeout(() => child.stdout.resume(), readSlowly);
      }
    });
    child.stderr.on('data', (d) => (stderr += d));
    child.on('error', reject);
    child.on('close', (code) => {
      clearInterval(watch);
      resolve({ code, stdout: Buffer.concat(out).toString('utf8'), stderr, peakKiB });
    });
    child.stdin.on('error', () => undefined); // the command may stop reading (and close) first
    const write = (b: Buffer | string) =>
      new Promise<void>((res) => {
        if (child.stdin.destroyed || !child.stdin.write(b)) child.stdin.once('drain', res).once('close', res);
        else res();
      });
    feed(write).then(() => child.stdin.end(), () => child.stdin.end());
  });
}

const text = (s: string) => async (write: (b: string) => Promise<void>) => write(s);

function noStack(r: Run): void {
  assert.ok(!/\n\s+at .+:\d+/.test(r.stdout + r.stderr), `a stack trace was printed:\n${r.stderr}`);
}

describe('no request loses the answers of the others', () => {
  it('a good request before a preset above the limits is answered; the preset is refused with too-large at once (exit 1)', async () => {
    const input = JSON.stringify([{ op: 'entropy', rho: [[1]] }, { op: 'channel-preset', name: 'erasure', d: 1024, p: 0.1 }]);
    const t0 = Date.now();
    const r = await run(['compute', '-'], text(input));
    assert.ok(Date.now() - t0 < 20_000);
    assert.equal(r.code, 1, r.stderr);
    const [a, b] = JSON.parse(r.stdout);
    assert.equal(a.ok, true);
    assert.equal(a.value, 0); // the entropy of a pure state is 0 (textbook)
    assert.equal(b.error.code, 'too-large');
    noStack(r);
  });
});

describe('input of any size or encoding', () => {
  it('a line longer than the line limit (256 MiB) is answered with too-large without being held; the next line is answered', async () => {
    const chunk = Buffer.alloc(1 << 20, 0x5b); // "[[[[...": never parsed
    const r = await run(['compute', '--lines'], async (write) => {
      for (let k = 0; k < 260; k++) await write(chunk);
      await write('\n{"op": "spectrum", "matrix": [[2, 1], [1, 2]]}\n');
    });
    assert.equal(r.code, 1, r.stderr);
    const lines = r.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    assert.equal(lines.length, 2);
    assert.equal(lines[0].error.code, 'too-large');
    assert.match(lines[0].error.message, /Line 1 is 272629760 bytes long/);
    assert.deepEqual(lines[1].value, [1, 3]);
    assert.ok(r.peakKiB < 400_000, `peak memory ${r.peakKiB} KiB: the long line was held`);
    noStack(r);
  });

  it('a document longer than the input limit (256 MiB) is answered with one too-large answer and exit 1', async () => {
    const chunk = Buffer.alloc(1 << 20, 0x20);
    const r = await run(['compute'], async (write) => {
      await write('[');
      for (let k = 0; k < 260; k++) await write(chunk);
      await write(']');
    });
    assert.equal(r.code, 1, r.stderr);
    const a = JSON.parse(r.stdout);
    assert.equal(a.error.code, 'too-large');
    assert.match(a.error.message, /--lines/);
    noStack(r);
  });

  it('invalid UTF-8 is a parse error, never replaced silently: with --lines in its place, otherwise exit 2', async () => {
    const bad = Buffer.concat([Buffer.from('{"op": "spectrum", "matrix": [["'), Buffer.from([0xff, 0xfe]), Buffer.from('"]]}\n')]);
    const lines = await run(['compute', '--lines'], async (write) => {
      await write(bad);
      await write('{"op": "spectrum", "matrix": [[1]]}\n');
    });
    assert.equal(lines.code, 2);
    const answers = lines.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    assert.equal(answers[0].error.code, 'parse-error');
    assert.match(answers[0].error.message, /UTF-8/);
    assert.equal(answers[1].ok, true);
    const whole = await run(['compute'], async (write) => write(bad));
    assert.equal(whole.code, 2);
    assert.match(whole.stderr, /UTF-8/);
    assert.equal(whole.stdout, '');
  });

  it('a request that repeats a key is refused naming the key, in a line, a single request and an array element', async () => {
    const dup = '{"op": "entropy", "op": "spectrum", "matrix": [[1]], "id": 7}';
    const one = await run(['compute'], text(dup));
    assert.equal(one.code, 1);
    const a = JSON.parse(one.stdout);
    assert.equal(a.error.code, 'invalid-argument');
    assert.equal(a.error.path, 'op');
    assert.equal(a.id, 7);
    const arr = await run(['compute'], text(`[{"op": "spectrum", "matrix": [[1]]}, {"op": "spectrum", "matrix": [[1]], "vectors": true, "vectors": false}]`));
    const [x, y] = JSON.parse(arr.stdout);
    assert.equal(x.ok, true);
    assert.equal(y.error.path, 'vectors');
    const nested = await run(['compute', '--lines'], text('{"op": "entropy", "rho": {"matrix": [[1]], "matrix": [[0.5, 0], [0, 0.5]]}}\n'));
    assert.equal(JSON.parse(nested.stdout).error.path, 'rho.matrix');
  });
});

describe('every answer reaches the reader, or the exit code says it did not', () => {
  it('with --lines and a slow reader, every answer arrives in order, and memory stays bounded (answers are not held)', async () => {
    const count = 400;
    const line = `${JSON.stringify({ op: 'state-preset', name: 'maximally-mixed', d: 256 })}\n`;
    const r = await run(['compute', '--lines'], async (write) => {
      for (let k = 0; k < count; k++) await write(line.replace('}', `, "id": ${k}}`));
    }, 2);
    assert.equal(r.code, 0, r.stderr);
    const ids = r.stdout.trimEnd().split('\n').map((l) => JSON.parse(l).id);
    assert.deepEqual(ids, Array.from({ length: count }, (_, k) => k));
    // 400 answers of a 256 × 256 matrix are 107 MB of text. Measured here: one answer 156 MB peak (tsx
    // included), all 400 written to a file 239 MB; holding the answers would add the 107 MB on top.
    assert.ok(r.stdout.length > 100e6);
    assert.ok(r.peakKiB < 300_000, `peak memory ${r.peakKiB} KiB`);
  });

  it('when the reader closes the output early, the command stops and exits 3 with a message, no stack trace', async () => {
    const r = await new Promise<Run>((resolve) => {
      const child = spawn(process.execPath, ['--import', 'tsx', launcher, 'compute', '--lines'], { cwd: root });
      let stderr = '';
      child.stderr.on('data', (d) => (stderr += d));
      child.stdout.once('data', () => child.stdout.destroy());
      child.on('close', (code) => resolve({ code, stdout: '', stderr, peakKiB: 0 }));
      child.stdin.on('error', () => undefined);
      const line = `${JSON.stringify({ op: 'state-preset', name: 'maximally-mixed', d: 256 })}\n`;
      (async () => {
        for (let k = 0; k < 400 && !child.stdin.destroyed; k++) {
          if (!child.stdin.write(line)) await new Promise((res) => child.stdin.once('drain', res).once('close', res));
        }
        child.stdin.end();
      })();
    });
    assert.equal(r.code, 3, r.stderr);
    assert.match(r.stderr, /not every answer was delivered/);
    noStack(r);
  });
});

describe('deadlines through the command', () => {
  it('--deadline sets the deadline of requests that give none; a request\'s own "deadline" wins', async () => {
    const n = 64;
    const rho = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 / n : 0)));
    const sigma = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 / n : Math.abs(i - j) === 1 ? 0.3 / n : 0)));
    const req = { op: 'divergence', family: 'measured', rho, sigma };
    const r = await run(['compute', '--lines', '--deadline', '1'], text(`${JSON.stringify(req)}\n${JSON.stringify({ ...req, deadline: 60_000, maxIterations: 5 })}\n`));
    const [a, b] = r.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    assert.equal(a.error.code, 'deadline-exceeded');
    assert.equal(b.ok, true, JSON.stringify(b).slice(0, 300));
    const wrong = await run(['compute', '--deadline', 'soon'], text('{"op": "spectrum", "matrix": [[1]]}'));
    assert.equal(wrong.code, 2);
  });
});
