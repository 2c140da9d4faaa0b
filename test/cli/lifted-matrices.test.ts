// Facts about the command with and without the reader of large matrices from a request's bytes
// (src/ops/json-matrices.ts): every answer, ok or error, every message on standard error and every exit
// code is the same, through `compute --lines`, `compute` (one document) and `serve`, on valid and
// malformed requests. The referee is the command's ordinary path (V8's JSON.parse of the whole text, the
// size walk, ajv), run in the same process with the reader switched off; the requests that must engage
// the reader are checked to do so, so that the comparison is not between two runs of the same path.
// JSON's grammar for the malformed cases: RFC 8259 (§2 whitespace, §4 objects, §6 numbers, §7 strings).
import { afterAll, describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { Readable, Writable } from 'node:stream';
import { main, type Io } from '../../src/cli/main.js';
import { liftMatrices, setMatrixLiftEnabled } from '../../src/ops/json-matrices.js';

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32) - 0.5;
}

/** A Hermitian n × n matrix as {re, im} rows; entries of full double precision (not dyadic). */
function hermitian(n: number, seed: number): { re: number[][]; im: number[][] } {
  const r = rng(seed);
  const re = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const im = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const a = r() / 3;
      const b = i === j ? 0 : r() / 7;
      re[i][j] = a;
      re[j][i] = a;
      im[i][j] = b;
      im[j][i] = -b;
    }
  }
  return { re, im };
}

/** A density matrix (diagonal, positive, unit trace) of order n as rows. */
function diagonalState(n: number): number[][] {
  const w = Array.from({ length: n }, (_, i) => i + 1);
  const t = w.reduce((a, b) => a + b, 0);
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? w[i] / t : 0)));
}

const N = 20;
const h = hermitian(N, 7);
const rowsText = (m: number[][], sep = ','): string => `[${m.map((r) => `[${r.join(sep)}]`).join(sep)}]`;
const reText = rowsText(h.re);
const imText = rowsText(h.im);
const notHermitian = h.re.map((r, i) => r.map((x, j) => (i === 3 && j === 5 ? x + 0.25 : x)));
const ragged = h.re.map((r, i) => (i === 7 ? r.slice(1) : r));
const withText = (k: number, token: string, more: Record<number, string> = {}): string => {
  const flat = h.re.flat().map(String);
  flat[k] = token;
  for (const [at, t] of Object.entries(more)) flat[Number(at)] = t;
  return `[${Array.from({ length: N }, (_, i) => `[${flat.slice(i * N, (i + 1) * N).join(',')}]`).join(',')}]`;
};
const identityKraus = Array.from({ length: 16 }, (_, i) => Array.from({ length: 16 }, (_, j) => (i === j ? 1 : 0)));

/** Request lines that the reader engages on (valid and invalid requests alike). */
const lifting: [string, string][] = [
  ['spectrum of real rows', `{"op":"spectrum","matrix":${reText}}`],
  ['spectrum of {re, im} rows, with an id', `{"id":"a","op":"spectrum","matrix":{"re":${reText},"im":${imText}}}`],
  ['spectrum with JSON whitespace between every token', `{ "op" : "spectrum" , "matrix" : ${rowsText(h.re, ' ,\t ').replace(/\[/g, '[ ').replace(/\]/g, ' ]')} }`],
  ['spectrum with vectors', `{"op":"spectrum","vectors":true,"matrix":{"re":${reText},"im":${imText}}}`],
  ['spectrum with exponents, -0 and upper-case E on the diagonal', `{"op":"spectrum","matrix":${withText(0, '-0.0e0', { 21: '2.5E-1', 42: '1e+0', 63: '-12345678901234567890e-20', 84: '0.00000000000000000000000012345' })}}`],
  ['entropy of a state given as rows', `{"op":"entropy","rho":${rowsText(diagonalState(16))}}`],
  ['entropy of a state given as {"matrix"}', `{"op":"entropy","rho":{"matrix":${rowsText(diagonalState(16))}}}`],
  ['channel-check of Kraus operators (matrices nested in a list)', `{"op":"channel-check","channel":{"kraus":[${rowsText(identityKraus)}]}}`],
  ['not Hermitian', `{"op":"spectrum","matrix":${rowsText(notHermitian)}}`],
  ['a repeated key outside the matrix', `{"op":"spectrum","matrix":${reText},"op":"spectrum"}`],
  ['the matrix key repeated', `{"op":"spectrum","matrix":${reText},"matrix":${imText}}`],
  ['a repeated key inside the {re, im} object', `{"op":"spectrum","matrix":{"re":${reText},"re":${imText}}}`],
  ['an id equal to a placeholder of the reader', `{"op":"spectrum","id":"rhosigma lifted matrix 0","matrix":${reText}}`],
  ['an id equal to another placeholder', `{"op":"spectrum","id":"rhosigma lifted matrix 5","matrix":${reText}}`],
  ['a trailing comma after the matrix', `{"op":"spectrum","matrix":${reText},}`],
  ['a matrix in place of a key', `{${reText}:1,"op":"spectrum"}`],
  ['a matrix under an unknown field', `{"op":"spectrum","matrix":${reText},"extra":${imText}}`],
  ['a matrix under "__proto__"', `{"op":"spectrum","__proto__":${reText},"matrix":${imText}}`],
  ['a matrix as the whole request', reText],
  ['the matrix given twice in a list', `{"op":"spectrum","matrix":[${reText},${imText}]}`],
  ['a missing closing brace', `{"op":"spectrum","matrix":${reText}`],
  ['an unknown op', `{"op":"spectrumm","matrix":${reText}}`],
  ['a matrix with a NaN token elsewhere in the request', `{"op":"spectrum","matrix":${reText},"tolerance":NaN}`],
  ['a big matrix inside a string, and one outside', `{"op":"spectrum","id":"${reText}","matrix":${reText}}`],
  ['escaped quotes before the matrix', `{"op":"spectrum","id":"a\\"[[1,2]]\\\\","matrix":${reText}}`],
  ['a matrix that is not square', `{"op":"spectrum","matrix":${rowsText(h.re.slice(0, 15))}}`],
  ['a deadline and a tolerance', `{"op":"spectrum","deadline":5000,"tolerance":1e-7,"matrix":${reText}}`],
];

