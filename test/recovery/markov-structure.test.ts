// The Hayden–Jozsa–Petz–Winter structure of quantum Markov chains through the markov-structure op:
// states built from an explicit block structure on B with a random unitary on B give back the weights
// and factor dimensions, a unitary that numpy confirms block-diagonalizes the state into q ρ_{A b^L} ⊗
// ρ_{b^R C}, exact Petz recovery and fidelity of recovery 1; non-Markov states get an upper bound by a
// Markov state.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, kron, toRows } from '../../src/linalg/index.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, rng } from '../helpers/random.js';
import { python, numpyVersions } from '../quantum/numpy-reference.js';
import { markovChain } from './fixtures.js';

const versions = numpyVersions();

function ask(req: Record<string, unknown>): Record<string, any> {
  const a = handle(req) as Record<string, any>;
  assert.equal(a.ok, true, JSON.stringify(a.error));
  return a;
}
const wire = (m: CMatrix) => toRows(m);
const asComplex = (x: any) => (Array.isArray(x) ? { re: x, im: x.map((row: number[]) => row.map(() => 0)) } : x);

describe('markov-structure: H_B ≅ ⊕_j H_{b_j^L} ⊗ H_{b_j^R}, ρ_ABC = ⊕_j q_j ρ_{A b_j^L} ⊗ ρ_{b_j^R C} (Hayden, Jozsa, Petz & Winter 2004, Thm 6)', () => {
  const cases: [number, number, [number, number][]][] = [
    [2, 2, [[1, 2], [2, 1], [1, 1]]],
    [2, 2, [[2, 2], [1, 2]]],
    [3, 2, [[1, 3], [2, 1]]],
  ];
  for (const [dA, dC, blocks] of cases) {
    it(`recovers the weights and factor dimensions of blocks ${JSON.stringify(blocks)} (d_A = ${dA}, d_C = ${dC}) hidden by a random unitary on B, with a unitary numpy ${versions.numpy} confirms`, () => {
      const r = rng(500 + blocks.length * 10 + dA);
      const m = markovChain(dA, dC, blocks, r);
      const dims = [dA, m.dB, dC];
      const a = ask({ op: 'markov-structure', rho: { matrix: wire(m.rho), dims }, a: [0], b: [1], c: [2] });
      assert.equal(a.markov, true, a.statement);
      assert.ok(a.value <= 1e-9, `reconstruction error ${a.value}`);
      assert.ok(a.unitaryDefect <= 1e-9);
      assert.ok(Math.abs(a.conditionalMutualInformation) <= 1e-9, 'I(A;C|B) = 0 for the construction');
      const found = a.blocks.map((b: any) => [b.left, b.right, b.weight]).sort((x: number[], y: number[]) => x[2] - y[2]);
      const built = blocks.map(([l, rr], j) => [l, rr, m.weights[j]]).sort((x, y) => x[2] - y[2]);
      assert.equal(found.length, built.length);
      found.forEach((f: number[], k: number) => {
        assert.deepEqual(f.slice(0, 2), built[k].slice(0, 2), `block ${k}: factor dimensions`);
        assert.ok(Math.abs(f[2] - built[k][2]) <= 1e-10, `block ${k}: weight ${f[2]} vs ${built[k][2]}`);
      });
      // numpy: (1 ⊗ U* ⊗ 1) ρ (1 ⊗ U ⊗ 1) is block diagonal over the blocks, each block q ρ_{A b^L} ⊗ ρ_{b^R C}
      // with the factors from numpy's own partial traces (einsum).
      const ref = python(
        [
          'rho = M(data["rho"]); U = M(data["U"]); dA, dB, dC = data["dims"]',
          'X = np.kron(np.kron(np.eye(dA), U), np.eye(dC))',
          'T = (X.conj().T @ rho @ X).reshape(dA, dB, dC, dA, dB, dC)',
          'off = 0; worst_off = 0.0; worst_block = 0.0; weights = []',
          'spans = []',
          'for n, m in data["blocks"]:',
          '    spans.append((off, n, m)); off += n * m',
          'for (o1, n1, m1) in spans:',
          '    for (o2, n2, m2) in spans:',
          '        blk = T[:, o1:o1 + n1 * m1, :, :, o2:o2 + n2 * m2, :]',
          '        if o1 != o2:',
          '            worst_off = max(worst_off, float(np.abs(blk).max()))',
          '            continue',
          '        B = blk.reshape(dA, n1, m1, dC, dA, n1, m1, dC)',
          '        q = float(np.einsum("abcdabcd->", B).real)',
          '        L = np.einsum("abcdefcd->abef", B).reshape(dA * n1, dA * n1) / q',
          '        R = np.einsum("abcdabgh->cdgh", B).reshape(m1 * dC, m1 * dC) / q',
          '        full = B.reshape(dA * n1 * m1 * dC, dA * n1 * m1 * dC)',
          '        worst_block = max(worst_block, float(np.abs(full - q * np.kron(L, R)).max()))',
          '        weights.append(q)',
          'result = {"off": worst_off, "block": worst_block, "weights": weights}',
        ].join('\n'),
        { rho: wire(m.rho), U: asComplex(a.unitary), dims, blocks: a.blocks.map((b: any) => [b.left, b.right]) },
      );
      assert.ok(ref.off <= 1e-10, `off-diagonal blocks ${ref.off}`);
      assert.ok(ref.block <= 1e-10, `diagonal blocks differ from q ρ_L ⊗ ρ_R by ${ref.block}`);
      ref.weights.forEach((q: number, k: number) => assert.ok(Math.abs(q - a.blocks[k].weight) <= 1e-12));
    });
  }

  it('on a Markov chain the Petz map recovers exactly and the fidelity of recovery is 1 (Hayden, Jozsa, Petz & Winter 2004, Thm 6; Fawzi & Renner 2015)', () => {
    const m = markovChain(2, 2, [[1, 2], [2, 1]], rng(520));
    const req = { rho: { matrix: wire(m.rho), dims: [2, m.dB, 2] }, a: [0], b: [1], c: [2] };
    assert.equal(ask({ op: 'markov-structure', ...req }).markov, true);
    assert.ok(Math.abs(ask({ op: 'petz-recovery', ...req }).value - 1) <= 1e-9);
    assert.ok(Math.abs(ask({ op: 'fidelity-of-recovery', ...req }).value - 1) <= 1e-6);
  });

  it('finds one block with trivial b^L for ρ_A ⊗ ρ_BC and one with trivial b^R for ρ_AB ⊗ ρ_C (a product is a Markov chain; common practice, no published source)', () => {
    const r = rng(521);
    const rho = kron(randomDensity(2, r), randomDensity(6, r));
    const a = ask({ op: 'markov-structure', rho: { matrix: wire(rho), dims: [2, 3, 2] }, a: [0], b: [1], c: [2] });
    assert.equal(a.markov, true);
    assert.deepEqual(a.blocks.map((b: any) => [b.left, b.right]), [[1, 3]]);
    const other = kron(randomDensity(6, r), randomDensity(2, r));
    const b = ask({ op: 'markov-structure', rho: { matrix: wire(other), dims: [2, 3, 2] }, a: [0], b: [1], c: [2] });
    assert.equal(b.markov, true);
    assert.deepEqual(b.blocks.map((x: any) => [x.left, x.right]), [[3, 1]], 'ρ_AB ⊗ ρ_C: one block with trivial b^R');
  });

  it('for a generic (non-Markov) state gives a Markov state of the decomposed form at the reported trace distance, an upper bound (common practice, no published source)', () => {
    const r = rng(522);
    const rho = randomDensity(8, r);
    const dims = [2, 2, 2];
    const a = ask({ op: 'markov-structure', rho: { matrix: wire(rho), dims }, a: [0], b: [1], c: [2] });
    assert.equal(a.markov, false);
    assert.ok(a.conditionalMutualInformation > 1e-3);
    const rec = a.reconstructed.matrix;
    const cmi = ask({ op: 'conditional-mutual-information', rho: { matrix: rec, dims }, a: [0], b: [1], c: [2] });
    assert.ok(Math.abs(cmi.value) <= 1e-9, `the rebuilt state is Markov: I(A;C|B) = ${cmi.value}`);
    const td = ask({ op: 'trace-distance', rho: wire(rho), sigma: rec });
    assert.ok(Math.abs(td.value - a.value) <= 1e-12 && a.value > 1e-3);
    assert.match(a.statement, /upper bound/);
    // The C-side construction is ρ_A ⊗ ρ_BC for a generic state; the bound is the nearer of the two.
    const rhoA = ask({ op: 'partial-trace', matrix: wire(rho), dims, keep: [0] }).value;
    const rhoBC = ask({ op: 'partial-trace', matrix: wire(rho), dims, keep: [1, 2] }).value;
    const toM = (x: any) => (Array.isArray(x) ? { rows: x.length, cols: x.length, re: Float64Array.from(x.flat()), im: new Float64Array(x.length ** 2) } : { rows: x.re.length, cols: x.re.length, re: Float64Array.from(x.re.flat()), im: Float64Array.from(x.im.flat()) });
    const product = wire(kron(toM(rhoA), toM(rhoBC)));
    const tdC = ask({ op: 'trace-distance', rho: wire(rho), sigma: product }).value;
    assert.ok(Math.abs(a.reconstructionErrorFromC - tdC) <= 1e-10, `${a.reconstructionErrorFromC} vs ½‖ρ − ρ_A ⊗ ρ_BC‖₁ = ${tdC}`);
    assert.ok(Math.abs(a.distanceUpperBound - Math.min(a.value, tdC)) <= 1e-10);
  });
});
