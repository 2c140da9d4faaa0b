// The SDP solver on degenerate but valid problems: no strictly feasible primal or dual point,
// rank-deficient data, duplicated and dependent constraints, a zero objective, data scaled by 1e±8,
// and the smooth max-relative entropy instance on the boundary of its feasibility, with the
// perturbations of the step length that once made it fail. Each `it` names where its expected
// answer comes from (the definition, a derivation given in the comment, a paper, or cvxopt live).
//
// Tolerances. On problems with a strictly feasible pair the certificate promises the value to the
// relative gap (1e-8) up to residuals. Without a strictly feasible point a residual ε of a face
// constraint allows a value error of order √ε (singularity degree one; J. F. Sturm, "Error bounds
// for linear matrix inequalities", SIAM J. Optim. 10 (2000) 1228, recalled from memory), so those
// checks use faceBound below, computed from the answer's own residuals.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { fileURLToPath } from 'node:url';
import { eigvalsh, type CMatrix } from '../../src/linalg/index.js';
import { solveSdp, type BlockValue, type Constraint, type SdpAnswer, type SdpProblem } from '../../src/sdp/index.js';
import { solveSdpWith } from '../../src/sdp/solver.js';
import { liveReference } from '../helpers/python.js';
import { rng, gaussian } from '../helpers/random.js';

const root = fileURLToPath(new URL('../..', import.meta.url));
const sym = (n: number) => ({ kind: 'symmetric' as const, size: n });
const herm = (n: number) => ({ kind: 'hermitian' as const, size: n });
const unitTrace = (n: number) => Array.from({ length: n }, (_, i) => [i, i, 1] as const);
const asMatrix = (v: BlockValue): CMatrix => v as CMatrix;
const why = (a: SdpAnswer) => `${a.status} ${a.message ?? ''} p=${a.primalObjective} d=${a.dualObjective} pr=${a.primalResidual} dr=${a.dualResidual} gap=${a.relativeGap}`;

/** |value error| allowed on a problem without interior: 4‖C‖·√(residual·(1 + ‖b‖)) + the gap tolerance (see the header). */
function faceBound(a: SdpAnswer, cNorm: number, bNorm: number, want: number): number {
  return 4 * cNorm * Math.sqrt(a.primalResidual * (1 + bNorm)) + 1e-8 * (1 + 2 * Math.abs(want));
}

function assertOptimalNear(a: SdpAnswer, want: number, tol: number, what: string): void {
  assert.equal(a.status, 'optimal', `${what}: ${why(a)}`);
  // The gap test of the solver: relative to the objective, or absolute (1e-13) at a zero objective.
  assert.ok(a.primalResidual <= 1e-8 && a.dualResidual <= 1e-8 && (a.relativeGap <= 1e-8 || Math.abs(a.gap) <= 1e-12), `${what}: ${why(a)}`);
  assert.ok(Math.abs(a.primalObjective - want) <= tol, `${what}: value ${a.primalObjective}, expected ${want}, tolerance ${tol}`);
}

/** min ⟨C, X⟩ over 2×2 X ⪰ 0 with unit diagonal: X = [[1, t], [t̄, 1]], |t| ≤ 1, so the value is C00 + C11 − 2|C01| (derived). */
const C2 = [[2, -0.5], [-0.5, 1]];
const unitDiagonal: Constraint[] = [
  { terms: [{ block: 0, entries: [[0, 0, 1]] }], equals: 1 },
  { terms: [{ block: 0, entries: [[1, 1, 1]] }], equals: 1 },
];
const unitDiagonalValue = 2 + 1 - 2 * 0.5;

