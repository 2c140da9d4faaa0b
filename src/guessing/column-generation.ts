/**
 * The SDP over guessing orders solved by column generation, for any cost of positions f:
 *
 *   primal  minimize Σ_g Tr M_g C_g  s.t.  M_g ⪰ 0, Σ_g M_g = 1,    C_g = Σ_x f(pos_g(x)) p_x ρ_x
 *   dual    maximize Tr Y            s.t.  Y ⪯ C_g for every order g
 *
 * (f(j) = j^k: the k-th moment of guesswork; f(j) = [j > k]: one minus the probability of success
 * within k guesses; f(j) = j^k up to k and a stated cost after it: guesswork with giving up.)
 *
 * THE LOOP (Gilmore & Gomory 1961 for the idea; for SDPs with many blocks this is the usual
 * cutting-plane view of the dual). A working set W of orders starts with the classical order and the
 * rearrangement orders of the eigenvectors of the states (orders.ts). Each round:
 *   1. the restricted primal over W is solved by rhosigma's interior-point solver (src/sdp): |W| blocks
 *      of size d, d² equalities; its multipliers give Y;
 *   2. the upper bound: the restricted POVM, its orders of weight Tr M_g / d above the weight tolerance
 *      kept and renormalised (G^{−1/2} M_g G^{−1/2}), is a strategy over all orders, and its cost is
 *      achieved by it;
 *   3. cheap pricing: for the eigenvectors v of C_g − Y (g ∈ W) and of Y, the order by decreasing
 *      p_x⟨v|ρ_x|v⟩ minimises ⟨v|C_g|v⟩ (rearrangement inequality, f nondecreasing), hence bounds
 *      λ_min(C_g − Y) from above; violated orders found so are added and the round ends;
 *   4. otherwise the exact pricing over every order (orders.ts, branch and bound, streamed) gives
 *      ε = max(0, −min_g λ_min(C_g − Y)); Y − ε·1 is dual feasible, so the value is ≥ Tr Y − d·ε (weak
 *      duality). When upper − lower is within the requested gap, stop; else the most violated orders
 *      join W.
 * The answer is the bracket [lower, upper], the strategy that attains upper, the dual point Y − ε·1
 * that proves lower, the working set's size, the orders priced and the rounds.
 *
 * Both bounds are floating-point evidence: eigenvalues, Cholesky tests and traces carry rounding of
 * order 1e-15 times the norms, and the bracket is padded by that. When the exact pricing is cut short
 * by its node budget, the lower bound comes from the bounds of the closed subtrees (still valid, weaker)
 * and the answer says so.
 *
 * Deliberately not here: validation and the guesswork-specific wrappers (guesswork.ts). Cost per round:
 * one SDP with |W| blocks (|W| is typically a few times d²) and, in the final rounds, one pricing pass
 * of at most e·K! nodes of O(d³) each, usually far fewer (the bound skips subtrees).
 */
import { CMatrix, combine, eigh, hermitianPart, trace, traceOfProductRe, zeros } from '../linalg/index.js';
import { RhoError } from '../errors.js';
import { checkDeadline } from '../deadline.js';
import { solveSdp, matrixCoordinates, coordinateEntry, type BlockTerm, type Constraint, type SdpAnswer, type SdpOptions } from '../sdp/index.js';
import { multiplierMatrix, renormalisePovm, roundingPad } from '../sdp/support.js';
import { factorial, pack, packedMinEigenvalue, rearrangementOrder, searchOrders, type Packed } from './orders.js';

/** What a caller sees while a long solve runs (the same role as the SDP solver's onIteration). */
export interface OrderProgress {
  round: number;
  /** Orders in the restricted problem. */
  workingSet: number;
  /** Orders accounted for by exact pricing so far (K! per complete pass). */
  ordersPriced: number;
  lower: number;
  upper: number;
}

export interface ColumnGenerationOptions {
  /** Stop when upper − lower ≤ gap·max(1, |upper|) (default 1e-7). */
  gap?: number;
  /** Orders with Tr M_g / d at or below this are left out of the strategy (default 1e-9). */
  weightTolerance?: number;
  /** Rounds before giving up on closing the gap (default MAX_ROUNDS); the bracket reached is answered. */
  maxRounds?: number;
  /** Largest working set: past it, the orders of least weight outside the strategy are dropped (default 4d² + 2K). */
  maxWorkingSet?: number;
  /** Nodes one exact pricing pass may visit before closing subtrees by their bounds (default 5e7). */
  nodeBudget?: number;
  /** Options of the restricted SDP solves (default: gap and feasibility 1e-10, falling back to the solver's defaults). */
  sdp?: SdpOptions;
  onProgress?: (p: OrderProgress) => void;
  /** Polled between rounds and during pricing; true stops with RhoError 'cancelled'. */
  shouldStop?: () => boolean;
  signal?: { readonly aborted: boolean };
}

