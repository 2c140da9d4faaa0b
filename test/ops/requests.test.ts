// Facts about what the engine does with the fields and values of a request (issue 7, "Wrong or unclear
// answers"): fields an op does not use are refused naming the field; states accepted within a loose
// tolerance are used made exact by one rule, said in the answer; finite quantities that overflow say so
// with their logarithm; entries whose squares overflow are a user error. Sources: the project's protocol
// (docs/protocol.md) for the rules; the closed forms named at each check.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { runPythonCode } from '../helpers/python.js';

function refused(request: Record<string, unknown>, path: string, code = 'invalid-argument'): string {
  const a = handle(request);
  assert.ok(!a.ok, `${JSON.stringify(request).slice(0, 120)} was answered`);
  assert.equal(a.error.code, code, a.error.message);
  assert.equal(a.error.path, path, a.error.message);
  return a.error.message;
}

const half = [[0.5, 0], [0, 0.5]];
const skew = [[0.3, 0], [0, 0.7]];

describe('fields an op does not use are refused, naming the field', () => {
  it('alpha and epsilon on umegaki, z on petz, maxIterations on sandwiched, alpha on max', () => {
    assert.match(refused({ op: 'divergence', family: 'umegaki', rho: half, sigma: skew, alpha: 2 }, 'alpha'), /umegaki divergence does not use "alpha"/);
    refused({ op: 'divergence', family: 'umegaki', rho: half, sigma: skew, epsilon: 0.1 }, 'epsilon');
    refused({ op: 'divergence', family: 'petz', rho: half, sigma: skew, alpha: 2, z: 1 }, 'z');
    refused({ op: 'divergence', family: 'sandwiched', rho: half, sigma: skew, alpha: 2, maxIterations: 10 }, 'maxIterations');
    refused({ op: 'divergence', family: 'max', rho: half, sigma: skew, alpha: 2 }, 'alpha');
    assert.equal(handle({ op: 'divergence', family: 'alpha-z', rho: half, sigma: skew, alpha: 2, z: 1 }).ok, true);
  });

  it('"base" on an op without a logarithm, "tolerance" on an op that validates nothing', () => {
    assert.match(refused({ op: 'trace-distance', rho: half, sigma: skew, base: 'e' }, 'base'), /does not use "base"/);
    refused({ op: 'spectrum', matrix: half, base: 2 }, 'base');
    assert.match(refused({ op: 'partial-trace', matrix: half, dims: [2], over: [0], tolerance: 1e-3 }, 'tolerance'), /does not use "tolerance"/);
    assert.equal(handle({ op: 'entropy', rho: half, base: 'e' }).ok, true);
  });

  it('maxIterations on a non-optimised conditional entropy, weightTolerance without side information, minimal with the Choi form', () => {
    const rho = { matrix: [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]], dims: [2, 2] };
    refused({ op: 'conditional-renyi-entropy', rho, a: [0], b: [1], family: 'petz', alpha: 2, maxIterations: 5 }, 'maxIterations');
    refused({ op: 'guesswork', probabilities: [0.5, 0.5], weightTolerance: 1e-9 }, 'weightTolerance');
    refused({ op: 'channel-convert', channel: { kraus: [[[1, 0], [0, 1]]] }, form: 'choi', minimal: true }, 'minimal');
  });
});

describe('one rule for states accepted within a loose tolerance, said in the answer', () => {
  it('a trace of 1.003 under tolerance 1e-2: every op uses ρ/Tr ρ (entropy and trace distance alike) and lists the input', () => {
    const rho = [[0.6, 0], [0, 0.403]];
    const p = [0.6 / 1.003, 0.403 / 1.003];
    const e = handle({ op: 'entropy', rho, tolerance: 1e-2 });
    assert.ok(e.ok);
    // Shannon entropy of the normalised spectrum (the von Neumann entropy of a diagonal state; textbook).
    const h = -p.reduce((s, x) => s + x * Math.log2(x), 0);
    assert.ok(Math.abs((e.value as number) - h) < 1e-12);
    const t = handle({ op: 'trace-distance', rho, sigma: half, tolerance: 1e-2 });
    assert.ok(t.ok);
    // ½ Σ |p_i − q_i| for commuting states (textbook).
    assert.ok(Math.abs((t.value as number) - 0.5 * (Math.abs(p[0] - 0.5) + Math.abs(p[1] - 0.5))) < 1e-12);
    for (const a of [e, t]) {
      const adjusted = a.inputsAdjusted as { note: string; inputs: { path: string; trace: number }[] };
      assert.match(adjusted.note, /divided by their trace/);
      assert.deepEqual(adjusted.inputs.map((x) => x.path), ['rho']);
      assert.ok(Math.abs(adjusted.inputs[0].trace - 1.003) < 1e-15);
    }
  });

  it('a negative eigenvalue of −0.002 under tolerance 1e-2 is set to zero: diag(1.002, −0.002) is used as the pure state diag(1, 0)', () => {
    const e = handle({ op: 'entropy', rho: [[1.002, 0], [0, -0.002]], tolerance: 1e-2 });
    assert.ok(e.ok);
    assert.equal(e.value, 0); // a pure state has entropy 0 (textbook)
    const input = (e.inputsAdjusted as { inputs: { smallestEigenvalue: number }[] }).inputs[0];
    assert.ok(Math.abs(input.smallestEigenvalue + 0.002) < 1e-15);
  });

  it('an exact state is used as given and the answer lists nothing', () => {
    const a = handle({ op: 'entropy', rho: half });
    assert.ok(a.ok && a.inputsAdjusted === undefined);
  });
});

