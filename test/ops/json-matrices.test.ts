// Facts about the reader of large numeric matrices from a request's bytes (src/ops/json-matrices.ts and its
// WebAssembly module src/ops/wasm/json-numbers.as). The referee for every number is V8's own JSON.parse
// (ECMA-262 §25.5.1 with the Number value of a numeric literal, §6.1.6.1: the correctly rounded double,
// ties to even), run on the same text: each number the reader converts must be the same double, bit for bit
// (Object.is, so -0 counts). Over a million random doubles in many spellings: shortest round-trip text of
// random bit patterns (all exponents, subnormals among them), 17 significant digits, exponent forms with
// upper- and lower-case E and signs, values in (-1/2, 1/2), integers beyond 2^53 and 2^64, exact binary
// fractions, long mantissas, and the exact midpoints between neighbouring doubles (and the decimals just
// above and below them), written out in full with BigInt. Also: the committed module is a fresh compile.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { MAX_LIFT_BYTES, liftMatrices } from '../../src/ops/json-matrices.js';

const root = fileURLToPath(new URL('../..', import.meta.url));

// A seeded 64-bit generator (an LCG with Knuth's MMIX constants, the top bits used), for random bit patterns.
let state = 0x9e3779b97f4a7c15n;
const MASK64 = (1n << 64n) - 1n;
function next64(): bigint {
  state = (state * 6364136223846793005n + 1442695040888963407n) & MASK64;
  const a = state;
  state = (state * 6364136223846793005n + 1442695040888963407n) & MASK64;
  return (a & 0xffffffff00000000n) | (state >> 32n);
}
const f64 = new Float64Array(1);
const u64 = new BigUint64Array(f64.buffer);
function fromBits(bits: bigint): number {
  u64[0] = bits;
  return f64[0];
}
function randomFinite(): number {
  for (;;) {
    const x = fromBits(next64());
    if (Number.isFinite(x)) return x;
  }
}
const unit = (): number => Number(next64() >> 11n) / 2 ** 53 - 0.5;
const digits = (n: number): string => Array.from({ length: n }, () => String(Number(next64() % 10n))).join('');

/** Spellings of random numbers, each a function giving one JSON number's text. */
const forms: Record<string, () => string> = {
  'shortest text of random bit patterns': () => String(randomFinite()),
  '17 significant digits of random bit patterns': () => randomFinite().toPrecision(17),
  'shortest text of values in (-1/2, 1/2)': () => String(unit()),
  '17 significant digits of values in (-1/2, 1/2)': () => unit().toPrecision(17),
  'exponent form, 0–20 digits, e/E, signed exponents': () => {
    const t = (unit() * 10 ** Number(next64() % 40n - 20n)).toExponential(Number(next64() % 21n));
    const r = Number(next64() % 3n);
    return r === 0 ? t.replace('e', 'E') : r === 1 ? t.replace('e+', 'e') : t;
  },
  'integers up to 2^64 and beyond': () => {
    const k = Number(next64() % 4n);
    const v = k === 0 ? next64() >> 20n : k === 1 ? next64() : k === 2 ? next64() * next64() : next64() >> 40n;
    return (next64() & 1n ? '-' : '') + v.toString();
  },
  'exact binary fractions k / 2^m': () => {
    const m = Number(next64() % 60n);
    const k = next64() >> BigInt(11 + Number(next64() % 40n));
    return (Number(k) / 2 ** m).toFixed(Math.min(100, m)).replace(/0+$/, '0');
  },
  'long mantissas (shortest text plus 1–30 more digits)': () => {
    const t = String(unit());
    return t.includes('e') ? t : `${t}${digits(1 + Number(next64() % 30n))}`;
  },
  'zeros in every spelling': () => ['0', '-0', '0.0', '-0.0', '0e0', '-0E+5', '0.000e-7', '-0.0e-400'][Number(next64() % 8n)],
};

