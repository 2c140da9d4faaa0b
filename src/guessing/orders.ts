/**
 * The pricing step of guesswork by column generation (column-generation.ts): given a dual point Y,
 * the smallest eigenvalue of C_g − Y over EVERY guessing order g of K symbols, streamed by a
 * depth-first branch and bound over prefixes of orders, never holding the K! cost matrices.
 *
 *   C_g = Σ_x f(pos_g(x)) A_x,   A_x = p_x ρ_x ⪰ 0,   f: position → cost (f(j) = j^k for guesswork).
 *
 * THE BOUND. Let a prefix place symbols g_1..g_t; write S_t = Σ_{i≤t} f(i) A_{g_i} − Y and
 * R_t = Σ_{x unplaced} A_x. Every completion puts the unplaced symbols at positions > t, where
 * f ≥ μ_t := min_{j>t} f(j), so (A_x ⪰ 0)
 *
 *   C_g − Y  ⪰  B_t := S_t + μ_t R_t        for every order g extending the prefix,
 *
 * hence λ_min(C_g − Y) ≥ λ_min(B_t): when B_t − θ·1 is positive definite (one Cholesky
 * factorisation, d³/3 complex multiply-adds) no order below the prefix has λ_min < θ and the subtree
 * is skipped. When f is constant on the positions after t, the bound is attained by every completion:
 * the subtree is one class of equivalent orders (the unplaced symbols follow in increasing index).
 * At a leaf the exact λ_min is computed (closed form for d = 2; Householder and Sturm bisection,
 * src/linalg/smallest-eigenvalue.ts, otherwise).
 *
 * THE ANSWER. The `keep` orders of smallest λ_min below the threshold θ₀ ≤ 0 (θ tightens to the worst
 * kept value once `keep` are held), their values, and `floor`, a lower bound on min_g λ_min(C_g − Y)
 * over all orders: the smallest value kept (exact), θ₀ when nothing was kept, and, when the search was
 * cut short by its node budget, the bounds λ_min(B_t) of the subtrees closed unexplored. `covered`
 * counts the orders accounted for (explored, skipped by the bound or closed by it): K! exactly when the
 * search is complete, which the caller checks.
 *
 * Floating-point evidence, not proof: a Cholesky factorisation that succeeds in doubles certifies
 * positive definiteness only up to rounding of order d·u·‖B_t‖.
 *
 * Deliberately not here: the restricted SDP and the loop (column-generation.ts), validation (the
 * callers pass weighted states of one size). Cost: at most e·K! nodes, each O(d²) to update the prefix
 * sum plus one d×d Cholesky (O(d³)); a leaf that fails the test adds one smallest eigenvalue (O(d³)).
 * Memory O(K d²).
 */
import { cCholesky } from '../linalg/dense-complex.js';
import { minEigHermitianInPlace } from '../linalg/smallest-eigenvalue.js';

/** A Hermitian d×d matrix packed as in dense-complex.ts: d² real parts, then d² imaginary parts (row-major). */
export type Packed = Float64Array;

export interface OrderSearchInput {
  /** A_x = p_x ρ_x for the K symbols searched, packed, all d×d and positive semidefinite. */
  weighted: readonly Packed[];
  d: number;
  /** f(1), ..., f(K): the cost of each position. */
  positionCosts: readonly number[];
  /** The dual point Y, packed, Hermitian. */
  y: Packed;
  /** How many of the most violated orders to return (≥ 1). */
  keep: number;
  /** θ₀ ≤ 0: only orders with λ_min(C_g − Y) < θ₀ are returned. */
  threshold: number;
  /** Nodes after which subtrees are closed by their bound instead of explored (default: none). */
  budget?: number;
  /** Called every 2¹⁶ nodes with the node count (may throw to stop: deadlines, cancellation). */
  poll?: (nodes: number) => void;
}

export interface PricedOrder {
  /** Symbol indices (0..K−1), first guess first. */
  order: number[];
  /** λ_min(C_g − Y). */
  value: number;
}

