// AssemblyScript source of the byte-level reader of large numeric matrices inside a JSON request
// (src/ops/json-matrices.ts). Compiled by src/ops/wasm/build.mjs (`npm run build:wasm`, part of
// `npm run build`) into src/ops/wasm/json-numbers.wasm.ts, which is committed; a test checks that the
// committed module equals a fresh compile. The build prepends the table POW10 (below) to this source.
//
// What it is for: one pass over the bytes of a JSON text that finds every array of rows of JSON
// numbers ("[[n, n, ...], [n, ...], ...]", outside strings, all rows of one length, within the given
// side and entry limits) and converts its numbers straight into float64, correctly rounded, so that
// the host never builds the JavaScript arrays and numbers of JSON.parse for them. Numbers follow
// JSON's grammar exactly (RFC 8259 §6: -?(0|[1-9][0-9]*)(.[0-9]+)?([eE][+-]?[0-9]+)?); whitespace
// between tokens is JSON's four characters. The conversion: Clinger's fast path (at most 19 digits
// with a mantissa ≤ 2^53 and |exponent| ≤ 22: one exactly rounded multiplication or division of two
// exact doubles), else the Eisel–Lemire algorithm (a 64 × 128-bit product with a table of truncated
// powers of ten, in the formulation of Go's strconv: Lemire, "Number Parsing at a Gigabyte per
// Second", Software: Practice and Experience 51 (2021); Mushtak and Lemire, "Fast Number Parsing
// Without Fallback" (2023)), which either yields the correctly rounded double or says it cannot
// decide (halfway-near cases, subnormals, overflow, exponents outside the table, and mantissas
// longer than 19 digits whose truncation bounds round differently).
// What it deliberately does not do: decide anything it is not sure of. A candidate array with
// anything else in it (strings, nesting, an undecided number, a ragged row, a token outside JSON's
// grammar) is simply not reported, and the host leaves its text to JSON.parse. It allocates nothing
// and throws nothing; every pointer is a byte address in the memory the host imports and sizes.
// Cost: one look at each byte; per number a few integer operations and one or two 64 × 64-bit
// products (built from 32-bit halves: WebAssembly has no widening multiply).
//
// Hand-written because no library converts decimal text to doubles in place into typed arrays
// without building strings or JavaScript numbers first; AssemblyScript for 64-bit integer
// arithmetic, which JavaScript lacks outside BigInt (far too slow here).

// POW10 (a pointer to pairs of u64: low word, then high word), POW10_MIN and POW10_MAX are defined
// by the build's prelude: for each e in [POW10_MIN, POW10_MAX], the 128 leading bits of 10^e,
// rounded down (the most significant bit set).

const EXACT10: usize = memory.data<f64>([
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
  1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
]);

/** 5^k for k in [0, 27] (all below 2^63). */
const POW5: usize = memory.data<u64>([
  1, 5, 25, 125, 625, 3125, 15625, 78125, 390625, 1953125, 9765625, 48828125, 244140625, 1220703125,
  6103515625, 30517578125, 152587890625, 762939453125, 3814697265625, 19073486328125, 95367431640625,
  476837158203125, 2384185791015625, 11920928955078125, 59604644775390625, 298023223876953125,
  1490116119384765625, 7450580596923828125,
]);

let prodHi: u64 = 0;
let prodLo: u64 = 0;

/** The 128-bit product a·b into prodHi:prodLo. */
@inline function mul128(a: u64, b: u64): void {
  const aL = a & 0xffffffff, aH = a >> 32, bL = b & 0xffffffff, bH = b >> 32;
  const p0 = aL * bL, p1 = aL * bH, p2 = aH * bL, p3 = aH * bH;
  const mid = (p0 >> 32) + (p1 & 0xffffffff) + (p2 & 0xffffffff);
  prodHi = p3 + (p1 >> 32) + (p2 >> 32) + (mid >> 32);
  prodLo = a * b;
}

let result: f64 = 0;

