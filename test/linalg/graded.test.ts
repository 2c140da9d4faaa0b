// The relative-accuracy kernels of src/linalg/graded.ts against mpmath (pinned in requirements.txt, version
// in the messages) at 1200 digits, on graded matrices D₁ X D₂ (X unitary, the scalings spanning up to
// 250 decades) and scaled Hermitian matrices D(1 + K)D with K from 1e-2 down to 1e-14; plus closed forms.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, zeros, mul, adjoint } from '../../src/linalg/index.js';
import { gradedSvd, scaledEigenDeviations } from '../../src/linalg/graded.js';
import { randomUnitary, rng } from '../helpers/random.js';
import { liveReference } from '../helpers/python.js';

const SINGULAR_VALUES = `
import json, sys, mpmath
from mpmath import mp
mp.dps = 1200
out = []
for c in json.load(sys.stdin):
    m, k = c['m'], c['k']
    A = mp.matrix(m, k)
    for i in range(m):
        for j in range(k):
            A[i, j] = mp.mpc(c['re'][i * k + j], c['im'][i * k + j])
    H = A.H * A if k <= m else A * A.H
    e = mp.eigh(H, eigvals_only=True)
    out.append(sorted([float(mp.sqrt(max(mp.re(x), 0))) for x in e], reverse=True))
print(json.dumps({'mpmath': mpmath.__version__, 'values': out}))
`;

const DEVIATIONS = `
import json, sys, mpmath
from mpmath import mp
mp.dps = 1000
out = []
for c in json.load(sys.stdin):
    k, z = c['k'], mp.mpf(c['z'])
    d = [mp.exp(mp.mpf(x)) for x in c['logD']]
    M = mp.matrix(k, k)
    for i in range(k):
        for j in range(k):
            M[i, j] = d[i] * d[j] * ((1 if i == j else 0) + mp.mpc(c['re'][i * k + j], c['im'][i * k + j]))
    e = mp.eigh(M, eigvals_only=True)
    out.append(float(sum(mp.re(x) ** z for x in e) - sum(x ** (2 * z) for x in d)))
print(json.dumps({'mpmath': mpmath.__version__, 'values': out}))
`;

function graded(m: number, k: number, span1: number, span2: number, r: () => number): CMatrix {
  const n = Math.max(m, k);
  const U = randomUnitary(n, r);
  const d1 = Array.from({ length: m }, () => 10 ** (-span1 * r()));
  const d2 = Array.from({ length: k }, () => 10 ** (-span2 * r()));
  const B = zeros(m, k);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < k; j++) {
      B.re[i * k + j] = d1[i] * U.re[i * n + j] * d2[j];
      B.im[i * k + j] = d1[i] * U.im[i * n + j] * d2[j];
    }
  }
  return B;
}

describe('gradedSvd', () => {
  it('gives every singular value of D₁ X D₂ to 2e-15 relative, down to 1e-250 of the largest (mpmath, 1200 digits)', () => {
    const r = rng(401);
    const cases: CMatrix[] = [];
    for (let t = 0; t < 40; t++) cases.push(graded(2 + (t % 4), 2 + ((t >> 2) % 3), [0, 6, 20, 60, 150][t % 5], [0, 10, 40, 100][t % 4], r));
    const ours = cases.map((b) => Array.from(gradedSvd(b).values));
    const ref = liveReference<{ mpmath: string; values: number[][] }>(['-c', SINGULAR_VALUES], 'mpmath (bash scripts/setup.sh)', {
      input: cases.map((b) => ({ m: b.rows, k: b.cols, re: Array.from(b.re), im: Array.from(b.im) })),
    });
    if (!ref) return;
    ref.values.forEach((vals, t) => {
      assert.equal(ours[t].length, vals.length, `case ${t}: number of singular values`);
      vals.forEach((v, i) => {
        const rel = Math.abs(ours[t][i] - v) / v;
        assert.ok(rel <= 2e-15, `case ${t} (${cases[t].rows}×${cases[t].cols}), σ_${i}: ours ${ours[t][i]}, mpmath ${ref.mpmath} ${v} (relative ${rel.toExponential(2)})`);
      });
    });
  });

  it('returns orthonormal singular vectors with B y_k = σ_k x_k (definition of the SVD)', () => {
    const r = rng(402);
    for (const [m, k] of [[4, 3], [3, 5], [4, 4]]) {
      const b = graded(m, k, 8, 8, r);
      const s = gradedSvd(b, { right: true, left: true });
      const By = mul(b, s.right!);
      const p = Math.min(m, k);
      for (let c = 0; c < p; c++) {
        for (let i = 0; i < m; i++) {
          const er = By.re[i * By.cols + c] - s.values[c] * s.left!.re[i * p + c];
          const ei = By.im[i * By.cols + c] - s.values[c] * s.left!.im[i * p + c];
          assert.ok(Math.hypot(er, ei) <= 1e-14 * s.values[0], `${m}×${k}: B y_${c} = σ x_${c}`);
        }
      }
      for (const V of [s.right!, s.left!]) {
        const g = mul(adjoint(V), V);
        for (let i = 0; i < V.cols; i++) {
          for (let j = 0; j < V.cols; j++) {
            assert.ok(Math.hypot(g.re[i * V.cols + j] - (i === j ? 1 : 0), g.im[i * V.cols + j]) <= 1e-13, `${m}×${k}: orthonormal`);
          }
        }
      }
    }
  });

  it('gives exact zeros and a complete right basis for an exactly rank-deficient matrix (rank 1 of 3×3)', () => {
    const b = zeros(3, 3);
    const u = [1, 2, 2];
    const v = [2, 1, -2];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) b.re[i * 3 + j] = u[i] * v[j];
    const s = gradedSvd(b, { right: true });
    assert.ok(Math.abs(s.values[0] - 9) <= 1e-14, `‖u‖‖v‖ = 9, got ${s.values[0]}`);
    assert.ok(s.values[1] <= 1e-15 && s.values[2] <= 1e-15, `the other singular values vanish: ${s.values[1]}, ${s.values[2]}`);
    const g = mul(adjoint(s.right!), s.right!);
    for (let i = 0; i < 3; i++) assert.ok(Math.abs(g.re[i * 3 + i] - 1) <= 1e-13, 'complete orthonormal right basis');
  });
});

