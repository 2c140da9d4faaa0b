/**
 * Phase 1 of an interior-point iteration: the linear maps of the problem and the residuals of the
 * homogeneous self-dual embedding at an iterate,
 *
 *   r_p = A x − b τ,   r_d = c τ − Aᵀy − s,   r_g = b·y − ⟨c, x⟩ − κ,   μ = (⟨x, s⟩ + τκ)/(ν + 1).
 *
 * A(x) reads each PSD block through the upper-triangle triplets of compile.ts (an off-diagonal
 * triplet stands for two entries); Aᵀy writes dense symmetric blocks.
 *
 * Does not: scale anything (the residuals are of the equilibrated problem; termination.ts converts to
 * the user's scale). Cost: O(stored coefficients + Σ n_k²) per call.
 */
import type { Compiled } from './compile.js';
import { dotv, type Iterate, type SolverData, type Workspace } from './iterate.js';

/** A(x): constraint values of the cone and free parts (xF null: free part left out). */
export function applyA(cp: Compiled, X: Float64Array[], xL: Float64Array, xF: Float64Array | null, out: Float64Array = new Float64Array(cp.m)): Float64Array {
  out.fill(0);
  const psd = cp.psd;
  for (let k = 0; k < psd.length; k++) {
    const blk = psd[k];
    const x = X[k];
    const n = blk.n;
    for (let a = 0; a < blk.cons.length; a++) {
      const p = blk.tp[a];
      const q = blk.tq[a];
      const v = blk.tv[a];
      let s = 0;
      for (let t = 0; t < v.length; t++) s += (p[t] === q[t] ? 1 : 2) * v[t] * x[p[t] * n + q[t]];
      out[blk.cons[a]] += s;
    }
  }
  for (let i = 0; i < cp.m; i++) {
    let s = 0;
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) s += cp.linVal[e] * xL[cp.linIdx[e]];
    if (xF) for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) s += cp.freeVal[e] * xF[cp.freeIdx[e]];
    out[i] += s;
  }
  return out;
}

/** Aᵀy into M (dense symmetric per PSD block), L (orthant), F (free). */
export function applyAT(cp: Compiled, y: Float64Array, M: Float64Array[], L: Float64Array, F: Float64Array): void {
  const psd = cp.psd;
  for (let k = 0; k < psd.length; k++) {
    const blk = psd[k];
    const n = blk.n;
    const out = M[k];
    out.fill(0);
    for (let a = 0; a < blk.cons.length; a++) {
      const yi = y[blk.cons[a]];
      if (yi === 0) continue;
      const p = blk.tp[a];
      const q = blk.tq[a];
      const v = blk.tv[a];
      for (let t = 0; t < v.length; t++) {
        out[p[t] * n + q[t]] += yi * v[t];
        if (p[t] !== q[t]) out[q[t] * n + p[t]] += yi * v[t];
      }
    }
  }
  L.fill(0);
  F.fill(0);
  for (let i = 0; i < cp.m; i++) {
    const yi = y[i];
    if (yi === 0) continue;
    for (let e = cp.linRowPtr[i]; e < cp.linRowPtr[i + 1]; e++) L[cp.linIdx[e]] += yi * cp.linVal[e];
    for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) F[cp.freeIdx[e]] += yi * cp.freeVal[e];
  }
}

/** The residuals and scalars of `it` into ws.res (see the header). */
export function computeResiduals(d: SolverData, it: Iterate, ws: Workspace): void {
  const { cp, m, nb, nL, nF, nu } = d;
  const r = ws.res;
  const { X, S, xL, sL, xF, y, tau, kappa } = it;
  const b = cp.b;
  applyA(cp, X.v, xL, xF, ws.Ax);
  for (let i = 0; i < m; i++) r.rp[i] = ws.Ax[i] - b[i] * tau;
  applyAT(cp, y, ws.atyM.v, ws.atyL, ws.atyF);
  const rdK = r.rdK;
  for (let e = 0; e < rdK.data.length; e++) rdK.data[e] = -ws.atyM.data[e] - S.data[e];
  for (let k = 0; k < nb; k++) {
    const c = cp.psd[k].c;
    const rk = rdK.v[k];
    for (let e = 0; e < rk.length; e++) rk[e] += c[e] * tau;
  }
  for (let p = 0; p < nL; p++) r.rdL[p] = -ws.atyL[p] - sL[p] + cp.cL[p] * tau;
  for (let p = 0; p < nF; p++) r.rdF[p] = -ws.atyF[p] + cp.cF[p] * tau;
  let cx = dotv(cp.cL, xL) + dotv(cp.cF, xF);
  for (let k = 0; k < nb; k++) cx += dotv(cp.psd[k].c, X.v[k]);
  r.cx = cx;
  r.by = dotv(b, y);
  r.rg = r.by - cx - kappa;
  r.xs = dotv(xL, sL) + dotv(X.data, S.data);
  r.mu = (r.xs + tau * kappa) / (nu + 1);
  r.rdNorm = Math.sqrt(dotv(r.rdL, r.rdL) + dotv(r.rdF, r.rdF) + dotv(rdK.data, rdK.data));
}