/** Checks a matrix text of `count` numbers of one form; returns how many the reader converted. */
function checkChunk(make: () => string, rows: number, cols: number): { converted: number; text: string } {
  const texts = Array.from({ length: rows * cols }, make);
  const text = `{"m":[${Array.from({ length: rows }, (_, i) => `[${texts.slice(i * cols, (i + 1) * cols).join(',')}]`).join(',')}]}`;
  const referee = (JSON.parse(text) as { m: number[][] }).m;
  const lifted = liftMatrices(Buffer.from(text));
  if (!lifted) return { converted: 0, text };
  const restored = lifted.restore(JSON.parse(Buffer.from(lifted.bytes).toString('latin1')));
  assert.ok(restored, 'a lifted matrix was not put back');
  const got = (restored.value as { m: number[][] }).m;
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      if (!Object.is(got[i][j], referee[i][j])) {
        assert.fail(`${texts[i * cols + j]}: JSON.parse gives ${referee[i][j]}, the reader ${got[i][j]}`);
      }
    }
  }
  return { converted: rows * cols, text };
}

/** One number checked on its own (in a row of 255 zeros); whether the reader converted it. */
function checkOne(text: string): boolean {
  const line = `[[${text}${',0'.repeat(255)}]]`;
  const lifted = liftMatrices(Buffer.from(line));
  if (!lifted) return false;
  const restored = lifted.restore(JSON.parse(Buffer.from(lifted.bytes).toString('latin1')));
  assert.ok(restored);
  const got = (restored.value as number[][])[0][0];
  const want = JSON.parse(text) as number;
  if (!Object.is(got, want)) assert.fail(`${text}: JSON.parse gives ${want}, the reader ${got}`);
  return true;
}

/** The exact decimal text of m · 2^e (BigInt arithmetic). */
function exactDecimal(m: bigint, e: number): string {
  return e >= 0 ? (m << BigInt(e)).toString() : `${m * 5n ** BigInt(-e)}e${e}`;
}

