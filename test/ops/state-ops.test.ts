// The editors' ops through the plain-data door: state-check, repair-state, data-processing-region.
// Spectra, Hermitian parts and clipped matrices are checked against numpy (numpy.linalg.eigvalsh, eigh,
// in .venv); the clipped matrix is also the Frobenius-nearest positive semidefinite matrix (Higham 1988,
// "Computing a nearest symmetric positive semidefinite matrix", Linear Algebra Appl. 103, Theorem 2.1),
// which the test checks against numpy's construction. The α-z region is H. Zhang, Adv. Math. 2020,
// Theorem 1.2 (the inequalities recalled from memory), with its corners checked by hand below.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { numpyVersions, python } from '../quantum/numpy-reference.js';

const versions = numpyVersions();

function ok(request: Record<string, unknown>): Record<string, any> {
  const a = handle(request) as Record<string, any>;
  assert.equal(a.ok, true, JSON.stringify(a.error ?? a));
  return a;
}

function fails(request: Record<string, unknown>, code: string, path?: string): void {
  const a = handle(request) as Record<string, any>;
  assert.equal(a.ok, false, 'expected a failure');
  assert.equal(a.error.code, code, JSON.stringify(a.error));
  if (path !== undefined) assert.equal(a.error.path, path);
}

// A candidate of our own with every defect at once: not Hermitian at [2][0], a negative eigenvalue, trace 0.9.
const re = [[0.5, 0.1, 0.3], [0.1, 0.5, 0.0], [0.0, 0.0, -0.1]];
const im = [[0, 0.05, 0], [-0.05, 0, 0.02], [0, -0.02, 0]];

describe(`state-check (numpy ${versions.numpy})`, () => {
  const a = ok({ op: 'state-check', state: { matrix: { re, im }, dims: [3] } });
  const ref = python(
    `m = M(data)
d = np.abs(m - m.conj().T)
i, j = np.unravel_index(np.argmax(d), d.shape)
w = np.linalg.eigvalsh((m + m.conj().T) / 2)
result = {"defect": float(d.max()), "row": int(i), "col": int(j), "spectrum": w.tolist(), "trace": float(np.trace(m).real)}`,
    { re, im },
  );

  it('names the worst Hermiticity defect and its entry, as numpy.abs(M − M*).argmax', () => {
    assert.equal(a.hermitian.ok, false);
    assert.ok(Math.abs(a.hermitian.defect - ref.defect) < 1e-15);
    // argmax picks the first of the symmetric pair (row-major); ours reports one of the pair.
    assert.deepEqual(new Set([a.hermitian.row, a.hermitian.column]), new Set([ref.row, ref.col]));
  });

  it('gives the spectrum of the Hermitian part as numpy.linalg.eigvalsh, with the most negative eigenvalue and its index', () => {
    a.spectrum.forEach((x: number, k: number) => assert.ok(Math.abs(x - ref.spectrum[k]) < 1e-14, `eigenvalue ${k}`));
    assert.equal(a.positive.ok, false);
    assert.equal(a.positive.index, 0);
    assert.ok(Math.abs(a.positive.minEigenvalue - ref.spectrum[0]) < 1e-14);
  });

  it('gives the trace and its defect |Tr M − 1|', () => {
    assert.ok(Math.abs(a.trace.re - ref.trace) < 1e-15);
    assert.ok(Math.abs(a.trace.defect - Math.abs(ref.trace - 1)) < 1e-15);
    assert.equal(a.trace.ok, false);
    assert.equal(a.value, false);
  });

  it('accepts a density matrix (the maximally mixed qubit pair; textbook fact) with all checks true', () => {
    const d = ok({ op: 'state-check', state: { matrix: [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]], dims: [2, 2] } });
    assert.equal(d.value, true);
    assert.deepEqual(d.spectrum, [0.25, 0.25, 0.25, 0.25]);
  });

  it('reports dims that do not fit the matrix instead of refusing the request', () => {
    const d = ok({ op: 'state-check', state: { matrix: [[1, 0, 0], [0, 0, 0], [0, 0, 0]], dims: [2, 2] } });
    assert.equal(d.dims.ok, false);
    assert.equal(d.dims.product, 4);
    assert.equal(d.value, false);
  });

  it('refuses what is not a matrix at all, naming the entry (an expression that does not parse)', () => {
    fails({ op: 'state-check', state: { matrix: [[1, 'sqrt('], [0, 0]] } }, 'parse-error', 'state.matrix[0][1]');
  });
});

