// The channel and state ops through the plain-data door (handle). Each check names its source.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/channel-ops.js';
import { handle, compileAll } from '../../src/ops/handle.js';
import { eigvalsh, fromRows } from '../../src/linalg/index.js';
import { numpyVersions, python } from '../quantum/numpy-reference.js';

const versions = numpyVersions();

function ok(request: Record<string, unknown>): Record<string, any> {
  const a = handle(request) as Record<string, any>;
  assert.equal(a.ok, true, JSON.stringify(a.error ?? a));
  assert.doesNotThrow(() => JSON.parse(JSON.stringify(a)));
  return a;
}

function fails(request: Record<string, unknown>, code: string, path?: string): Record<string, any> {
  const a = handle(request) as Record<string, any>;
  assert.equal(a.ok, false, 'expected a failure');
  assert.equal(a.error.code, code, JSON.stringify(a.error));
  if (path !== undefined) assert.equal(a.error.path, path, JSON.stringify(a.error));
  return a;
}

/** Real or {re, im} plain matrix → [re rows, im rows]. */
function parts(m: any): { re: number[][]; im: number[][] } {
  if (Array.isArray(m)) return { re: m, im: m.map((r: number[]) => r.map(() => 0)) };
  return { re: m.re, im: m.im ?? m.re.map((r: number[]) => r.map(() => 0)) };
}

function assertClose(a: any, b: any, tol = 1e-12): void {
  const x = parts(a);
  const y = parts(b);
  assert.equal(x.re.length, y.re.length);
  x.re.forEach((row, i) => row.forEach((v, j) => {
    assert.ok(Math.abs(v - y.re[i][j]) <= tol && Math.abs(x.im[i][j] - y.im[i][j]) <= tol, `entry [${i}][${j}]`);
  }));
}

const half = [[0.5, 0], [0, 0.5]];