describe('SDP solver: no strictly feasible primal point', () => {
  it('Tr X = 0 with X ⪰ 0 forces X = 0, so min ⟨C, X⟩ = 0 for any C, real and Hermitian (definition: a PSD matrix with zero trace is zero)', () => {
    const C = [[1, 2, 0], [2, -3, 1], [0, 1, 0.5]];
    for (const [cone, objective] of [
      [sym(3), { block: 0, matrix: C }],
      [herm(3), { block: 0, matrix: { re: C, im: [[0, 1, 0], [-1, 0, 0.3], [0, -0.3, 0]] } }],
    ] as const) {
      const a = solveSdp({ cones: [cone], objective: [objective], constraints: [{ terms: [{ block: 0, entries: unitTrace(3) }], equals: 0 }] });
      assertOptimalNear(a, 0, faceBound(a, 5, 0, 0), cone.kind);
      assert.ok(Math.max(...eigvalsh(asMatrix(a.x[0])).map(Math.abs)) <= 1e-7, 'X ≈ 0');
    }
  });

  it('a feasible set that is the single rank-one matrix v v* (unit diagonal and X01 fixed to a unit-modulus number) gives ⟨C, v v*⟩, real and Hermitian (definition)', () => {
    const real = solveSdp({ cones: [sym(2)], objective: [{ block: 0, matrix: C2 }], constraints: [...unitDiagonal, { terms: [{ block: 0, entries: [[0, 1, 0.5]] }], equals: 1 }] });
    assertOptimalNear(real, 2 + 1 - 1, faceBound(real, 2.3, 1.8, 2), 'real, v = (1, 1)');
    // X01 = e^{iθ}: Re X01 = cos θ, Im X01 = sin θ; Re tr(C X) = C00 + C11 + 2 Re(C01 X10) with X10 = e^{−iθ}.
    const th = 0.7;
    const c01 = { re: 0.3, im: -0.4 };
    const want = 3 + 2 * (c01.re * Math.cos(th) + c01.im * Math.sin(th));
    const a = solveSdp({
      cones: [herm(2)],
      objective: [{ block: 0, matrix: { re: [[2, c01.re], [c01.re, 1]], im: [[0, c01.im], [-c01.im, 0]] } }],
      constraints: [
        ...unitDiagonal,
        { terms: [{ block: 0, entries: [[0, 1, 0.5]] }], equals: Math.cos(th) },
        { terms: [{ block: 0, entries: [[0, 1, 0, 0.5]] }], equals: Math.sin(th) },
      ],
    });
    assertOptimalNear(a, want, faceBound(a, 2.4, 1.8, want), 'Hermitian, v = (1, e^{−iθ})');
  });

  it('X00 = 1 and X11 = 0 pin X to |0⟩⟨0| (a PSD matrix with a zero diagonal entry has a zero row), so min ⟨C, X⟩ = C00 (definition)', () => {
    const a = solveSdp({
      cones: [sym(2)],
      objective: [{ block: 0, matrix: [[3, 7], [7, -5]] }],
      constraints: [{ terms: [{ block: 0, entries: [[0, 0, 1]] }], equals: 1 }, { terms: [{ block: 0, entries: [[1, 1, 1]] }], equals: 0 }],
    });
    // The error here is of order √(residual), as the header explains: Re X01 may be √(X11) ≈ 5e-5 off.
    assertOptimalNear(a, 3, faceBound(a, 11.5, 1, 3), 'pinned');
  });
});

