// The closed-form elimination of a fixed principal sub-block from the Schur complement (src/sdp/elimination.ts)
// against the plain dense Schur system (src/sdp/schur.ts) on the same system: block Gaussian elimination
// through the Schur complement of the fixed block gives the same solution (textbook linear algebra, e.g.
// Golub & Van Loan, Matrix Computations, §3.2 on block LU; recalled from memory), here with the block's part
// inverted by W₁₁⁻¹(·)W₁₁⁻¹ instead of a factorization.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { compile } from '../../src/sdp/compile.js';
import { EliminatedSchur, findFixedBlock, schurSystemFor } from '../../src/sdp/elimination.js';
import { SchurSystem } from '../../src/sdp/schur.js';
import { coordinateEntry, matrixCoordinates, type Constraint, type SdpProblem } from '../../src/sdp/index.js';
import { diagonalBlockConstraints } from '../../src/oneshot/fidelity-sdp.js';
import { gaussian, rng } from '../helpers/random.js';

/** [[Λ, X], [X*, S]] ⪰ 0 with Λ fixed (s×s), S = J coordinate by coordinate, Tr J + t = 1 (t free): Watrous's fidelity SDP's shape. */
function fixedBlockProblem(s: number, extraTouch: boolean): SdpProblem {
  const constraints: Constraint[] = diagonalBlockConstraints(0, 0, Array.from({ length: s }, (_, i) => (i + 1) / 10), 'fixed');
  for (const co of matrixCoordinates(s, true)) {
    constraints.push({
      terms: [
        { block: 0, entries: [coordinateEntry(s + co.i, s + co.j, co.part)] },
        { block: 1, entries: [coordinateEntry(co.i, co.j, co.part)].map(([p, q, re, im]) => [p, q, -(re ?? 0), -((im as number | undefined) ?? 0)]) as never },
      ],
      equals: 0,
    });
  }
  constraints.push({ terms: [{ block: 1, entries: Array.from({ length: s }, (_, i) => [i, i, 1] as [number, number, number]) }, { block: 2, vector: [1] }], equals: 1 });
  if (extraTouch) constraints.push({ terms: [{ block: 0, entries: [[0, s + 1, 1, 0.5]] }], equals: 0 });
  return {
    cones: [{ kind: 'hermitian', size: 2 * s }, { kind: 'hermitian', size: s }, { kind: 'free', size: 1 }],
    objective: [{ block: 0, entries: [[0, s, -1]] }],
    constraints,
  };
}

/** A random Hermitian positive definite h×h matrix G G* + 1 in the solver's complex layout (real parts, then imaginary). */
function randomPd(h: number, r: () => number): Float64Array {
  const gr = Array.from({ length: h * h }, () => gaussian(r));
  const gi = Array.from({ length: h * h }, () => gaussian(r));
  const w = new Float64Array(2 * h * h);
  for (let i = 0; i < h; i++) {
    for (let j = 0; j < h; j++) {
      let sr = i === j ? 1 : 0;
      let si = 0;
      for (let k = 0; k < h; k++) {
        // (G G*)_ij = Σ_k G_ik conj(G_jk)
        sr += gr[i * h + k] * gr[j * h + k] + gi[i * h + k] * gi[j * h + k];
        si += gi[i * h + k] * gr[j * h + k] - gr[i * h + k] * gi[j * h + k];
      }
      w[i * h + j] = sr;
      w[h * h + i * h + j] = si;
    }
  }
  return w;
}

describe('Schur complement with a fixed sub-block eliminated (src/sdp/elimination.ts)', () => {
  it('finds the fixed 5×5 block of [[Λ, X], [X*, S]] and solves the Schur system as the plain dense factorization does, to 1e-9 relative (block elimination)', () => {
    const r = rng(61);
    const s = 5;
    const cp = compile(fixedBlockProblem(s, false));
    const fb = findFixedBlock(cp);
    assert.ok(fb, 'no fixed block found');
    assert.deepEqual(Array.from(fb.fixed), [0, 1, 2, 3, 4]);
    assert.equal(fb.rows.length, s * s);
    const elim = schurSystemFor(cp);
    assert.ok(elim instanceof EliminatedSchur);
    const plain = new SchurSystem(cp);
    for (let trial = 0; trial < 3; trial++) {
      const W = [randomPd(2 * s, r), randomPd(s, r)];
      const d = new Float64Array(0);
      plain.assembleAndFactor(W, d);
      elim.assembleAndFactor(W, d);
      const rhs = Float64Array.from({ length: cp.m + cp.nF }, () => gaussian(r));
      const x1 = plain.solve(rhs, 2);
      const x2 = elim.solve(rhs, 2);
      let err = 0;
      let scale = 0;
      for (let i = 0; i < x1.length; i++) {
        err = Math.max(err, Math.abs(x1[i] - x2[i]));
        scale = Math.max(scale, Math.abs(x1[i]));
      }
      assert.ok(err <= 1e-9 * scale, `trial ${trial}: max difference ${err} at scale ${scale}`);
    }
  });

  it('leaves the plain Schur system in place when another constraint touches a fixed index (the closed form would not hold)', () => {
    const cp = compile(fixedBlockProblem(5, true));
    assert.equal(findFixedBlock(cp), null);
    assert.ok(schurSystemFor(cp) instanceof SchurSystem);
  });
});
