// Facts about monotone metrics (Petz's classification) and double operator integrals.
// Sources in each it(...). External references: numpy 2.4.6 / scipy 1.17.1 (pinned in requirements.txt).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, add, sub, mul, scale, adjoint, diagonal, eigh, frobeniusNorm, toRows, trace, sqrtm,
  hermitianFunction, fromRows,
} from '../../src/linalg/index.js';
import {
  monotoneMetric, metricFromFunction, doubleOperatorIntegral, frechetDerivative, dividedDifference,
  SLD_METRIC, KUBO_MORI_METRIC, WIGNER_YANASE_METRIC, HARMONIC_METRIC,
} from '../../src/quantities/metrics.js';
import { rng, randomDensity, randomHermitian } from '../helpers/random.js';
import { runPythonCode as python } from '../helpers/python.js';

const PRESETS = [SLD_METRIC, KUBO_MORI_METRIC, WIGNER_YANASE_METRIC, HARMONIC_METRIC];

const READ = [
  'import json, sys, numpy as np, scipy.linalg as sl',
  'def M(d): return np.array(d["re"]) + 1j * np.array(d["im"])',
  'data = json.load(sys.stdin)',
].join('\n');

function commutator(a: CMatrix, b: CMatrix): CMatrix {
  return sub(mul(a, b), mul(b, a));
}

/** i[ρ, H], the tangent vector of the unitary family e^{−iθH} ρ e^{iθH} at θ = 0. */
function unitaryTangent(rho: CMatrix, h: CMatrix): CMatrix {
  const c = commutator(rho, h);
  // multiply by i: (re, im) → (−im, re)
  return { rows: c.rows, cols: c.cols, re: c.im.map((v) => -v), im: c.re.slice() };
}

