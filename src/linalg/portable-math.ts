/**
 * Elementary functions for the random path that give the same bits in every JavaScript engine: the natural
 * logarithm of (0, 1], the sine and cosine of a whole turn's fraction 2πu, and a hypotenuse, each built only
 * from operations IEEE 754 rounds exactly (+, −, ×, ÷, sqrt) and exact ones (comparisons, Math.floor, scaling
 * by two). `Math.log`, `Math.sin`, `Math.cos`, `Math.hypot` and `**` are not specified to the last place
 * (ECMA-262 calls them "implementation-approximated"), and Chromium's and Node's differ on a few percent of
 * arguments, which made a browser's sweep rows differ from the command's in the last place.
 *
 * The algorithms (textbook forms; the error bounds are ours, checked against mpmath in
 * test/linalg/portable-math.test.ts):
 * - log x, 0 < x ≤ 1: x = m·2^−e with m in [√½, √2) by exact doubling; f = m − 1 (exact, Sterbenz);
 *   s = f/(2 + f), log m = 2 atanh s = 2s + 2s·z·(1/3 + z/5 + … + z^10/23) with z = s² ≤ 0.0295 (the series
 *   of atanh, truncated where the next term is below 2^−56 of the sum); log x = log m − e·ln 2 with ln 2 split
 *   in a high part with trailing zeros (e·high exact) and a low part (Cody and Waite, "Software Manual for
 *   the Elementary Functions", 1980, ch. 5). A few units in the last place; never NaN on (0, 1].
 * - sin and cos of 2πu, 0 ≤ u < 1: w = 4u, q = ⌊w⌋, r = w − q (all exact) give the quadrant q and the
 *   fraction r of a quarter turn; for r ≤ ½ the angle a = (π/2)·r, else a = (π/2)(1 − r) with sine and cosine
 *   swapped, so 0 ≤ a ≤ π/4; then the Taylor series of sin a to a^19 and of cos a to a^18 (Horner in a²,
 *   coefficients 1/k! with k! exact in a double), and the signs and swap of quadrant q. Absolute error a few
 *   units of 2^−53.
 * - hypot(x, y) = sqrt(x² + y²): for the moderate numbers of random matrices (no scaling against overflow).
 *
 * Deliberately not here: anything off the random path (the divergences and eigensolvers use the engine's
 * Math functions). Cost: about twenty flops for log, thirty for sin and cos together.
 */

const LN2_HI = 6.93147180369123816490e-1; // ln 2 to 32 bits (fdlibm's ln2_hi): e·LN2_HI is exact for |e| < 2^20
const LN2_LO = 1.90821492927058770002e-10; // ln 2 − LN2_HI

/** 2/(2k + 1) for k = 1..11: the atanh series of log m, times 2. */
const ATANH = Array.from({ length: 11 }, (_, k) => 2 / (2 * k + 3));

/** The natural logarithm of x in (0, 1], bit-identical in every engine (see the header). */
export function portableLog(x: number): number {
  if (!(x > 0 && x <= 1)) throw new RangeError(`portableLog is for (0, 1], not ${x}`);
  let m = x;
  let e = 0;
  while (m < Math.SQRT1_2) {
    m *= 2;
    e++;
  }
  const f = m - 1;
  const s = f / (2 + f);
  const z = s * s;
  let p = ATANH[10];
  for (let k = 9; k >= 0; k--) p = ATANH[k] + z * p;
  const logM = 2 * s + s * (z * p);
  return logM - e * LN2_LO - e * LN2_HI;
}

const FACTORIAL: number[] = [1];
for (let k = 1; k <= 19; k++) FACTORIAL.push(FACTORIAL[k - 1] * k); // exact: the odd part of 19! is below 2^53
/** (−1)^k / (2k + 1)! for k = 1..9 (sine) and (−1)^k / (2k)! for k = 1..9 (cosine). */
const SIN = Array.from({ length: 9 }, (_, k) => (k % 2 === 0 ? -1 : 1) / FACTORIAL[2 * k + 3]);
const COS = Array.from({ length: 9 }, (_, k) => (k % 2 === 0 ? -1 : 1) / FACTORIAL[2 * k + 2]);
const HALF_PI = Math.PI / 2;

/** [sin a, cos a] for 0 ≤ a ≤ π/4 by the Taylor series (the header). */
function sinCosSmall(a: number): [number, number] {
  const z = a * a;
  let ps = SIN[8], pc = COS[8];
  for (let k = 7; k >= 0; k--) {
    ps = SIN[k] + z * ps;
    pc = COS[k] + z * pc;
  }
  return [a + a * (z * ps), 1 + z * pc];
}

/** [sin 2πu, cos 2πu] for u in [0, 1), bit-identical in every engine (see the header). */
export function sinCosTurn(u: number): [number, number] {
  if (!(u >= 0 && u < 1)) throw new RangeError(`sinCosTurn is for [0, 1), not ${u}`);
  const w = 4 * u;
  const q = Math.floor(w);
  const r = w - q;
  let s: number, c: number;
  if (r <= 0.5) [s, c] = sinCosSmall(HALF_PI * r);
  else [c, s] = sinCosSmall(HALF_PI * (1 - r));
  // The angle is (π/2)(q + r): rotate (c, s) by q quarter turns.
  switch (q) {
    case 0: return [s, c];
    case 1: return [c, -s];
    case 2: return [-s, -c];
    default: return [-c, s];
  }
}

/** sqrt(x² + y²) by exactly rounded operations (moderate x and y: no scaling against overflow). */
export function portableHypot(x: number, y: number): number {
  return Math.sqrt(x * x + y * y);
}
