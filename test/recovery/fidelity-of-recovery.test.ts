// Fidelity of recovery F(A;C|B) = max over channels R: B → BC of F(ρ_ABC, (id_A ⊗ R)(ρ_AB))
// (Seshadreesan & Wilde 2015): against cvxopt (cvxopt from PyPI in .venv, the SDP built independently
// with numpy in scripts/reference/cvxopt_guessing.py, and its dual at (4,2,4) in
// scripts/reference/cvxopt_recovery.py), the Fawzi–Renner bound, the Petz map as a
// feasible channel, Markov chains, and the fidelity-of-recovery op.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { CMatrix, fromRows, identity, partialTrace, sub, eigvalsh, toRows } from '../../src/linalg/index.js';
import { fidelityOfRecovery } from '../../src/recovery/fidelity-of-recovery.js';
import { petzRecovery } from '../../src/recovery/petz.js';
import { krausSum } from '../../src/quantum/channels.js';
import '../../src/ops/recovery-ops.js';
import '../../src/ops/verify-ops.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, rng } from '../helpers/random.js';
import { cmi, markovChain } from './fixtures.js';
import { liveReference } from '../helpers/python.js';

type Plain = { re: number[][]; im: number[][] };
interface RecoveryCase { rho: { matrix: Plain; dims: number[] }; a: number[]; b: number[]; c: number[]; value: number; cvxoptStatus: string }
interface ReferenceFile { cvxopt: string; numpy: string; seed: number; recovery: RecoveryCase[] }

