/**
 * The `rhosigma` command: a thin adapter from files and standard streams to `handle` (src/ops/handle.ts).
 *
 *   rhosigma compute [FILE|-] [--lines] [--pretty]   answer requests (PROTOCOL.md, "The command")
 *   rhosigma ops [NAME] [--json]                     list the ops, or print one op's request schema
 *   rhosigma serve                                   a long-lived engine: JSON Lines in, one answer line out per
 *                                                    request, in order, flushed as each is computed (kernel bridge)
 *   rhosigma demo                                    a short worked report (src/cli/demo.ts)
 *   rhosigma sweep SPEC | merge | summary | plot ...  sweeps and counterexample searches (src/cli/sweep.ts)
 *
 * Exit codes: 0 every answer ok; 1 at least one answer failed (all others still answered); 2 the input is
 * not JSON, a file cannot be read, or the command line is wrong. Nothing here computes: every answer comes
 * from `handle`, and no stack trace is ever printed. `main` returns the exit code and never calls
 * process.exit (bin/rhosigma.js sets process.exitCode), so it can run in-process too.
 * Command-line parsing is commander's. Cost: one `handle` call per request; JSON Lines input is streamed,
 * each answer written as soon as its line is read.
 */
import { readFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { createInterface } from 'node:readline';
import { once } from 'node:events';
import type { Readable, Writable } from 'node:stream';
import { Command, CommanderError } from 'commander';
import '../ops/all.js';
import { handle, requestSchema, closeOpNames, type Answer } from '../ops/handle.js';
import { getOp, listOps } from '../ops/registry.js';
import { runDemo } from './demo.js';
import { addSweepCommands } from './sweep.js';

/** The streams the command uses (the process's own by default; tests may pass others). */
export interface Io {
  stdin: Readable & { isTTY?: boolean };
  stdout: Writable;
  stderr: Writable;
}

const EXAMPLE_REQUEST = '{"op": "spectrum", "matrix": [["3/4", "i/4"], ["-i/4", "3/4"]]}';

function version(): string {
  try {
    // src/cli/ and dist/cli/ both sit two levels below the package root.
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: string };
    return pkg.version ?? 'unknown';
  } catch {
    return 'unknown';
  }
}

/** "Unexpected token } in JSON at position 12" → the same with the line and column of position 12. */
function describeJsonError(err: unknown, text: string, oneLine = false): string {
  const message = err instanceof Error ? err.message : String(err);
  const m = /position (\d+)/.exec(message);
  if (!m) return message;
  const pos = Number(m[1]);
  const before = text.slice(0, pos);
  const line = before.split('\n').length;
  const column = pos - before.lastIndexOf('\n');
  return oneLine ? `${message} (column ${column})` : `${message} (line ${line}, column ${column})`;
}

function safeHandle(request: unknown): Answer {
  try {
    return handle(request);
  } catch {
    // handle() never throws by contract; this guard keeps one broken request from stopping a batch.
    return { ok: false, op: null, error: { code: 'internal-error', message: 'The engine failed unexpectedly on this request.' } };
  }
}

async function readAll(stream: Readable): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(typeof chunk === 'string' ? Buffer.from(chunk) : chunk);
  return Buffer.concat(chunks).toString('utf8');
}

function inputStream(file: string | undefined, io: Io): Readable | undefined {
  if (file !== undefined && file !== '-') return undefined;
  if (io.stdin.isTTY) {
    io.stderr.write('rhosigma compute: reading requests from standard input; end with Ctrl-D (see `rhosigma compute --help`).\n');
  }
  return io.stdin;
}

async function computeWhole(file: string | undefined, pretty: boolean, io: Io): Promise<number> {
  let text: string;
  const stream = inputStream(file, io);
  try {
    text = stream ? await readAll(stream) : await readFile(file!, 'utf8');
  } catch (err) {
    io.stderr.write(`rhosigma compute: cannot read ${file}: ${(err as NodeJS.ErrnoException).code ?? String(err)}\n`);
    return 2;
  }
  let input: unknown;
  try {
    input = JSON.parse(text);
  } catch (err) {
    const hint = text.trim() === '' ? 'the input is empty' : describeJsonError(err, text);
    io.stderr.write(`rhosigma compute: the input is not JSON: ${hint}. (For one request per line, use --lines.)\n`);
    return 2;
  }
  const answers = Array.isArray(input) ? input.map(safeHandle) : safeHandle(input);
  io.stdout.write(`${JSON.stringify(answers, null, pretty ? 2 : undefined)}\n`);
  const list = Array.isArray(answers) ? answers : [answers];
  return list.every((a) => a.ok) ? 0 : 1;
}

