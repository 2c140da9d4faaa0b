// Facts about D(ρ‖E(ρ)), the relative entropy to a conditional expectation. Sources in each it(...).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, diagonal, toRows, fromRows, frobeniusNorm, sub, eigh, mul, adjoint } from '../../src/linalg/index.js';
import {
  divergenceToExpectation, divergenceToChannelExpectation, divergenceToBlockExpectation, blockConditionalExpectation,
} from '../../src/quantities/expectation.js';
import { conditionalExpectation, pinchingInBasis, depolarizing } from '../../src/quantum/presets.js';
import { rng, randomDensity, randomHermitian } from '../helpers/random.js';
import { runPythonCode as python } from '../helpers/python.js';

const READ = [
  'import json, sys, numpy as np, scipy.linalg as sl',
  'def M(d): return np.array(d["re"]) + 1j * np.array(d["im"])',
  'def H(m):',
  '    w = np.linalg.eigvalsh(m); w = w[w > 1e-14]',
  '    return float(-np.sum(w * np.log2(w)))',
  'data = json.load(sys.stdin)',
].join('\n');

describe('relative entropy to a conditional expectation', () => {
  it('for the pinching in the computational basis equals H(diag ρ) − H(ρ), the relative entropy of coherence (Baumgratz, Cramer & Plenio, PRL 113, 140401 (2014)), entropies from numpy 2.4.6', () => {
    const r = rng(61);
    const states = [[2, 2], [3, 1], [4, 4], [6, 3]].map(([n, k]) => randomDensity(n, r, k));
    const expected: number[] = python(
      READ + '\nout = []\nfor a in data:\n    R = M(a)\n    out.append(H(np.diag(np.diag(R))) - H(R))\nprint(json.dumps(out))',
      states.map(toRows),
    );
    states.forEach((rho, k) => {
      const d = divergenceToBlockExpectation(rho, Array(rho.rows).fill(1));
      assert.ok(Math.abs(d.value - expected[k]) < 1e-10, `state ${k}: ${d.value} vs ${expected[k]}`);
      const viaChannel = divergenceToChannelExpectation(rho, pinchingInBasis(rho.rows));
      assert.ok(Math.abs(viaChannel.value - d.value) < 1e-12);
    });
  });

  it('equals Tr ρ(log ρ − log E(ρ)) computed with scipy.linalg.logm (scipy 1.17.1) for a block algebra with multiplicities, and equals the entropy gap H(E(ρ)) − H(ρ) (Petz, Quantum Information Theory and Quantum Statistics, 2008)', () => {
    const r = rng(62);
    const blocks = [2, 1, 1];
    const mult = [1, 2, 3];
    const rho = randomDensity(7, r);
    const d = divergenceToBlockExpectation(rho, blocks, mult);
    const [expected]: number[] = python(
      READ +
        '\nout = []\nfor a, b in data:\n    R = M(a); E = M(b)\n' +
        '    out.append(float(np.real(np.trace(R @ (sl.logm(R) - sl.logm(E)))) / np.log(2)))\nprint(json.dumps(out))',
      [[toRows(rho), toRows(d.expectation)]],
    );
    assert.ok(Math.abs(d.value - expected) < 1e-9, `${d.value} vs scipy ${expected}`);
    assert.ok(Math.abs(d.value - d.entropyGap) < 1e-12);
    assert.ok((d.idempotenceDefect ?? 1) < 1e-14);
  });

  it('the block form agrees with the Kraus form of the same conditional expectation in src/quantum/presets.ts, also in a rotated basis (common practice, no published source)', () => {
    const r = rng(63);
    const rho = randomDensity(5, r, 3);
    const blocks = [1, 2];
    const mult = [3, 1];
    const channel = conditionalExpectation(blocks, mult);
    const a = divergenceToBlockExpectation(rho, blocks, mult);
    const b = divergenceToChannelExpectation(rho, channel);
    assert.ok(frobeniusNorm(sub(a.expectation, b.expectation)) < 1e-14);
    assert.ok(Math.abs(a.value - b.value) < 1e-12);
    const U = eigh(randomHermitian(5, r)).vectors!;
    const rotated = divergenceToChannelExpectation(rho, conditionalExpectation(blocks, mult, U));
    const back = divergenceToBlockExpectation(mul(mul(adjoint(U), rho), U), blocks, mult);
    assert.ok(Math.abs(rotated.value - back.value) < 1e-11);
    assert.ok(Math.abs(rotated.value - rotated.entropyGap) < 1e-11);
  });

  it('vanishes exactly when ρ lies in the algebra, E(ρ) = ρ (Umegaki relative entropy is zero only for equal states; Petz 2008)', () => {
    const rho = diagonal([0.5, 0.3, 0.2]);
    const d = divergenceToBlockExpectation(rho, [1, 1, 1]);
    assert.ok(Math.abs(d.value) < 1e-15);
  });

  it('for a channel that is not a conditional expectation (depolarizing) differs from the entropy gap and is not idempotent (common practice, no published source)', () => {
    const r = rng(64);
    const rho = randomDensity(3, r);
    const d = divergenceToChannelExpectation(rho, depolarizing(3, 0.4));
    assert.ok(Math.abs(d.value - d.entropyGap) > 1e-3);
    assert.ok((d.idempotenceDefect ?? 0) > 1e-3);
  });

  it('is Infinity, with a reason, when ρ has weight outside the support of the given E(ρ) (Umegaki support condition)', () => {
    const rho = fromRows([[0.5, 0.5], [0.5, 0.5]]);
    const d = divergenceToExpectation(rho, fromRows([[1, 0], [0, 0]]));
    assert.equal(d.value, Infinity);
    assert.match(d.reason ?? '', /supp/);
  });

  it('the block conditional expectation with multiplicity replaces each block by its partial trace over the multiplicity factor tensored with I/m (structure theorem; Petz 2008)', () => {
    const x: CMatrix = fromRows([
      [0.4, 0.1, 0.0],
      [0.1, 0.2, 0.05],
      [0.0, 0.05, 0.4],
    ]);
    const e = blockConditionalExpectation(x, [1, 1], [1, 2]);
    // Block 0 (1x1) keeps 0.4; block 1 is C^1 ⊗ C^2 with trace 0.6, so it becomes 0.6 · I/2.
    const expected = fromRows([[0.4, 0, 0], [0, 0.3, 0], [0, 0, 0.3]]);
    assert.ok(frobeniusNorm(sub(e, expected)) < 1e-15);
  });
});