/** Request lines whose matrix the reader must leave to JSON.parse (and the answers still agree). */
const declined: [string, string][] = [
  ['a NaN token inside the matrix', `{"op":"spectrum","matrix":${withText(40, 'NaN')}}`],
  ['Infinity inside the matrix', `{"op":"spectrum","matrix":${withText(40, 'Infinity')}}`],
  ['an entry beyond double range (1e400)', `{"op":"spectrum","matrix":${withText(40, '1e400')}}`],
  ['a subnormal entry', `{"op":"spectrum","matrix":${withText(40, '5e-324')}}`],
  ['an expression string entry', `{"op":"spectrum","matrix":${withText(0, '"1/3"')}}`],
  ['a leading zero', `{"op":"spectrum","matrix":${withText(40, '01')}}`],
  ['a leading plus sign', `{"op":"spectrum","matrix":${withText(40, '+1')}}`],
  ['a number ending in a point', `{"op":"spectrum","matrix":${withText(40, '1.')}}`],
  ['a number starting with a point', `{"op":"spectrum","matrix":${withText(40, '.5')}}`],
  ['an exponent without digits', `{"op":"spectrum","matrix":${withText(40, '1e')}}`],
  ['hexadecimal', `{"op":"spectrum","matrix":${withText(40, '0x1')}}`],
  ['true in a matrix', `{"op":"spectrum","matrix":${withText(40, 'true')}}`],
  ['null in a matrix', `{"op":"spectrum","matrix":${withText(40, 'null')}}`],
  ['an entry that is a list', `{"op":"spectrum","matrix":${withText(40, '[1]')}}`],
  ['a ragged row', `{"op":"spectrum","matrix":${rowsText(ragged)}}`],
  ['an empty row', `{"op":"spectrum","matrix":${reText.replace('],[', '],[],[')}}`],
  ['a missing comma between numbers', `{"op":"spectrum","matrix":${reText.replace(',', ' ')}}`],
  ['a double comma', `{"op":"spectrum","matrix":${reText.replace(',', ',,')}}`],
  ['a row of 1025 entries (too large)', `{"op":"spectrum","matrix":[[${new Array(1025).fill(1).join(',')}]]}`],
  ['1025 rows (too large)', `{"op":"spectrum","matrix":[${new Array(1025).fill('[1]').join(',')}]}`],
  ['a vertical tab as whitespace (not JSON)', `{"op":"spectrum","matrix":${reText.replace(',', ',\v')}}`],
  ['a non-breaking space as whitespace (not JSON)', `{"op":"spectrum","matrix":${reText.replace(',', ',\u00a0')}}`],
  ['a long mantissa whose truncation bounds differ (1 + 2^-53, halfway)', `{"op":"spectrum","matrix":${withText(0, '1.00000000000000011102230246251565404236316680908203125')}}`],
];