/** Eisel–Lemire: man · 10^exp10 (man ≠ 0) correctly rounded into `result`, or false when undecided. */
@inline function eiselLemire(man: u64, exp10: i32, neg: bool): bool {
  if (exp10 < POW10_MIN || exp10 > POW10_MAX) return false;
  const lz = <i64>clz<u64>(man);
  man <<= lz;
  // 217706 / 2^16 ≈ log2(10): the binary exponent the table's entry for 10^exp10 implies.
  let exp2: i64 = <i64>(((217706 * exp10) >> 16) + 64 + 1023) - lz;
  const entry = POW10 + (<usize>(exp10 - POW10_MIN) << 4);
  mul128(man, load<u64>(entry, 8));
  let xHi = prodHi, xLo = prodLo;
  if ((xHi & 0x1ff) == 0x1ff && xLo + man < man) {
    // The low word of the table may carry into the bits that decide the rounding: take it in.
    mul128(man, load<u64>(entry));
    const yHi = prodHi, yLo = prodLo;
    let mHi = xHi;
    const mLo = xLo + yHi;
    if (mLo < xLo) mHi++;
    if ((mHi & 0x1ff) == 0x1ff && mLo + 1 == 0 && yLo + man < man) return false;
    xHi = mHi;
    xLo = mLo;
  }
  const msb = xHi >> 63;
  let m = xHi >> (msb + 9);
  exp2 -= <i64>(1 ^ msb);
  // Exactly halfway between two doubles (or too close to tell).
  if (xLo == 0 && (xHi & 0x1ff) == 0 && (m & 3) == 1) return false;
  m += m & 1;
  m >>= 1;
  if (m >> 53 != 0) {
    m >>= 1;
    exp2 += 1;
  }
  if (exp2 <= 0 || exp2 >= 0x7ff) return false; // subnormal or overflow: undecided here
  let bits = (<u64>exp2 << 52) | (m & 0x000fffffffffffff);
  if (neg) bits |= 0x8000000000000000;
  result = reinterpret<f64>(bits);
  return true;
}

let numberEnd: usize = 0;
let mantissa: u64 = 0;
let exponent: i32 = 0;
let truncated = false;

/** Whether the 8 bytes of v (little-endian) are all ASCII digits. */
@inline function eightDigits(v: u64): bool {
  return ((v & 0xf0f0f0f0f0f0f0f0) | (((v + 0x0606060606060606) & 0xf0f0f0f0f0f0f0f0) >> 4)) == 0x3333333333333333;
}

/** The value of 8 ASCII digits (little-endian, first digit in the low byte), by three multiplications. */
@inline function eightDigitsValue(v: u64): u64 {
  v -= 0x3030303030303030;
  v = v * 10 + (v >> 8);
  return (((v & 0x000000ff000000ff) * 0x000f424000000064) + (((v >> 16) & 0x000000ff000000ff) * 0x0000271000000001)) >> 32;
}

/**
 * The careful reading of the digits of a number at p (after its sign; its grammar already checked by
 * readNumber): at most 19 significant digits in mantissa, the rest counted in the exponent and noted
 * in `truncated`. For numbers of more than 19 digits with leading zeros counted.
 */
function readDigitsCarefully(p: usize, end: usize): void {
  let man: u64 = 0;
  let digits: i32 = 0;
  let exp10: i32 = 0;
  let cut = false;
  while (p < end) {
    const d = <u32>load<u8>(p) - 48;
    if (d > 9) break;
    if (digits < 19) {
      if (man != 0 || d != 0) {
        man = man * 10 + <u64>d;
        digits++;
      }
    } else {
      exp10++;
      if (d != 0) cut = true;
    }
    p++;
  }
  if (p < end && load<u8>(p) == 46) {
    p++;
    while (p < end) {
      const d = <u32>load<u8>(p) - 48;
      if (d > 9) break;
      if (digits == 0 && d == 0) exp10--;
      else if (digits < 19) {
        man = man * 10 + <u64>d;
        digits++;
        exp10--;
      } else if (d != 0) cut = true;
      p++;
    }
  }
  mantissa = man;
  exponent = exp10;
  truncated = cut;
}

