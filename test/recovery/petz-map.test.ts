// The Petz recovery map of any σ and channel N, its rotated versions and the averaged rotated map:
// against numpy/scipy (matrix functions) and scipy.integrate.quad / mpmath (the average over t),
// the defining property R(N(σ)) = σ, trace preservation with the completion, and the op's channels
// accepted by other ops.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, identity, sub, zeros } from '../../src/linalg/index.js';
import {
  averagedPetzMap, rotatedPetzMap, quadratureRule, quadratureWeight, averagedWeightClosedForm,
} from '../../src/recovery/petz-map.js';
import { applyKraus, krausSum, krausToChoi } from '../../src/quantum/channels.js';
import type { Channel } from '../../src/quantum/types.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, randomUnitary, rng } from '../helpers/random.js';
import { randomChannel } from './fixtures.js';
import { python, numpyVersions, toData, fromData } from '../quantum/numpy-reference.js';
import { runPythonCode } from '../helpers/python.js';

const versions = numpyVersions();

function maxAbs(m: CMatrix): number {
  let s = 0;
  for (let k = 0; k < m.re.length; k++) s = Math.max(s, Math.hypot(m.re[k], m.im[k]));
  return s;
}

const rows = (m: CMatrix) => toData(m);

// numpy: R^t's Choi matrix from the definition, with eigh-based complex powers on the supports.
const PETZ_REFERENCE = `
def cpow(h, p, t):
    w, v = np.linalg.eigh(h)
    keep = w > 1e-12 * w.max()
    f = np.zeros(len(w), dtype=complex)
    f[keep] = w[keep] ** p * np.exp(1j * p * t * np.log(w[keep]))
    return (v * f) @ v.conj().T
sig = M(data["sigma"])
K = [M(k) for k in data["kraus"]]
dout, din = K[0].shape
Ns = sum(k @ sig @ k.conj().T for k in K)
def choi_t(t):
    L = [cpow(sig, 0.5, t) @ k.conj().T @ cpow(Ns, -0.5, t) for k in K]
    J = np.zeros((dout * din, dout * din), dtype=complex)
    for l in L:
        v = l.T.reshape(-1)  # input index first: v[i*din + a] = L[a, i]
        J += np.outer(v, v.conj())
    return J
`;

describe('Petz recovery map R_{σ,N}(X) = σ^{1/2} N*(N(σ)^{−1/2} X N(σ)^{−1/2}) σ^{1/2} (Petz 1986, 1988)', () => {
  it(`has the Choi matrix numpy ${versions.numpy} computes from the definition, for t = 0 and the rotated maps R^t (Junge, Renner, Sutter, Wilde & Winter 2018, Eq. (1.3))`, () => {
    const r = rng(301);
    const sigma = randomDensity(3, r);
    const channel = randomChannel(3, 2, 2, r);
    for (const t of [0, 0.8, -2.1]) {
      const ours = krausToChoi(rotatedPetzMap(sigma, channel, t).channel);
      const ref = python(`${PETZ_REFERENCE}\nresult = W(choi_t(${t}))`, { sigma: rows(sigma), kraus: channel.kraus.map(rows) });
      assert.ok(maxAbs(sub(ours, fromData(ref))) <= 1e-10, `t = ${t}: ${maxAbs(sub(ours, fromData(ref)))}`);
    }
  });

  it('recovers its reference state: R^t(N(σ)) = σ for every t and for the averaged map (Petz 1988; Junge et al. 2018, Sec. 1)', () => {
    const r = rng(302);
    const sigma = randomDensity(4, r);
    const channel = randomChannel(4, 3, 2, r);
    const image = applyKraus(channel, sigma);
    for (const t of [0, 1.7]) {
      const back = applyKraus(rotatedPetzMap(sigma, channel, t).channel, image);
      assert.ok(maxAbs(sub(back, sigma)) <= 1e-11, `t = ${t}`);
    }
    const avg = averagedPetzMap(sigma, channel);
    assert.ok(maxAbs(sub(applyKraus(avg.channel, image), sigma)) <= 1e-10, 'averaged');
  });

  it('is trace preserving once completed outside supp N(σ), with N(σ) of lower rank (definition of a channel; Σ L*L = Π_{supp N(σ)} before completion)', () => {
    const r = rng(303);
    // σ of rank 1 on C^3 and an isometric channel into C^4: N(σ) has rank 1.
    const u = randomUnitary(4, r);
    const V = zeros(4, 3);
    for (let i = 0; i < 4; i++) for (let j = 0; j < 3; j++) { V.re[i * 3 + j] = u.re[i * 4 + j]; V.im[i * 3 + j] = u.im[i * 4 + j]; }
    const channel: Channel = { kraus: [V], fromDims: [3], toDims: [4] };
    const sigma = randomDensity(3, r, 1);
    for (const complete of [true, false]) {
      const m = rotatedPetzMap(sigma, channel, 0.3, { complete });
      assert.equal(m.diagnostics.rankImage, 1);
      assert.equal(m.diagnostics.kernelDimension, 3);
      const defect = maxAbs(sub(krausSum(m.channel, 'KstarK'), identity(4)));
      if (complete) assert.ok(defect <= 1e-10, `completed: ‖Σ L*L − 1‖ = ${defect}`);
      else assert.ok(defect > 0.5, 'without completion it is trace preserving only on the support');
    }
    const a = averagedPetzMap(sigma, channel);
    assert.ok(maxAbs(sub(krausSum(a.channel, 'KstarK'), identity(4))) <= 1e-10, 'averaged and completed');
  });
});