export interface OrderSearchResult {
  /** Ascending by value. */
  found: PricedOrder[];
  /** A lower bound on min_g λ_min(C_g − Y) over every order (see the header). */
  floor: number;
  /** Nodes visited, leaves (or classes of equivalent orders) priced exactly. */
  nodes: number;
  leaves: number;
  /** Orders accounted for: K! when complete. */
  covered: number;
  /** False when the node budget closed some subtrees by their bound. */
  complete: boolean;
}

/** n! as a double (exact up to 18!). */
export function factorial(n: number): number {
  let f = 1;
  for (let i = 2; i <= n; i++) f *= i;
  return f;
}

/** λ_min of a packed Hermitian d×d matrix; `scratch` of 2d² + 4d numbers (destroyed). */
export function packedMinEigenvalue(m: Packed, d: number, scratch: Float64Array): number {
  if (d === 1) return m[0];
  if (d === 2) {
    const mid = 0.5 * (m[0] + m[3]);
    const half = 0.5 * (m[0] - m[3]);
    return mid - Math.sqrt(half * half + m[1] * m[1] + m[5] * m[5]);
  }
  const dd = d * d;
  const a = scratch.subarray(0, 2 * dd);
  a.set(m.subarray(0, 2 * dd));
  return minEigHermitianInPlace(a, d, scratch.subarray(2 * dd, 2 * dd + d), scratch.subarray(2 * dd + d, 2 * dd + 2 * d), scratch.subarray(2 * dd + 2 * d, 2 * dd + 4 * d));
}

/** Whether the packed Hermitian m − θ·1 is positive definite (Cholesky; closed form for d ≤ 2). */
function definiteAbove(m: Packed, d: number, theta: number, shifted: Float64Array, factor: Float64Array): boolean {
  if (d === 1) return m[0] - theta > 0;
  if (d === 2) {
    const a = m[0] - theta;
    const c = m[3] - theta;
    return a > 0 && a * c - (m[1] * m[1] + m[5] * m[5]) > 0;
  }
  const dd = d * d;
  shifted.set(m.subarray(0, 2 * dd));
  for (let i = 0; i < d; i++) shifted[i * d + i] -= theta;
  return cCholesky(shifted, d, factor);
}

/**
 * The branch and bound of the header. Symbols are tried at each position in the order of decreasing
 * trace of A_x (likely first guesses first), which tightens θ early.
 */