describe('numbers read by the WebAssembly reader, with V8\'s JSON.parse as referee', () => {
  it('gives the same double as JSON.parse for over a million random numbers in many spellings', () => {
    let total = 0;
    const converted: Record<string, number> = {};
    for (const [name, make] of Object.entries(forms)) {
      let done = 0;
      let n = 0;
      const chunks = name.startsWith('zeros') ? 40 : 560;
      for (let k = 0; k < chunks; k++) {
        const r = checkChunk(make, 16, 16);
        done += r.converted;
        n += 256;
      }
      total += done;
      converted[name] = done / n;
    }
    assert.ok(total >= 1_000_000, `only ${total} numbers converted`);
    // Most chunks are converted (the rest, where some number is subnormal or undecided, went to JSON.parse
    // and were compared above all the same); a reader that declined everything would pass vacuously.
    for (const [name, share] of Object.entries(converted)) assert.ok(share > 0.5, `${name}: only ${share} converted`);
  });

  it('gives the same double for the exact midpoints between neighbouring doubles and the decimals just beside them', () => {
    // Written out in full, a midpoint has up to hundreds of digits: the reader keeps 19 and decides only
    // when both bounds of the truncation round alike, so these mostly go to JSON.parse (compared all the same).
    let tried = 0;
    for (let k = 0; k < 3000; k++) {
      const x = Math.abs(randomFinite());
      f64[0] = x;
      const bits = u64[0];
      const biased = Number((bits >> 52n) & 0x7ffn);
      if (biased === 0 || biased > 0x7fd) continue;
      // Random exponents in a moderate range keep the exact decimals at most a few hundred digits.
      const e = Number(next64() % 400n) - 250 - 52;
      const m = (bits & ((1n << 52n) - 1n)) | (1n << 52n);
      const [whole, exp] = exactDecimal(2n * m + 1n, e - 1).split('e'); // (m + 1/2) · 2^e
      for (const variant of [whole, `${BigInt(whole) + 1n}`, `${BigInt(whole) - 1n}`]) {
        checkOne(exp === undefined ? variant : `${variant}e${exp}`);
        tried++;
      }
    }
    assert.ok(tried > 8000);
    // Integer midpoints of at most 20 digits (2^j + an odd multiple of 2^(j-53)): the midpoint itself may go to
    // JSON.parse (ties to even are left undecided), the integers beside it are decided by the reader.
    let beside = 0;
    for (let k = 0; k < 20000; k++) {
      const j = 53 + Number(next64() % 11n);
      const mid = (1n << BigInt(j)) + (2n * (next64() >> BigInt(64 - (j - 53) - 1 + 1)) + 1n) * (1n << BigInt(j - 53));
      checkOne(mid.toString());
      if (checkOne((mid + 1n).toString())) beside++;
      if (checkOne((mid - 1n).toString())) beside++;
    }
    assert.ok(beside > 0.99 * 40000, `only ${beside} of 40000 decided`);
  });

  it('gives the same double for subnormals, the extremes of the double range and numbers that overflow, or leaves them to JSON.parse', () => {
    const texts = ['5e-324', '2.2250738585072014e-308', '2.2250738585072011e-308', '1.7976931348623157e308', '1.7976931348623159e308', '1e400', '-1e-400', '4.9406564584124654e-324', '1e-323'];
    for (let k = 0; k < 3000; k++) texts.push(String(fromBits(next64() & ((1n << 52n) - 1n))));
    for (const t of texts) checkOne(t);
    // The smallest normal double and the largest are decided (both normal, neither halfway).
    assert.ok(checkOne('2.2250738585072014e-308') && checkOne('1.7976931348623157e308'));
  });

  it('leaves every matrix with something outside JSON numbers to JSON.parse, and finds those inside larger lists', () => {
    const row = new Array(16).fill('0.5').join(',');
    const m = `[${new Array(16).fill(`[${row}]`).join(',')}]`;
    assert.ok(liftMatrices(Buffer.from(m)));
    assert.equal(liftMatrices(Buffer.from(`"${m}"`)), undefined, 'inside a string');
    assert.equal(liftMatrices(Buffer.from(m.replace('0.5', '"0.5"'))), undefined, 'a string entry');
    assert.equal(liftMatrices(Buffer.from(m.replace('0.5', '-'))), undefined, 'a lone minus');
    assert.equal(liftMatrices(Buffer.from(`[${new Array(15).fill(`[${row}]`).join(',')}]`.replace('0.5', '0.5,0.5'))), undefined, 'a longer row');
    assert.equal(liftMatrices(Buffer.from(`[${new Array(8).fill(`[${row}]`).join(',')}]`.slice(0, 200))), undefined, 'below 256 entries');
    // Strings are skipped eight bytes at a time: escapes and quotes at every offset within those eight.
    for (let pad = 0; pad < 18; pad++) {
      const str = `"${'x'.repeat(pad)}\\"${m}\\\\"`;
      const lifted = liftMatrices(Buffer.from(`[${str},${m}]`));
      assert.ok(lifted, `pad ${pad}`);
      assert.equal(Buffer.from(lifted.bytes).toString(), `[${str},"rhosigma lifted matrix 0"]`, `pad ${pad}`);
      assert.deepEqual(lifted.restore(JSON.parse(Buffer.from(lifted.bytes).toString()))?.value, JSON.parse(`[${str},${m}]`));
    }
    const nested = liftMatrices(Buffer.from(`[${m},[${m}],{"a":${m}}]`));
    assert.ok(nested);
    assert.equal(Buffer.from(nested.bytes).toString(), '["rhosigma lifted matrix 0",["rhosigma lifted matrix 1"],{"a":"rhosigma lifted matrix 2"}]');
  });

  it('reads a 1024 × 1024 matrix of 17-digit numbers (about 19 MB), and the next text after it; leaves texts above MAX_LIFT_BYTES alone', () => {
    const row = Array.from({ length: 1024 }, () => unit().toPrecision(17)).join(',');
    const big = `[${new Array(1024).fill(`[${row}]`).join(',')}]`;
    assert.ok(big.length > 16 << 20 && big.length < MAX_LIFT_BYTES);
    const lifted = liftMatrices(Buffer.from(big));
    assert.ok(lifted);
    const value = lifted.restore(JSON.parse(Buffer.from(lifted.bytes).toString()))!.value as number[][];
    const first = JSON.parse(`[${row}]`) as number[];
    assert.ok(value.length === 1024 && value[1023].every((x, j) => Object.is(x, first[j])));
    checkChunk(forms['shortest text of values in (-1/2, 1/2)'], 16, 16);
    assert.ok(checkOne('0.1'));
    const tooLong = `[${new Array(1800).fill(`[${row}]`).join(',')}]`;
    assert.ok(tooLong.length > MAX_LIFT_BYTES);
    assert.equal(liftMatrices(Buffer.from(tooLong)), undefined);
  });

  it('the committed module src/ops/wasm/json-numbers.wasm.ts equals a fresh AssemblyScript compile of json-numbers.as', () => {
    const r = spawnSync(process.execPath, [join(root, 'src/ops/wasm/build.mjs'), '--check'], { encoding: 'utf8' });
    assert.equal(r.status, 0, r.stderr);
  });
});