describe('averaged rotated Petz map R̄ = ∫ β₀(t) R^t dt, β₀(t) = (π/2)(cosh πt + 1)⁻¹ (Junge, Renner, Sutter, Wilde & Winter 2018, Eq. (1.5))', () => {
  it('has quadrature weights within their reported bound of mpmath.quad of ∫ β₀(t) cos(Δt) dt, and the closed form Δ/sinh Δ agrees with mpmath (Trefethen & Weideman 2014, Thm 5.1 for the bound; closed form derived from the transform of sech², recalled)', () => {
    const deltas = [0, 0.3, 1.5, 4, 9];
    const ref = runPythonCode<{ version: string; values: string[] }>(
      [
        'import json, sys, mpmath',
        'mpmath.mp.dps = 30',
        'ds = json.loads(sys.stdin.read())',
        'f = lambda d: mpmath.quad(lambda t: mpmath.pi / 2 / (mpmath.cosh(mpmath.pi * t) + 1) * mpmath.cos(d * t), [-mpmath.inf, 0, mpmath.inf])',
        'print(json.dumps({"version": mpmath.__version__, "values": [mpmath.nstr(f(mpmath.mpf(d)), 25) for d in ds]}))',
      ].join('\n'),
      deltas,
    );
    for (const [k, d] of deltas.entries()) {
      const exact = Number(ref.values[k]);
      const rule = quadratureRule(d, 1e-13);
      const w = quadratureWeight(rule, d);
      assert.ok(Math.abs(w - exact) <= rule.errorBound, `Δ = ${d}: |${w} − ${exact}| > ${rule.errorBound} (mpmath ${ref.version})`);
      assert.ok(Math.abs(averagedWeightClosedForm(d) - exact) <= 1e-15, `Δ = ${d}: closed form`);
      const coarse = quadratureRule(d, 1e-4);
      assert.ok(Math.abs(quadratureWeight(coarse, d) - exact) <= coarse.errorBound, `Δ = ${d}: the coarse rule meets its bound too`);
    }
  });

  it(`has the Choi matrix of ∫ β₀(t) J(R^t) dt computed entry by entry by scipy ${versions.scipy} (scipy.integrate.quad), within the reported Frobenius bound plus quad's tolerance`, () => {
    const r = rng(304);
    const sigma = randomDensity(2, r);
    const channel = randomChannel(2, 2, 2, r);
    const avg = averagedPetzMap(sigma, channel);
    const ref = python(
      `${PETZ_REFERENCE}
import scipy.integrate
n = dout * din
beta = lambda t: np.pi / 2 / (np.cosh(np.pi * t) + 1)
cache = {}
def entry(t, i, j):
    if t not in cache: cache[t] = choi_t(t)
    return cache[t][i, j]
J = np.zeros((n, n), dtype=complex)
for i in range(n):
    for j in range(i, n):
        re = scipy.integrate.quad(lambda t: beta(t) * entry(t, i, j).real, -np.inf, np.inf, epsabs=1e-13, epsrel=1e-13, limit=200)[0]
        im = scipy.integrate.quad(lambda t: beta(t) * entry(t, i, j).imag, -np.inf, np.inf, epsabs=1e-13, epsrel=1e-13, limit=200)[0]
        J[i, j] = re + 1j * im
        J[j, i] = re - 1j * im
result = W(J)`,
      { sigma: rows(sigma), kraus: channel.kraus.map(rows) },
    );
    const diff = sub(avg.choi, fromData(ref));
    let fro = 0;
    for (let k = 0; k < diff.re.length; k++) fro += diff.re[k] ** 2 + diff.im[k] ** 2;
    fro = Math.sqrt(fro);
    assert.ok(fro <= avg.quadrature.choiFrobeniusBound + 1e-10, `‖ΔJ‖_F = ${fro}`);
    assert.ok(avg.quadrature.closedFormDeviation <= avg.quadrature.errorBound);
    // R̄ differs from the Petz map itself unless σ and N(σ) commute suitably (common practice, no published source).
    assert.ok(maxAbs(sub(avg.choi, krausToChoi(rotatedPetzMap(sigma, channel).channel))) > 1e-4);
  });
});