describe('channel and state ops', () => {
  it('every op schema compiles under ajv strict mode', () => {
    compileAll();
  });

  it('apply-channel: amplitude damping on |1⟩⟨1| gives diag(γ, 1−γ) (Nielsen & Chuang §8.3.5; recalled from memory)', () => {
    const channel = ok({ op: 'channel-preset', name: 'amplitude-damping', gamma: 0.25 }).value;
    const a = ok({ op: 'apply-channel', channel, rho: [[0, 0], [0, 1]] });
    assertClose(a.value, [[0.25, 0], [0, 0.75]], 1e-15);
    assert.deepEqual(a.state.dims, [2]);
  });

  it('apply-channel on one half of a Bell pair with labels: depolarizing p = 1 leaves the product I/2 ⊗ I/2 (Nielsen & Chuang §8.3.4)', () => {
    const channel = ok({ op: 'channel-preset', name: 'depolarizing', d: 2, p: 1 }).value;
    const rho = { ket: ['1/sqrt(2)', 0, 0, '1/sqrt(2)'], dims: [2, 2], labels: ['A', 'B'] };
    const a = ok({ op: 'apply-channel', channel, rho, on: ['B'] });
    assertClose(a.value, [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]], 1e-15);
    assert.deepEqual(a.state.labels, ['A', 'B']);
  });

  it(`apply-channel agrees with numpy ${versions.numpy} for a partial trace given as a channel on a random state`, () => {
    const ref = python(
      [
        'rng = np.random.default_rng(7)',
        'G = rng.normal(size=(12, 12)) + 1j * rng.normal(size=(12, 12))',
        'rho = G @ G.conj().T; rho /= np.trace(rho)',
        'red = np.einsum("abcdbf->acdf", rho.reshape(2, 3, 2, 2, 3, 2)).reshape(4, 4)',
        'result = {"rho": W(rho), "red": W(red)}',
      ].join('\n'),
      {},
    );
    const channel = ok({ op: 'channel-preset', name: 'partial-trace', dims: [2, 3, 2], traceOut: [1] }).value;
    const a = ok({ op: 'apply-channel', channel, rho: { matrix: ref.rho, dims: [2, 3, 2] } });
    assertClose(a.value, ref.red, 1e-12);
    assert.deepEqual(a.state.dims, [2, 2]);
  });

  it('apply-channel refuses a subsystem whose dimension does not fit, naming "on"', () => {
    const channel = ok({ op: 'channel-preset', name: 'amplitude-damping', gamma: 0.1 }).value;
    fails({ op: 'apply-channel', channel, rho: { matrix: [[1, 0, 0], [0, 0, 0], [0, 0, 0]] } }, 'dimension-mismatch', 'on');
  });

  it('channel-check reports the transpose map (Choi = swap) as not completely positive with eigenvalue −1, and still trace preserving (textbook example)', () => {
    const swap = [[1, 0, 0, 0], [0, 0, 1, 0], [0, 1, 0, 0], [0, 0, 0, 1]];
    const a = ok({ op: 'channel-check', channel: { choi: swap, from: [2] } });
    assert.equal(a.value, false);
    assert.equal(a.completelyPositive, false);
    assert.ok(Math.abs(a.minChoiEigenvalue + 1) < 1e-14);
    assert.equal(a.tracePreserving, true);
    assert.equal(a.unital, true);
  });

  it('channel-check reports the trace defect of Kraus operators that do not sum to the identity (‖Σ K*K − I‖ = 0.19 for K = 0.9·I)', () => {
    const a = ok({ op: 'channel-check', channel: { kraus: [[[0.9, 0], [0, 0.9]]] } });
    assert.equal(a.value, false);
    assert.ok(Math.abs(a.traceDefectKraus - 0.19) < 1e-14);
    assert.equal(a.completelyPositive, true);
  });

  it('channel-convert: the identity channel has Choi matrix Σ_ij |ii⟩⟨jj| (Choi 1975) and a one-operator Kraus form', () => {
    const id = { kraus: [[[1, 0], [0, 1]]] };
    const choi = ok({ op: 'channel-convert', channel: id, form: 'choi' }).value;
    assertClose(choi, [[1, 0, 0, 1], [0, 0, 0, 0], [0, 0, 0, 0], [1, 0, 0, 1]], 0);
    const back = ok({ op: 'channel-convert', channel: { choi, from: [2] }, form: 'kraus' });
    assert.equal(back.count, 1);
    assert.equal(back.droppedEigenvalues.length, 3);
  });

  it('channel-convert to a minimal Kraus family keeps the action: dephasing (d = 2) has Choi rank 2 (common practice)', () => {
    const deph = ok({ op: 'channel-preset', name: 'dephasing', d: 2, p: 0.5 }).value;
    assert.equal(deph.kraus.length, 3);
    const min = ok({ op: 'channel-convert', channel: deph, form: 'kraus', minimal: true });
    assert.equal(min.count, 2);
    const rho = [[0.5, 0.5], [0.5, 0.5]];
    const a = ok({ op: 'apply-channel', channel: deph, rho }).value;
    const b = ok({ op: 'apply-channel', channel: { kraus: min.value }, rho }).value;
    assertClose(a, b, 1e-14);
  });

  it('channel-convert to a Stinespring isometry: V*V = I for a trace-preserving channel (Stinespring 1955)', () => {
    const ad = ok({ op: 'channel-preset', name: 'amplitude-damping', gamma: 0.3 }).value;
    const s = ok({ op: 'channel-convert', channel: ad, form: 'stinespring' });
    assert.equal(s.environmentDim, 2);
    const V = fromRows(parts(s.value).re, parts(s.value).im);
    assert.equal(V.rows, 4);
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) {
      let sum = 0;
      for (let k = 0; k < 4; k++) sum += V.re[k * 2 + i] * V.re[k * 2 + j] + V.im[k * 2 + i] * V.im[k * 2 + j];
      assert.ok(Math.abs(sum - (i === j ? 1 : 0)) < 1e-15);
    }
  });

  it('channel-convert refuses a Choi matrix that is not positive semidefinite when converting to Kraus', () => {
    const swap = [[1, 0, 0, 0], [0, 0, 1, 0], [0, 1, 0, 0], [0, 0, 0, 1]];
    const a = fails({ op: 'channel-convert', channel: { choi: swap, from: [2] }, form: 'kraus' }, 'not-completely-positive', 'channel.choi');
    assert.ok(Math.abs(a.error.detail.eigenvalue + 1) < 1e-14);
  });

  it('channel-preset validates each parameter by name and refuses parameters the preset does not take', () => {
    fails({ op: 'channel-preset', name: 'depolarizing', d: 2, p: 2 }, 'invalid-argument', 'p');
    fails({ op: 'channel-preset', name: 'amplitude-damping', gamma: -0.1 }, 'invalid-argument', 'gamma');
    fails({ op: 'channel-preset', name: 'amplitude-damping', gamma: 0.1, p: 0.2 }, 'invalid-argument', 'p');
    fails({ op: 'channel-preset', name: 'erasure', d: 2 }, 'missing-argument', 'p');
    fails({ op: 'channel-preset', name: 'unitary', unitary: [[1, 1], [0, 1]] }, 'invalid-argument', 'unitary');
    fails({ op: 'channel-preset', name: 'spin-flip' }, 'invalid-argument');
  });

  it('every channel preset is trace preserving by channel-check (textbook facts)', () => {
    const s = Math.SQRT1_2;
    const requests: Record<string, unknown>[] = [
      { name: 'depolarizing', d: 3, p: 0.5 },
      { name: 'dephasing', d: 3, p: 0.5 },
      { name: 'amplitude-damping', gamma: 0.5 },
      { name: 'generalized-amplitude-damping', gamma: 0.5, N: 0.2 },
      { name: 'erasure', d: 2, p: 0.3 },
      { name: 'unitary', unitary: [[s, s], [s, -s]] },
      { name: 'partial-trace', dims: [2, 2], traceOut: [0] },
      { name: 'measure-prepare', povm: [[[1, 0], [0, 0]], [[0, 0], [0, 1]]], states: [half, { ket: [1, 0] }] },
      { name: 'pinching', d: 3 },
      { name: 'pinching', projectors: [[[1, 0], [0, 0]], [[0, 0], [0, 1]]] },
      { name: 'pinching', basis: [[s, s], [s, -s]] },
      { name: 'conditional-expectation', blocks: [1, 2], multiplicities: [2, 1] },
      { name: 'group-twirl', unitaries: [[[1, 0], [0, 1]], [[0, 1], [1, 0]], [[1, 0], [0, -1]], { re: [[0, 0], [0, 0]], im: [[0, -1], [1, 0]] }] },
    ];
    for (const r of requests) {
      const channel = ok({ op: 'channel-preset', ...r }).value;
      const check = ok({ op: 'channel-check', channel });
      assert.equal(check.value, true, JSON.stringify(r));
    }
  });

  it('compose-channels applies the first channel first: a unitary X then amplitude damping γ = 1 sends |0⟩ to |0⟩ (composition of maps)', () => {
    const X = ok({ op: 'channel-preset', name: 'unitary', unitary: [[0, 1], [1, 0]] }).value;
    const ad = ok({ op: 'channel-preset', name: 'amplitude-damping', gamma: 1 }).value;
    const c = ok({ op: 'compose-channels', channels: [X, ad] }).value;
    assertClose(ok({ op: 'apply-channel', channel: c, rho: [[1, 0], [0, 0]] }).value, [[1, 0], [0, 0]], 1e-15);
    const rev = ok({ op: 'compose-channels', channels: [ad, X] }).value;
    assertClose(ok({ op: 'apply-channel', channel: rev, rho: [[1, 0], [0, 0]] }).value, [[0, 0], [0, 1]], 1e-15);
    fails({ op: 'compose-channels', channels: [X, ok({ op: 'channel-preset', name: 'depolarizing', d: 3, p: 0.1 }).value] }, 'dimension-mismatch', 'channels[1]');
  });

  it('complementary-channel of the erasure channel is the erasure channel with 1 − p (Bennett, DiVincenzo & Smolin, PRL 78, 3217 (1997); recalled from memory): equal output spectra on pure inputs', () => {
    const er = ok({ op: 'channel-preset', name: 'erasure', d: 2, p: 0.3 }).value;
    const comp = ok({ op: 'complementary-channel', channel: er });
    assert.equal(comp.environmentDim, 3);
    const er2 = ok({ op: 'channel-preset', name: 'erasure', d: 2, p: 0.7 }).value;
    const rho = { ket: ['3/5', '4/5'] };
    const a = ok({ op: 'apply-channel', channel: comp.value, rho }).value;
    const b = ok({ op: 'apply-channel', channel: er2, rho }).value;
    const spec = (m: any) => Array.from(eigvalsh(fromRows(parts(m).re, parts(m).im)), (x) => Math.round(x * 1e12) / 1e12).sort();
    assert.deepEqual(spec(a), spec(b));
  });

  it('state-preset: werner with p = 1 on qubits is the singlet; isotropic has the requested fidelity (Werner 1989; Horodecki & Horodecki 1999)', () => {
    const w = ok({ op: 'state-preset', name: 'werner', d: 2, p: 1 });
    assertClose(w.value, [[0, 0, 0, 0], [0, 0.5, -0.5, 0], [0, -0.5, 0.5, 0], [0, 0, 0, 0]], 1e-15);
    assert.deepEqual(w.state.dims, [2, 2]);
    assert.match(w.convention, /antisymmetric weight/);
    const iso = ok({ op: 'state-preset', name: 'isotropic', d: 2, fidelity: 0.8 });
    const m = parts(iso.value).re;
    const F = (m[0][0] + m[0][3] + m[3][0] + m[3][3]) / 2; // ⟨Φ|ρ|Φ⟩
    assert.ok(Math.abs(F - 0.8) < 1e-15);
  });

  it(`state-preset thermal agrees with scipy.linalg.expm (scipy ${versions.scipy}) and reports ln Z`, () => {
    const H = [[1, 0.5, 0], [0.5, -1, 0.25], [0, 0.25, 0.3]];
    const ref = python('H = np.array(data["H"]); E = scipy.linalg.expm(-2.0 * H); result = {"rho": W(E / np.trace(E)), "logZ": float(np.log(np.trace(E)))}', { H });
    const a = ok({ op: 'state-preset', name: 'thermal', hamiltonian: H, beta: 2 });
    assertClose(a.value, ref.rho, 1e-12);
    assert.ok(Math.abs(a.logPartition - ref.logZ) < 1e-12);
  });

  it('state-preset builds GHZ, W, Bloch, ket, maximally mixed and maximally entangled states of unit trace, and refuses bad parameters by name', () => {
    const cases: Record<string, unknown>[] = [
      { name: 'ghz', n: 3 }, { name: 'ghz', n: 2, d: 3 }, { name: 'w', n: 3 }, { name: 'bloch', bloch: [0, 0.6, 0.8] },
      { name: 'ket', ket: ['1/sqrt(2)', 'i/sqrt(2)'] }, { name: 'maximally-mixed', dims: [2, 3] }, { name: 'maximally-entangled', d: 3 },
    ];
    for (const c of cases) {
      const a = ok({ op: 'state-preset', ...c });
      const m = parts(a.value).re;
      const tr = m.reduce((s, row, i) => s + row[i], 0);
      assert.ok(Math.abs(tr - 1) < 1e-14, JSON.stringify(c));
    }
    fails({ op: 'state-preset', name: 'bloch', bloch: [1, 1, 0] }, 'invalid-argument', 'bloch');
    fails({ op: 'state-preset', name: 'werner', d: 2, p: 1.5 }, 'invalid-argument', 'p');
    fails({ op: 'state-preset', name: 'ket', ket: [1, 1] }, 'invalid-argument', 'ket');
    fails({ op: 'state-preset', name: 'w', n: 3, d: 2 }, 'invalid-argument', 'd');
  });
});