describe('SDP solver: no strictly feasible dual point, unbounded and inconsistent problems', () => {
  it('with C = diag(1, 0), X00 = 0.7 and 2 X01 = 0.4 the dual slack [[1 − y1, −y2], [−y2, 0]] is singular for every feasible y, and the value is 0.7 (derived: y2 = 0, y1 ≤ 1)', () => {
    const a = solveSdp({
      cones: [sym(2)],
      objective: [{ block: 0, matrix: [[1, 0], [0, 0]] }],
      constraints: [{ terms: [{ block: 0, entries: [[0, 0, 1]] }], equals: 0.7 }, { terms: [{ block: 0, entries: [[0, 1, 1]] }], equals: 0.4 }],
    });
    assertOptimalNear(a, 0.7, 1e-8 * (1 + 2 * 0.7) + 1e-8, 'dual without interior');
  });

  it('min 2 X01 s.t. X00 = 1 is unbounded below and answers dual-infeasible with a checkable primal ray X ⪰ 0, A(X) = 0, ⟨C, X⟩ = −1 (definition of the certificate)', () => {
    const a = solveSdp({ cones: [sym(2)], objective: [{ block: 0, entries: [[0, 1, 1]] }], constraints: [{ terms: [{ block: 0, entries: [[0, 0, 1]] }], equals: 1 }] });
    assert.equal(a.status, 'dual-infeasible', why(a));
    assert.ok(a.certificate && a.certificate.kind === 'primal-ray');
    const X = asMatrix(a.certificate.x[0]);
    assert.ok(Math.min(...eigvalsh(X)) >= -1e-8, 'X ⪰ 0');
    assert.ok(Math.abs(X.re[0]) <= 1e-8, `A(X) = X00 = ${X.re[0]}`);
    assert.ok(Math.abs(2 * X.re[1] + 1) <= 1e-8, `⟨C, X⟩ = ${2 * X.re[1]}`);
  });

  it('contradictory duplicates (X00 = 1 and X00 = 2) are not reported optimal: the answer is inaccurate or an iteration limit with a primal residual that shows the contradiction (honest outcome; no Farkas ray, see the note)', () => {
    // The Schur factorization drops the second row as dependent on the first (dependentConstraints),
    // which assumes it is consistent; the Farkas ray y = (−1, 1) lives exactly in the dropped
    // direction, so it is not found. What the solver must not do is claim an optimum.
    const a = solveSdp({
      cones: [sym(2)],
      objective: [{ block: 0, matrix: C2 }],
      constraints: [{ terms: [{ block: 0, entries: [[0, 0, 1]] }], equals: 1 }, { terms: [{ block: 0, entries: [[0, 0, 1]] }], equals: 2 }],
    });
    assert.ok(a.status === 'inaccurate' || a.status === 'iteration-limit' || a.status === 'primal-infeasible', why(a));
    if (a.status !== 'primal-infeasible') assert.ok(a.primalResidual >= 0.1, why(a));
    assert.ok(a.dependentConstraints >= 1);
  });
});

describe('SDP solver: rank-deficient data, zero objective', () => {
  it('max ⟨v vᵀ, X⟩ over density matrices is ‖v‖² (Rayleigh quotient: the largest eigenvalue of a rank-one matrix), and with C = diag(1, 1, 1, 0) it is 1 with a three-dimensional optimal face', () => {
    const v = [1, -2, 0.5, 0];
    const rankOne = solveSdp({ cones: [sym(4)], objective: [{ block: 0, matrix: v.map((a) => v.map((b) => -a * b)) }], constraints: [{ terms: [{ block: 0, entries: unitTrace(4) }], equals: 1 }] });
    assertOptimalNear(rankOne, -5.25, 1e-8 * (1 + 2 * 5.25) + 1e-8 * 5.25, 'rank one');
    const flat = solveSdp({ cones: [sym(4)], objective: [{ block: 0, matrix: [[-1, 0, 0, 0], [0, -1, 0, 0], [0, 0, -1, 0], [0, 0, 0, 0]] }], constraints: [{ terms: [{ block: 0, entries: unitTrace(4) }], equals: 1 }] });
    assertOptimalNear(flat, -1, 1e-8 * 3 + 2e-8, 'multiplicity three');
  });

  it('a zero objective has value 0 and the returned X is feasible (definition), with and without an objective term', () => {
    for (const objective of [[{ block: 0, matrix: [[0, 0, 0], [0, 0, 0], [0, 0, 0]] }], []]) {
      const a = solveSdp({ cones: [sym(3)], objective, constraints: [{ terms: [{ block: 0, entries: unitTrace(3) }], equals: 1 }] });
      assertOptimalNear(a, 0, 1e-8, 'zero objective');
      const X = asMatrix(a.x[0]);
      assert.ok(Math.abs(X.re[0] + X.re[4] + X.re[8] - 1) <= 1e-8 && Math.min(...eigvalsh(X)) >= -1e-8);
    }
  });

  it('rank-one constraint matrices a_i a_iᵀ and a rank-two objective G Gᵀ on a 5×5 block agree with cvxopt.solvers.sdp to 1e-6 relative (cvxopt from PyPI in .venv, live)', () => {
    const r = rng(2024);
    const n = 5;
    const G = Array.from({ length: n }, () => [gaussian(r), gaussian(r)]);
    const C = G.map((gi) => G.map((gj) => gi[0] * gj[0] + gi[1] * gj[1]));
    const constraints: Constraint[] = [];
    for (let k = 0; k < 4; k++) {
      const a = Array.from({ length: n }, () => gaussian(r));
      const A = a.map((x) => a.map((z) => x * z));
      constraints.push({ terms: [{ block: 0, matrix: A }], equals: a.reduce((s, x) => s + x * x, 0) / n }); // ⟨a aᵀ, I/n⟩: I/n is strictly feasible
    }
    constraints.push({ terms: [{ block: 0, entries: unitTrace(n) }], equals: 1 });
    const problem: SdpProblem = { cones: [sym(n)], objective: [{ block: 0, matrix: C }], constraints };
    const ref = liveReference<{ cvxopt: string; results: { optimal: number }[] }>([`${root}scripts/reference/cvxopt_sdp.py`, '--solve-stdin'], 'cvxopt (bash scripts/setup.sh)', { input: { problems: [problem] } });
    if (!ref) return;
    const a = solveSdp(problem);
    const want = ref.results[0].optimal;
    assertOptimalNear(a, want, 1e-6 * Math.max(1, Math.abs(want)), `cvxopt ${ref.cvxopt}`);
  });
});

