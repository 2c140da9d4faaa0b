/**
 * Two conditional expectations E₁, E₂ on the same matrix algebra: whether they form a commuting square,
 * the conditional expectation onto the intersection of their ranges, the convergence of (E₁E₂)^k to it,
 * and relative entropies to all three for given states (quasi-factorization estimates).
 *
 * Setting. A trace-preserving conditional expectation E onto a *-subalgebra 𝒩 ⊆ M_d (unital, trace
 * preserving, idempotent) is the orthogonal projection onto 𝒩 in the Hilbert–Schmidt inner product
 * (common practice; e.g. Petz, Quantum Information Theory and Quantum Statistics, 2008, Sec. 4). As a
 * superoperator S = Σ_k K_k ⊗ conj(K_k) (row-major vec(KXK*) = (K ⊗ K̄) vec X) it is then a Hermitian
 * idempotent; the answer reports the defects of all four properties, and the statements below are made
 * for maps that have them.
 *
 *  - Commuting square: E₁E₂ = E₂E₁ (then both equal E₁₂, the conditional expectation onto 𝒩₁ ∩ 𝒩₂);
 *    decided by ‖S₁S₂ − S₂S₁‖ ≤ tolerance, with that norm reported.
 *  - E₁₂ is the projection onto range S₁ ∩ range S₂: the null space of (1 − S₁)*(1 − S₁) + (1 − S₂)*(1 − S₂).
 *  - Friedrichs: c = ‖S₁S₂ − S₁₂‖ is the cosine of the Friedrichs angle between the ranges, and
 *    ‖(S₁S₂)^k − S₁₂‖ = c^{2k−1} (Kayalar & Weinert, Math. Control Signals Systems 1, 43 (1988);
 *    Deutsch, Best Approximation in Inner Product Spaces, 2001, Ch. 9; recalled): the measured norms are
 *    reported beside that prediction. c = 0 exactly for a commuting square.
 *  - For states ρ_i: D(ρ‖E₁ρ), D(ρ‖E₂ρ), D(ρ‖E₁₂ρ) (Umegaki) and the ratio D(ρ‖E₁₂ρ)/(D(ρ‖E₁ρ) + D(ρ‖E₂ρ)),
 *    whose maximum over the given states is a lower estimate of the best quasi-factorization constant c in
 *    D(ρ‖E₁₂ρ) ≤ c(D(ρ‖E₁ρ) + D(ρ‖E₂ρ)) (over all states it can only be larger). Estimates from the states
 *    given, not a bound.
 *
 * Deliberately not here: conditional expectations that preserve a state other than the trace (their
 * superoperators are not HS-self-adjoint; the report then says so and the Friedrichs statement does not
 * apply), building the maps (channel-preset conditional-expectation, pinching).
 * Cost: superoperators of side d², their products O(d⁶) per step, one eigendecomposition of side d².
 */
import {
  CMatrix, add, adjoint, conjugate, eigh, identity, kron, mul, operatorNorm, sub, zeros,
} from '../linalg/index.js';
import type { Channel } from '../quantum/types.js';
import { choiToKraus, inputDimension, outputDimension } from '../quantum/channels.js';
import { umegakiRelativeEntropy } from '../quantities/divergences.js';
import { RhoError } from '../errors.js';
import { checkDeadline } from '../deadline.js';

/** S = Σ K ⊗ conj(K), acting on row-major vec. */
export function superoperator(channel: Channel): CMatrix {
  let s: CMatrix | null = null;
  for (const K of channel.kraus) {
    const t = kron(K, conjugate(K));
    s = s ? add(s, t) : t;
  }
  return s!;
}

/** The channel of a superoperator S on M_d (Choi J[(i,a),(j,b)] = S[(a,b),(i,j)]), in Kraus form. */
export function channelOfSuperoperator(s: CMatrix, d: number, dims: readonly number[]): { channel: Channel; choi: CMatrix } {
  const n = d * d;
  const J = zeros(n, n);
  for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) for (let a = 0; a < d; a++) for (let b = 0; b < d; b++) {
    const src = (a * d + b) * n + (i * d + j);
    const dst = (i * d + a) * n + (j * d + b);
    J.re[dst] = s.re[src];
    J.im[dst] = s.im[src];
  }
  return { channel: choiToKraus(J, dims, dims, 1e-10), choi: J };
}

export interface ExpectationDefects {
  idempotence: number;
  unital: number;
  tracePreserving: number;
  /** ‖S − S*‖: 0 for a trace-preserving conditional expectation (an HS-orthogonal projection). */
  selfAdjoint: number;
}