const root = fileURLToPath(new URL('../..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_guessing.py`;

function maxAbs(m: CMatrix): number {
  let s = 0;
  for (let k = 0; k < m.re.length; k++) s = Math.max(s, Math.hypot(m.re[k], m.im[k]));
  return s;
}

function check(ref: ReferenceFile, origin: string): void {
  assert.ok(ref.recovery.length > 0);
  ref.recovery.forEach((c, k) => {
    assert.equal(c.cvxoptStatus, 'optimal');
    const f = fidelityOfRecovery(fromRows(c.rho.matrix.re, c.rho.matrix.im), c.rho.dims, c.a, c.b, c.c);
    const where = `${origin} recovery #${k} (cvxopt ${ref.cvxopt}, numpy ${ref.numpy}, seed ${ref.seed})`;
    assert.equal(f.certificate.status, 'optimal', where);
    const err = Math.abs(f.value - c.value) / Math.max(1, Math.abs(c.value));
    assert.ok(err <= 1e-6, `${where}: ours ${f.value}, cvxopt ${c.value}`);
  });
}

describe('fidelity of recovery F(A;C|B) (Seshadreesan & Wilde, Phys. Rev. A 92, 042321 (2015))', () => {
  it('matches cvxopt.solvers.sdp on the committed random three-qubit states to 1e-6 relative', () => {
    const ref = JSON.parse(readFileSync(`${root}test/reference/data/guessing-cases.json`, 'utf8')) as ReferenceFile;
    check(ref, 'committed');
  });

  it('matches cvxopt.solvers.sdp on a random three-qubit state generated in this run (seed 41) to 1e-6 relative', () => {
    const ref = liveReference<ReferenceFile>([script, '--seed', '41', '--count', '0', '--recovery', '1', '--out', '-'], 'cvxopt (bash scripts/setup.sh)');
    if (ref) check(ref, 'live');
  });

  it('matches cvxopt.solvers.sdp on the dual SDP at the sizes researchers use, (2,2,2) and (4,2,4), to 1e-6 relative, and the op\'s (4,2,4) certificate passes verify-answer (committed test/reference/data/recovery-cases.json from scripts/reference/cvxopt_recovery.py, Hilbert–Schmidt states)', () => {
    const ref = JSON.parse(readFileSync(`${root}test/reference/data/recovery-cases.json`, 'utf8')) as ReferenceFile & { generator: string };
    assert.equal(ref.generator, 'scripts/reference/cvxopt_recovery.py');
    assert.ok(ref.recovery.some((c) => c.rho.dims.join(',') === '4,2,4'));
    check({ ...ref, recovery: ref.recovery.filter((c) => c.rho.dims.join(',') !== '4,2,4') }, 'committed (dual SDP)');
    // (4,2,4) through the op: its value against cvxopt's, and its certificate re-checked by verify-answer.
    const big = ref.recovery.find((c) => c.rho.dims.join(',') === '4,2,4')!;
    const request = { op: 'fidelity-of-recovery', rho: big.rho, a: big.a, b: big.b, c: big.c };
    const answer = JSON.parse(JSON.stringify(handle(request)));
    assert.equal(answer.ok, true, JSON.stringify(answer).slice(0, 300));
    assert.equal(answer.certificate.status, 'optimal');
    assert.ok(Math.abs(answer.value - big.value) / big.value <= 1e-6, `(4,2,4): ours ${answer.value}, cvxopt ${big.value} (cvxopt ${ref.cvxopt}, seed ${ref.seed})`);
    const v = handle({ op: 'verify-answer', request, answer }) as Record<string, any>;
    assert.equal(v.value, true, JSON.stringify(v).slice(0, 600));
  });

  it('obeys I(A;C|B) ≥ −log₂ F(A;C|B) on random states, full rank and rank-deficient (Fawzi & Renner, Commun. Math. Phys. 340, 575 (2015), in the form of Seshadreesan & Wilde 2015)', () => {
    const r = rng(51);
    for (const rank of [8, 3, 1]) {
      const rho = randomDensity(8, r, rank);
      const f = fidelityOfRecovery(rho, [2, 2, 2], [0], [1], [2]);
      const i = cmi(rho, [2, 2, 2], [0], [1], [2]);
      assert.equal(f.certificate.status, 'optimal', `rank ${rank}`);
      assert.ok(i >= -Math.log2(f.value) - 1e-7, `rank ${rank}: I = ${i}, −log F = ${-Math.log2(f.value)}`);
    }
  });

  it('is at least the Petz recovery fidelity (a maximum over all channels, the Petz map among them)', () => {
    const r = rng(52);
    for (const [a, b, c] of [[[0], [1], [2]], [[1], [2], [0]]]) {
      const rho = randomDensity(8, r);
      const f = fidelityOfRecovery(rho, [2, 2, 2], a, b, c);
      const p = petzRecovery(rho, [2, 2, 2], a, b, c);
      assert.ok(f.value >= p.value - 1e-7, `A=${a} B=${b} C=${c}: F(A;C|B) = ${f.value} < Petz ${p.value}`);
    }
  });

  it('equals 1 on a quantum Markov chain ⊕_j q_j ρ_{A b_j^L} ⊗ ρ_{b_j^R C} (Hayden, Jozsa, Petz & Winter 2004; Seshadreesan & Wilde 2015)', () => {
    const r = rng(53);
    // B = C¹⊗C¹ ⊕ C¹⊗C¹ (in a rotated basis): ρ = Σ_j q_j ρ_A^j ⊗ |b_j⟩⟨b_j| ⊗ ρ_C^j, three qubits (keeps the SDP small).
    const { rho, dB } = markovChain(2, 2, [[1, 1], [1, 1]], r);
    const f = fidelityOfRecovery(rho, [2, dB, 2], [0], [1], [2]);
    assert.ok(Math.abs(f.value - 1) <= 1e-6, `F = ${f.value}`);
  });

  it('returns a channel (CPTP: Choi matrix ⪰ 0, Σ K*K = 1) that achieves the value by the closed-form fidelity (definition)', () => {
    const r = rng(54);
    const rho = randomDensity(8, r);
    const f = fidelityOfRecovery(rho, [2, 2, 2], [2], [0], [1]);
    assert.ok(maxAbs(sub(krausSum(f.channel, 'KstarK'), identity(2))) <= 1e-12);
    assert.ok(eigvalsh(f.choi)[0] >= -1e-12);
    assert.ok(Math.abs(f.achieved - f.value) <= 1e-6, `achieved ${f.achieved}, SDP ${f.value}`);
    assert.ok(f.certificate.relativeGap <= 1e-7);
  });
});

describe('fidelity of recovery: range and certificate (docs/protocol.md, "SDP certificates")', () => {
  it('stays in its range [0, 1] on a quantum Markov chain, where F(A;C|B) = 1 (Hayden, Jozsa, Petz & Winter 2004; Seshadreesan & Wilde 2015): value and bracket clipped, the excess stated', () => {
    const r = rng(56);
    for (const blocks of [[[1, 1], [1, 1]], [[2, 1]]] as [number, number][][]) {
      const { rho, dB } = markovChain(2, 2, blocks, r);
      const f = fidelityOfRecovery(rho, [2, dB, 2], [0], [1], [2]);
      const { lower, upper } = f.certificate.bounds;
      assert.ok(f.value <= 1 && upper <= 1 && lower <= f.value && f.value <= upper, `value ${f.value}, bracket [${lower}, ${upper}]`);
      assert.ok(Math.abs(f.value - 1) <= 1e-6, `F = ${f.value}`);
      const c = f.certificate.clipped;
      if (c) {
        assert.deepEqual(c.range, [0, 1]);
        assert.ok(c.excess > 0 && c.excess <= 1e-6 && Math.max(c.from, c.bracket.upper) > 1, JSON.stringify(c));
        assert.ok(f.warning?.includes('clipped'), f.warning);
      }
    }
  });

  it('carries a primal point (the channel\'s Choi matrix, CPTP) and a dual point (Y ⪰ 0, Z on B) whose objectives bracket the value (weak duality; Watrous 2013 fidelity SDP with σ a variable)', () => {
    const r = rng(57);
    for (const rank of [8, 2]) {
      const rho = randomDensity(8, r, rank);
      const f = fidelityOfRecovery(rho, [2, 2, 2], [0], [1], [2]);
      const cert = f.certificate;
      const J = cert.primal.choi as CMatrix;
      assert.ok(eigvalsh(J)[0] >= -1e-12, 'J ⪰ 0');
      assert.ok(maxAbs(sub(partialTrace(J, [2, 4], [1]), identity(2))) <= 1e-12, 'Tr_out J = 1_B');
      assert.equal((cert.dual.Z as CMatrix).rows, 2);
      assert.equal((cert.dual.Y as CMatrix).rows, 8);
      assert.ok(eigvalsh(cert.dual.Y as CMatrix)[0] >= -1e-12, 'Y ⪰ 0');
      // Objectives are of √F: the primal is the achieved root fidelity, the dual at least it (weak duality).
      assert.ok(Math.abs(cert.primalObjective ** 2 - f.achieved) <= 1e-12);
      assert.ok(cert.dualObjective >= cert.primalObjective - 1e-12);
      assert.ok(Math.abs(cert.gap - Math.abs(cert.dualObjective - cert.primalObjective)) <= 1e-15);
      assert.ok(cert.bounds.lower <= f.value && f.value <= cert.bounds.upper);
      assert.ok(cert.accuracy.relative <= 1e-5, JSON.stringify(cert.accuracy));
    }
  });
});

describe('fidelity-of-recovery op (PROTOCOL.md fields: rho with dims, a, b, c; the channel and the certificate)', () => {
  it('answers with value, root, a protocol channel {choi, from, to} and the certificate, and agrees with the Petz bound', () => {
    const r = rng(55);
    const rho = randomDensity(8, r);
    const plain = toRows(rho);
    const a = handle({ op: 'fidelity-of-recovery', rho: { matrix: plain, dims: [2, 2, 2] }, a: [0], b: [1], c: [2] }) as Record<string, any>;
    assert.equal(a.ok, true, JSON.stringify(a.error));
    const p = handle({ op: 'petz-recovery', rho: { matrix: plain, dims: [2, 2, 2] }, a: [0], b: [1], c: [2] }) as Record<string, any>;
    assert.ok(a.value >= p.value - 1e-7);
    assert.ok(Math.abs(a.root ** 2 - a.value) <= 1e-12);
    assert.deepEqual(a.channel.from, [2]);
    assert.deepEqual(a.channel.to, [2, 2]);
    assert.ok(a.channel.choi);
    assert.equal(a.certificate.status, 'optimal');
    assert.equal(typeof a.certificate.dualObjective, 'number');
    // The channel answer is readable back as a protocol channel.
    const back = handle({ op: 'channel-check', channel: a.channel }) as Record<string, any>;
    if (back.ok) assert.equal(back.tracePreserving, true);
  });
});
