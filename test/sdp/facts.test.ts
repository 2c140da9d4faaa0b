// Published facts the SDP solver must reproduce. Each `it` names its source.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { fromRows, eigvalsh, type CMatrix } from '../../src/linalg/index.js';
import { solveSdp, partialTraceConstraints, type SdpProblem, type Constraint, type BlockValue } from '../../src/sdp/index.js';
import { rng, gaussian } from '../helpers/random.js';

const asMatrix = (v: BlockValue): CMatrix => v as CMatrix;

/** Smallest eigenvalue of a real symmetric 2×2 [[a, b], [b, d]] (closed form of the characteristic polynomial). */
function lambdaMin2(a: number, b: number, d: number): number {
  return 0.5 * (a + d) - Math.hypot(0.5 * (a - d), b);
}

/** Lovász theta of a graph on n vertices: max ⟨J, X⟩ s.t. tr X = 1, X_ij = 0 on edges, X ⪰ 0. */
function thetaProblem(n: number, edges: [number, number][]): SdpProblem {
  const J = Array.from({ length: n }, () => new Array<number>(n).fill(-1));
  const constraints: Constraint[] = [{ terms: [{ block: 0, entries: Array.from({ length: n }, (_, i) => [i, i, 1] as const) }], equals: 1 }];
  for (const [i, j] of edges) constraints.push({ terms: [{ block: 0, entries: [[i, j, 0.5]] }], equals: 0 });
  return { cones: [{ kind: 'symmetric', size: n }], objective: [{ block: 0, matrix: J }], constraints };
}

