// Facts about the `rhosigma` command, run as a real process (test/cli/launch.ts). Source: PROTOCOL.md,
// "The command" (shapes, order, exit codes 0/1/2, no stack trace, a bad request never stops the batch);
// the rest (--pretty, `ops`, help text) is the project's own contract, no published source.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawn } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const launcher = fileURLToPath(new URL('./launch.ts', import.meta.url));

interface Run {
  code: number | null;
  stdout: string;
  stderr: string;
}

function run(args: string[], input = ''): Promise<Run> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', launcher, ...args], { cwd: root });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout, stderr }));
    child.stdin.end(input);
  });
}

function noStack(r: Run): void {
  assert.ok(!/\n\s+at .+:\d+/.test(r.stdout + r.stderr), `a stack trace was printed:\n${r.stderr}`);
}

const good = { op: 'spectrum', matrix: [[2, 1], [1, 2]] };
const alsoGood = { op: 'spectrum', matrix: [['3/4', 'i/4'], ['-i/4', '3/4']], id: 'b' };
const bad = { op: 'spectrum', matrix: [[1, 2], [3, 4]], id: 'bad' };

describe('rhosigma compute', () => {
  it('answers a single request with a single answer object and exit code 0', async () => {
    const r = await run(['compute'], JSON.stringify(good));
    assert.equal(r.code, 0, r.stderr);
    const a = JSON.parse(r.stdout);
    assert.equal(a.ok, true);
    assert.deepEqual(a.value, [1, 3]); // eigenvalues of [[2,1],[1,2]] are 1 and 3 (textbook)
  });

  it('answers an array with an array in the same order; one bad request gives exit 1 and the others are answered', async () => {
    const r = await run(['compute', '-'], JSON.stringify([good, bad, alsoGood]));
    assert.equal(r.code, 1, r.stderr);
    const answers = JSON.parse(r.stdout);
    assert.equal(answers.length, 3);
    assert.deepEqual(answers.map((a: any) => a.ok), [true, false, true]);
    assert.equal(answers[1].error.code, 'not-hermitian');
    assert.equal(answers[1].id, 'bad');
    assert.equal(answers[2].id, 'b');
    noStack(r);
  });

  it('reads and writes JSON Lines with --lines, one answer per request line, blank lines skipped', async () => {
    const input = `${JSON.stringify(good)}\n\n${JSON.stringify(bad)}\r\n${JSON.stringify(alsoGood)}\n`;
    const r = await run(['compute', '--lines'], input);
    assert.equal(r.code, 1, r.stderr);
    const lines = r.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    assert.deepEqual(lines.map((a) => a.ok), [true, false, true]);
  });

  it('exits 2 on input that is not JSON, with a message and no stack trace', async () => {
    const r = await run(['compute'], '{"op": "spectrum", ');
    assert.equal(r.code, 2);
    assert.equal(r.stdout, '');
    assert.match(r.stderr, /not JSON/);
    noStack(r);
  });

  it('with --lines, answers a line that is not JSON with a parse-error in its place, answers the rest, and exits 2', async () => {
    const r = await run(['compute', '--lines'], `${JSON.stringify(good)}\n{nope\n${JSON.stringify(alsoGood)}\n`);
    assert.equal(r.code, 2);
    const lines = r.stdout.trimEnd().split('\n').map((l) => JSON.parse(l));
    assert.deepEqual(lines.map((a) => a.ok), [true, false, true]);
    assert.equal(lines[1].error.code, 'parse-error');
    assert.match(lines[1].error.message, /Line 2/);
  });

  it('reads a file argument, and --pretty indents the output', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rhosigma-cli-'));
    const file = join(dir, 'requests.json');
    writeFileSync(file, JSON.stringify([good]));
    const r = await run(['compute', file, '--pretty']);
    assert.equal(r.code, 0, r.stderr);
    assert.match(r.stdout, /^\[\n {2}\{\n {4}"ok": true/);
    assert.deepEqual(JSON.parse(r.stdout)[0].value, [1, 3]);
  });

  it('exits 2 for a wrong command line: unknown option, unknown command, missing file', async () => {
    const cases = [['compute', '--bogus'], ['frobnicate'], ['compute', '/no/such/file.json']];
    const runs = await Promise.all(cases.map((args) => run(args)));
    runs.forEach((r, k) => {
      assert.equal(r.code, 2, `${cases[k].join(' ')}: ${r.stderr}`);
      noStack(r);
    });
  });
});

describe('rhosigma ops, help', () => {
  it('lists every op with its summary, prints one op\'s schema, and refuses an unknown name with exit 2', async () => {
    const [list, one, none] = await Promise.all([run(['ops']), run(['ops', 'spectrum']), run(['ops', 'spectrm'])]);
    assert.equal(list.code, 0);
    assert.match(list.stdout, /^spectrum\s+Eigenvalues/m);
    assert.equal(one.code, 0);
    const schema = JSON.parse(one.stdout);
    assert.equal(schema.properties.op.const, 'spectrum');
    assert.ok(schema.required.includes('matrix'));
    assert.equal(none.code, 2);
    assert.match(none.stderr, /spectrum/);
  });

  it('describes its usage with an example under --help and compute --help, exit 0', async () => {
    const [top, sub] = await Promise.all([run(['--help']), run(['compute', '--help'])]);
    assert.equal(top.code, 0);
    assert.match(top.stdout, /rhosigma compute/);
    assert.equal(sub.code, 0);
    assert.match(sub.stdout, /Exit code/);
    assert.match(sub.stdout, /Example/);
  });
});

describe('rhosigma serve', () => {
  it('writes a ready line, then answers each request line as it arrives, before the next is sent (the bridge waits for each answer), and ends with 0 at end of input', async () => {
    const child = spawn(process.execPath, ['--import', 'tsx', launcher, 'serve'], { cwd: root });
    const lines: string[] = [];
    let buffer = '';
    let wake: (() => void) | undefined;
    child.stdout.setEncoding('utf8');
    child.stdout.on('data', (d: string) => {
      buffer += d;
      let k;
      while ((k = buffer.indexOf('\n')) >= 0) {
        lines.push(buffer.slice(0, k));
        buffer = buffer.slice(k + 1);
      }
      wake?.();
    });
    const nextLine = async (): Promise<any> => {
      while (lines.length === 0) await new Promise<void>((r) => (wake = r));
      return JSON.parse(lines.shift()!);
    };
    const closed = new Promise<number | null>((r) => child.on('close', r));
    const ready = await nextLine();
    assert.equal(ready.ready, true);
    assert.equal(ready.protocol, '1.1');
    child.stdin.write(`${JSON.stringify({ ...good, id: 1 })}\n`);
    const first = await nextLine(); // answered while stdin is still open
    assert.equal(first.id, 1);
    assert.deepEqual(first.value, [1, 3]); // eigenvalues of [[2,1],[1,2]] (textbook)
    child.stdin.write('not json\n');
    assert.equal((await nextLine()).error.code, 'parse-error');
    child.stdin.write(`${JSON.stringify(bad)}\n`);
    assert.equal((await nextLine()).error.code, 'not-hermitian');
    child.stdin.end();
    assert.equal(await closed, 0);
  });
});
