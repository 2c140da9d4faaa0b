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
 * not JSON (or not UTF-8), a file cannot be read, or the command line is wrong; 3 some answer could not be
 * written (the reader went away). Input is read as bytes: lines longer than MAX_LINE_BYTES and documents
 * longer than MAX_INPUT_BYTES are answered with 'too-large' without being held, invalid UTF-8 is a
 * parse error, and a request that repeats a key is refused. Nothing here computes: every answer comes
 * from `handle`, and no stack trace is ever printed. `main` returns the exit code and never calls
 * process.exit (bin/rhosigma.js sets process.exitCode), so it can run in-process too.
 * Command-line parsing is commander's. Cost: one `handle` call per request; answers are written as they
 * are computed (an array element by element) with back-pressure, the next request read only then.
 */
import { readFileSync, createReadStream } from 'node:fs';
import type { Readable, Writable } from 'node:stream';
import { isAscii, isUtf8 } from 'node:buffer';
import { Command, CommanderError, InvalidArgumentError } from 'commander';
import '../ops/all.js';
import { handleAsync, requestSchema, closeOpNames, DEFAULT_DEADLINE_MS, MAX_DEADLINE_MS, type Answer } from '../ops/handle.js';
import { getOp, listOps } from '../ops/registry.js';
import { decodeUtf8, findDuplicateKeys, type DuplicateKey } from '../ops/json-text.js';
import { liftMatrices } from '../ops/json-matrices.js';
import { warmUp } from '../ops/warm-up.js';
import { runDemo } from './demo.js';
import { addSweepCommands } from './sweep.js';

/** The streams the command uses (the process's own by default; tests may pass others). */
export interface Io {
  stdin: Readable & { isTTY?: boolean };
  stdout: Writable;
  stderr: Writable;
}

const EXAMPLE_REQUEST = '{"op": "spectrum", "matrix": [["3/4", "i/4"], ["-i/4", "3/4"]]}';

/** Largest input read as one JSON document (without --lines), in bytes. */
export const MAX_INPUT_BYTES = 1 << 28;
/** Largest line read as one request (--lines, serve), in bytes. */
export const MAX_LINE_BYTES = 1 << 28;

/** Default deadline of a request through `compute` and through `serve`, in milliseconds. */
export const COMPUTE_DEFAULT_DEADLINE_MS = DEFAULT_DEADLINE_MS;
export const SERVE_DEFAULT_DEADLINE_MS = DEFAULT_DEADLINE_MS;

/** Exit code when some answer could not be written (the reader went away, the write failed). */
export const EXIT_NOT_DELIVERED = 3;

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

function failureAnswer(code: 'parse-error' | 'too-large' | 'invalid-argument', message: string, path?: string): Answer {
  return { ok: false, op: null, error: path === undefined ? { code, message } : { code, message, path } };
}

/** The answer for a request that repeats a key: the engine would run another request than a validator saw. */
function duplicateAnswer(request: unknown, dups: DuplicateKey[], prefix = ''): Answer {
  const d = dups[0];
  const path = prefix && d.path.startsWith(prefix) ? d.path.slice(prefix.length).replace(/^\./, '') : d.path;
  const op = typeof request === 'object' && request !== null && typeof (request as { op?: unknown }).op === 'string' ? (request as { op: string }).op : null;
  const id = typeof request === 'object' && request !== null ? (request as { id?: unknown }).id : undefined;
  const answer: Answer = {
    ok: false,
    op,
    error: {
      code: 'invalid-argument',
      message: `The key "${d.key}" appears twice${path !== d.key ? ` (at ${path})` : ''}; JSON readers disagree on which one counts, so the request is refused.`,
      path,
    },
  };
  if (typeof id === 'string' || typeof id === 'number') answer.id = id;
  return answer;
}