export interface OrderElement {
  /** Symbol indices 0..K−1 (of the symbols handed in), first guess first. */
  order: number[];
  element: CMatrix;
  /** Tr M_g / d. */
  weight: number;
  /** Σ_x p_x Tr M_g ρ_x. */
  probability: number;
}

export interface ColumnGenerationResult {
  /** The restricted problem's primal objective, clamped into [lower, upper]. */
  value: number;
  lower: number;
  upper: number;
  /** upper − lower, and that over max(1, |upper|). */
  gap: number;
  relativeGap: number;
  /** True when the gap reached the requested one with a complete exact pricing pass. */
  certified: boolean;
  strategy: OrderElement[];
  droppedWeight: number;
  /** The dual point Y − ε·1 (feasible up to rounding) and ε. */
  dual: CMatrix;
  dualViolation: number;
  rounds: number;
  workingSet: number;
  ordersPriced: number;
  pricingComplete: boolean;
  /** Interior-point iterations over all rounds, and the last solve's numbers. */
  iterations: number;
  lastSolve: SdpAnswer;
  solverTolerance: number;
}

/** Restricted solve tolerances tried first; the solver's defaults are the fallback. */
export const RESTRICTED_TOLERANCE = 1e-10;
export const DEFAULT_GAP = 1e-7;
export const DEFAULT_NODE_BUDGET = 5e7;
/** Default number of rounds (restricted solves); the ops' cost estimates take this many of each step. */
export const MAX_ROUNDS = 20;

function costMatrix(order: readonly number[], f: readonly number[], states: readonly CMatrix[], p: readonly number[]): CMatrix {
  const w: number[] = [];
  const m: CMatrix[] = [];
  order.forEach((x, i) => {
    if (f[i] !== 0 && p[x] !== 0) {
      w.push(f[i] * p[x]);
      m.push(states[x]);
    }
  });
  if (m.length === 0) return zeros(states[0].rows, states[0].rows);
  return hermitianPart(combine(w, m));
}

/** Canonical form of an order: within each run of positions of equal cost the symbols are sorted by index (equivalent orders). */
function canonical(order: number[], f: readonly number[]): number[] {
  const out = order.slice();
  let start = 0;
  for (let t = 1; t <= f.length; t++) {
    if (t === f.length || f[t] !== f[start]) {
      if (t - start > 1) {
        const run = out.slice(start, t).sort((a, b) => a - b);
        for (let i = start; i < t; i++) out[i] = run[i - start];
      }
      start = t;
    }
  }
  return out;
}

function restrictedProblem(costs: readonly CMatrix[], d: number) {
  const constraints: Constraint[] = matrixCoordinates(d, true).map((c) => {
    const e = coordinateEntry(c.i, c.j, c.part);
    const terms: BlockTerm[] = costs.map((_, g) => ({ block: g, entries: [e] }));
    return { terms, equals: c.i === c.j ? 1 : 0, label: `sum of POVM elements (${c.i}, ${c.j}) ${c.part}` };
  });
  return {
    cones: costs.map(() => ({ kind: 'hermitian' as const, size: d })),
    objective: costs.map((c, g) => ({ block: g, matrix: c })),
    constraints,
  };
}

/**
 * Column generation for the SDP of the header over the K symbols given (probabilities p_x > 0 and
 * states ρ_x of one size d, already validated), positions costing f[0..K−1].
 */
