// Facts about the seeded generator and the random matrices (src/linalg/philox.ts, src/linalg/random.ts).
// Sources: numpy 2.4 (numpy.random.Philox, Philox4x64-10 of Salmon et al. 2011; numpy.linalg.qr), Mezzadri,
// Notices AMS 54 (2007) 592 (Haar unitaries from QR with the phase correction), Diaconis and Shahshahani,
// J. Appl. Probab. 31A (1994) 49 (E|Tr U|^2k = k! for Haar U of order d ≥ k), and the moments
// E|U_11|² = 1/d, E|U_11|⁴ = 2/(d(d+1)) of one entry of a Haar unitary (the first column is a uniform unit
// vector; common practice, e.g. Collins and Śniady 2006 for the Weingarten calculus behind them).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { PhiloxStream } from '../../src/linalg/philox.js';
import { ginibre, haarUnitary, qrThin, simplexPoint } from '../../src/linalg/random.js';
import { adjoint, mul, identity, maxAbs, sub } from '../../src/linalg/cmatrix.js';
import { runPythonCode } from '../helpers/python.js';

const hex = (h: number, l: number) => h.toString(16).padStart(8, '0') + l.toString(16).padStart(8, '0');

/** Mean and standard error of a sample. */
function meanAndError(xs: number[]): { mean: number; error: number } {
  const n = xs.length;
  const mean = xs.reduce((a, b) => a + b, 0) / n;
  const variance = xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1);
  return { mean, error: Math.sqrt(variance / n) };
}

describe('the Philox4x64-10 streams', () => {
  const cases: [number, number[]][] = [[0, []], [5, []], [20261202, [17, 3]], [2 ** 53 - 1, [2 ** 53 - 1, 2 ** 32, 2 ** 32 - 1]]];

  it('give the same 64-bit words as numpy.random.Philox(key=seed, counter=[0, c1, c2, c3]) (numpy 2.4)', () => {
    const ours = cases.map(([seed, words]) => {
      const s = new PhiloxStream(seed, words);
      return Array.from({ length: 9 }, () => hex(...s.nextWord()));
    });
    const theirs = runPythonCode<string[][]>(
      `import json, sys, numpy as np
out = []
for seed, words in json.load(sys.stdin):
    c = [0] + words + [0] * (3 - len(words))
    out.append(['%016x' % w for w in np.random.Philox(key=seed, counter=c).random_raw(9)])
print(json.dumps(out))`,
      cases,
    );
    assert.deepEqual(ours, theirs);
  });

  it('give the same uniform doubles as numpy.random.Generator(Philox(...)).random() (numpy 2.4)', () => {
    const s = new PhiloxStream(42, [7, 1]);
    const ours = Array.from({ length: 20 }, () => s.uniform());
    const theirs = runPythonCode<number[]>(
      `import json, numpy as np
print(json.dumps(np.random.Generator(np.random.Philox(key=42, counter=[0, 7, 1, 0])).random(20).tolist()))`,
    );
    assert.deepEqual(ours, theirs);
  });

  it('are independent of each other and reproducible: a stream depends only on the seed and its counter words (common practice)', () => {
    const draw = (seed: number, words: number[]) => {
      const s = new PhiloxStream(seed, words);
      return Array.from({ length: 4 }, () => s.normal());
    };
    assert.deepEqual(draw(9, [3, 0]), draw(9, [3, 0]));
    assert.notDeepEqual(draw(9, [3, 0]), draw(9, [4, 0]));
    assert.notDeepEqual(draw(9, [3, 0]), draw(9, [3, 1]));
    assert.notDeepEqual(draw(9, [3, 0]), draw(10, [3, 0]));
  });

  it('Box–Muller normals have mean 0, variance 1 and fourth moment 3 (Box and Muller 1958)', () => {
    const s = new PhiloxStream(1, [0]);
    const z = Array.from({ length: 40000 }, () => s.normal());
    for (const [p, want] of [[1, 0], [2, 1], [4, 3]] as const) {
      const { mean, error } = meanAndError(z.map((x) => x ** p));
      assert.ok(Math.abs(mean - want) < 5 * error, `E z^${p} = ${mean} ± ${error}, expected ${want}`);
    }
  });
});