/** Reads the JSON number at p (p < end) into `result` and its end into numberEnd; false if not one or undecided. */
@inline function readNumber(p: usize, end: usize): bool {
  let c = <u32>load<u8>(p);
  let neg = false;
  if (c == 45) {
    neg = true;
    if (++p >= end) return false;
    c = <u32>load<u8>(p);
  }
  const first = p;
  let man: u64 = 0;
  let count: i32 = 0; // digits read into man, leading zeros included (man is exact while count ≤ 19)
  if (c == 48) {
    p++;
    if (p < end && <u32>load<u8>(p) - 48 <= 9) return false; // no leading zeros in JSON
  } else if (c - 49 <= 8) {
    const from = p;
    while (p < end) {
      const d = <u32>load<u8>(p) - 48;
      if (d > 9) break;
      man = man * 10 + <u64>d;
      p++;
    }
    count = <i32>(p - from);
  } else return false;
  let exp10: i32 = 0;
  if (p < end && load<u8>(p) == 46) {
    const from = ++p;
    // Eight digits at a time while they last (Lemire's SWAR digit test and conversion).
    while (p + 8 <= end) {
      const v = load<u64>(p);
      if (!eightDigits(v)) break;
      man = man * 100000000 + eightDigitsValue(v);
      p += 8;
    }
    while (p < end) {
      const d = <u32>load<u8>(p) - 48;
      if (d > 9) break;
      man = man * 10 + <u64>d;
      p++;
    }
    if (p == from) return false;
    exp10 = -<i32>(p - from);
    count += <i32>(p - from);
  }
  truncated = false;
  if (count > 19) {
    readDigitsCarefully(first, end);
    man = mantissa;
    exp10 = exponent;
  }
  if (p < end && (<u32>load<u8>(p) | 0x20) == 101) {
    p++;
    let eneg = false;
    if (p < end) {
      const s = <u32>load<u8>(p);
      if (s == 45 || s == 43) {
        eneg = s == 45;
        p++;
      }
    }
    const start = p;
    let e: i32 = 0;
    while (p < end) {
      const d = <u32>load<u8>(p) - 48;
      if (d > 9) break;
      if (e < 100000) e = e * 10 + <i32>d;
      p++;
    }
    if (p == start) return false;
    exp10 += eneg ? -e : e;
  }
  numberEnd = p;
  if (man == 0) {
    result = neg ? -0.0 : 0.0;
    return true;
  }
  if (!truncated && man <= (<u64>1 << 53) && exp10 >= -22 && exp10 <= 22) {
    result = clinger(man, exp10, neg);
    return true;
  }
  if (!eiselLemire(man, exp10, neg)) {
    if (truncated) return false;
    if (exp10 < 0 && exp10 >= -27) {
      // man / 10^k with 5^k dividing man is q / 2^k exactly (q = man / 5^k): the double nearest q,
      // scaled by an exact power of two, is the correctly rounded value. Eisel–Lemire cannot decide
      // such exactly representable values ("0.47212982177734375" = 61884 / 2^17) when their product
      // with the truncated table falls just below a double.
      const p5 = load<u64>(POW5 + (<usize>-exp10 << 3));
      if (man % p5 == 0) {
        const r = <f64>(man / p5) * reinterpret<f64>(<u64>(1023 + exp10) << 52);
        result = neg ? -r : r;
        return true;
      }
    }
    if (man % 10 != 0) return false;
    // Trailing zeros ("4168148676294584.0", %.17g output) moved into the exponent, so that Clinger's
    // path takes such numbers (Eisel–Lemire cannot decide some exactly representable values).
    while (man % 10 == 0) {
      man /= 10;
      exp10++;
    }
    if (man > (<u64>1 << 53) || exp10 < -22 || exp10 > 22) return false;
    result = clinger(man, exp10, neg);
    return true;
  }
  if (!truncated) return true;
  // Digits beyond the 19th were dropped: the value lies between man and man + 1 (times 10^exp10);
  // it is decided only when both bounds round to the same double.
  const low = result;
  if (!eiselLemire(man + 1, exp10, neg)) return false;
  return result == low;
}

/** Clinger's fast path (man ≤ 2^53, |exp10| ≤ 22): both operands exact, one correctly rounded operation. */
@inline function clinger(man: u64, exp10: i32, neg: bool): f64 {
  const x = <f64>man;
  const r = exp10 >= 0 ? x * load<f64>(EXACT10 + (<usize>exp10 << 3)) : x / load<f64>(EXACT10 + (<usize>-exp10 << 3));
  return neg ? -r : r;
}

@inline function isSpace(c: u32): bool {
  return c == 32 || c == 10 || c == 13 || c == 9;
}

