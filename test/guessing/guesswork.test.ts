// Guesswork without and with quantum side information (src/guessing/guesswork.ts) and the `guesswork`
// op, checked against: the definition by brute force over all orders; the definition's special cases
// (uninformative and orthogonal side information); Helstrom's closed form for two states; and cvxopt
// (cvxopt from PyPI in .venv, version recorded in the reference file) through
// scripts/reference/cvxopt_guesswork.py. Every SDP instance is also checked for strong duality.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import {
  CMatrix, add, combine, eigh, fromRows, hermitianPart, identity, maxAbs, sub, traceOfProductRe, zeros,
} from '../../src/linalg/index.js';
import {
  allOrders, guessworkClassical, guessworkAllOrders, orderCost, type QuantumGuesswork,
} from '../../src/guessing/guesswork.js';
import { RhoError } from '../../src/errors.js';
import { handle } from '../../src/ops/handle.js';
import '../../src/ops/guesswork-ops.js';
import { rng, randomDensity } from '../helpers/random.js';
import { liveReference } from '../helpers/python.js';
import type { GuessworkReferenceFile } from '../helpers/reference-batch.js';

const root = fileURLToPath(new URL('../..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_guesswork.py`;

function randomDistribution(n: number, r: () => number): number[] {
  const w = Array.from({ length: n }, () => -Math.log(Math.max(r(), 1e-300))); // flat Dirichlet
  const s = w.reduce((a, b) => a + b, 0);
  return w.map((x) => x / s);
}

function relClose(actual: number, expected: number, tol: number, what: string): void {
  const err = Math.abs(actual - expected) / Math.max(1, Math.abs(expected));
  assert.ok(err <= tol, `${what}: got ${actual}, expected ${expected} (relative difference ${err.toExponential(2)})`);
}

/**
 * Strong duality and the returned strategy, on every SDP instance: the solver reports 'optimal' with
 * a small gap, the checkable bounds (a dual feasible point below, the returned strategy's own cost
 * above) enclose the value and nearly meet, and the strategy is a POVM whose cost, recomputed here from
 * the definition Σ_g Σ_x p_x Tr(M_g ρ_x) pos_g(x)^k, is the upper bound.
 */
function checkSolve(g: QuantumGuesswork, p: readonly number[], states: readonly CMatrix[], what: string): void {
  const c = g.certificate;
  assert.equal(c.status, 'optimal', `${what}: status ${c.status} ${c.message ?? ''}`);
  assert.ok(c.relativeGap <= 1e-7, `${what}: relative gap ${c.relativeGap}`);
  assert.ok(Math.abs(c.primalObjective - c.dualObjective) <= 1e-6 * (1 + Math.abs(c.primalObjective)), `${what}: primal ${c.primalObjective} vs dual ${c.dualObjective}`);
  assert.ok(c.lowerBound <= c.upperBound + 1e-12, `${what}: bounds ${c.lowerBound} > ${c.upperBound}`);
  assert.ok(c.upperBound - c.lowerBound <= 1e-6 * (1 + Math.abs(g.value)), `${what}: bounds ${c.lowerBound}, ${c.upperBound} apart`);
  assert.ok(g.value >= c.lowerBound - 1e-7 && g.value <= c.upperBound + 1e-7, `${what}: value ${g.value} outside [${c.lowerBound}, ${c.upperBound}]`);
  const d = states[0].rows;
  let sum = zeros(d, d);
  let cost = 0;
  let prob = 0;
  for (const s of g.strategy) {
    assert.ok(eigh(hermitianPart(s.element), { vectors: false }).values[0] >= -1e-12, `${what}: element of order ${s.order} not PSD`);
    sum = add(sum, s.element);
    s.order.forEach((x, i) => {
      cost += p[x] * Math.pow(i + 1, g.moment) * traceOfProductRe(s.element, states[x]);
    });
    prob += s.probability;
  }
  assert.ok(maxAbs(sub(sum, identity(d))) <= 1e-9, `${what}: the strategy's elements do not sum to the identity`);
  relClose(prob, 1, 1e-9, `${what}: order probabilities`);
  relClose(cost, c.upperBound, 1e-9, `${what}: cost of the returned strategy`);
}

describe('guesswork without side information', () => {
  it('guessing by decreasing probability attains the minimum over all orders of Σ_x p_x pos(x)^k (Massey 1994; Arikan 1996; brute force over orders: common practice)', () => {
    const r = rng(101);
    for (const n of [1, 2, 3, 4, 5, 6]) {
      for (const k of [1, 2, 0.5, 3.7]) {
        const p = randomDistribution(n, r);
        const g = guessworkClassical(p, k);
        const brute = Math.min(...allOrders(p.map((_, i) => i)).map((o) => orderCost(o, p, k)));
        relClose(g.value, brute, 1e-14, `n=${n}, k=${k}`);
        relClose(orderCost(g.order, p, k), g.value, 1e-15, `n=${n}, k=${k}: cost of the returned order`);
      }
    }
  });

  it('a uniform distribution on n symbols has guesswork (n+1)/2 for the first moment (Massey 1994, uniform case)', () => {
    for (const n of [1, 2, 5, 10]) {
      const g = guessworkClassical(Array(n).fill(1 / n), 1);
      relClose(g.value, (n + 1) / 2, 1e-14, `n=${n}`);
      assert.equal(g.ties, n > 1);
    }
  });

  it('refuses probabilities that are negative or do not sum to 1, and a moment that is not positive', () => {
    assert.throws(() => guessworkClassical([0.5, 0.6]), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument');
    assert.throws(() => guessworkClassical([1.2, -0.2]), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument');
    assert.throws(() => guessworkClassical([0.5, 0.5], 0), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument');
  });
});

describe('guesswork with quantum side information by the plain SDP over all orders (the cross-check of the column generation)', () => {
  it('side information in one state for every symbol is useless: the value equals the guesswork without side information (definition)', () => {
    const r = rng(202);
    for (const [n, d, k] of [[3, 2, 1], [4, 2, 2], [3, 3, 0.5]] as const) {
      const p = randomDistribution(n, r);
      const rho = randomDensity(d, r);
      const states = Array(n).fill(rho);
      const g = guessworkAllOrders(p, states, { moment: k });
      checkSolve(g, p, states, `n=${n}, d=${d}, k=${k}`);
      relClose(g.value, guessworkClassical(p, k).value, 1e-7, `n=${n}, d=${d}, k=${k}`);
    }
  });

  it('orthogonal states reveal X: the first guess is always right and the guesswork is 1 for every moment (definition)', () => {
    const r = rng(303);
    const basis = (i: number, d: number): CMatrix => {
      const m = zeros(d, d);
      m.re[i * d + i] = 1;
      return m;
    };
    // Three pure basis states in d = 3, and two mixed states on orthogonal 2-dimensional supports in d = 4.
    const cases: { p: number[]; states: CMatrix[] }[] = [
      { p: randomDistribution(3, r), states: [0, 1, 2].map((i) => basis(i, 3)) },
      {
        p: randomDistribution(2, r),
        states: [combine([0.3, 0.7], [basis(0, 4), basis(1, 4)]), combine([0.5, 0.5], [basis(2, 4), basis(3, 4)])],
      },
    ];
    for (const { p, states } of cases) {
      for (const k of [1, 2]) {
        const g = guessworkAllOrders(p, states, { moment: k });
        checkSolve(g, p, states, `|X|=${p.length}, k=${k}`);
        relClose(g.value, 1, 1e-7, `|X|=${p.length}, k=${k}`);
      }
    }
  });

  it('for two symbols G_k = 1 + (2^k − 1)(1 − p_guess) with Helstrom p_guess = ½(1 + ‖p₀ρ₀ − p₁ρ₁‖₁) (Helstrom 1976, Quantum Detection and Estimation Theory, ch. IV)', () => {
    // Derivation: with two symbols the only orders are (0,1) and (1,0), and the second guess is
    // always right. Writing M_(0,1) = E_0 and M_(1,0) = E_1 (a two-outcome POVM "first guess is x"),
    //   G_k = Σ_x p_x [1·Tr E_x ρ_x + 2^k·Tr E_{1−x} ρ_x] = 1·P_first + 2^k (1 − P_first)
    //       = 1 + (2^k − 1)(1 − P_first),  P_first = Σ_x p_x Tr E_x ρ_x,
    // which is decreasing in P_first, so the optimum is Helstrom's maximal success probability.
    // The trace norm of the 2×2 Hermitian A = p₀ρ₀ − p₁ρ₁ is computed from its eigenvalues in closed
    // form, tr/2 ± √((a₀₀ − a₁₁)²/4 + |a₀₁|²), independent of the project's eigensolver.
    const r = rng(404);
    for (let t = 0; t < 4; t++) {
      const p = randomDistribution(2, r);
      const states = [randomDensity(2, r, 1 + (t % 2)), randomDensity(2, r)];
      const a = combine([p[0], -p[1]], states);
      const half = (a.re[0] + a.re[3]) / 2;
      const rad = Math.sqrt(((a.re[0] - a.re[3]) / 2) ** 2 + a.re[1] ** 2 + a.im[1] ** 2);
      const pGuess = 0.5 * (1 + Math.abs(half + rad) + Math.abs(half - rad));
      for (const k of [1, 2.5]) {
        const g = guessworkAllOrders(p, states, { moment: k });
        checkSolve(g, p, states, `instance ${t}, k=${k}`);
        relClose(g.value, 1 + (2 ** k - 1) * (1 - pGuess), 1e-7, `instance ${t}, k=${k}`);
      }
    }
  });

  it('side information never hurts: G_k(X|B) ≤ G_k(X), a measurement-free strategy attains the right-hand side (Hanson, Katariya, Leditzky & Wilde 2022, recalled from memory)', () => {
    const r = rng(505);
    for (let t = 0; t < 3; t++) {
      const p = randomDistribution(3, r);
      const states = [0, 1, 2].map(() => randomDensity(2, r));
      const g = guessworkAllOrders(p, states, { moment: 1 });
      checkSolve(g, p, states, `instance ${t}`);
      // The dual lower bound is a value no strategy beats; the headline value carries the solver's residuals.
      assert.ok(g.certificate.lowerBound <= g.withoutSideInformation + 1e-12, `instance ${t}: lower bound ${g.certificate.lowerBound} > ${g.withoutSideInformation}`);
      assert.ok(g.value <= g.withoutSideInformation + 1e-8, `instance ${t}: ${g.value} > ${g.withoutSideInformation}`);
    }
  });

  it('symbols of probability zero are guessed last and do not change the value (definition: moving them to the end shortens every other position)', () => {
    const r = rng(606);
    const p = randomDistribution(3, r);
    const states = [0, 1, 2].map(() => randomDensity(2, r));
    const extra = randomDensity(2, r);
    const base = guessworkAllOrders(p, states);
    // Seven symbols, four of probability zero: only 3! orders are searched.
    const p7 = [0, p[0], 0, p[1], 0, p[2], 0];
    const s7 = [extra, states[0], extra, states[1], extra, states[2], extra];
    const g = guessworkAllOrders(p7, s7);
    checkSolve(g, p7, s7, 'seven symbols');
    assert.equal(g.ordersSearched, 6);
    assert.deepEqual(g.zeroProbabilitySymbols, [0, 2, 4, 6]);
    for (const s of g.strategy) assert.deepEqual(s.order.slice(3), [0, 2, 4, 6]);
    relClose(g.value, base.value, 1e-7, 'with and without the zero-probability symbols');
  });

  it('refuses more than six symbols of nonzero probability (too-large), states of different sizes, non-density matrices, and a count mismatch', () => {
    const code = (c: string) => (e: unknown) => e instanceof RhoError && e.code === c;
    const q = fromRows([[1]]);
    assert.throws(() => guessworkAllOrders(Array(7).fill(1 / 7), Array(7).fill(q)), code('too-large'));
    const h = fromRows([[0.5, 0], [0, 0.5]]);
    assert.throws(() => guessworkAllOrders([0.5, 0.5], [h, fromRows([[1, 0, 0], [0, 0, 0], [0, 0, 0]])]), code('dimension-mismatch'));
    assert.throws(() => guessworkAllOrders([0.5, 0.5], [h]), code('dimension-mismatch'));
    assert.throws(() => guessworkAllOrders([0.5, 0.5], [h, fromRows([[1.2, 0], [0, -0.2]])]), code('not-positive'));
    assert.throws(() => guessworkAllOrders([0.5, 0.5], [h, fromRows([[0.6, 0], [0, 0.6]])]), code('trace-not-one'));
    assert.throws(() => guessworkAllOrders([0.7, 0.5], [h, h]), code('invalid-argument'));
    assert.throws(() => guessworkAllOrders([0.5, 0.5], [h, h], { moment: -1 }), code('invalid-argument'));
  });
});

type ReferenceFile = GuessworkReferenceFile;

function compareWithCvxopt(ref: ReferenceFile, origin: string): void {
  assert.ok(ref.cases.length > 0, `${origin}: no cases`);
  for (const c of ref.cases) {
    const where = `${origin} ${c.name} (cvxopt ${ref.cvxopt}, numpy ${ref.numpy}, seed ${ref.seed})`;
    assert.equal(c.cvxoptStatus, 'optimal', `${where}: cvxopt status`);
    const states = c.states.map((s) => fromRows(s.re, s.im));
    const g = guessworkAllOrders(c.probabilities, states, { moment: c.moment });
    checkSolve(g, c.probabilities, states, where);
    relClose(g.value, c.value, 1e-6, `${where}: against cvxopt's optimal value`);
  }
}

describe('guesswork with quantum side information against cvxopt.solvers.sdp', () => {
  it('matches the committed random ensembles (|X| = 3, d = 2 and 3) to 1e-6 relative (cvxopt, version in the file)', () => {
    const ref = JSON.parse(readFileSync(`${root}test/reference/data/guesswork-cases.json`, 'utf8')) as ReferenceFile;
    compareWithCvxopt(ref, 'committed');
  });

  it('matches a fresh batch of random ensembles solved by cvxopt in this run (seed 11) to 1e-6 relative', () => {
    const ref = liveReference<ReferenceFile>([script, '--seed', '11', '--count', '4', '--out', '-'], 'cvxopt (bash scripts/setup.sh)');
    if (ref) compareWithCvxopt(ref, 'live');
  });
});

describe('the guesswork op', () => {
  it('without states answers the closed form Σ_i i^k p_(i) with the optimal order and method "closed-form" (Arikan 1996)', () => {
    const a = handle({ op: 'guesswork', probabilities: [0.2, 0.5, 0.3], moment: 2 }) as Record<string, any>;
    assert.equal(a.ok, true);
    assert.equal(a.method, 'closed-form');
    assert.deepEqual(a.order, [1, 2, 0]);
    relClose(a.value, 1 * 0.5 + 4 * 0.3 + 9 * 0.2, 1e-15, 'value');
    assert.equal(a.certificate, undefined);
  });

  it('with states answers the column-generation value with the strategy and the certificate; |0⟩ vs |+⟩ at equal priors gives 2 − ½(1 + 1/√2) (Helstrom 1976)', () => {
    const a = handle({ op: 'guesswork', probabilities: [0.5, 0.5], states: [[[1, 0], [0, 0]], { ket: ['1/sqrt(2)', '1/sqrt(2)'] }] }) as Record<string, any>;
    assert.equal(a.ok, true, JSON.stringify(a));
    assert.equal(a.method, 'column-generation');
    assert.equal(a.certified, true);
    relClose(a.value, 2 - 0.5 * (1 + Math.SQRT1_2), 1e-7, 'value');
    assert.equal(a.certificate.status, 'optimal');
    assert.equal(a.dualOperator.re.length, 2);
    for (const key of ['primalObjective', 'dualObjective', 'gap', 'relativeGap', 'primalResidual', 'dualResidual']) {
      assert.equal(typeof a.certificate[key], 'number', key);
    }
    assert.equal(a.strategy.length, 2);
    for (const s of a.strategy) assert.ok(Array.isArray(s.order) && s.element.re.length === 2 && s.element.im.length === 2);
    assert.ok(a.bounds.lower <= a.bounds.upper + 1e-12);
  });

  it('refuses bad requests with the protocol codes and paths', () => {
    const err = (req: Record<string, unknown>) => (handle({ op: 'guesswork', ...req }) as Record<string, any>).error;
    assert.equal(err({ probabilities: [0.5, 0.6] }).code, 'invalid-argument');
    assert.equal(err({ probabilities: [0.5, 0.5], moment: 0 }).code, 'invalid-argument');
    const e1 = err({ probabilities: [0.5, 0.5], states: [[[1, 0], [0, 0]], [[1, 0], [0, 1]]] });
    assert.equal(e1.code, 'trace-not-one');
    assert.equal(e1.path, 'states[1]');
    const big = err({ probabilities: Array(13).fill(1 / 13), states: Array(13).fill([[1]]) });
    assert.equal(big.code, 'too-large');
    assert.match(big.message, /limited to 12/);
    assert.equal(err({ probabilities: [0.5, 0.5], gap: 1e-6 }).code, 'invalid-argument');
    assert.equal(err({ probabilities: [0.5, 0.5], states: [[[1]], [[1]]], stopAfter: 1 }).code, 'missing-argument');
    assert.equal(err({ probabilities: [0.5, 0.5], joint: [[0.5], [0.5]] }).code, 'invalid-argument');
  });
});