describe('petz-map op: the maps as channels other ops accept', () => {
  const r = rng(305);
  const sigma = randomDensity(3, r);
  const channel = randomChannel(3, 2, 3, r);
  const wire = { kraus: channel.kraus.map(rows), from: [3], to: [2] };
  for (const extra of [{}, { t: 0.9 }, { averaged: true }]) {
    it(`returns ${JSON.stringify(extra)} in Kraus and Choi form, each a CPTP map by channel-check (definition), mapping N(σ) back to σ by apply-channel (Petz 1988)`, () => {
      const a = handle({ op: 'petz-map', sigma: rows(sigma), channel: wire, ...extra }) as Record<string, any>;
      assert.equal(a.ok, true, JSON.stringify(a.error));
      assert.deepEqual([a.value.from, a.value.to], [[2], [3]]);
      const image = applyKraus(channel, sigma);
      for (const form of [a.value, a.choi]) {
        const c = handle({ op: 'channel-check', channel: form }) as Record<string, any>;
        assert.equal(c.ok, true, JSON.stringify(c.error));
        assert.equal(c.value, true, JSON.stringify(c));
        const back = handle({ op: 'apply-channel', channel: form, rho: rows(image) }) as Record<string, any>;
        assert.equal(back.ok, true, JSON.stringify(back.error));
        const m = back.value.re ? fromData(back.value) : fromData({ re: back.value, im: back.value.map((row: number[]) => row.map(() => 0)) });
        assert.ok(maxAbs(sub(m, sigma)) <= 1e-9);
      }
      if ((extra as any).averaged) assert.ok(a.quadrature.errorBound <= 1e-13 && a.quadrature.nodes > 1);
    });
  }

  it('refuses "t" together with "averaged", and a σ of the wrong size, naming the field', () => {
    const both = handle({ op: 'petz-map', sigma: rows(sigma), channel: wire, t: 1, averaged: true }) as Record<string, any>;
    assert.equal(both.error.code, 'invalid-argument');
    assert.equal(both.error.path, 't');
    const wrong = handle({ op: 'petz-map', sigma: [[1, 0], [0, 0]], channel: wire }) as Record<string, any>;
    assert.equal(wrong.error.code, 'dimension-mismatch');
    assert.equal(wrong.error.path, 'sigma');
  });
});