async function safeHandle(request: unknown, defaultDeadline: number): Promise<Answer> {
  try {
    // handleAsync: loads the expression reader first when the request may need it (a bundle run
    // outside the checkout can only load it this way).
    return await handleAsync(request, { defaultDeadline });
  } catch {
    // handle() never throws by contract; this guard keeps one broken request from stopping a batch.
    return { ok: false, op: null, error: { code: 'internal-error', message: 'The engine failed unexpectedly on this request.' } };
  }
}

function inputStream(file: string | undefined, io: Io): Readable | undefined {
  if (file !== undefined && file !== '-') return undefined;
  if (io.stdin.isTTY) {
    io.stderr.write('rhosigma compute: reading requests from standard input; end with Ctrl-D (see `rhosigma compute --help`).\n');
  }
  return io.stdin;
}

/** The file (opened, so that a missing file is reported before anything else) or standard input, as bytes. */
async function openInput(file: string | undefined, io: Io): Promise<Readable | string> {
  const stream = inputStream(file, io);
  if (stream) return stream;
  try {
    // Chunks of 1 MiB rather than 64 KiB: a 256 × 256 matrix is one to three megabytes of text, read in
    // a few calls and joined from a few pieces instead of dozens.
    const s = createReadStream(file!, { highWaterMark: 1 << 20 });
    await new Promise<void>((resolve, reject) => {
      s.once('open', () => resolve());
      s.once('error', reject);
    });
    return s;
  } catch (err) {
    return `cannot read ${file}: ${(err as NodeJS.ErrnoException).code ?? String(err)}`;
  }
}

/**
 * The output side: writes with back-pressure (waits for 'drain' when the pipe is full, so nothing piles
 * up in memory) and notices when the reader has gone or a write failed, so that the exit code can say
 * that some answer did not arrive.
 */
class Output {
  failed: string | undefined;
  written = 0;
  constructor(private readonly io: Io) {
    io.stdout.on('error', (err: NodeJS.ErrnoException) => {
      this.failed ??= err.code ?? err.message;
    });
  }

  /** Writes `text`; false once the output has failed (the caller then stops). */
  async write(text: string): Promise<boolean> {
    if (this.failed) return false;
    const out = this.io.stdout;
    let ready: boolean;
    try {
      ready = out.write(text);
    } catch (err) {
      this.failed ??= (err as NodeJS.ErrnoException).code ?? String(err);
      return false;
    }
    if (!ready && !this.failed) {
      await new Promise<void>((resolve) => {
        const done = () => {
          out.off('drain', done);
          out.off('error', done);
          out.off('close', done);
          resolve();
        };
        out.on('drain', done);
        out.on('error', done);
        out.on('close', done);
      });
    }
    if (!this.failed) this.written++;
    return !this.failed;
  }

  /** Waits until everything written has been handed to the system (or the output failed). */
  async finish(): Promise<void> {
    if (this.failed) return;
    const out = this.io.stdout as Writable & { writableNeedDrain?: boolean };
    if (out.writableNeedDrain) await this.write('');
  }

  /** The exit code, given what it would be had every answer arrived. */
  code(ifDelivered: number, answers: number): number {
    if (!this.failed) return ifDelivered;
    const why = this.failed === 'EPIPE' ? 'the reader closed the output' : `writing the output failed (${this.failed})`;
    this.io.stderr.write(`rhosigma: ${why}; not every answer was delivered (${this.written} writes of ${answers} answers went out before it).\n`);
    return EXIT_NOT_DELIVERED;
  }
}

/** Reads a whole stream as bytes, stopping (undefined) once it is longer than `limit`. */
async function readBytes(stream: Readable, limit: number): Promise<Buffer | undefined> {
  const chunks: Buffer[] = [];
  let total = 0;
  for await (const chunk of stream) {
    const b = typeof chunk === 'string' ? Buffer.from(chunk) : (chunk as Buffer);
    total += b.length;
    if (total > limit) {
      stream.destroy();
      return undefined;
    }
    chunks.push(b);
  }
  return Buffer.concat(chunks, total);
}