describe('SDP solver: published facts', () => {
  it('Lovász theta of the 5-cycle is √5 (Lovász 1979, IEEE Trans. Inf. Theory 25:1, Cor. 5)', () => {
    const edges: [number, number][] = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 0]];
    const a = solveSdp(thetaProblem(5, edges));
    assert.equal(a.status, 'optimal');
    assert.ok(Math.abs(-a.primalObjective - Math.sqrt(5)) < 1e-7, `θ(C5) = ${-a.primalObjective}, √5 = ${Math.sqrt(5)}`);
  });

  it('Lovász theta of the Petersen graph is 4 (Lovász 1979, value recalled from memory: θ = α = 4 for this vertex-transitive graph)', () => {
    const edges: [number, number][] = [];
    for (let i = 0; i < 5; i++) {
      edges.push([i, (i + 1) % 5]); // outer cycle
      edges.push([5 + i, 5 + ((i + 2) % 5)]); // inner pentagram
      edges.push([i, 5 + i]); // spokes
    }
    const a = solveSdp(thetaProblem(10, edges));
    assert.equal(a.status, 'optimal');
    assert.ok(Math.abs(-a.primalObjective - 4) < 1e-7, `θ(Petersen) = ${-a.primalObjective}`);
  });

  it('strong duality: on strictly feasible problems the duality gap closes (Vandenberghe & Boyd 1996, SIAM Review 38:49, Thm 3.1)', () => {
    const r = rng(7);
    for (let trial = 0; trial < 3; trial++) {
      const n = 4;
      // C = I + small symmetric perturbation (dual strictly feasible at y = 0), A_1 = I with b = 1
      // and random A_i with b_i = ⟨A_i, I/n⟩ (primal strictly feasible at I/n).
      const C: number[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
      for (let i = 0; i < n; i++) for (let j = i; j < n; j++) { const v = 0.2 * gaussian(r); C[i][j] += v; if (i !== j) C[j][i] += v; }
      const constraints: Constraint[] = [{ terms: [{ block: 0, entries: [[0, 0, 1], [1, 1, 1], [2, 2, 1], [3, 3, 1]] }], equals: 1 }];
      for (let k = 0; k < 3; k++) {
        const A: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
        let tr = 0;
        for (let i = 0; i < n; i++) for (let j = i; j < n; j++) { const v = gaussian(r); A[i][j] = v; A[j][i] = v; if (i === j) tr += v; }
        constraints.push({ terms: [{ block: 0, matrix: A }], equals: tr / n });
      }
      const a = solveSdp({ cones: [{ kind: 'symmetric', size: n }], objective: [{ block: 0, matrix: C }], constraints });
      assert.equal(a.status, 'optimal');
      assert.ok(Math.abs(a.gap) < 1e-7 * (1 + Math.abs(a.primalObjective)), `gap ${a.gap}`);
      assert.ok(a.primalResidual < 1e-8 && a.dualResidual < 1e-8);
    }
  });

  it('λ_max of a Hermitian H = h1 ⊗ 1 + 1 ⊗ h2 is max tr(H X) over density matrices X (Rayleigh–Ritz; Horn & Johnson, Thm 4.2.2); eigenvalues of 2×2 h are tr/2 ± |Bloch part|', () => {
    // h1 = 0.3·1 + 0.4 σx + 0.5 σy − 0.2 σz ; h2 = −0.1·1 + 0.7 σy + 0.1 σz
    const h1 = { c: 0.3, x: 0.4, y: 0.5, z: -0.2 };
    const h2 = { c: -0.1, x: 0, y: 0.7, z: 0.1 };
    const pauli = (p: typeof h1): CMatrix => fromRows([[p.c + p.z, p.x], [p.x, p.c - p.z]], [[0, -p.y], [p.y, 0]]);
    const a1 = pauli(h1);
    const a2 = pauli(h2);
    // H entries: H_(ab),(cd) = h1_ac δ_bd + δ_ac h2_bd, negated for minimization.
    const re: number[][] = Array.from({ length: 4 }, () => new Array<number>(4).fill(0));
    const im: number[][] = Array.from({ length: 4 }, () => new Array<number>(4).fill(0));
    for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) for (let c = 0; c < 2; c++) for (let d = 0; d < 2; d++) {
      const i = 2 * a + b;
      const j = 2 * c + d;
      if (b === d) { re[i][j] -= a1.re[2 * a + c]; im[i][j] -= a1.im[2 * a + c]; }
      if (a === c) { re[i][j] -= a2.re[2 * b + d]; im[i][j] -= a2.im[2 * b + d]; }
    }
    const ans = solveSdp({
      cones: [{ kind: 'hermitian', size: 4 }],
      objective: [{ block: 0, matrix: { re, im } }],
      constraints: [{ terms: [{ block: 0, entries: [[0, 0, 1], [1, 1, 1], [2, 2, 1], [3, 3, 1]] }], equals: 1 }],
    });
    const expected = h1.c + Math.hypot(h1.x, h1.y, h1.z) + h2.c + Math.hypot(h2.x, h2.y, h2.z);
    assert.equal(ans.status, 'optimal');
    assert.ok(Math.abs(-ans.primalObjective - expected) < 1e-7, `λmax = ${-ans.primalObjective}, closed form ${expected}`);
  });

  it('max ⟨Φ|X|Φ⟩ over states X_AB with tr_B X = ρ_A is (tr √ρ_A)²/d (Uhlmann; Nielsen & Chuang Thm 9.4 with monotonicity of fidelity, Thm 9.6)', () => {
    // ρ_A = [[0.7, 0.1 − 0.2i], [0.1 + 0.2i, 0.3]]: eigenvalues 1/2 ± √(0.2² + 0.1² + 0.2²) (Bloch form)
    const rhoA = fromRows([[0.7, 0.1], [0.1, 0.3]], [[0, -0.2], [0.2, 0]]);
    const phi = [[-0.5, 0, 0, -0.5], [0, 0, 0, 0], [0, 0, 0, 0], [-0.5, 0, 0, -0.5]]; // −|Φ⟩⟨Φ|, Φ = (|00⟩ + |11⟩)/√2
    const ans = solveSdp({
      cones: [{ kind: 'hermitian', size: 4 }],
      objective: [{ block: 0, matrix: phi }],
      constraints: partialTraceConstraints({ block: 0, dims: [2, 2], traceOut: [1], hermitian: true, equals: rhoA }),
    });
    const r = Math.hypot(0.2, 0.1, 0.2);
    const trSqrt = Math.sqrt(0.5 + r) + Math.sqrt(0.5 - r);
    assert.equal(ans.status, 'optimal');
    assert.ok(Math.abs(-ans.primalObjective - (trSqrt * trSqrt) / 2) < 1e-7, `${-ans.primalObjective} vs ${(trSqrt * trSqrt) / 2}`);
    // X is Hermitian and its marginal is ρ_A (the constraint, read back from the returned matrix).
    const X = asMatrix(ans.x[0]);
    assert.ok(Math.abs(X.im[0 * 4 + 2] + X.im[1 * 4 + 3] - -0.2) < 1e-7);
    assert.ok(Math.min(...eigvalsh(X)) > -1e-8);
  });

  it('an infeasible primal is reported with a Farkas dual ray: −Σ y_i A_i ⪰ 0 and b·y = 1 (Farkas lemma for cones; Ben-Tal & Nemirovski, Lectures on Modern Convex Optimization, Prop. 1.4.2)', () => {
    // X ⪰ 0 (2×2), t ≥ 0 with tr X = −1 and X_00 + t = 2: tr X of a PSD matrix cannot be negative.
    const A1 = [[0, 0, 1], [1, 1, 1]] as const;
    const A2 = [[0, 0, 1]] as const;
    const ans = solveSdp({
      cones: [{ kind: 'symmetric', size: 2 }, { kind: 'nonnegative', size: 1 }],
      objective: [{ block: 0, entries: [[0, 0, 1], [0, 1, 0.3]] }],
      constraints: [
        { terms: [{ block: 0, entries: A1 }], equals: -1 },
        { terms: [{ block: 0, entries: A2 }, { block: 1, vector: [1] }], equals: 2 },
      ],
    });
    assert.equal(ans.status, 'primal-infeasible');
    const cert = ans.certificate!;
    assert.equal(cert.kind, 'dual-ray');
    if (cert.kind !== 'dual-ray') return;
    const [y1, y2] = cert.y;
    assert.ok(Math.abs(-1 * y1 + 2 * y2 - 1) < 1e-9, 'b·y = 1');
    // −(y1 A1 + y2 A2) on the PSD block and on the orthant, checked from y alone:
    const s00 = -(y1 + y2);
    const s11 = -y1;
    assert.ok(lambdaMin2(s00, 0, s11) >= -1e-8, `−Σ y A on the PSD block has eigenvalue ${lambdaMin2(s00, 0, s11)}`);
    assert.ok(-y2 >= -1e-8, 'orthant part of −Σ y A is nonnegative');
  });

  it('an unbounded primal is reported as dual-infeasible with a primal ray X ⪰ 0, A(X) = 0, ⟨C, X⟩ = −1 (Ben-Tal & Nemirovski, Prop. 1.4.2, the dual alternative)', () => {
    // minimize −X_00 subject to X_11 = 1: X = diag(t, 1) ⪰ 0 for every t.
    const ans = solveSdp({
      cones: [{ kind: 'symmetric', size: 2 }],
      objective: [{ block: 0, entries: [[0, 0, -1]] }],
      constraints: [{ terms: [{ block: 0, entries: [[1, 1, 1]] }], equals: 1 }],
    });
    assert.equal(ans.status, 'dual-infeasible');
    const cert = ans.certificate!;
    assert.equal(cert.kind, 'primal-ray');
    if (cert.kind !== 'primal-ray') return;
    const X = asMatrix(cert.x[0]);
    assert.ok(Math.abs(-X.re[0] - -1) < 1e-9, '⟨C, X⟩ = −1');
    assert.ok(Math.abs(X.re[3]) < 1e-7, 'A(X) = X_11 = 0');
    assert.ok(lambdaMin2(X.re[0], X.re[1], X.re[3]) >= -1e-9, 'X ⪰ 0');
  });

  it('5,000 blocks of size 2 with a coupling row: Σ_k min tr(C_k X_k) over density matrices is Σ_k λ_min(C_k) (Rayleigh–Ritz; Horn & Johnson Thm 4.2.2)', () => {
    const K = 5000;
    const r = rng(11);
    const cones: SdpProblem['cones'][number][] = [];
    const objective: SdpProblem['objective'][number][] = [];
    const constraints: Constraint[] = [];
    let expected = 0;
    for (let k = 0; k < K; k++) {
      const a = gaussian(r), b = gaussian(r), d = gaussian(r);
      cones.push({ kind: 'symmetric', size: 2 });
      objective.push({ block: k, entries: [[0, 0, a], [0, 1, b], [1, 1, d]] });
      constraints.push({ terms: [{ block: k, entries: [[0, 0, 1], [1, 1, 1]] }], equals: 1 });
      expected += lambdaMin2(a, b, d);
    }
    // Σ_k (X_k)_00 + t = K + 1 with slack t ≥ 0: never binding (each (X_k)_00 ≤ 1), couples all blocks.
    cones.push({ kind: 'nonnegative', size: 1 });
    const terms: Constraint['terms'][number][] = [{ block: K, vector: [1] }];
    for (let k = 0; k < K; k++) terms.push({ block: k, entries: [[0, 0, 1]] });
    constraints.push({ terms, equals: K + 1 });
    const ans = solveSdp({ cones, objective, constraints });
    assert.equal(ans.status, 'optimal');
    assert.ok(Math.abs(ans.primalObjective - expected) < 1e-6 * Math.abs(expected), `${ans.primalObjective} vs ${expected}`);
  });
});