describe('random matrices', () => {
  it('the Householder QR has orthonormal columns, reproduces A = QR and |R_kk| as numpy.linalg.qr (numpy 2.4)', () => {
    const a = ginibre(6, 4, new PhiloxStream(3));
    const { q, rDiagonal } = qrThin(a);
    assert.ok(maxAbs(sub(mul(adjoint(q), q), identity(4))) < 1e-13);
    // Q*A is R: upper triangular with the stated diagonal.
    const r = mul(adjoint(q), a);
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < i; j++) assert.ok(Math.hypot(r.re[i * 4 + j], r.im[i * 4 + j]) < 1e-13);
      assert.ok(Math.abs(r.re[i * 5] - rDiagonal.re[i]) < 1e-13 && Math.abs(r.im[i * 5] - rDiagonal.im[i]) < 1e-13);
    }
    const numpyAbs = runPythonCode<number[]>(
      `import json, sys, numpy as np
a = json.load(sys.stdin); m = np.array(a['re']) + 1j * np.array(a['im'])
print(json.dumps(np.abs(np.diag(np.linalg.qr(m)[1])).tolist()))`,
      { re: [0, 1, 2, 3, 4, 5].map((i) => Array.from(a.re.subarray(i * 4, i * 4 + 4))), im: [0, 1, 2, 3, 4, 5].map((i) => Array.from(a.im.subarray(i * 4, i * 4 + 4))) },
    );
    numpyAbs.forEach((x, k) => assert.ok(Math.abs(x - Math.hypot(rDiagonal.re[k], rDiagonal.im[k])) < 1e-12));
  });

  it('Haar unitaries are unitary and have E|U_11|² = 1/d, E|U_11|⁴ = 2/(d(d+1)), E U_11 = 0 (Mezzadri 2007)', () => {
    for (const d of [2, 3, 5]) {
      const m2: number[] = [], m4: number[] = [], re11: number[] = [];
      for (let n = 0; n < 6000; n++) {
        const u = haarUnitary(d, new PhiloxStream(11, [n, d]));
        if (n < 20) assert.ok(maxAbs(sub(mul(adjoint(u), u), identity(d))) < 1e-13);
        const a2 = u.re[0] ** 2 + u.im[0] ** 2;
        m2.push(a2);
        m4.push(a2 * a2);
        re11.push(u.re[0]);
      }
      for (const [xs, want, what] of [[m2, 1 / d, '|U_11|²'], [m4, 2 / (d * (d + 1)), '|U_11|⁴'], [re11, 0, 'Re U_11']] as const) {
        const { mean, error } = meanAndError([...xs]);
        assert.ok(Math.abs(mean - want) < 5 * error, `d = ${d}: E ${what} = ${mean} ± ${error}, expected ${want}`);
      }
    }
  });

  it('Haar unitaries have E|Tr U|² = 1 and E|Tr U|⁴ = 2 for d ≥ 2 (Diaconis and Shahshahani 1994); without the phase correction E Re U_11 ≠ 0', () => {
    const d = 3;
    const t2: number[] = [], t4: number[] = [], uncorrected: number[] = [];
    for (let n = 0; n < 8000; n++) {
      const u = haarUnitary(d, new PhiloxStream(12, [n]));
      let tr = 0, ti = 0;
      for (let i = 0; i < d; i++) {
        tr += u.re[i * d + i];
        ti += u.im[i * d + i];
      }
      t2.push(tr * tr + ti * ti);
      t4.push((tr * tr + ti * ti) ** 2);
      uncorrected.push(qrThin(ginibre(d, d, new PhiloxStream(12, [n]))).q.re[0]);
    }
    for (const [xs, want] of [[t2, 1], [t4, 2]] as const) {
      const { mean, error } = meanAndError([...xs]);
      assert.ok(Math.abs(mean - want) < 5 * error, `E|Tr U|^k = ${mean} ± ${error}, expected ${want}`);
    }
    // The bare Householder Q has a real negative corner: the correction is what removes the bias.
    const { mean, error } = meanAndError(uncorrected);
    assert.ok(Math.abs(mean) > 20 * error, `uncorrected E Re Q_11 = ${mean}`);
  });

  it('points on the simplex are flat Dirichlet: E p_1 = 1/n, E p_1² = 2/(n(n+1)) (Devroye 1986, §XI.4)', () => {
    const n = 4;
    const p1: number[] = [], p1sq: number[] = [];
    for (let k = 0; k < 8000; k++) {
      const p = simplexPoint(n, new PhiloxStream(13, [k]));
      assert.ok(Math.abs(p.reduce((a, b) => a + b, 0) - 1) < 1e-14);
      p1.push(p[0]);
      p1sq.push(p[0] ** 2);
    }
    for (const [xs, want] of [[p1, 1 / n], [p1sq, 2 / (n * (n + 1))]] as const) {
      const { mean, error } = meanAndError([...xs]);
      assert.ok(Math.abs(mean - want) < 5 * error, `${mean} ± ${error}, expected ${want}`);
    }
  });
});