/**
 * The text of UTF-8 bytes, or undefined when they are not UTF-8. Node's native checks first: ASCII
 * (the usual case, and the base64 of packed matrices) is decoded as one-byte text, three times faster.
 */
function decodeBytes(bytes: Uint8Array): string | undefined {
  const b = Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (isAscii(b)) return b.toString('latin1');
  return isUtf8(b) ? decodeUtf8(b) : undefined;
}

/** Parses one request's text: JSON, then the duplicate-key check. */
function parseText(text: string): { value: unknown; duplicates: DuplicateKey[] } {
  const value = JSON.parse(text);
  return { value, duplicates: findDuplicateKeys(text) };
}

/** One request's bytes parsed: its value and duplicate keys; or the text JSON.parse refused, with why; or not UTF-8. */
type Parsed = { value: unknown; duplicates: DuplicateKey[] } | { text: string; error: unknown } | { notUtf8: true };

/**
 * Parses one request's bytes. Large matrices of numbers are first read straight from the bytes
 * (src/ops/json-matrices.ts) and only the rest goes to JSON.parse and the duplicate-key check; when
 * that path declines or anything on it fails, the whole bytes take the ordinary path (decode, parse,
 * check), so that every verdict and error message is the one of the ordinary path.
 */
function parseBytes(bytes: Buffer): Parsed {
  const lifted = liftMatrices(bytes);
  if (lifted) {
    const text = decodeBytes(lifted.bytes);
    if (text !== undefined) {
      let value: unknown;
      let parsedOk = true;
      try {
        value = JSON.parse(text);
      } catch {
        parsedOk = false;
      }
      const restored = parsedOk ? lifted.restore(value) : undefined;
      if (restored) return { value: restored.value, duplicates: findDuplicateKeys(text) };
    }
  }
  const text = decodeBytes(bytes);
  if (text === undefined) return { notUtf8: true };
  try {
    return parseText(text);
  } catch (error) {
    return { text, error };
  }
}

async function computeWhole(file: string | undefined, pretty: boolean, deadline: number, io: Io): Promise<number> {
  const input = await openInput(file, io);
  if (typeof input === 'string') {
    io.stderr.write(`rhosigma compute: ${input}\n`);
    return 2;
  }
  const out = new Output(io);
  let bytes: Buffer | undefined;
  try {
    bytes = await readBytes(input, MAX_INPUT_BYTES);
  } catch (err) {
    io.stderr.write(`rhosigma compute: cannot read ${file ?? 'standard input'}: ${(err as NodeJS.ErrnoException).code ?? String(err)}\n`);
    return 2;
  }
  if (bytes === undefined) {
    const a = failureAnswer('too-large', `The input is longer than ${MAX_INPUT_BYTES} bytes, the limit for one JSON document; give one request per line with --lines (each line may hold ${MAX_LINE_BYTES} bytes).`);
    await out.write(`${JSON.stringify(a)}\n`);
    return out.code(1, 1);
  }
  const parsed = parseBytes(bytes);
  if ('notUtf8' in parsed) {
    io.stderr.write('rhosigma compute: the input is not valid UTF-8 text (JSON must be UTF-8); nothing was computed.\n');
    return 2;
  }
  if ('error' in parsed) {
    const hint = parsed.text.trim() === '' ? 'the input is empty' : describeJsonError(parsed.error, parsed.text);
    io.stderr.write(`rhosigma compute: the input is not JSON: ${hint}. (For one request per line, use --lines.)\n`);
    return 2;
  }
  const { value, duplicates } = parsed;
  bytes = undefined;
  const answerOf = async (request: unknown, k?: number): Promise<Answer> => {
    const prefix = k === undefined ? '' : `[${k}]`;
    const mine = duplicates.filter((d) => (k === undefined ? true : d.path === prefix || d.path.startsWith(`${prefix}.`) || d.path.startsWith(`${prefix}[`)));
    return mine.length ? duplicateAnswer(request, mine, prefix) : safeHandle(request, deadline);
  };
  // Answers are written as they are computed (an array element by element), so that a request that
  // brings the process down cannot take the answers before it with it.
  let failed = false;
  if (!Array.isArray(value)) {
    const a = await answerOf(value);
    await out.write(`${JSON.stringify(a, null, pretty ? 2 : undefined)}\n`);
    await out.finish();
    return out.code(a.ok ? 0 : 1, 1);
  }
  if (value.length === 0) {
    await out.write('[]\n');
    return out.code(0, 0);
  }
  for (let k = 0; k < value.length; k++) {
    const a = await answerOf(value[k], k);
    value[k] = undefined; // the request's memory can go before the next one is computed
    if (!a.ok) failed = true;
    const body = pretty ? JSON.stringify(a, null, 2).replace(/\n/g, '\n  ') : JSON.stringify(a);
    const head = k === 0 ? (pretty ? '[\n  ' : '[') : pretty ? ',\n  ' : ',';
    const tail = k === value.length - 1 ? (pretty ? '\n]\n' : ']\n') : '';
    if (!(await out.write(head + body + tail))) break;
  }
  await out.finish();
  return out.code(failed ? 1 : 0, value.length);
}

