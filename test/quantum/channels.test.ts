// Facts about channel representations, checks, application and constructions. Each names its source.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import {
  CMatrix, adjoint, identity, kron, mul, scale, zeros, eigvalsh, partialTrace, reorderSubsystems,
  traceOfProductRe, add, innerProduct,
} from '../../src/linalg/index.js';
import {
  krausToChoi, choiToKraus, choiToKrausDetailed, krausToStinespring, stinespringToKraus, channelDiagnostics,
  choiDiagnostics, applyChannel, applyKraus, composeChannels, composeSequence, tensorChannels, adjointChannel,
  complementaryChannel, identityChannel, maximallyEntangled, swapOperator, amplitudeDamping, stateFromKet,
  compressKraus, scaleChannel,
} from '../../src/quantum/index.js';
import type { Channel } from '../../src/quantum/index.js';
import { RhoError } from '../../src/errors.js';
import { rng, randomDensity, randomComplex, randomHermitian, randomKet } from '../helpers/random.js';
import { close, randomChannel } from './fixtures.js';
import { fromData, numpyVersions, python, toData } from './numpy-reference.js';

const versions = numpyVersions();

function throwsCode(f: () => unknown, code: string): RhoError {
  let caught: RhoError | undefined;
  assert.throws(f, (e: unknown) => {
    if (e instanceof RhoError && e.code === code) { caught = e; return true; }
    return false;
  });
  return caught!;
}

function sortedSpectrum(m: CMatrix): number[] {
  return Array.from(eigvalsh(m)).sort((a, b) => a - b);
}

/** Non-zero eigenvalues (above 1e-10), sorted: the spectra compared up to zero padding. */
function nonzeroSpectrum(m: CMatrix): number[] {
  return sortedSpectrum(m).filter((x) => Math.abs(x) > 1e-10);
}

describe('Kraus, Choi and Stinespring forms', () => {
  it('the Choi matrix of the identity channel is the unnormalised maximally entangled projector d|Φ⟩⟨Φ| (Choi, Linear Algebra Appl. 10, 285 (1975))', () => {
    for (const d of [2, 3]) {
      assert.ok(close(krausToChoi(identityChannel([d])), scale(maximallyEntangled(d).matrix, d), 1e-14));
    }
  });

  it('the Choi matrix follows J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|) entry by entry (PROTOCOL.md convention, input factor first)', () => {
    const ch = randomChannel(2, 3, 2, rng(1));
    const J = krausToChoi(ch);
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < 2; j++) {
        const Eij = zeros(2, 2);
        Eij.re[i * 2 + j] = 1;
        const block = applyKraus(ch, Eij);
        for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) {
          const p = (i * 3 + a) * 6 + (j * 3 + b);
          assert.ok(Math.abs(J.re[p] - block.re[a * 3 + b]) < 1e-14 && Math.abs(J.im[p] - block.im[a * 3 + b]) < 1e-14);
        }
      }
    }
  });

  it('Kraus → Choi → Kraus gives the same channel action on random inputs, with at most d_in·d_out operators (Choi 1975: Kraus rank = rank of J)', () => {
    const r = rng(2);
    for (const [dIn, dOut, count] of [[2, 2, 6], [3, 2, 2], [2, 4, 3]]) {
      const ch = randomChannel(dIn, dOut, count, r);
      const back = choiToKraus(krausToChoi(ch), [dIn], [dOut]);
      assert.equal(back.kraus.length, Math.min(count, dIn * dOut));
      for (let t = 0; t < 3; t++) {
        const x = randomComplex(dIn, dIn, r); // any operator, not only states
        assert.ok(close(applyKraus(back, x), applyKraus(ch, x), 1e-12));
      }
    }
  });

  it('a non-positive Choi matrix is refused as not completely positive with its eigenvalue: the transpose map has Choi matrix the swap, eigenvalue −1 (Peres 1996 / Horodecki 1996, partial transpose)', () => {
    const e = throwsCode(() => choiToKraus(swapOperator(2), [2], [2]), 'not-completely-positive');
    assert.ok(Math.abs((e.detail!.eigenvalue as number) + 1) < 1e-14);
  });

  it('Choi → Kraus drops eigenvalues below the tolerance and reports them (tolerance-dependent rank, common practice)', () => {
    const J = krausToChoi(amplitudeDamping(0.3));
    const tiny = scale(maximallyEntangled(2).matrix, 1e-13);
    const res = choiToKrausDetailed(add(J, tiny), [2], [2], 1e-9);
    assert.equal(res.channel.kraus.length, 2);
    assert.equal(res.dropped.length, 2);
    assert.ok(res.dropped.every((x) => Math.abs(x) <= res.threshold));
  });

  it('the Stinespring operator V = Σ K_k ⊗ |k⟩ is an isometry for a trace-preserving channel and Tr_E VρV* = N(ρ) (Stinespring 1955)', () => {
    const r = rng(3);
    const ch = randomChannel(3, 2, 4, r);
    const { isometry: V, environmentDim } = krausToStinespring(ch);
    assert.equal(environmentDim, 4);
    assert.ok(close(mul(adjoint(V), V), identity(3), 1e-12));
    const rho = randomDensity(3, r);
    const out = partialTrace(mul(mul(V, rho), adjoint(V)), [2, 4], [1]);
    assert.ok(close(out, applyKraus(ch, rho), 1e-12));
    const back = stinespringToKraus(V, [3], [2], 4);
    back.kraus.forEach((K, k) => assert.ok(close(K, ch.kraus[k], 0)));
  });
});