/** Writes one line, waiting for the reader when the pipe is full (back-pressure: nothing piles up in memory). */
async function writeLine(io: Io, text: string): Promise<void> {
  if (!io.stdout.write(`${text}\n`)) await once(io.stdout, 'drain');
}

/**
 * Answers JSON Lines from `stream`: one answer line per non-blank request line, in order, each written as
 * soon as it is computed. Returns what happened, for the exit code.
 */
async function answerLines(stream: Readable, io: Io): Promise<{ notJson: boolean; failed: boolean }> {
  let notJson = false;
  let failed = false;
  let lineNumber = 0;
  const lines = createInterface({ input: stream, crlfDelay: Infinity });
  for await (const line of lines) {
    lineNumber++;
    if (line.trim() === '') continue;
    let answer: Answer;
    try {
      answer = safeHandle(JSON.parse(line));
    } catch (err) {
      // The line keeps its place in the output, so answers still line up with requests.
      notJson = true;
      answer = {
        ok: false,
        op: null,
        error: { code: 'parse-error', message: `Line ${lineNumber} is not JSON: ${describeJsonError(err, line, true)}.` },
      };
    }
    if (!answer.ok) failed = true;
    await writeLine(io, JSON.stringify(answer));
  }
  return { notJson, failed };
}

async function computeLines(file: string | undefined, io: Io): Promise<number> {
  let stream = inputStream(file, io);
  if (!stream) {
    try {
      const { createReadStream } = await import('node:fs');
      const s = createReadStream(file!, { encoding: 'utf8' });
      await new Promise<void>((resolve, reject) => {
        s.once('open', () => resolve());
        s.once('error', reject);
      });
      stream = s;
    } catch (err) {
      io.stderr.write(`rhosigma compute: cannot read ${file}: ${(err as NodeJS.ErrnoException).code ?? String(err)}\n`);
      return 2;
    }
  }
  const { notJson, failed } = await answerLines(stream, io);
  return notJson ? 2 : failed ? 1 : 0;
}

/** The protocol version this engine speaks (docs/protocol.md). */
export const PROTOCOL_VERSION = '1.1';

/**
 * `rhosigma serve`: the long-lived engine behind the Python bridge. First line out: a ready line
 * {"ready": true, "engine": "rhosigma", "version", "protocol"}, so that a client can tell a started engine
 * from a failed start. Then exactly one answer line per request line, in order. Failed requests do not
 * change the exit status: it is 0 when standard input ends.
 */
async function serve(io: Io): Promise<number> {
  await writeLine(io, JSON.stringify({ ready: true, engine: 'rhosigma', version: version(), protocol: PROTOCOL_VERSION }));
  await answerLines(io.stdin, io);
  return 0;
}

function listing(json: boolean, io: Io): number {
  const ops = listOps();
  if (json) {
    io.stdout.write(`${JSON.stringify(ops.map((o) => ({ name: o.name, summary: o.summary })), null, 2)}\n`);
    return 0;
  }
  const width = Math.max(...ops.map((o) => o.name.length));
  for (const o of ops) io.stdout.write(`${o.name.padEnd(width)}  ${o.summary}\n`);
  io.stdout.write('\nArguments of one op: rhosigma ops NAME\n');
  return 0;
}

function describeOp(name: string, io: Io): number {
  const def = getOp(name);
  if (!def) {
    const close = closeOpNames(name);
    const hint = close.length ? ` Did you mean ${close.slice(0, 3).join(' or ')}?` : ' Run `rhosigma ops` for the list.';
    io.stderr.write(`rhosigma ops: there is no op "${name}".${hint}\n`);
    return 2;
  }
  io.stdout.write(`${JSON.stringify(requestSchema(def), null, 2)}\n`);
  return 0;
}