export interface CommutingSquareResult {
  commuting: boolean;
  commutatorNorm: number;
  /** cos of the Friedrichs angle, ‖S₁S₂ − S₁₂‖. */
  friedrichsCosine: number;
  /** ‖(S₁S₂)^k − S₁₂‖ for k = 1..steps, and the prediction c^{2k−1}. */
  convergence: { k: number; distance: number; predicted: number }[];
  intersection: { superoperator: CMatrix; dimension: number; channel: Channel; choi: CMatrix };
  defects: [ExpectationDefects, ExpectationDefects];
  states: {
    toFirst: number;
    toSecond: number;
    toIntersection: number;
    /** D(ρ‖E₁₂ρ)/(D(ρ‖E₁ρ) + D(ρ‖E₂ρ)); null when the denominator is 0. */
    ratio: number | null;
  }[];
  /** max of the ratios (null without states or when all are undefined). */
  quasiFactorizationEstimate: number | null;
  tolerance: number;
}

function vecOf(x: CMatrix): CMatrix {
  return { rows: x.rows * x.cols, cols: 1, re: x.re, im: x.im };
}
function unvec(v: CMatrix, d: number): CMatrix {
  return { rows: d, cols: d, re: v.re, im: v.im };
}

function defectsOf(s: CMatrix, d: number): ExpectationDefects {
  const id = vecOf(identity(d));
  return {
    idempotence: operatorNorm(sub(mul(s, s), s)),
    unital: operatorNorm(sub(mul(s, id), id)),
    tracePreserving: operatorNorm(sub(mul(adjoint(s), id), id)),
    selfAdjoint: operatorNorm(sub(s, adjoint(s))),
  };
}

/** The commuting-square analysis of two conditional expectations (header). */
export function commutingSquare(
  first: Channel, second: Channel, states: readonly CMatrix[] = [], options: { steps?: number; tolerance?: number } = {},
): CommutingSquareResult {
  const d = inputDimension(first);
  for (const [c, path] of [[first, 'first'], [second, 'second']] as const) {
    if (inputDimension(c) !== d || outputDimension(c) !== d) {
      throw new RhoError('dimension-mismatch', `Both conditional expectations must map M_${d} to itself; ${path} goes from ${inputDimension(c)} to ${outputDimension(c)} dimensions.`, path);
    }
  }
  const tol = options.tolerance ?? 1e-9;
  const steps = options.steps ?? 6;
  const s1 = superoperator(first);
  const s2 = superoperator(second);
  const n = d * d;
  const one = identity(n);
  const c1 = sub(one, s1);
  const c2 = sub(one, s2);
  const gram = add(mul(adjoint(c1), c1), mul(adjoint(c2), c2));
  const e = eigh(gram, { vectors: true });
  let p12 = zeros(n, n);
  let dimension = 0;
  e.values.forEach((v, k) => {
    if (v > Math.sqrt(tol)) return; // ‖(1 − S_i)v‖² ≤ √tol: a rank decision at the tolerance
    dimension++;
    const col = zeros(n, 1);
    for (let p = 0; p < n; p++) { col.re[p] = e.vectors!.re[p * n + k]; col.im[p] = e.vectors!.im[p * n + k]; }
    p12 = add(p12, mul(col, adjoint(col)));
  });
  const product = mul(s1, s2);
  const commutatorNorm = operatorNorm(sub(product, mul(s2, s1)));
  const c = operatorNorm(sub(product, p12));
  const convergence: CommutingSquareResult['convergence'] = [];
  let power = product;
  for (let k = 1; k <= steps; k++) {
    convergence.push({ k, distance: operatorNorm(sub(power, p12)), predicted: Math.pow(c, 2 * k - 1) });
    power = mul(power, product);
    checkDeadline('the iterated products (E₁E₂)^k', () => ({ k }));
  }
  const apply = (s: CMatrix, x: CMatrix) => unvec(mul(s, vecOf(x)), d);
  const results = states.map((rho) => {
    const toFirst = umegakiRelativeEntropy(rho, apply(s1, rho)).value;
    const toSecond = umegakiRelativeEntropy(rho, apply(s2, rho)).value;
    const toIntersection = umegakiRelativeEntropy(rho, apply(p12, rho)).value;
    const den = toFirst + toSecond;
    return { toFirst, toSecond, toIntersection, ratio: den > 0 && Number.isFinite(den) ? toIntersection / den : null };
  });
  const ratios = results.map((r) => r.ratio).filter((x): x is number => x !== null);
  const { channel, choi } = channelOfSuperoperator(p12, d, first.fromDims);
  return {
    commuting: commutatorNorm <= tol,
    commutatorNorm,
    friedrichsCosine: c,
    convergence,
    intersection: { superoperator: p12, dimension, channel, choi },
    defects: [defectsOf(s1, d), defectsOf(s2, d)],
    states: results,
    quasiFactorizationEstimate: ratios.length ? Math.max(...ratios) : null,
    tolerance: tol,
  };
}
