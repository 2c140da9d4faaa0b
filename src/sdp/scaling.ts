/**
 * Equilibration of a compiled SDP: constraint rows, the right-hand side and the objective rescaled
 * by powers of two so that the solver's absolute tests (residual norms relative to 1 + ‖b‖ and
 * 1 + ‖c‖, the certificate tests relative to max(1, ‖c‖) and max(1, ‖b‖)) mean the same thing on
 * data of any magnitude.
 *
 *   Â_i = A_i / r_i,   b̂_i = b_i / (r_i β_b),   ĉ = c / β_c
 *   X = β_b X̂,   y_i = β_c ŷ_i / r_i,   S = β_c Ŝ,   ⟨c, X⟩ = β_b β_c ⟨ĉ, X̂⟩
 *
 * r_i is the Frobenius norm of constraint i (all blocks), β_b = ‖b̂‖ (before β_b), β_c = ‖c‖, each
 * rounded to a power of two (so scaling is exact in floating point) and left at 1 when the norm lies
 * within [1/64, 64] (DEAD_BAND): ordinary problems are solved exactly as without this module, bit for
 * bit, and only data that is tiny or huge (1e-8, 1e8 …) is touched. A zero row, b or c keeps scale 1.
 *
 * Why: without it, b scaled by 1e8 made an ordinary optimum look like a Farkas ray (b·y is large next
 * to ‖Aᵀy + s‖) and the solver reported 'primal-infeasible' for a feasible problem; rows scaled by
 * 1e-8 did the same; an objective of size 1e-8 was "optimal" at 1% relative error.
 *
 * Does not: scale variables per block (no diagonal congruence of the cones), or look at the
 * conditioning of A beyond row norms. Cost: O(stored coefficients), once per solve.
 */
import type { Compiled } from './compile.js';

/** Norms within [1/DEAD_BAND, DEAD_BAND] are not rescaled. */
export const DEAD_BAND = 64;

export interface Scaling {
  /** The rescaled problem (new coefficient arrays where rescaled; `cp` itself when nothing is). */
  cp: Compiled;
  /** r_i per constraint. */
  row: Float64Array;
  /** β_b and β_c. */
  b: number;
  c: number;
  /** Whether anything was rescaled. */
  active: boolean;
}

function powerOfTwoScale(norm: number): number {
  if (!(norm > 0) || !isFinite(norm) || (norm >= 1 / DEAD_BAND && norm <= DEAD_BAND)) return 1;
  return 2 ** Math.round(Math.log2(norm));
}

/** Row, right-hand-side and objective scales of `cp` (see the header), and the rescaled problem. */
export function equilibrate(cp: Compiled): Scaling {
  const m = cp.m;
  const row2 = new Float64Array(m);
  for (const blk of cp.psd) {
    for (let a = 0; a < blk.cons.length; a++) {
      const p = blk.tp[a];
      const q = blk.tq[a];
      const v = blk.tv[a];
      // The block's internal coefficient: each off-diagonal triplet stands for two entries.
      let s = 0;
      for (let t = 0; t < v.length; t++) s += (p[t] === q[t] ? 1 : 2) * v[t] * v[t];
      // Hermitian blocks are stored embedded with halved coefficients: ‖emb(A)/2‖² = ‖A‖²/2.
      row2[blk.cons[a]] += blk.hermitian ? 2 * s : s;
    }
  }
  for (let i = 0; i < m; i++) {
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) row2[i] += cp.linVal[e] * cp.linVal[e];
    for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) row2[i] += cp.freeVal[e] * cp.freeVal[e];
  }
  const row = new Float64Array(m);
  let rowsActive = false;
  for (let i = 0; i < m; i++) {
    row[i] = powerOfTwoScale(Math.sqrt(row2[i]));
    if (row[i] !== 1) rowsActive = true;
  }
  let nb2 = 0;
  for (let i = 0; i < m; i++) nb2 += (cp.b[i] / row[i]) ** 2;
  const bs = powerOfTwoScale(Math.sqrt(nb2));
  let nc2 = 0;
  for (const blk of cp.psd) for (const v of blk.c) nc2 += blk.hermitian ? 2 * v * v : v * v;
  for (const v of cp.cL) nc2 += v * v;
  for (const v of cp.cF) nc2 += v * v;
  const cs = powerOfTwoScale(Math.sqrt(nc2));
  if (!rowsActive && bs === 1 && cs === 1) return { cp, row, b: 1, c: 1, active: false };

  const b = Float64Array.from(cp.b, (v, i) => v / (row[i] * bs));
  const psd = cp.psd.map((blk) => ({
    ...blk,
    tv: rowsActive ? blk.tv.map((v, a) => Float64Array.from(v, (x) => x / row[blk.cons[a]])) : blk.tv,
    c: cs === 1 ? blk.c : Float64Array.from(blk.c, (x) => x / cs),
    complex:
      blk.complex && rowsActive
        ? {
            p: blk.complex.p,
            q: blk.complex.q,
            re: blk.complex.re.map((v, a) => Float64Array.from(v, (x) => x / row[blk.cons[a]])),
            im: blk.complex.im.map((v, a) => Float64Array.from(v, (x) => x / row[blk.cons[a]])),
          }
        : blk.complex,
  }));
  const linVal = Float64Array.from(cp.linVal);
  const freeVal = Float64Array.from(cp.freeVal);
  for (let i = 0; i < m; i++) {
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) linVal[e] /= row[i];
    for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) freeVal[e] /= row[i];
  }
  const linColVal = Float64Array.from(cp.linColVal, (v, e) => v / row[cp.linColRow[e]]);
  return {
    cp: {
      ...cp,
      b,
      psd,
      linVal,
      linColVal,
      freeVal,
      cL: cs === 1 ? cp.cL : Float64Array.from(cp.cL, (x) => x / cs),
      cF: cs === 1 ? cp.cF : Float64Array.from(cp.cF, (x) => x / cs),
    },
    row,
    b: bs,
    c: cs,
    active: true,
  };
}