export function searchOrders(input: OrderSearchInput): OrderSearchResult {
  const { weighted, d, positionCosts: f, y, threshold } = input;
  const K = weighted.length;
  const keep = Math.max(1, input.keep);
  const budget = input.budget ?? Infinity;
  const n2 = 2 * d * d;
  // μ_t = min_{j>t} f(j) (0-based: positions t..K−1), and whether f is constant there.
  const mu = new Float64Array(K + 1);
  const constantAfter = new Uint8Array(K + 1);
  mu[K] = 0;
  constantAfter[K] = 1;
  for (let t = K - 1; t >= 0; t--) {
    mu[t] = t === K - 1 ? f[t] : Math.min(f[t], mu[t + 1]);
    constantAfter[t] = t === K - 1 || (constantAfter[t + 1] === 1 && f[t] === f[t + 1]) ? 1 : 0;
  }
  const trials = weighted.map((_, x) => x);
  const traceOf = (a: Packed) => {
    let s = 0;
    for (let i = 0; i < d; i++) s += a[i * d + i];
    return s;
  };
  trials.sort((a, b) => traceOf(weighted[b]) - traceOf(weighted[a]) || a - b);

  // Prefix sums S_t and remainders R_t, one buffer per depth; B_t in `bound`.
  const S = Array.from({ length: K + 1 }, () => new Float64Array(n2));
  const R = Array.from({ length: K + 1 }, () => new Float64Array(n2));
  for (let k = 0; k < n2; k++) S[0][k] = -y[k];
  for (const a of weighted) for (let k = 0; k < n2; k++) R[0][k] += a[k];
  const bound = new Float64Array(n2);
  const shifted = new Float64Array(n2);
  const factor = new Float64Array(n2);
  const scratch = new Float64Array(n2 + 4 * d);
  const fact = Array.from({ length: K + 1 }, (_, i) => factorial(i));

  const used = new Uint8Array(K);
  const prefix = new Int32Array(K);
  const found: PricedOrder[] = []; // kept sorted ascending; at most `keep`
  let theta = threshold;
  let closedFloor = Infinity;
  let nodes = 0;
  let leaves = 0;
  let covered = 0;
  let complete = true;

  const record = (t: number, value: number) => {
    if (!(value < theta)) return;
    const order = Array.from(prefix.subarray(0, t));
    for (let x = 0; x < K; x++) if (!used[x]) order.push(x);
    let i = found.length;
    while (i > 0 && found[i - 1].value > value) i--;
    found.splice(i, 0, { order, value });
    if (found.length > keep) found.pop();
    if (found.length === keep) theta = Math.min(threshold, found[keep - 1].value);
  };

  const visit = (t: number): void => {
    nodes++;
    if ((nodes & 0xffff) === 0 && input.poll) input.poll(nodes);
    const s = S[t];
    const r = R[t];
    const m = mu[t];
    for (let k = 0; k < n2; k++) bound[k] = s[k] + m * r[k];
    const size = fact[K - t];
    if (t === K || constantAfter[t] === 1) {
      // Exact: every completion costs B_t.
      leaves++;
      covered += size;
      if (!definiteAbove(bound, d, theta, shifted, factor)) record(t, packedMinEigenvalue(bound, d, scratch));
      return;
    }
    if (definiteAbove(bound, d, theta, shifted, factor)) {
      covered += size;
      return;
    }
    if (nodes > budget) {
      // Out of budget: close the subtree by its bound (a lower bound on each of its orders).
      complete = false;
      covered += size;
      closedFloor = Math.min(closedFloor, packedMinEigenvalue(bound, d, scratch));
      return;
    }
    const ft = f[t];
    const sNext = S[t + 1];
    const rNext = R[t + 1];
    for (const x of trials) {
      if (used[x]) continue;
      const a = weighted[x];
      for (let k = 0; k < n2; k++) {
        sNext[k] = s[k] + ft * a[k];
        rNext[k] = r[k] - a[k];
      }
      used[x] = 1;
      prefix[t] = x;
      visit(t + 1);
      used[x] = 0;
    }
  };
  visit(0);

  const floor = Math.min(found.length > 0 ? found[0].value : threshold, closedFloor);
  return { found, floor, nodes, leaves, covered, complete };
}

/** Pack a Hermitian CMatrix-like {re, im} (row-major d×d) into the layout above. */
export function pack(m: { re: Float64Array; im: Float64Array; rows: number }): Packed {
  const dd = m.rows * m.rows;
  const out = new Float64Array(2 * dd);
  out.set(m.re.subarray(0, dd), 0);
  out.set(m.im.subarray(0, dd), dd);
  return out;
}

/**
 * The order of smallest ⟨v|C_g|v⟩ for a fixed vector v when f is nondecreasing: the symbols by
 * decreasing q_x = ⟨v|A_x|v⟩ (rearrangement inequality; Hardy, Littlewood & Pólya, Inequalities,
 * Thm 368). `v` as real and imaginary parts.
 */
export function rearrangementOrder(weighted: readonly Packed[], d: number, vre: ArrayLike<number>, vim: ArrayLike<number>): number[] {
  const dd = d * d;
  const q = weighted.map((a) => {
    // ⟨v|A|v⟩ = Σ_ij conj(v_i) A_ij v_j, real for Hermitian A.
    let s = 0;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        const ar = a[i * d + j];
        const ai = a[dd + i * d + j];
        // conj(v_i) v_j = (vr_i vr_j + vi_i vi_j) + i (vr_i vi_j − vi_i vr_j)
        const pr = vre[i] * vre[j] + vim[i] * vim[j];
        const pi = vre[i] * vim[j] - vim[i] * vre[j];
        s += ar * pr - ai * pi;
      }
    }
    return s;
  });
  return q.map((_, x) => x).sort((a, b) => q[b] - q[a] || a - b);
}