describe('SDP solver: duplicated and linearly dependent constraints', () => {
  const C = C2;
  const dependent = (extra: Constraint[], free = false): SdpProblem => ({
    cones: free ? [sym(2), { kind: 'free', size: 1 }] : [sym(2)],
    objective: free ? [{ block: 0, matrix: C }, { block: 1, vector: [0.5] }] : [{ block: 0, matrix: C }],
    constraints: [...unitDiagonal, ...extra],
  });

  it('repeating X00 = 1, adding X00 + X11 = 2 and 2X00 − X11 = 1 leaves min ⟨C, X⟩ = C00 + C11 − 2|C01| and counts the dependent rows (derived above)', () => {
    for (const [extra, count] of [
      [[unitDiagonal[0]], 1],
      [[{ terms: [{ block: 0, entries: [[0, 0, 1], [1, 1, 1]] }], equals: 2 }], 1],
      [[unitDiagonal[1], unitDiagonal[0], { terms: [{ block: 0, entries: [[0, 0, 2], [1, 1, -1]] }], equals: 1 }], 3],
    ] as [Constraint[], number][]) {
      const a = solveSdp(dependent(extra));
      assertOptimalNear(a, unitDiagonalValue, 1e-8 * (1 + 2 * unitDiagonalValue) + 1e-7, `${extra.length} extra rows`);
      assert.equal(a.dependentConstraints, count);
    }
  });

  it('with a free variable f, a duplicated row X01 + f = 0 (bordered system factored by LU) gives min ⟨C, X⟩ + f/2 = 3 − 1.5·max X01 = 1.5 (derived: X01 ≤ 1)', () => {
    const row: Constraint = { terms: [{ block: 0, entries: [[0, 1, 0.5]] }, { block: 1, vector: [1] }], equals: 0 };
    const a = solveSdp(dependent([unitDiagonal[0], row, row], true));
    assertOptimalNear(a, 1.5, 1e-8 * 4 + 1e-7, 'free variable');
  });

  it('a Hermitian block with the diagonal fixed twice and through the trace gives C00 + C11 − 2|C01| for complex C01 (derived as above)', () => {
    const a = solveSdp({
      cones: [herm(2)],
      objective: [{ block: 0, matrix: { re: [[2, 0.3], [0.3, 1]], im: [[0, -0.4], [0.4, 0]] } }],
      constraints: [...unitDiagonal, unitDiagonal[1], { terms: [{ block: 0, entries: unitTrace(2) }], equals: 2 }],
    });
    assertOptimalNear(a, 3 - 2 * 0.5, 1e-8 * 5 + 1e-7, 'Hermitian');
    assert.equal(a.dependentConstraints, 2);
  });
});