describe('monotone metrics', () => {
  it('every normalised monotone metric reduces to the Fisher–Rao metric Σ X_ii²/λ_i on commuting tangent vectors (Čencov; Petz, Linear Algebra Appl. 244, 81 (1996))', () => {
    const lam = [0.1, 0.2, 0.3, 0.4];
    const x = [0.05, -0.02, 0.03, -0.06];
    const expected = x.reduce((s, v, i) => s + (v * v) / lam[i], 0);
    for (const m of PRESETS) {
      const g = monotoneMetric(diagonal(lam), diagonal(x), undefined, m);
      assert.ok(Math.abs(g.value - expected) < 1e-13, `${m.name}: ${g.value} vs ${expected}`);
    }
  });

  it('the SLD metric is the smallest and the metric of f(t) = 2t/(1+t) the largest monotone metric (Petz 1996, Theorem; recalled from memory), with Wigner–Yanase and Kubo–Mori between', () => {
    const r = rng(41);
    for (const n of [2, 3, 5]) {
      for (let k = 0; k < 5; k++) {
        const rho = randomDensity(n, r);
        const x = randomHermitian(n, r);
        const v = PRESETS.map((m) => monotoneMetric(rho, x, x, m).value);
        const [sld, km, wy, harm] = v;
        assert.ok(sld <= wy * (1 + 1e-12) && wy <= km * (1 + 1e-12) && km <= harm * (1 + 1e-12), JSON.stringify(v));
      }
    }
  });

  it('the SLD metric equals Tr X L with ρL + Lρ = 2X solved by scipy.linalg.solve_sylvester (scipy 1.17.1; Braunstein & Caves, PRL 72, 3439 (1994))', () => {
    const r = rng(42);
    const cases = [2, 3, 6].map((n) => [randomDensity(n, r), randomHermitian(n, r)] as [CMatrix, CMatrix]);
    const expected: number[] = python(
      READ + '\nout = []\nfor a, b in data:\n    R = M(a); X = M(b)\n    L = sl.solve_sylvester(R, R, 2 * X)\n    out.append(float(np.real(np.trace(X @ L))))\nprint(json.dumps(out))',
      cases.map(([a, b]) => [toRows(a), toRows(b)]),
    );
    cases.forEach(([rho, x], k) => {
      const g = monotoneMetric(rho, x, x, SLD_METRIC).value;
      assert.ok(Math.abs(g - expected[k]) < 1e-9 * Math.abs(expected[k]), `${g} vs ${expected[k]}`);
    });
  });

  it('the Kubo–Mori metric equals Tr X · d/dt log(ρ + tY)|₀, with the derivative from central differences of scipy.linalg.logm (scipy 1.17.1; Petz 1996 / Hiai & Petz 2014: the Bogoliubov inner product)', () => {
    const r = rng(43);
    const cases = [2, 4].map((n) => [randomDensity(n, r), randomHermitian(n, r), randomHermitian(n, r)] as [CMatrix, CMatrix, CMatrix]);
    const expected: number[] = python(
      READ +
        '\nout = []\nh = 1e-5\nfor a, b, c in data:\n    R = M(a); X = M(b); Y = M(c)\n' +
        '    D = (sl.logm(R + h * Y) - sl.logm(R - h * Y)) / (2 * h)\n    out.append(float(np.real(np.trace(X @ D))))\nprint(json.dumps(out))',
      cases.map((c) => c.map(toRows)),
    );
    cases.forEach(([rho, x, y], k) => {
      const g = monotoneMetric(rho, x, y, KUBO_MORI_METRIC);
      assert.ok(Math.abs(g.value - expected[k]) < 1e-6 * Math.abs(expected[k]), `${g.value} vs ${expected[k]}`);
      assert.ok(Math.abs(g.imaginary) < 1e-10 * Math.abs(g.value));
    });
  });

  it('for unitary tangents X = i[ρ,H] the Wigner–Yanase metric is 8 times the skew information I = −½ Tr [√ρ,H]² (Wigner & Yanase, PNAS 49, 910 (1963); relation derived from Petz’s formula), and I ≤ F_SLD/4 ≤ 2I (Luo, PRL 91, 180403 (2003); recalled from memory)', () => {
    const r = rng(44);
    for (const [n, rank] of [[2, 2], [3, 3], [4, 2], [5, 5]]) {
      const rho = randomDensity(n, r, rank);
      const h = randomHermitian(n, r);
      const x = unitaryTangent(rho, h);
      const c = commutator(sqrtm(rho), h);
      const skew = -0.5 * trace(mul(c, c)).re;
      const wy = monotoneMetric(rho, x, x, WIGNER_YANASE_METRIC).value;
      assert.ok(Math.abs(wy - 8 * skew) < 1e-10 * Math.max(1, wy), `${wy} vs 8·${skew}`);
      const sld = monotoneMetric(rho, x, x, SLD_METRIC).value;
      assert.ok(skew <= sld / 4 + 1e-12 && sld / 4 <= 2 * skew + 1e-12);
    }
  });

  it('a user-supplied f reproduces the presets: (1+t)/2 gives SLD and (t−1)/log t gives Kubo–Mori, also at nearly degenerate eigenvalues (Petz 1996)', () => {
    const r = rng(45);
    const sld = metricFromFunction((t) => (1 + t) / 2);
    const km = metricFromFunction((t) => (t - 1) / Math.log(t));
    assert.deepEqual(km.warnings, []);
    const U = eigh(randomHermitian(4, r)).vectors!;
    const rho = mul(mul(U, diagonal([0.25 - 3e-9, 0.25 + 3e-9, 0.3, 0.2])), adjoint(U));
    const x = randomHermitian(4, r);
    assert.ok(Math.abs(monotoneMetric(rho, x, x, sld).value - monotoneMetric(rho, x, x, SLD_METRIC).value) < 1e-12);
    const a = monotoneMetric(rho, x, x, km).value;
    const b = monotoneMetric(rho, x, x, KUBO_MORI_METRIC).value;
    assert.ok(Math.abs(a - b) < 1e-10 * b, `${a} vs ${b}`);
  });

  it('rejects f without f(1) = 1 or without the symmetry f(t) = t f(1/t), and warns when a Löwner matrix of f is not positive semidefinite (Löwner 1934; Bhatia, Matrix Analysis, Ch. V)', () => {
    assert.throws(() => metricFromFunction((t) => 2 * t), /f\(1\) = 1/);
    assert.throws(() => metricFromFunction((t) => t), /symmetric/);
    const bad = metricFromFunction((t) => (1 + t * t) / (1 + t)); // symmetric, f(1) = 1, not monotone
    assert.equal(bad.warnings.length, 1);
    assert.match(bad.warnings[0], /Löwner/);
  });

  it('on a pure state, a tangent between support and kernel has finite SLD length but infinite Kubo–Mori length (the Bogoliubov metric blows up at the boundary; Petz 1996), and kernel–kernel weight is infinite for every metric', () => {
    const rho = fromRows([[1, 0], [0, 0]]);
    const x = fromRows([[0, 1], [1, 0]]);
    assert.ok(Math.abs(monotoneMetric(rho, x, x, SLD_METRIC).value - 4) < 1e-14); // 2·(1 + 1)/(1 + 0)
    const km = monotoneMetric(rho, x, x, KUBO_MORI_METRIC);
    assert.equal(km.value, Infinity);
    assert.match(km.reason ?? '', /between the support and the kernel/);
    const restricted = monotoneMetric(rho, x, x, KUBO_MORI_METRIC, { restrictToSupport: true });
    assert.equal(restricted.value, 0);
    assert.ok(Math.abs(restricted.dropped - Math.SQRT2) < 1e-14);
    const k = monotoneMetric(rho, fromRows([[0, 0], [0, 1]]), undefined, SLD_METRIC);
    assert.equal(k.value, Infinity);
    assert.match(k.reason ?? '', /kernel/);
  });
});