/** Longest line joined into splitLines' buffer kept from line to line (longer lines get their own). */
const SCRATCH_LIMIT = 1 << 25;

/** One line of JSON Lines input: its bytes, or how long it was when it was too long to keep. */
type Line = { number: number; bytes: Buffer } | { number: number; tooLong: number };

/**
 * The lines of a byte stream, split at "\n" (a "\r" before it is dropped), without ever holding a line
 * longer than `limit` bytes: such a line is skipped to its end and reported by its length instead.
 * (readline would throw on a line beyond V8's string limit and decode bytes before we can check them.)
 */
async function* splitLines(stream: Readable, limit: number): AsyncGenerator<Line> {
  let parts: Buffer[] = [];
  let length = 0;
  let skipping = false;
  let number = 0;
  // A line spread over several chunks is joined into one buffer kept from line to line (up to
  // SCRATCH_LIMIT bytes): a fresh buffer per line cost its page faults, a millisecond per 2.6 MB line.
  // Safe because a line's bytes are used only until the next line is asked for (answerLines reads,
  // parses and answers a line before it takes the next; nothing parsed keeps a view of the bytes).
  let scratch: Buffer | undefined;
  const joined = (): Buffer => {
    if (length > SCRATCH_LIMIT) return Buffer.concat(parts, length);
    if (scratch === undefined || scratch.length < length) scratch = Buffer.allocUnsafe(Math.min(SCRATCH_LIMIT, Math.max(length, 2 * (scratch?.length ?? 0))));
    let at = 0;
    for (const part of parts) {
      part.copy(scratch, at);
      at += part.length;
    }
    return scratch.subarray(0, length);
  };
  const take = (): Line => {
    number++;
    if (skipping) {
      const line: Line = { number, tooLong: length };
      skipping = false;
      length = 0;
      return line;
    }
    let bytes = parts.length === 1 ? parts[0] : joined();
    if (bytes.length && bytes[bytes.length - 1] === 13) bytes = bytes.subarray(0, bytes.length - 1);
    parts = [];
    length = 0;
    return { number, bytes };
  };
  const add = (piece: Buffer): void => {
    length += piece.length;
    if (skipping) return;
    if (length > limit) {
      skipping = true;
      parts = [];
      return;
    }
    if (piece.length) parts.push(piece);
  };
  for await (const chunk of stream) {
    const b = typeof chunk === 'string' ? Buffer.from(chunk) : (chunk as Buffer);
    let from = 0;
    for (let nl = b.indexOf(10, from); nl >= 0; nl = b.indexOf(10, from)) {
      add(b.subarray(from, nl));
      yield take();
      from = nl + 1;
    }
    if (from < b.length) add(b.subarray(from)); // chunks are not reused by the stream: no copy needed
  }
  if (length > 0 || skipping) yield take();
}