function io(input: Buffer): { io: Io; out: () => string; err: () => string } {
  const out: Buffer[] = [];
  const err: Buffer[] = [];
  const sink = (into: Buffer[]) =>
    new Writable({
      write(chunk, _enc, done) {
        into.push(Buffer.from(chunk));
        done();
      },
    });
  return {
    io: { stdin: Readable.from([input]), stdout: sink(out), stderr: sink(err) },
    out: () => Buffer.concat(out).toString('utf8'),
    err: () => Buffer.concat(err).toString('utf8'),
  };
}

async function run(args: string[], input: Buffer, lift: boolean): Promise<{ code: number; stdout: string; stderr: string }> {
  setMatrixLiftEnabled(lift);
  try {
    const s = io(input);
    const code = await main(args, s.io);
    return { code, stdout: s.out(), stderr: s.err() };
  } finally {
    setMatrixLiftEnabled(true);
  }
}

async function same(args: string[], input: Buffer, what: string): Promise<{ code: number; stdout: string; stderr: string }> {
  const fast = await run(args, input, true);
  const ordinary = await run(args, input, false);
  assert.deepEqual(fast, ordinary, `${what}: the answers differ with and without the reader`);
  return fast;
}

afterAll(() => setMatrixLiftEnabled(true));

describe('the command with the reader of matrices from bytes', () => {
  it('engages the reader on every request of the first set, and on none of the matrices of the second', () => {
    for (const [what, line] of lifting) assert.ok(liftMatrices(Buffer.from(line)), `not engaged: ${what}`);
    for (const [what, line] of declined) assert.equal(liftMatrices(Buffer.from(line)), undefined, `engaged: ${what}`);
  });

  it('puts the matrices of valid requests back as the same value JSON.parse gives for the whole line', () => {
    for (const [what, line] of lifting.slice(0, 8)) {
      const lifted = liftMatrices(Buffer.from(line))!;
      const restored = lifted.restore(JSON.parse(Buffer.from(lifted.bytes).toString('utf8')));
      assert.ok(restored, `not restored: ${what}`);
      assert.deepEqual(restored.value, JSON.parse(line), what);
    }
  });

  it('answers each request of both sets alone (compute --lines) exactly as the ordinary path does', async () => {
    let ok = 0;
    for (const [what, line] of [...lifting, ...declined]) {
      const r = await same(['compute', '--lines'], Buffer.from(`${line}\n`), what);
      if (r.code === 0) ok++;
    }
    // Both sets hold successful requests, so equality is not only between error answers.
    assert.ok(ok >= 8, `only ${ok} requests answered ok`);
  });

  it('answers the whole batch of lines, with blank and invalid UTF-8 lines among them, exactly as the ordinary path does', async () => {
    const parts = [...lifting, ...declined].map(([, line]) => Buffer.from(`${line}\n`));
    parts.splice(3, 0, Buffer.from('\n   \n'), Buffer.concat([Buffer.from(`{"op":"spectrum","id":"\xff","matrix":${reText}}`, 'latin1'), Buffer.from('\n')]));
    parts.push(Buffer.from(`{"op":"spectrum","matrix":${reText}}\r\n`), Buffer.from(`\ufeff{"op":"spectrum","matrix":${reText}}`));
    const r = await same(['compute', '--lines'], Buffer.concat(parts), 'the batch');
    assert.equal(r.stdout.trim().split('\n').length, lifting.length + declined.length + 3);
  });

  it('answers one document, and an array of requests, exactly as the ordinary path does (also pretty and spread over lines)', async () => {
    for (const [what, line] of lifting.slice(0, 12)) await same(['compute'], Buffer.from(line), what);
    const array = `[${lifting.slice(0, 9).map(([, l]) => l).join(',\n')}]`;
    await same(['compute', '--pretty'], Buffer.from(array), 'an array of requests');
    const spread = JSON.stringify({ op: 'spectrum', matrix: h }, null, 2);
    assert.ok(liftMatrices(Buffer.from(spread)));
    const r = await same(['compute'], Buffer.from(spread), 'a request spread over lines');
    assert.equal(r.code, 0, r.stdout);
    await same(['compute'], Buffer.from(`${array.slice(0, -1)},]`), 'an array with a trailing comma (not JSON)');
    await same(['compute'], Buffer.from(`{"op":"spectrum","matrix":${reText}} x`), 'text after the request');
  });

  it('serves the same answer lines (serve, the Python bridge\'s engine)', async () => {
    const input = Buffer.from(lifting.map(([, l]) => `${l}\n`).join(''));
    await same(['serve', '--no-warm-up'], input, 'serve');
  });
});