describe(`repair-state (numpy ${versions.numpy})`, () => {
  it('"hermitian" gives (M + M*)/2 and reports the defect it removed', () => {
    const a = ok({ op: 'repair-state', state: { matrix: { re, im } }, actions: ['hermitian'] });
    const ref = python('m = M(data); result = W((m + m.conj().T) / 2)', { re, im });
    const v = a.value;
    v.re.forEach((row: number[], i: number) => row.forEach((x, j) => {
      assert.ok(Math.abs(x - ref.re[i][j]) < 1e-15 && Math.abs(v.im[i][j] - ref.im[i][j]) < 1e-15);
    }));
    assert.equal(a.changes[0].changed, true);
    assert.ok(Math.abs(a.changes[0].defectBefore - 0.3) < 1e-15);
  });

  it('"clip" gives the nearest PSD matrix V max(Λ, 0) V* (Higham 1988) as numpy builds it, and lists the eigenvalues clipped', () => {
    const h = [[0.6, 0.3], [0.3, -0.1]];
    const a = ok({ op: 'repair-state', state: { matrix: h }, actions: ['clip', 'normalize'] });
    const ref = python(
      `m = M(data); w, v = np.linalg.eigh(m); c = (v * np.maximum(w, 0)) @ v.conj().T
result = {"m": W(c / np.trace(c).real), "neg": [float(x) for x in w if x < 0], "tr": float(np.trace(c).real)}`,
      { re: h, im: [[0, 0], [0, 0]] },
    );
    a.value.forEach((row: number[], i: number) => row.forEach((x, j) => assert.ok(Math.abs(x - ref.m.re[i][j]) < 1e-14)));
    assert.equal(a.changes[0].clippedCount, 1);
    assert.ok(Math.abs(a.changes[0].clippedEigenvalues[0] - ref.neg[0]) < 1e-14);
    assert.ok(Math.abs(a.changes[1].traceBefore - ref.tr) < 1e-14);
  });

  it('does only what is asked: "normalize" alone leaves a negative eigenvalue in place', () => {
    const a = ok({ op: 'repair-state', state: { matrix: [[1.2, 0], [0, -0.1]] }, actions: ['normalize'] });
    assert.ok(Math.abs(a.value[1][1] - -0.1 / 1.1) < 1e-15);
    const check = ok({ op: 'state-check', state: a.state });
    assert.equal(check.positive.ok, false);
    assert.equal(check.trace.ok, true);
  });

  it('refuses to clip a non-Hermitian matrix, naming the action', () => {
    fails({ op: 'repair-state', state: { matrix: { re, im } }, actions: ['clip'] }, 'not-hermitian', 'actions[0]');
    fails({ op: 'repair-state', state: { matrix: [[0, 0], [0, 0]] }, actions: ['normalize'] }, 'trace-not-one', 'actions[0]');
  });
});

describe('data-processing-region (H. Zhang, Adv. Math. 2020, Theorem 1.2; recalled from memory)', () => {
  const at = (alpha: number, z: number) => ok({ op: 'data-processing-region', alpha, z, points: 8 });

  it('contains the Petz line z = 1 exactly for α ∈ (0, 2] (Petz 1986; Tomamichel, Quantum Information Processing with Finite Resources, 2016, Sec. 4.4)', () => {
    for (const alpha of [0.1, 0.5, 0.9, 1.5, 2]) assert.equal(at(alpha, 1).value, true, `α = ${alpha}`);
    assert.equal(at(2.5, 1).value, false);
  });

  it('contains the sandwiched line z = α exactly for α ≥ 1/2 (Frank–Lieb 2013, Beigi 2013)', () => {
    for (const alpha of [0.5, 0.75, 1.5, 3, 10]) assert.equal(at(alpha, alpha).value, true, `α = ${alpha}`);
    assert.equal(at(0.4, 0.4).value, false);
  });

  it('gives the α-intervals of a fixed z: for z = 1 the interval (0, 2]', () => {
    assert.deepEqual(at(1, 1).alphaIntervals, [[0, 2]]);
    // z = 3: all of (0, 1) (z ≥ 1 ≥ max(α, 1 − α)), α = 1, (1, 2] ∩ [3, 6] empty, [2, ∞) ∩ [3, 4] = [3, 4].
    assert.deepEqual(ok({ op: 'data-processing-region', z: 3, alphaMax: 5 }).alphaIntervals, [[0, 1], [3, 4]]);
    // z = 0.4 < 1/2: only the limit α = 1.
    assert.deepEqual(ok({ op: 'data-processing-region', z: 0.4 }).alphaIntervals, [[1, 1]]);
  });

  it('samples the band with the kinks 1/2, 1 and 2 included and names its source', () => {
    const a = ok({ op: 'data-processing-region', points: 4 });
    const alphas = a.band.map((b: any) => b.alpha);
    for (const k of [0.5, 1, 2]) assert.ok(alphas.includes(k));
    const two = a.band.find((b: any) => b.alpha === 2);
    assert.deepEqual([two.low, two.high], [1, 2]);
    assert.match(a.source, /Zhang/);
    fails({ op: 'data-processing-region', alpha: 1 }, 'missing-argument', 'z');
  });
});
