/**
 * Philox4x64-10, the counter-based random generator of Salmon, Moraes, Dror and Shaw, "Parallel random
 * numbers: as easy as 1, 2, 3" (SC 2011), and the uniform and normal variates drawn from it.
 *
 * Why counter-based: a block of output is a keyed bijection of its counter, so any stream is reached
 * directly from (key, counter) with no state to carry and no jump-ahead. A sweep gives every point its own
 * counter words, so a point's draws depend only on the seed and the point's index, whatever the order, the
 * number of workers or the sharding.
 *
 * The words: with key = (seed, 0) and the stream's counter words (c1, c2, c3), block n (n = 1, 2, ...)
 * is Philox4x64-10(counter = (n, c1, c2, c3), key), and its four 64-bit words are used in order. This is
 * exactly the sequence numpy.random.Philox(key=seed, counter=[0, c1, c2, c3]).random_raw() produces (numpy
 * increments the counter before each block); test/linalg/random.test.ts checks it against numpy.
 * A uniform double is (w >> 11) · 2^-53 for the next word w, in [0, 1), as numpy's `random()` makes it from
 * a bit generator. Normals come in pairs from two uniforms by the Box–Muller transform (Box and Muller
 * 1958): r = sqrt(−2 ln(1 − u1)), (r cos 2πu2, r sin 2πu2); the second of a pair is kept for the next call.
 * The logarithm, sine and cosine are src/linalg/portable-math.ts's, built only from exactly rounded operations,
 * so the normals (and every ensemble made from them) are the same bits in every JavaScript engine (Node, a
 * browser's worker); `Math.log`/`Math.sin`/`Math.cos` may differ between engines in the last place.
 *
 * Hand-written because no maintained npm package offers a counter-based generator with numpy's word
 * order; the 64-bit products are done on 32-bit halves, exactly (no BigInt, no allocation).
 * Deliberately not here: ensembles of matrices or states (src/linalg/random.ts, src/quantum/random.ts).
 * Cost: ten rounds of two 64×64→128-bit products per block of four words; about 0.1 µs per word.
 */

import { portableLog, sinCosTurn } from './portable-math.js';

const TWO32 = 4294967296;

// Multipliers and Weyl key increments of Philox4x64 (Salmon et al. 2011, Table 2; Random123's philox.h).
const M0H = 0xd2e7470e, M0L = 0xe14c6c93;
const M1H = 0xca5a8263, M1L = 0x95121157;
const W0H = 0x9e3779b9, W0L = 0x7f4a7c15;
const W1H = 0xbb67ae85, W1L = 0x84caa73b;

/** The largest integer a seed or a counter word may be (JSON numbers are exact up to 2^53 − 1). */
export const MAX_SEED = Number.MAX_SAFE_INTEGER;

const INV32 = 1 / TWO32;

/**
 * High 32 bits of the 64-bit product of two unsigned 32-bit integers. The double product a·b is within 2^12 of
 * the exact one after subtracting the exact low word (Math.imul), so rounding (a·b − lo)/2^32 to the nearest
 * integer gives the high word exactly.
 */
function mulHi32(a: number, b: number): number {
  return Math.round((a * b - (Math.imul(a, b) >>> 0)) * INV32);
}

// The 128-bit product of the last mulhilo64 call, as four 32-bit words (least significant first).
let w0 = 0, w1 = 0, w2 = 0, w3 = 0;

/** The 128-bit product of (aH, aL) and (bH, bL), into w0..w3. Sums stay below 2^35, exact in doubles. */
function mulhilo64(aH: number, aL: number, bH: number, bL: number): void {
  const p0h = mulHi32(aL, bL);
  const p1l = Math.imul(aL, bH) >>> 0, p1h = mulHi32(aL, bH);
  const p2l = Math.imul(aH, bL) >>> 0, p2h = mulHi32(aH, bL);
  const p3l = Math.imul(aH, bH) >>> 0, p3h = mulHi32(aH, bH);
  const s1 = p0h + p1l + p2l;
  const s2 = p1h + p2h + p3l + Math.floor(s1 * INV32);
  w0 = Math.imul(aL, bL) >>> 0;
  w1 = s1 >>> 0;
  w2 = s2 >>> 0;
  w3 = (p3h + Math.floor(s2 * INV32)) >>> 0;
}

/**
 * One Philox4x64-10 block: `ctr` and the result are four 64-bit words as eight uint32 halves
 * [w0hi, w0lo, w1hi, w1lo, ...]; `key` is two words as [k0hi, k0lo, k1hi, k1lo].
 */