@inline function skipSpace(p: usize, end: usize): usize {
  while (p < end && isSpace(<u32>load<u8>(p))) p++;
  return p;
}

let foundRows: i32 = 0;
let foundCols: i32 = 0;

/**
 * The array of rows of numbers starting at the "[" at s, its numbers written to out as float64: the
 * address after its closing "]", or 0 when it is not one (or is outside the limits).
 */
function readRows(s: usize, end: usize, out: usize, minEntries: i32, maxSide: i32): usize {
  let p = skipSpace(s + 1, end);
  if (p >= end || load<u8>(p) != 91) return 0;
  let rows: i32 = 0;
  let cols: i32 = 0;
  let q = out;
  // (Loops with a flag rather than for (;;) with break: AssemblyScript 0.27 took the code after
  // such a loop for unreachable.)
  let moreRows = true;
  while (moreRows) {
    // at a row's "["
    p = skipSpace(p + 1, end);
    let count: i32 = 0;
    let moreNumbers = true;
    while (moreNumbers) {
      if (p >= end || !readNumber(p, end)) return 0;
      store<f64>(q, result);
      q += 8;
      if (++count > maxSide) return 0;
      p = skipSpace(numberEnd, end);
      if (p >= end) return 0;
      const c = load<u8>(p);
      if (c == 44) p = skipSpace(p + 1, end);
      else if (c == 93) {
        p++;
        moreNumbers = false;
      } else return 0;
    }
    if (rows == 0) cols = count;
    else if (count != cols) return 0;
    if (++rows > maxSide) return 0;
    p = skipSpace(p, end);
    if (p >= end) return 0;
    const c = load<u8>(p);
    if (c == 44) {
      p = skipSpace(p + 1, end);
      if (p >= end || load<u8>(p) != 91) return 0;
    } else if (c == 93) {
      p++;
      moreRows = false;
    } else return 0;
  }
  if (<i64>rows * <i64>cols < <i64>minEntries) return 0;
  foundRows = rows;
  foundCols = cols;
  return p;
}

/** Whether one of the 8 bytes of v is a quote (0x22) or a backslash (0x5c): the zero-byte test of v ^ byte. */
@inline function quoteOrBackslash(v: u64): bool {
  const q = v ^ 0x2222222222222222;
  const b = v ^ 0x5c5c5c5c5c5c5c5c;
  return ((((q - 0x0101010101010101) & ~q) | ((b - 0x0101010101010101) & ~b)) & 0x8080808080808080) != 0;
}

/** Where the host may put its data: the first byte after the module's static data. */
export function dataEnd(): usize {
  return __heap_base;
}

/**
 * Finds the arrays of rows of numbers in the len bytes at input (outside strings; nested candidates
 * inside a larger array are found too) with at least minEntries entries and at most maxSide rows and
 * columns, up to maxRuns of them. Each found array's numbers go to out, one after another (out must
 * hold len / 2 + 1 float64); for the k-th, runs + 16k holds four i32: its first byte's offset, the
 * offset after its last byte, rows, columns. Returns how many were found.
 */
export function scan(input: usize, len: i32, out: usize, runs: usize, maxRuns: i32, minEntries: i32, maxSide: i32): i32 {
  const end = input + <usize>len;
  let p = input;
  let found: i32 = 0;
  let q = out;
  while (p < end) {
    const c = load<u8>(p);
    if (c == 34) {
      // a string: skipped to its closing quote (an escape takes the next byte with it), eight bytes
      // at a time while none of them is a quote or a backslash (the base64 text of packed matrices)
      p++;
      while (p + 8 <= end && !quoteOrBackslash(load<u64>(p))) p += 8;
      while (p < end) {
        const d = load<u8>(p);
        if (d == 34) break;
        p += d == 92 ? 2 : 1;
      }
      p++;
      continue;
    }
    if (c == 91 && found < maxRuns) {
      const after = readRows(p, end, q, minEntries, maxSide);
      if (after != 0) {
        const r = runs + (<usize>found << 4);
        store<i32>(r, <i32>(p - input));
        store<i32>(r, <i32>(after - input), 4);
        store<i32>(r, foundRows, 8);
        store<i32>(r, foundCols, 12);
        q += (<usize>foundRows * <usize>foundCols) << 3;
        found++;
        p = after;
        continue;
      }
    }
    p++;
  }
  return found;
}