/**
 * Answers JSON Lines from `stream`: one answer line per non-blank request line, in order, each written as
 * soon as it is computed, reading the next line only then (so a slow reader slows the reading, and
 * nothing piles up). Returns what happened, for the exit code.
 */
async function answerLines(
  stream: Readable, io: Io, deadline: number, out: Output, state: { busy: boolean; lastAnswer?: number } = { busy: false },
): Promise<{ notJson: boolean; failed: boolean; answers: number }> {
  let notJson = false;
  let failed = false;
  let answers = 0;
  for await (const line of splitLines(stream, MAX_LINE_BYTES)) {
    state.busy = true;
    let answer: Answer;
    if ('tooLong' in line) {
      answer = failureAnswer('too-large', `Line ${line.number} is ${line.tooLong} bytes long, above the limit of ${MAX_LINE_BYTES} bytes for one request.`);
    } else {
      const parsed = parseBytes(line.bytes);
      if ('notUtf8' in parsed) {
        notJson = true;
        answer = failureAnswer('parse-error', `Line ${line.number} is not valid UTF-8 text (JSON must be UTF-8).`);
      } else if ('error' in parsed) {
        if (parsed.text.trim() === '') {
          state.busy = false;
          continue;
        }
        // The line keeps its place in the output, so answers still line up with requests.
        notJson = true;
        answer = failureAnswer('parse-error', `Line ${line.number} is not JSON: ${describeJsonError(parsed.error, parsed.text, true)}.`);
      } else {
        const { value, duplicates } = parsed;
        answer = duplicates.length ? duplicateAnswer(value, duplicates) : await safeHandle(value, deadline);
      }
    }
    if (!answer.ok) failed = true;
    answers++;
    const delivered = await out.write(`${JSON.stringify(answer)}\n`);
    state.busy = false;
    state.lastAnswer = performance.now();
    if (!delivered) {
      (stream as Readable).destroy();
      break;
    }
  }
  await out.finish();
  return { notJson, failed, answers };
}

async function computeLines(file: string | undefined, deadline: number, io: Io): Promise<number> {
  const input = await openInput(file, io);
  if (typeof input === 'string') {
    io.stderr.write(`rhosigma compute: ${input}\n`);
    return 2;
  }
  const out = new Output(io);
  const { notJson, failed, answers } = await answerLines(input, io, deadline, out);
  return out.code(notJson ? 2 : failed ? 1 : 0, answers);
}

/** The protocol version this engine speaks (docs/protocol.md). */
export const PROTOCOL_VERSION = '1.1';

/**
 * `rhosigma serve`: the long-lived engine behind the Python bridge. First line out: a ready line
 * {"ready": true, "engine": "rhosigma", "version", "protocol"}, so that a client can tell a started engine
 * from a failed start. Then exactly one answer line per request line, in order. Failed requests do not
 * change the exit status: it is 0 when standard input ends, 3 when an answer could not be written.
 */
/** `serve` warms up only after this many milliseconds without a request being answered. */
const WARM_AFTER_IDLE_MS = 250;