export function philox4x64(ctr: ArrayLike<number>, key: ArrayLike<number>, out: Uint32Array = new Uint32Array(8)): Uint32Array {
  let x0h = ctr[0], x0l = ctr[1], x1h = ctr[2], x1l = ctr[3], x2h = ctr[4], x2l = ctr[5], x3h = ctr[6], x3l = ctr[7];
  let k0h = key[0], k0l = key[1], k1h = key[2], k1l = key[3];
  for (let round = 0; round < 10; round++) {
    if (round > 0) {
      // Bump the key by the Weyl increments (64-bit additions modulo 2^64).
      let s = k0l + W0L;
      k0l = s >>> 0;
      k0h = (k0h + W0H + (s >= TWO32 ? 1 : 0)) >>> 0;
      s = k1l + W1L;
      k1l = s >>> 0;
      k1h = (k1h + W1H + (s >= TWO32 ? 1 : 0)) >>> 0;
    }
    mulhilo64(M0H, M0L, x0h, x0l);
    const hi0h = w3, hi0l = w2, lo0h = w1, lo0l = w0;
    mulhilo64(M1H, M1L, x2h, x2l);
    const hi1h = w3, hi1l = w2, lo1h = w1, lo1l = w0;
    // (x0, x1, x2, x3) ← (hi1 ⊕ x1 ⊕ k0, lo1, hi0 ⊕ x3 ⊕ k1, lo0)
    const n0h = (hi1h ^ x1h ^ k0h) >>> 0, n0l = (hi1l ^ x1l ^ k0l) >>> 0;
    const n2h = (hi0h ^ x3h ^ k1h) >>> 0, n2l = (hi0l ^ x3l ^ k1l) >>> 0;
    x0h = n0h; x0l = n0l;
    x1h = lo1h; x1l = lo1l;
    x2h = n2h; x2l = n2l;
    x3h = lo0h; x3l = lo0l;
  }
  out[0] = x0h; out[1] = x0l; out[2] = x1h; out[3] = x1l;
  out[4] = x2h; out[5] = x2l; out[6] = x3h; out[7] = x3l;
  return out;
}

function checkWord(x: number, name: string): void {
  if (!Number.isInteger(x) || x < 0 || x > MAX_SEED) throw new RangeError(`${name} must be an integer in [0, 2^53 − 1], not ${x}`);
}

/** A source of standard normal and uniform variates (a seeded stream, or given coordinates). */
export interface VariateSource {
  /** A uniform variate in [0, 1). */
  uniform(): number;
  /** A standard normal variate. */
  normal(): number;
}

/**
 * One stream of Philox4x64-10 words for a seed (the key) and up to three counter words, with uniform and
 * normal variates drawn from it as the header describes.
 */
export class PhiloxStream implements VariateSource {
  private readonly key = new Uint32Array(4);
  private readonly ctr = new Float64Array(8);
  private readonly block = new Uint32Array(8);
  private next = 4; // index of the next unused word of `block` (4: none left)
  private spare = NaN; // the second normal of the last Box–Muller pair, or NaN

  constructor(seed: number, words: readonly number[] = []) {
    checkWord(seed, 'seed');
    if (words.length > 3) throw new RangeError('a stream has at most three counter words');
    words.forEach((w, k) => checkWord(w, `stream word ${k + 1}`));
    this.key[0] = Math.floor(seed / TWO32);
    this.key[1] = seed % TWO32;
    for (let k = 0; k < words.length; k++) {
      this.ctr[2 * (k + 1)] = Math.floor(words[k] / TWO32);
      this.ctr[2 * (k + 1) + 1] = words[k] % TWO32;
    }
  }

  private refill(): void {
    // Increment the 256-bit counter (word 0 first, carrying into the next words), then compute the block.
    for (let w = 0; w < 4; w++) {
      const lo = this.ctr[2 * w + 1] + 1;
      if (lo < TWO32) {
        this.ctr[2 * w + 1] = lo;
        break;
      }
      this.ctr[2 * w + 1] = 0;
      const hi = this.ctr[2 * w] + 1;
      if (hi < TWO32) {
        this.ctr[2 * w] = hi;
        break;
      }
      this.ctr[2 * w] = 0;
    }
    philox4x64(this.ctr, this.key, this.block);
    this.next = 0;
  }

  /** The next 64-bit word as [high 32 bits, low 32 bits]. */
  nextWord(): [number, number] {
    if (this.next === 4) this.refill();
    const k = this.next++;
    return [this.block[2 * k], this.block[2 * k + 1]];
  }

  uniform(): number {
    if (this.next === 4) this.refill();
    const k = this.next++;
    // (w >> 11) · 2^-53 with w = hi · 2^32 + lo: hi · 2^21 + (lo >>> 11), exact in a double.
    return (this.block[2 * k] * 2097152 + (this.block[2 * k + 1] >>> 11)) / 9007199254740992;
  }

  normal(): number {
    if (!Number.isNaN(this.spare)) {
      const z = this.spare;
      this.spare = NaN;
      return z;
    }
    const u1 = this.uniform();
    const u2 = this.uniform();
    const r = Math.sqrt(-2 * portableLog(1 - u1));
    const [sin, cos] = sinCosTurn(u2);
    this.spare = r * sin;
    return r * cos;
  }
}