describe('scaledEigenDeviations', () => {
  it('gives Tr (D(1+K)D)^z − Tr D^{2z} to 1e-13 relative for K from 1e-2 to 1e-14 and D spanning 200 decades (mpmath, 1000 digits)', () => {
    const r = rng(403);
    const cases: { k: number; z: number; logD: number[]; K: CMatrix }[] = [];
    for (let t = 0; t < 30; t++) {
      const k = 2 + (t % 4);
      const span = [0, 3, 12, 60, 200][t % 5];
      const size = [1e-2, 1e-6, 1e-10, 1e-14][(t >> 1) % 4];
      const z = [0.5, 0.1, 2, 1.3][(t >> 2) % 4];
      // Some cases with two equal scales (a degenerate block).
      const logD = Array.from({ length: k }, (_, i) => (t % 7 === 0 && i < 2 ? 0 : -span * r() * Math.LN10));
      const K = zeros(k, k);
      for (let i = 0; i < k; i++) {
        for (let j = i; j < k; j++) {
          const a = size * (2 * r() - 1);
          const b = i === j ? 0 : size * (2 * r() - 1);
          K.re[i * k + j] = a;
          K.im[i * k + j] = b;
          K.re[j * k + i] = a;
          K.im[j * k + i] = -b;
        }
      }
      cases.push({ k, z, logD, K });
    }
    const ours = cases.map(({ k, z, logD, K }) => {
      const delta = scaledEigenDeviations(logD, K);
      let t = 0;
      for (let i = 0; i < k; i++) t += Math.exp(2 * z * logD[i]) * Math.expm1(z * Math.log1p(delta[i]));
      return t;
    });
    const ref = liveReference<{ mpmath: string; values: number[] }>(['-c', DEVIATIONS], 'mpmath (bash scripts/setup.sh)', {
      input: cases.map(({ k, z, logD, K }) => ({ k, z, logD, re: Array.from(K.re), im: Array.from(K.im) })),
    });
    if (!ref) return;
    ref.values.forEach((v, t) => {
      const rel = Math.abs(ours[t] - v) / Math.abs(v);
      assert.ok(rel <= 1e-13, `case ${t}: ours ${ours[t]}, mpmath ${ref.mpmath} ${v} (relative ${rel.toExponential(2)})`);
    });
  });

  it('gives the exact eigenvalues of a diagonal K and of a degenerate 2×2 block (closed forms)', () => {
    const K = zeros(3, 3);
    K.re[0] = 1e-9;
    K.re[4] = -2e-9;
    K.re[8] = 3e-9;
    const d = scaledEigenDeviations([0, -10, -20], K);
    assert.deepEqual(Array.from(d), [1e-9, -2e-9, 3e-9]);
    // D = 1, K = [[0, ε], [ε, 0]]: eigenvalues 1 ± ε.
    const J = zeros(2, 2);
    J.re[1] = 1e-12;
    J.re[2] = 1e-12;
    const e = Array.from(scaledEigenDeviations([0, 0], J)).sort((a, b) => a - b);
    assert.ok(Math.abs(e[0] + 1e-12) <= 1e-27 && Math.abs(e[1] - 1e-12) <= 1e-27, `±1e-12, got ${e}`);
  });
});