function buildProgram(io: Io, setCode: (code: number) => void): Command {
  const program = new Command();
  program
    .name('rhosigma')
    .description('Quantities of quantum information theory, computed from plain JSON requests.')
    .version(version(), '-V, --version', 'print the version')
    .helpOption('-h, --help', 'show this help')
    .exitOverride()
    .configureOutput({
      writeOut: (s) => io.stdout.write(s),
      writeErr: (s) => io.stderr.write(s),
    })
    .showSuggestionAfterError(true)
    .addHelpText(
      'after',
      `
Examples:
  echo '${EXAMPLE_REQUEST}' | rhosigma compute
  rhosigma compute requests.json --pretty
  rhosigma compute --lines < batch.jsonl > answers.jsonl
  rhosigma ops
  rhosigma ops spectrum

The requests and answers are described in docs/protocol.md; the JSON Schema is schema/protocol.schema.json.`,
    );

  program
    .command('compute')
    .description('Answer one request, a JSON array of requests, or JSON Lines (--lines), in the same shape and order.')
    .argument('[file]', 'file of requests; "-" or nothing for standard input')
    .option('--lines', 'read JSON Lines (one request per line) and write one answer per line')
    .option('--pretty', 'indent the JSON output (ignored with --lines)')
    .addHelpText(
      'after',
      `
Input: one request object, an array of requests, or (with --lines) one request per line.
Output: the answers on standard output in the same shape and order; an answer is
  {"ok": true, "op": NAME, "value": ...} or {"ok": false, "op": NAME, "error": {"code", "message", "path"}}.
Exit code: 0 every answer ok; 1 some answers failed (the others are still answered);
  2 the input is not JSON (with --lines: some line is not JSON; it is answered with a parse-error),
  a file cannot be read, or the command line is wrong.

Example:
  $ echo '${EXAMPLE_REQUEST}' | rhosigma compute
  {"ok":true,"op":"spectrum","value":[0.5,1],"hermiticityDefect":0}`,
    )
    .action(async (file: string | undefined, opts: { lines?: boolean; pretty?: boolean }) => {
      setCode(opts.lines ? await computeLines(file, io) : await computeWhole(file, opts.pretty === true, io));
    });

  program
    .command('serve')
    .description('Run as a long-lived engine: JSON Lines in, one answer line per request out, in order, each as soon as it is computed.')
    .addHelpText(
      'after',
      `
The first line written is {"ready": true, "engine": "rhosigma", "version": ..., "protocol": ...}.
Then every non-blank line of standard input is answered by one line, in order; a line that is not
JSON is answered with a parse-error. The command ends with exit code 0 when standard input ends.
This is what the Python package starts once per kernel.`,
    )
    .action(async () => {
      setCode(await serve(io));
    });

  program
    .command('ops')
    .description('List every op with its summary, or print the request schema of one op.')
    .argument('[name]', 'an op name')
    .option('--json', 'print the list as JSON')
    .action((name: string | undefined, opts: { json?: boolean }) => {
      setCode(name === undefined ? listing(opts.json === true, io) : describeOp(name, io));
    });

  program
    .command('demo')
    .description('Print a short worked report computed by the engine on built-in data.')
    .option('--json', 'print the requests and their answers as JSON instead of the report')
    .action(async (opts: { json?: boolean }) => {
      setCode(await runDemo((s) => io.stdout.write(s), { json: opts.json === true }));
    });

  addSweepCommands(program, io, setCode);

  return program;
}

let watchingStdout = false;

/** Run the command with the arguments after the program name; resolves to the exit code. */
export async function main(argv: string[], io: Io = { stdin: process.stdin, stdout: process.stdout, stderr: process.stderr }): Promise<number> {
  // A reader that closes the pipe early (`| head`) is not an error worth a stack trace.
  if (io.stdout === process.stdout && !watchingStdout) {
    watchingStdout = true;
    process.stdout.on('error', (err: NodeJS.ErrnoException) => {
      if (err.code !== 'EPIPE') io.stderr.write(`rhosigma: cannot write the output: ${err.code ?? err.message}\n`);
    });
  }
  let code = 0;
  const program = buildProgram(io, (c) => {
    code = c;
  });
  if (argv.length === 0) {
    program.outputHelp({ error: true });
    return 2;
  }
  try {
    await program.parseAsync(argv, { from: 'user' });
    return code;
  } catch (err) {
    if (err instanceof CommanderError) {
      // Help and version end "successfully"; every other parse failure is a wrong command line.
      return err.exitCode === 0 ? 0 : 2;
    }
    io.stderr.write(`rhosigma: ${err instanceof Error ? err.message : String(err)}\n`);
    return 2;
  }
}