describe('SDP solver: free variables and redundant rows (worked by hand; common practice, no published source)', () => {
  it('a free variable is unrestricted: min x0 + 2x1 − z s.t. x0 + x1 = 1, z − x0 = 1/2, x ≥ 0 has value −1/2 at x = (1, 0), z = 3/2', () => {
    const a = solveSdp({
      cones: [{ kind: 'nonnegative', size: 2 }, { kind: 'free', size: 1 }],
      objective: [{ block: 0, vector: [1, 2] }, { block: 1, vector: [-1] }],
      constraints: [
        { terms: [{ block: 0, vector: [1, 1] }], equals: 1 },
        { terms: [{ block: 1, vector: [1] }, { block: 0, entries: [[0, -1]] }], equals: 0.5 },
      ],
    });
    assert.equal(a.status, 'optimal');
    assert.ok(Math.abs(a.primalObjective + 0.5) < 1e-7);
    assert.ok(Math.abs((a.x[1] as number[])[0] - 1.5) < 1e-6);
  });

  it('a duplicated (linearly dependent) constraint leaves the optimum, the smallest eigenvalue of C, unchanged (Rayleigh–Ritz; Horn & Johnson Thm 4.2.2)', () => {
    const C = [[2, 1], [1, 2]]; // eigenvalues 1 and 3
    const tr = [[0, 0, 1], [1, 1, 1]] as const;
    const a = solveSdp({
      cones: [{ kind: 'symmetric', size: 2 }],
      objective: [{ block: 0, matrix: C }],
      constraints: [{ terms: [{ block: 0, entries: tr }], equals: 1 }, { terms: [{ block: 0, entries: [[0, 0, 2], [1, 1, 2]] }], equals: 2 }],
    });
    assert.equal(a.status, 'optimal');
    assert.ok(Math.abs(a.primalObjective - 1) < 1e-7);
    assert.ok(a.dependentConstraints >= 1, 'the dependent row is reported');
  });
});

describe('SDP solver: progress and cancellation (common practice, no published source)', () => {
  it('reports every iteration and stops with status cancelled and the last iterate when asked', () => {
    const edges: [number, number][] = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 0]];
    const seen: number[] = [];
    const full = solveSdp(thetaProblem(5, edges), { onIteration: (i) => seen.push(i.iteration) });
    assert.deepEqual(seen, Array.from({ length: full.iterations }, (_, k) => k + 1));
    let calls = 0;
    const stopped = solveSdp(thetaProblem(5, edges), { shouldStop: () => ++calls > 3 });
    assert.equal(stopped.status, 'cancelled');
    assert.equal(stopped.iterations, 3);
    assert.equal(stopped.x.length, 1);
    const ctl = new AbortController();
    ctl.abort();
    assert.equal(solveSdp(thetaProblem(5, edges), { signal: ctl.signal }).status, 'cancelled');
  });

  it('runs are deterministic: the same problem gives bit-identical answers', () => {
    const p = thetaProblem(5, [[0, 1], [1, 2], [2, 3], [3, 4], [4, 0]]);
    assert.equal(solveSdp(p).primalObjective, solveSdp(p).primalObjective);
  });
});
