// Facts about the random path's elementary functions (src/linalg/portable-math.ts). Sources: mpmath (50-digit
// log, sin, cos) for accuracy; CPython's float arithmetic (IEEE 754 binary64, exactly rounded + − × ÷ and
// math.sqrt) running a line-by-line twin of the documented algorithm for bit-identity in another runtime —
// the property that makes browser and Node sweep rows equal (the twin checks the algorithm is made of exactly
// rounded steps only, not that it is accurate; mpmath checks that).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { PhiloxStream } from '../../src/linalg/philox.js';
import { portableHypot, portableLog, sinCosTurn } from '../../src/linalg/portable-math.js';
import { liveReference } from '../helpers/python.js';

/** The arguments: uniforms of a stream, the ends and a few awkward values. */
function argumentsForLog(): number[] {
  const s = new PhiloxStream(20261203, [1]);
  const xs = Array.from({ length: 3000 }, () => 1 - s.uniform());
  xs.push(1, 2 ** -53, 0.5, Math.SQRT1_2, Math.SQRT1_2 + 2 ** -53, 1 - 2 ** -53, 0.25 + 2 ** -54, 1e-300);
  return xs;
}
function argumentsForTurn(): number[] {
  const s = new PhiloxStream(20261203, [2]);
  const us = Array.from({ length: 3000 }, () => s.uniform());
  us.push(0, 0.125, 0.25, 0.375, 0.5, 0.625, 0.75, 0.875, 1 - 2 ** -53, 2 ** -53, 0.25 - 2 ** -54);
  return us;
}

const TWIN = String.raw`
import json, math, sys
LN2_HI = 6.93147180369123816490e-1
LN2_LO = 1.90821492927058770002e-10
ATANH = [2 / (2 * k + 3) for k in range(11)]
F = [1.0]
for k in range(1, 20): F.append(F[-1] * k)
SIN = [(-1.0 if k % 2 == 0 else 1.0) / F[2 * k + 3] for k in range(9)]
COS = [(-1.0 if k % 2 == 0 else 1.0) / F[2 * k + 2] for k in range(9)]
HALF_PI = math.pi / 2
def log(x):
    m, e = x, 0
    while m < math.sqrt(0.5):
        m *= 2; e += 1
    f = m - 1; s = f / (2 + f); z = s * s
    p = ATANH[10]
    for k in range(9, -1, -1): p = ATANH[k] + z * p
    return (2 * s + s * (z * p)) - e * LN2_LO - e * LN2_HI
def small(a):
    z = a * a; ps, pc = SIN[8], COS[8]
    for k in range(7, -1, -1):
        ps = SIN[k] + z * ps; pc = COS[k] + z * pc
    return a + a * (z * ps), 1 + z * pc
def turn(u):
    w = 4 * u; q = math.floor(w); r = w - q
    if r <= 0.5: s, c = small(HALF_PI * r)
    else: c, s = small(HALF_PI * (1 - r))
    return [(s, c), (c, -s), (-s, -c), (-c, s)][q]
args = json.load(sys.stdin)
out = {"log": [log(x) for x in args["log"]], "turn": [list(turn(u)) for u in args["turn"]],
       "normals": [[math.sqrt(-2 * log(1 - a)) * turn(b)[1], math.sqrt(-2 * log(1 - a)) * turn(b)[0]] for a, b in args["pairs"]]}
if args.get("mpmath"):
    import mpmath
    mpmath.mp.dps = 50
    out["mpLog"] = [float(mpmath.log(mpmath.mpf(x))) for x in args["log"]]
    out["mpTurn"] = [[float(mpmath.sin(2 * mpmath.pi * mpmath.mpf(u))), float(mpmath.cos(2 * mpmath.pi * mpmath.mpf(u)))] for u in args["turn"]]
print(json.dumps(out))
`;

describe('the random path\'s elementary functions', () => {
  const logArgs = argumentsForLog();
  const turnArgs = argumentsForTurn();
  const s = new PhiloxStream(7, [3, 1]);
  const pairs = Array.from({ length: 500 }, () => [s.uniform(), s.uniform()]);
  const ref = liveReference<{ log: number[]; turn: number[][]; normals: number[][]; mpLog: number[]; mpTurn: number[][] }>(
    ['-c', TWIN], 'mpmath (requirements.txt)', { input: { log: logArgs, turn: turnArgs, pairs, mpmath: true } });

  it('log on (0, 1] is within 5e-16 relative (a few units in the last place) of mpmath\'s 50-digit log (mpmath)', () => {
    if (!ref) return;
    logArgs.forEach((x, k) => {
      const want = ref.mpLog[k];
      const got = portableLog(x);
      assert.ok(want === 0 ? got === 0 : Math.abs(got - want) <= 5e-16 * Math.abs(want), `log ${x}: ${got} vs ${want}`);
    });
  });

  it('sin 2πu and cos 2πu are within 3e-16 of mpmath\'s (mpmath), and exact at the quarter turns (textbook values)', () => {
    if (!ref) return;
    turnArgs.forEach((u, k) => {
      const [sn, cs] = sinCosTurn(u);
      assert.ok(Math.abs(sn - ref.mpTurn[k][0]) <= 3e-16 && Math.abs(cs - ref.mpTurn[k][1]) <= 3e-16, `u = ${u}: ${sn}, ${cs} vs ${ref.mpTurn[k]}`);
    });
    assert.deepEqual([0, 0.25, 0.5, 0.75].map(sinCosTurn), [[0, 1], [1, -0], [-0, -1], [-1, 0]]);
  });

  it('log, sin, cos and the Box–Muller normals are bit-identical to a twin of the algorithm in CPython\'s IEEE arithmetic (CPython)', () => {
    if (!ref) return;
    assert.deepEqual(logArgs.map(portableLog), ref.log);
    assert.deepEqual(turnArgs.map((u) => [...sinCosTurn(u)]), ref.turn);
    // The stream's normals, drawn pair by pair from the same uniforms.
    const t = new PhiloxStream(7, [3, 1]);
    const ours = pairs.map(() => [t.normal(), t.normal()]);
    assert.deepEqual(ours, ref.normals);
  });

  it('hypot agrees with Math.hypot to rounding on moderate numbers (common practice)', () => {
    for (const [x, y] of [[3, 4], [1e-3, 2.5], [-0.7, 0.2]]) assert.ok(Math.abs(portableHypot(x, y) - Math.hypot(x, y)) <= 4e-16 * Math.hypot(x, y));
  });
});