describe('checks of complete positivity, trace preservation and unitality', () => {
  it('a random Kraus channel is CP and TP; Σ K*K − I and Tr_B J − I vanish (Nielsen & Chuang Thm 8.1; recalled from memory)', () => {
    const d = channelDiagnostics(randomChannel(2, 3, 3, rng(4)));
    assert.ok(d.completelyPositive && d.tracePreserving);
    assert.ok(d.traceDefectKraus! < 1e-12 && d.traceDefectChoi < 1e-12);
    assert.ok(d.minChoiEigenvalue > -1e-12);
  });

  it('scaling a channel by c reports the trace-preservation defect |c − 1| and the unitality defect |c − 1| for a unitary channel (direct computation)', () => {
    const U = randomChannel(2, 2, 1, rng(5));
    const d = channelDiagnostics(scaleChannel(U, 0.9));
    assert.ok(Math.abs(d.traceDefectKraus! - 0.1) < 1e-12 && Math.abs(d.traceDefectChoi - 0.1) < 1e-12);
    assert.ok(Math.abs(d.unitalDefect - 0.1) < 1e-12);
    assert.equal(d.tracePreserving, false);
    assert.equal(d.unital, false);
  });

  it('the transpose map passes TP and unitality but fails CP with minimum Choi eigenvalue −1 (textbook example of a positive, not completely positive map)', () => {
    const d = choiDiagnostics(swapOperator(2), [2], [2]);
    assert.equal(d.completelyPositive, false);
    assert.ok(Math.abs(d.minChoiEigenvalue + 1) < 1e-14);
    assert.ok(d.tracePreserving && d.unital);
  });

  it('the adjoint of a trace-preserving channel is unital, and Tr(N*(Y) X) = Tr(Y N(X)) (definition of the Heisenberg picture)', () => {
    const r = rng(6);
    const ch = randomChannel(3, 2, 3, r);
    const adj = adjointChannel(ch);
    assert.ok(channelDiagnostics(adj).unitalDefect < 1e-12);
    const X = randomComplex(3, 3, r);
    const Y = randomComplex(2, 2, r);
    const lhs = innerProduct(adjoint(applyKraus(adj, Y)), X);
    const rhs = innerProduct(adjoint(Y), applyKraus(ch, X));
    assert.ok(Math.abs(lhs.re - rhs.re) < 1e-12 && Math.abs(lhs.im - rhs.im) < 1e-12);
  });
});