export function solveOverOrders(
  p: readonly number[],
  states: readonly CMatrix[],
  f: readonly number[],
  options: ColumnGenerationOptions = {},
): ColumnGenerationResult {
  const K = p.length;
  const d = states[0].rows;
  const gapTarget = options.gap ?? DEFAULT_GAP;
  const weightTolerance = options.weightTolerance ?? 1e-9;
  const maxRounds = options.maxRounds ?? MAX_ROUNDS;
  const maxWorkingSet = options.maxWorkingSet ?? 4 * d * d + 2 * K;
  const budget = options.nodeBudget ?? DEFAULT_NODE_BUDGET;
  const stopped = () => options.shouldStop?.() === true || options.signal?.aborted === true;
  const cancelled = () => new RhoError('cancelled', 'The guesswork computation was cancelled.');
  const weighted = states.map((s, x) => hermitianPart(combine([p[x]], [s])));
  const packed: Packed[] = weighted.map(pack);
  const average = hermitianPart(combine(p as number[], states as CMatrix[]));
  const scale = Math.max(...f.map(Math.abs), 1e-300);
  const nondecreasing = f.every((v, i) => i === 0 || v >= f[i - 1]);

  // The working set: keys of canonical orders.
  const orders: number[][] = [];
  const costs: CMatrix[] = [];
  const seen = new Set<string>();
  // Past maxWorkingSet, the orders outside the strategy with the least weight in the last solve leave
  // the working set (and may come back when priced again): the restricted SDP's size stays bounded.
  const shrink = (weights: readonly number[], kept: ReadonlySet<number>) => {
    const excess = orders.length - maxWorkingSet;
    if (excess <= 0) return;
    const drop = new Set(
      weights.map((w, g) => [w, g] as const).filter(([, g]) => !kept.has(g)).sort((a, b) => a[0] - b[0]).slice(0, excess).map(([, g]) => g),
    );
    for (let g = orders.length - 1; g >= 0; g--) {
      if (drop.has(g)) {
        seen.delete(orders[g].join(','));
        orders.splice(g, 1);
        costs.splice(g, 1);
      }
    }
  };
  const add = (o: number[]): boolean => {
    const c = canonical(o, f);
    const key = c.join(',');
    if (seen.has(key)) return false;
    seen.add(key);
    orders.push(c);
    costs.push(costMatrix(c, f, states, p));
    return true;
  };
  add(p.map((_, x) => x).sort((a, b) => p[b] - p[a] || a - b));
  const vectorOrders = (m: CMatrix, out: (o: number[]) => void) => {
    const e = eigh(hermitianPart(m), { vectors: true });
    const v = e.vectors!;
    for (let j = 0; j < d; j++) {
      const re = new Float64Array(d);
      const im = new Float64Array(d);
      for (let i = 0; i < d; i++) {
        re[i] = v.re[i * d + j];
        im[i] = v.im[i * d + j];
      }
      out(rearrangementOrder(packed, d, re, im));
    }
  };
  if (nondecreasing) {
    for (const s of states) vectorOrders(s, add);
    vectorOrders(average, add);
  }

  const dd = d * d;
  const scratch = new Float64Array(2 * dd + 4 * d);
  // The pricing's bound needs A_x ⪰ 0; states accepted within the validation tolerance may have
  // eigenvalues slightly below 0. Then C_g − Y ⪰ B_t − (max f − μ_t)·Σ_x max(0, −λ_min(A_x))·1, so the
  // lower bound is padded by d·max|f|·that sum (zero for positive semidefinite states).
  let negativity = 0;
  for (const a of packed) negativity += Math.max(0, -packedMinEigenvalue(a, d, scratch));
  const negativityPad = d * scale * negativity;
  const violation = (c: CMatrix, y: CMatrix): number => {
    const m = new Float64Array(2 * dd);
    for (let k = 0; k < dd; k++) {
      m[k] = c.re[k] - y.re[k];
      m[dd + k] = c.im[k] - y.im[k];
    }
    return packedMinEigenvalue(m, d, scratch);
  };

  let iterations = 0;
  let ordersPriced = 0;
  let rounds = 0;
  let tol = RESTRICTED_TOLERANCE;
  // The bracket combines the best bound of each side over the rounds (each is valid on its own).
  let top: { value: number; strategy: OrderElement[]; dropped: number; solve: SdpAnswer; tol: number } | undefined;
  let bottom: { value: number; dual: CMatrix; eps: number; complete: boolean } | undefined;
  const lowerNow = () => bottom?.value ?? -Infinity;
  const upperNow = () => top?.value ?? Infinity;
  const progress = () => ({ rounds, workingSet: orders.length, ordersPriced, lower: lowerNow(), upper: upperNow() });
  const report = () => options.onProgress?.({ round: rounds, workingSet: orders.length, ordersPriced, lower: lowerNow(), upper: upperNow() });

  while (rounds < maxRounds) {
    rounds++;
    if (stopped()) throw cancelled();
    checkDeadline('the guesswork by column generation', progress, () =>
      top === undefined || bottom === undefined ? `no bracket yet after ${rounds - 1} rounds` : `bracket [${lowerNow()}, ${upperNow()}] after ${rounds - 1} rounds`);
    // 1. The restricted problem.
    const problem = restrictedProblem(costs, d);
    let solverOptions: SdpOptions = options.sdp ?? { gapTolerance: tol, feasibilityTolerance: tol };
    let ans = solveSdp(problem, { ...solverOptions, shouldStop: options.shouldStop, signal: options.signal });
    iterations += ans.iterations;
    if (ans.status !== 'optimal' && options.sdp === undefined && tol < 1e-8) {
      tol = 1e-8;
      solverOptions = {};
      ans = solveSdp(problem, { shouldStop: options.shouldStop, signal: options.signal });
      iterations += ans.iterations;
    }
    if (ans.status === 'cancelled') throw cancelled();
    if (ans.status !== 'optimal' && ans.status !== 'inaccurate' && ans.status !== 'iteration-limit') {
      throw new RhoError('solver-failed', `The restricted guesswork SDP (${orders.length} orders) did not solve: status '${ans.status}'.`, undefined, { status: ans.status, ...progress() });
    }
    const y = multiplierMatrix(ans.y, 0, d);

    // 2. The upper bound: the kept orders' renormalised POVM.
    const elements = ans.x as CMatrix[];
    const kept: number[] = [];
    const weights: number[] = [];
    let dropped = 0;
    elements.forEach((m, g) => {
      const w = trace(m).re / d;
      weights.push(w);
      if (w > weightTolerance) kept.push(g);
      else dropped += Math.max(0, w);
    });
    const povm = renormalisePovm(kept.map((g) => elements[g]));
    let achieved = 0;
    const strategy: OrderElement[] = kept.map((g, i) => {
      achieved += traceOfProductRe(povm[i], costs[g]);
      return { order: orders[g], element: povm[i], weight: trace(povm[i]).re / d, probability: traceOfProductRe(povm[i], average) };
    });
    const upperHere = achieved + roundingPad(kept.length * dd, scale);
    if (top === undefined || upperHere < top.value) {
      top = { value: upperHere, strategy, dropped, solve: ans, tol: solverOptions.gapTolerance ?? 1e-8 };
    }

    // 3. Cheap pricing by rearrangement.
    const threshold = -1e-11 * (1 + scale);
    let added = 0;
    if (nondecreasing) {
      const candidates: number[][] = [];
      for (const g of kept) vectorOrders(combine([1, -1], [costs[g], y]), (o) => candidates.push(o));
      vectorOrders(y, (o) => candidates.push(o));
      for (const o of candidates) {
        const c = canonical(o, f);
        if (seen.has(c.join(','))) continue;
        if (violation(costMatrix(c, f, states, p), y) < threshold && add(c)) added++;
      }
    }
    if (added > 0) {
      shrink(weights, new Set(kept));
      report();
      continue;
    }

    // 4. Exact pricing over every order.
    const search = searchOrders({
      weighted: packed, d, positionCosts: f, y: pack(y), keep: Math.max(4, 2 * d), threshold, budget,
      poll: (nodes) => {
        if (stopped()) throw cancelled();
        checkDeadline('the guesswork by column generation (pricing every order)', () => ({ ...progress(), pricingNodes: nodes }));
      },
    });
    ordersPriced += search.covered;
    const eps = Math.max(0, -search.floor);
    const dualPoint = combine([1], [y]);
    for (let i = 0; i < d; i++) dualPoint.re[i * d + i] -= eps;
    // Padding: the trace's rounding and the eigenvalue allowance of d×d matrices of norm ~ scale.
    const lowerHere = trace(y).re - d * eps - roundingPad(K * dd, scale) - d * 4 * Math.sqrt(d) * 1.1102230246251565e-16 * scale - negativityPad;
    if (bottom === undefined || lowerHere > bottom.value) bottom = { value: lowerHere, dual: dualPoint, eps, complete: search.complete };
    report();
    if (upperNow() - lowerNow() <= gapTarget * Math.max(1, Math.abs(upperNow()))) break;
    shrink(weights, new Set(kept));
    let fresh = 0;
    for (const o of search.found) if (add(o.order)) fresh++;
    if (fresh === 0) break; // nothing left to add: the restricted solve's accuracy limits the bracket
  }
  if (top === undefined || bottom === undefined) {
    throw new RhoError('solver-failed', `Column generation for the guesswork did not reach an exact pricing pass in ${maxRounds} rounds.`, undefined, progress());
  }
  const lower = bottom.value;
  const upper = top.value;
  const width = Math.max(0, upper - lower);
  const value = Math.min(upper, Math.max(lower, top.solve.primalObjective));
  const relativeGap = width / Math.max(1, Math.abs(upper));
  return {
    value,
    lower,
    upper,
    gap: width,
    relativeGap,
    certified: relativeGap <= gapTarget,
    strategy: top.strategy.slice().sort((a, b) => b.probability - a.probability),
    droppedWeight: top.dropped,
    dual: bottom.dual,
    dualViolation: bottom.eps,
    rounds,
    workingSet: orders.length,
    ordersPriced,
    pricingComplete: bottom.complete,
    iterations,
    lastSolve: top.solve,
    solverTolerance: top.tol,
  };
}

/** K! as the number of orders a complete pricing pass accounts for. */
export function ordersOf(K: number): number {
  return factorial(K);
}