async function serve(deadline: number, warm: boolean, io: Io): Promise<number> {
  const out = new Output(io);
  await out.write(`${JSON.stringify({ ready: true, engine: 'rhosigma', version: version(), protocol: PROTOCOL_VERSION })}\n`);
  // Warm the solver while idle (src/ops/warm-up.ts): one small step at a time, never while a request is
  // being answered nor until the engine has been idle for WARM_AFTER_IDLE_MS, stopped when the input ends.
  // It changes speed only, never an answer. (Without the idle wait, warm-up steps ran in the millisecond
  // gaps between the chunks of a sweep: a second or more of solver work inside every Dask worker's first
  // sweep, which made two workers look no faster than one in bench/sweep.ts.)
  const state: { busy: boolean; lastAnswer?: number } = { busy: false };
  const stop = { aborted: false };
  const busy = () => state.busy || (state.lastAnswer !== undefined && performance.now() - state.lastAnswer < WARM_AFTER_IDLE_MS);
  const warming = warm ? warmUp({ busy, signal: stop }) : Promise.resolve();
  const { answers } = await answerLines(io.stdin, io, deadline, out, state);
  stop.aborted = true;
  await warming;
  return out.code(0, answers);
}

function parseDeadline(value: string): number {
  const ms = Number(value);
  if (!Number.isFinite(ms) || ms <= 0 || ms > MAX_DEADLINE_MS) {
    throw new InvalidArgumentError(`a deadline is a number of milliseconds in (0, ${MAX_DEADLINE_MS}].`);
  }
  return ms;
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
    .option('--deadline <ms>', `deadline of requests that give none, in milliseconds (default ${COMPUTE_DEFAULT_DEADLINE_MS})`, parseDeadline)
    .addHelpText(
      'after',
      `
Input: one request object, an array of requests, or (with --lines) one request per line.
Output: the answers on standard output in the same shape and order; an answer is
  {"ok": true, "op": NAME, "value": ...} or {"ok": false, "op": NAME, "error": {"code", "message", "path"}}.
Exit code: 0 every answer ok; 1 some answers failed (the others are still answered);
  2 the input is not JSON or not UTF-8 (with --lines: some line is not; it is answered with a
  parse-error), a file cannot be read, or the command line is wrong; 3 some answer could not be
  written (the reader closed the output, or writing failed).

Example:
  $ echo '${EXAMPLE_REQUEST}' | rhosigma compute
  {"ok":true,"op":"spectrum","value":[0.5,1],"hermiticityDefect":0}`,
    )
    .action(async (file: string | undefined, opts: { lines?: boolean; pretty?: boolean; deadline?: number }) => {
      const deadline = opts.deadline ?? COMPUTE_DEFAULT_DEADLINE_MS;
      setCode(opts.lines ? await computeLines(file, deadline, io) : await computeWhole(file, opts.pretty === true, deadline, io));
    });

  program
    .command('serve')
    .description('Run as a long-lived engine: JSON Lines in, one answer line per request out, in order, each as soon as it is computed.')
    .addHelpText(
      'after',
      `
The first line written is {"ready": true, "engine": "rhosigma", "version": ..., "protocol": ...}.
Then every non-blank line of standard input is answered by one line, in order; a line that is not
JSON is answered with a parse-error. The command ends with exit code 0 when standard input ends
(3 when an answer could not be written). While idle it warms the solver (small requests of its own,
one at a time, never while a request is answered), so that the first real solve runs at full speed.
This is what the Python package starts once per kernel.`,
    )
    .option('--deadline <ms>', `deadline of requests that give none, in milliseconds (default ${SERVE_DEFAULT_DEADLINE_MS})`, parseDeadline)
    .option('--no-warm-up', 'do not warm the solver while idle (for measuring a cold engine)')
    .action(async (opts: { deadline?: number; warmUp?: boolean }) => {
      setCode(await serve(opts.deadline ?? SERVE_DEFAULT_DEADLINE_MS, opts.warmUp !== false, io));
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

/** Run the command with the arguments after the program name; resolves to the exit code. */
export async function main(argv: string[], io: Io = { stdin: process.stdin, stdout: process.stdout, stderr: process.stderr }): Promise<number> {
  // A reader that closes the pipe early (`| head`) must not crash the process with an unhandled 'error'
  // event; compute and serve watch the output themselves and say so in the exit code (Output).
  if (io.stdout.listenerCount('error') === 0) io.stdout.on('error', () => undefined);
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