/** (K ⊗ I) built the slow way: the acted-on subsystems first, full Kronecker products, then permuted back. */
function slowApply(ch: Channel, rho: CMatrix, dims: number[], on: number[]): { matrix: CMatrix; dims: number[] } {
  const rest = dims.map((_, k) => k).filter((k) => !on.includes(k));
  const perm = [...on, ...rest];
  const front = reorderSubsystems(rho, dims, perm);
  const R = rest.reduce((a, k) => a * dims[k], 1);
  let acc: CMatrix | null = null;
  for (const K of ch.kraus) {
    const big = kron(K, identity(R));
    const t = mul(mul(big, front), adjoint(big));
    acc = acc ? add(acc, t) : t;
  }
  return { matrix: acc!, dims: [...ch.toDims, ...rest.map((k) => dims[k])] };
}

describe('applying a channel to chosen subsystems', () => {
  it('on subsystems [2, 0] of a three-party state, the result equals Σ (K ⊗ I) ρ (K ⊗ I)* built the slow way, outputs in place (common practice)', () => {
    const r = rng(7);
    const dims = [2, 3, 2];
    const rho = randomDensity(12, r);
    // A channel on C²⊗C² with two output factors [3, 2]: output k replaces subsystem on[k].
    const ch: Channel = { ...randomChannel(4, 6, 3, r), fromDims: [2, 2], toDims: [3, 2] };
    const out = applyChannel(ch, { matrix: rho, dims, labels: ['A', 'B', 'C'] }, [2, 0]);
    assert.deepEqual(out.dims, [2, 3, 3]);
    assert.deepEqual(out.labels, ['A', 'B', 'C']);
    const slow = slowApply(ch, rho, dims, [2, 0]); // layout [out0 (C'), out1 (A'), B]
    // Final layout [A', B, C'] = slow subsystems [1, 2, 0].
    assert.ok(close(out.matrix, reorderSubsystems(slow.matrix, slow.dims, [1, 2, 0]), 1e-12));
  });

  it('a channel with a different number of output factors puts its outputs where the first acted-on subsystem was', () => {
    const r = rng(8);
    const dims = [2, 2, 3];
    const rho = randomDensity(12, r);
    const ch: Channel = { ...randomChannel(6, 5, 2, r), fromDims: [6], toDims: [5] };
    const out = applyChannel(ch, { matrix: rho, dims }, [1, 2]);
    assert.deepEqual(out.dims, [2, 5]);
    const slow = slowApply(ch, rho, dims, [1, 2]); // [out, A]
    assert.ok(close(out.matrix, reorderSubsystems(slow.matrix, slow.dims, [1, 0]), 1e-12));
  });

  it('with no subsystems listed the channel acts on the whole state, giving Σ K ρ K*', () => {
    const r = rng(9);
    const ch = randomChannel(4, 3, 3, r);
    const rho = randomDensity(4, r);
    const out = applyChannel(ch, { matrix: rho, dims: [2, 2] });
    assert.deepEqual(out.dims, [3]);
    assert.ok(close(out.matrix, applyKraus(ch, rho), 1e-13));
  });

  it('a subsystem whose dimension does not match the channel input is refused', () => {
    const rho = { matrix: randomDensity(6, rng(10)), dims: [2, 3] };
    throwsCode(() => applyChannel(amplitudeDamping(0.5), rho, [1]), 'dimension-mismatch');
    throwsCode(() => applyChannel(amplitudeDamping(0.5), rho, [2]), 'invalid-argument');
  });

  it(`outputs agree with numpy einsum on a 2×3×2 state (numpy ${versions.numpy})`, () => {
    const r = rng(11);
    const rho = randomDensity(12, r);
    const ch = randomChannel(3, 2, 3, r);
    const ref = python(
      [
        'rho = M(data["rho"]).reshape(2, 3, 2, 2, 3, 2)',
        'out = 0',
        'for k in data["kraus"]:',
        '    K = M(k)',
        '    out = out + np.einsum("bi,xiyzjw,cj->xbyzcw", K, rho, K.conj())',
        'result = W(out.reshape(8, 8))',
      ].join('\n'),
      { rho: toData(rho), kraus: ch.kraus.map(toData) },
    );
    const out = applyChannel(ch, { matrix: rho, dims: [2, 3, 2] }, [1]);
    assert.deepEqual(out.dims, [2, 2, 2]);
    assert.ok(close(out.matrix, fromData(ref), 1e-12));
  });
});