describe('double operator integrals', () => {
  it('with the divided-difference kernel of exp it is the Fréchet derivative of the matrix exponential, as scipy.linalg.expm_frechet computes (scipy 1.17.1; Daleckii & Krein 1965)', () => {
    const r = rng(46);
    const cases = [2, 3, 5].map((n) => [randomHermitian(n, r), randomHermitian(n, r)] as [CMatrix, CMatrix]);
    const expected = python(
      READ + '\nout = []\nfor a, b in data:\n    L = sl.expm_frechet(M(a), M(b), compute_expm=False)\n    out.append({"re": L.real.tolist(), "im": L.imag.tolist()})\nprint(json.dumps(out))',
      cases.map(([a, b]) => [toRows(a), toRows(b)]),
    );
    cases.forEach(([a, x], k) => {
      const d = frechetDerivative(Math.exp, a, x, Math.exp);
      const ref = fromRows(expected[k].re, expected[k].im);
      assert.ok(frobeniusNorm(sub(d, ref)) < 1e-11 * frobeniusNorm(ref), `case ${k}`);
    });
  });

  it('equals A²X + AXA + XA² for f(t) = t³ (exact algebra) and central differences of √(A + tX) on positive definite A (Daleckii & Krein 1965; Bhatia, Matrix Analysis, Thm V.3.3)', () => {
    const r = rng(47);
    const a = randomHermitian(4, r);
    const x = randomHermitian(4, r);
    const cube = frechetDerivative((t) => t ** 3, a, x); // numerical derivative of f inside
    const exact = add(add(mul(mul(a, a), x), mul(mul(a, x), a)), mul(x, mul(a, a)));
    assert.ok(frobeniusNorm(sub(cube, exact)) < 1e-9 * frobeniusNorm(exact));
    const p = randomDensity(4, r);
    const h = 1e-6;
    const fd = scale(sub(sqrtm(add(p, scale(x, h))), sqrtm(sub(p, scale(x, h)))), 1 / (2 * h));
    const doi = frechetDerivative(Math.sqrt, p, x, (t) => 0.5 / Math.sqrt(t));
    assert.ok(frobeniusNorm(sub(doi, fd)) < 1e-6 * frobeniusNorm(doi));
  });

  it('with a product kernel φ(λ, μ) = g(λ) h(μ) it factorises as g(A) X h(B) (definition of the double operator integral; Birman & Solomyak)', () => {
    const r = rng(48);
    const a = randomHermitian(3, r);
    const b = randomHermitian(3, r);
    const x = sub(randomHermitian(3, r), scale(randomHermitian(3, r), 0.5));
    const xNonHermitian = { ...x, im: x.im.map((v, i) => v + 0.1 * i) };
    const t = doubleOperatorIntegral((l, m) => Math.exp(l) * (m * m + 1), a, b, xNonHermitian);
    const ref = mul(mul(hermitianFunction(a, Math.exp), xNonHermitian), hermitianFunction(b, (m) => m * m + 1));
    assert.ok(frobeniusNorm(sub(t, ref)) < 1e-12 * frobeniusNorm(ref));
  });

  it('the divided difference is continuous across the switch to the midpoint derivative (first-order Taylor; common practice, no published source)', () => {
    const dd = dividedDifference(Math.log, (t) => 1 / t);
    const near = dd(2, 2 + 1e-5);
    const far = dd(2, 2 + 1e-4);
    assert.ok(Math.abs(near - 0.5) < 1e-5 && Math.abs(far - 0.5) < 5e-5);
    assert.ok(Math.abs(dd(3, 3) - 1 / 3) < 1e-16);
  });
});