describe('finite values that overflow, and entries that would', () => {
  it('guesswork with moment 2000: "Infinity" with a reason and its base-2 logarithm, log2(0.2) + 2000·log2(3) to double precision', () => {
    const a = handle({ op: 'guesswork', probabilities: [0.5, 0.3, 0.2], moment: 2000 });
    assert.ok(a.ok);
    assert.equal(a.value, 'Infinity');
    assert.match(a.reason as string, /finite but above the largest double/);
    // Σ_i i^k p_(i) = 0.5 + 0.3·2^k + 0.2·3^k (Massey 1994, guessing by decreasing probability); the last
    // term dominates by (3/2)^2000, so log2 = log2(0.2) + 2000 log2(3) + O(10^-352).
    assert.ok(Math.abs((a.log2Value as number) - (Math.log2(0.2) + 2000 * Math.log2(3))) < 1e-9);
  });

  it('guesswork with side information and moment 1e300 is refused at "moment" with the largest moment allowed', () => {
    const msg = refused({ op: 'guesswork', probabilities: [0.5, 0.5], states: [[[1, 0], [0, 0]], [[0, 0], [0, 1]]], moment: 1e300 }, 'moment');
    assert.match(msg, /at most 996\.58/);
  });

  it('a thermal preset with entries ±1e308 is a user error at the entry; β = −1e308 gives the exact state and ln Z with a reason', () => {
    refused({ op: 'state-preset', name: 'thermal', hamiltonian: [[1e308, 0], [0, -1e308]], beta: 1 }, 'hamiltonian[0][0]');
    const a = handle({ op: 'state-preset', name: 'thermal', hamiltonian: [[1, 0], [0, 2]], beta: -1e308 });
    assert.ok(a.ok);
    // β → −∞ puts all weight on the largest eigenvalue of H (textbook limit of exp(−βH)/Z).
    assert.deepEqual(a.value, [[0, 0], [0, 1]]);
    assert.equal(a.logPartition, 'Infinity');
    assert.match(a.reason as string, /beyond the largest double/);
  });
});

describe('answers with packed matrices ("answerMatrices": "packed")', () => {
  it('numpy reads every packed matrix of an answer as the rows of the same request, bit for bit', () => {
    // Outside reference: numpy.frombuffer(base64.b64decode(text), dtype="<f8").reshape(shape) (numpy's
    // documented C order and little-endian float64 dtype), compared with the rows answer of the same request.
    const request = { op: 'spectrum', matrix: [['1/2', 'i/3', 0], ['-i/3', '1/4', '1/5'], [0, '1/5', 1]], vectors: true };
    const rows = handle(request);
    const packed = handle({ ...request, answerMatrices: 'packed' });
    assert.ok(rows.ok && packed.ok);
    assert.deepEqual(packed.value, rows.value);
    const check = runPythonCode<{ same: boolean; shape: number[] }>(
      `import base64, json, sys, numpy as np
d = json.load(sys.stdin)
p, r = d["packed"], d["rows"]
dec = lambda s: np.frombuffer(base64.b64decode(s), dtype="<f8").reshape(p["shape"])
same = np.array_equal(dec(p["re"]), np.array(r["re"])) and np.array_equal(dec(p["im"]), np.array(r["im"]))
json.dump({"same": bool(same), "shape": p["shape"]}, sys.stdout)`,
      { packed: packed.vectors, rows: rows.vectors },
    );
    assert.deepEqual(check, { same: true, shape: [3, 3] });
  });

  it('a real matrix leaves "im" out; presets and states take the common fields too', () => {
    const a = handle({ op: 'state-preset', name: 'maximally-mixed', d: 2, answerMatrices: 'packed', deadline: 1000 });
    assert.ok(a.ok, JSON.stringify(a));
    const v = a.value as { shape: number[]; packed: string; re: string; im?: string };
    assert.deepEqual(v.shape, [2, 2]);
    assert.equal(v.im, undefined);
    const bytes = Buffer.from(v.re, 'base64');
    assert.deepEqual(Array.from({ length: bytes.length / 8 }, (_, k) => bytes.readDoubleLE(8 * k)), [0.5, 0, 0, 0.5]);
    refused({ op: 'spectrum', matrix: [[1]], answerMatrices: 'binary' }, 'answerMatrices');
  });
});