describe('composition, tensor products and complementary channels', () => {
  it('composition applies the inner channel first: (M ∘ N)(ρ) = M(N(ρ)), with at most d_in·d_out Kraus operators', () => {
    const r = rng(12);
    const N = randomChannel(2, 3, 3, r);
    const M = randomChannel(3, 2, 4, r);
    const rho = randomDensity(2, r);
    const c = composeChannels(M, N);
    assert.ok(c.kraus.length <= 4);
    assert.ok(close(applyKraus(c, rho), applyKraus(M, applyKraus(N, rho)), 1e-12));
    const seq = composeSequence([N, M]);
    assert.ok(close(applyKraus(seq, rho), applyKraus(c, rho), 1e-12));
    throwsCode(() => composeSequence([N, N]), 'dimension-mismatch');
  });

  it('the tensor product acts as N₁(ρ₁) ⊗ N₂(ρ₂) on product inputs (definition)', () => {
    const r = rng(13);
    const a = randomChannel(2, 2, 2, r);
    const b = randomChannel(3, 2, 2, r);
    const ra = randomDensity(2, r);
    const rb = randomDensity(3, r);
    const t = tensorChannels(a, b);
    assert.deepEqual(t.fromDims, [2, 3]);
    assert.ok(close(applyKraus(t, kron(ra, rb)), kron(applyKraus(a, ra), applyKraus(b, rb)), 1e-12));
  });

  it('for pure inputs the channel and its complement have outputs with equal non-zero spectra (Schmidt decomposition of V|ψ⟩; common practice)', () => {
    const r = rng(14);
    const ch = randomChannel(3, 2, 4, r);
    const comp = complementaryChannel(ch);
    assert.deepEqual(comp.toDims, [4]);
    for (let t = 0; t < 3; t++) {
      const psi = stateFromKet(randomKet(3, r)).matrix;
      const a = nonzeroSpectrum(applyKraus(ch, psi));
      const b = nonzeroSpectrum(applyKraus(comp, psi));
      assert.equal(a.length, b.length);
      a.forEach((x, k) => assert.ok(Math.abs(x - b[k]) < 1e-12));
    }
  });

  it('the complement of the complement acts like the original up to an isometry on outputs: equal output spectra on pure inputs (common practice)', () => {
    const r = rng(15);
    const ch = compressKraus(randomChannel(2, 3, 5, r));
    const cc = complementaryChannel(complementaryChannel(ch));
    assert.ok(channelDiagnostics(complementaryChannel(ch)).tracePreserving);
    for (let t = 0; t < 3; t++) {
      const psi = stateFromKet(randomKet(2, r)).matrix;
      const a = nonzeroSpectrum(applyKraus(ch, psi));
      const b = nonzeroSpectrum(applyKraus(cc, psi));
      assert.equal(a.length, b.length);
      a.forEach((x, k) => assert.ok(Math.abs(x - b[k]) < 1e-12));
    }
    // Mixed inputs too: the outputs agree exactly here, since cc has the same Kraus operators.
    const rho = randomDensity(2, r);
    assert.ok(close(applyKraus(cc, rho), applyKraus(ch, rho), 1e-12));
  });

  it('application to a Hermitian operator that is not a state is the linear extension (Σ K X K* with X Hermitian)', () => {
    const r = rng(16);
    const ch = randomChannel(2, 2, 2, r);
    const X = randomHermitian(4, r);
    const out = applyChannel(ch, { matrix: X, dims: [2, 2] }, [0]);
    assert.ok(close(out.matrix, slowApply(ch, X, [2, 2], [0]).matrix, 1e-12));
    assert.ok(Math.abs(traceOfProductRe(out.matrix, identity(4)) - traceOfProductRe(X, identity(4))) < 1e-12);
  });
});