describe('SDP solver: data scaled by 1e-8 and 1e8', () => {
  // Substitution (derived): C → sC scales the value by s; b → s b scales X and the value by s;
  // A → s A scales X and the value by 1/s; all three together scale the value by s.
  const scaled = (sc: number, sb: number, sa: number): SdpProblem => ({
    cones: [sym(2)],
    objective: [{ block: 0, matrix: C2.map((r) => r.map((x) => x * sc)) }],
    constraints: [0, 1].map((i) => ({ terms: [{ block: 0, entries: [[i, i, sa]] }], equals: sb })),
  });

  for (const s of [1e-8, 1e8]) {
    it(`scaling C, b, A or all of them by ${s} scales the value as the substitution says, to 1e-7 relative, status optimal`, () => {
      for (const [name, sc, sb, sa, factor] of [
        ['C', s, 1, 1, s],
        ['b', 1, s, 1, s],
        ['A', 1, 1, s, 1 / s],
        ['all', s, s, s, s],
      ] as [string, number, number, number, number][]) {
        const a = solveSdp(scaled(sc, sb, sa));
        const want = unitDiagonalValue * factor;
        assert.equal(a.status, 'optimal', `${name}: ${why(a)}`);
        assert.ok(Math.abs(a.primalObjective - want) <= 1e-7 * Math.abs(want), `${name} × ${s}: ${a.primalObjective} vs ${want}`);
        assert.ok(Math.abs(a.dualObjective - want) <= 1e-7 * Math.abs(want), `${name} × ${s}: dual ${a.dualObjective} vs ${want}`);
      }
    });
  }
});

describe('SDP solver: the smooth max-relative entropy instance on the boundary', () => {
  /**
   * The SDP that src/oneshot/smooth-max.ts builds for ρ = I/2, σ = |0⟩⟨0| (compressed to supp σ:
   * s = r = 1, D = (1/2), σ̂ = (1)), written out here through the public format: blocks Z (Hermitian
   * 2×2), ρ̂, S (Hermitian 1×1), [λ, t, u] ≥ 0; minimize λ s.t. Z00 = 1/2, Z11 − ρ̂ = 0, λ − ρ̂ − S = 0,
   * Re Z01 − t = √(1 − ε²), ρ̂ + u = 1. With ρ̂ = p: Z ⪰ 0 needs (Re Z01)² ≤ p/2, so p ≥ 2(1 − ε²)
   * and the value is λ = 2(1 − ε²) (derived; 0.72 at ε = 0.8). At ε = 1/√2 the only feasible p is 1:
   * the feasible set has no interior.
   */
  const boundary = (eps: number): SdpProblem => ({
    cones: [herm(2), herm(1), herm(1), { kind: 'nonnegative', size: 3 }],
    objective: [{ block: 3, vector: [1, 0, 0] }],
    constraints: [
      { terms: [{ block: 0, entries: [[0, 0, 1]] }], equals: 0.5 },
      { terms: [{ block: 0, entries: [[1, 1, 1]] }, { block: 1, entries: [[0, 0, -1]] }], equals: 0 },
      { terms: [{ block: 1, entries: [[0, 0, -1]] }, { block: 2, entries: [[0, 0, -1]] }, { block: 3, vector: [1, 0, 0] }], equals: 0 },
      { terms: [{ block: 0, entries: [[0, 1, 0.5]] }, { block: 3, vector: [0, -1, 0] }], equals: Math.sqrt(1 - eps * eps) },
      { terms: [{ block: 1, entries: [[0, 0, 1]] }, { block: 3, vector: [0, 0, 1] }], equals: 1 },
    ],
  });

  it('gives λ = 2(1 − ε²) = 0.72 at ε = 0.8 (derived above; the smooth-max test derives log 0.72)', () => {
    const a = solveSdp(boundary(0.8));
    assertOptimalNear(a, 0.72, 1e-8 * 3, 'ε = 0.8');
  });

  it('survives the perturbations that once broke it: early exit of the step-length bisection, a step length one ulp long, 3%, 50% and 10× too long (internal test knobs); same value', () => {
    for (const internals of [{ earlyStepExit: true }, { stepScale: 1 + Number.EPSILON }, { stepScale: 1.03 }, { stepScale: 1.5 }, { stepScale: 10 }]) {
      const a = solveSdpWith(boundary(0.8), {}, internals);
      assertOptimalNear(a, 0.72, 1e-8 * 3, JSON.stringify(internals));
    }
  });

  it('at ε = 1/√2 the feasible set is the single point ρ̂ = 1 and λ = 1 (derived above), within the √residual bound of a problem without interior', () => {
    const a = solveSdp(boundary(Math.SQRT1_2));
    assertOptimalNear(a, 1, faceBound(a, 1, 1.7, 1), 'ε = 1/√2');
  });
});
