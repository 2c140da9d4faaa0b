/**
 * Phase 3: the Newton direction of the homogeneous self-dual embedding in the NT-scaled space, with
 * Mehrotra's second-order corrector.
 *
 * The linearized system, for residual weight η and centring target σμ,
 *
 *   A Δx − b Δτ = −η r_p,   −AᵀΔy − Δs + c Δτ = −η r_d,   b·Δy − ⟨c, Δx⟩ − Δκ = −η r_g,
 *   λ ∘ (G⁻¹ΔX G⁻ᵀ + GᵀΔS G) = σμ I − λ∘λ − (corrector),   κΔτ + τΔκ = σμ − τκ − (corrector),
 *
 * is reduced to the Schur complement K = [M A_f; A_fᵀ 0] (schur.ts) solved twice per iteration: once
 * for p = K⁻¹[A(DC) + b; c_f] (fixed within an iteration, prepareDirections) and once per direction
 * for the right-hand side; Δτ follows from the gap equation, then Δy, Δs and Δx.
 *
 * Does not: choose σ or the step (solver.ts, step.ts). Cost: one Schur assembly and factorization per
 * iteration (schur.ts) and per direction a solve plus O(n³) per PSD block (congruences).
 */
import { congruence, congruenceT, matMul } from '../linalg/dense.js';
import { cCongruence, cCongruenceH, cMul, embedComplex, extractHermitian } from '../linalg/dense-complex.js';
import { dotv, type Iterate, type SolverData, type Workspace } from './iterate.js';
import { applyA, applyAT } from './residuals.js';
import type { SchurSolver } from './elimination.js';

/**
 * What stays fixed within one iteration: the Schur complement assembled and factored for the current
 * scaling, D c = W C W (orthant: d∘c), A(Dc), p = K⁻¹[A D c + b; c_f], the denominator of Δτ and
 * W r_d W. Needs ws.nt (ntScaling) and ws.res (computeResiduals) of `it`.
 */
export function prepareDirections(d: SolverData, it: Iterate, ws: Workspace, schur: SchurSolver): void {
  const { cp, nb, m, nL, nF, herm, hs, sizes, cC } = d;
  const { W, dL } = ws.nt;
  const { Dc, DcL, adc, h2, tmp1, tmp3, WrdW } = ws;
  const b = cp.b;
  schur.assembleAndFactor(W.v, dL);
  for (let k = 0; k < nb; k++) {
    if (herm[k]) {
      cCongruence(W.v[k], cC[k], hs[k], tmp3, tmp1);
      embedComplex(tmp3, hs[k], Dc.v[k]);
    } else congruence(W.v[k], cp.psd[k].c, sizes[k], Dc.v[k], tmp1);
  }
  for (let p = 0; p < nL; p++) DcL[p] = dL[p] * cp.cL[p];
  applyA(cp, Dc.v, DcL, null, adc);
  let cDc = dotv(cp.cL, DcL);
  for (let k = 0; k < nb; k++) cDc += dotv(cp.psd[k].c, Dc.v[k]);
  for (let i = 0; i < m; i++) h2[i] = adc[i] + b[i];
  for (let f = 0; f < nF; f++) h2[m + f] = cp.cF[f];
  const pv = schur.solve(h2, 1, ws.pv);
  let bp = 0;
  let adcp = 0;
  for (let i = 0; i < m; i++) {
    bp += b[i] * pv[i];
    adcp += adc[i] * pv[i];
  }
  let cfpf = 0;
  for (let f = 0; f < nF; f++) cfpf += cp.cF[f] * pv[m + f];
  ws.denomBase = bp - (adcp - cDc) - cfpf + it.kappa / it.tau;
  const rdK = ws.res.rdK;
  for (let k = 0; k < nb; k++) {
    if (herm[k]) {
      extractHermitian(rdK.v[k], hs[k], tmp3);
      cCongruence(W.v[k], tmp3, hs[k], WrdW.v[k], tmp1);
    } else congruence(W.v[k], rdK.v[k], sizes[k], WrdW.v[k], tmp1);
  }
}

/**
 * One Newton direction into ws.dir: residual weight `eta`, centring target `sigmaMu`, the corrector
 * terms of ws.corr / ws.corrL when `useCorr` (mehrotraCorrector), and `corrTK` for the τκ equation.
 * Needs prepareDirections for this iteration.
 */
export function newtonDirection(d: SolverData, it: Iterate, ws: Workspace, schur: SchurSolver, eta: number, sigmaMu: number, useCorr: boolean, corrTK: number): void {
  const { cp, nb, m, nL, nF, herm, hs, sizes } = d;
  const { G, lam, gL, lamL, dL } = ws.nt;
  const { rp, rdK, rdL, rdF, rg } = ws.res;
  const { Z, T, corr, zL, TL, corrL, WrdW, h1, AT, adc, tmp1, tmp3, atyM, atyL, atyF } = ws;
  const dir = ws.dir;
  const { dX, dS, dXs, dSs, dxL, dsL, dxLs, dsLs, dxF, dy } = dir;
  const { tau, kappa } = it;
  const b = cp.b;
  for (let k = 0; k < nb; k++) {
    if (herm[k]) {
      const h = hs[k];
      const hh = h * h;
      const l = lam.v[k];
      const z = Z.v[k];
      const cr = corr.v[k];
      for (let i = 0; i < h; i++) {
        for (let j = 0; j < h; j++) {
          const f = 2 / (l[i] + l[j]);
          const rr = (i === j ? sigmaMu - l[i] * l[i] : 0) - (useCorr ? cr[i * h + j] : 0);
          z[i * h + j] = rr * f;
          z[hh + i * h + j] = useCorr ? -cr[hh + i * h + j] * f : 0;
        }
      }
      cCongruence(G.v[k], z, h, tmp3, tmp1);
      const wr = WrdW.v[k];
      for (let e = 0; e < 2 * hh; e++) tmp3[e] -= eta * wr[e];
      embedComplex(tmp3, h, T.v[k]);
      continue;
    }
    const n = sizes[k];
    const l = lam.v[k];
    const z = Z.v[k];
    const cr = corr.v[k];
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const r = (i === j ? sigmaMu - l[i] * l[i] : 0) - (useCorr ? cr[i * n + j] : 0);
        z[i * n + j] = (2 * r) / (l[i] + l[j]);
      }
    }
    const t = T.v[k];
    congruence(G.v[k], z, n, t, tmp1);
    const wr = WrdW.v[k];
    for (let e = 0; e < t.length; e++) t[e] -= eta * wr[e];
  }
  for (let p = 0; p < nL; p++) {
    zL[p] = (sigmaMu - lamL[p] * lamL[p] - (useCorr ? corrL[p] : 0)) / lamL[p];
    TL[p] = gL[p] * zL[p] - eta * dL[p] * rdL[p];
  }
  const rtk = sigmaMu - tau * kappa - corrTK;
  applyA(cp, T.v, TL, null, AT);
  for (let i = 0; i < m; i++) h1[i] = -eta * rp[i] - AT[i];
  for (let f = 0; f < nF; f++) h1[m + f] = eta * rdF[f];
  const qv = schur.solve(h1, 1, ws.qv);
  let bq = 0;
  let adcq = 0;
  for (let i = 0; i < m; i++) {
    bq += b[i] * qv[i];
    adcq += adc[i] * qv[i];
  }
  let cT = dotv(cp.cL, TL);
  for (let k = 0; k < nb; k++) cT += dotv(cp.psd[k].c, T.v[k]);
  let cfqf = 0;
  for (let f = 0; f < nF; f++) cfqf += cp.cF[f] * qv[m + f];
  const dtau = (-eta * rg - bq + cT + adcq + cfqf + rtk / tau) / ws.denomBase;
  const pv = ws.pv;
  for (let i = 0; i < m; i++) dy[i] = qv[i] + pv[i] * dtau;
  for (let f = 0; f < nF; f++) dxF[f] = qv[m + f] + pv[m + f] * dtau;
  applyAT(cp, dy, atyM.v, atyL, atyF);
  for (let k = 0; k < nb; k++) {
    const n = sizes[k];
    const c = cp.psd[k].c;
    const ds = dS.v[k];
    const am = atyM.v[k];
    const rd = rdK.v[k];
    for (let e = 0; e < ds.length; e++) ds[e] = -am[e] + c[e] * dtau + eta * rd[e];
    if (herm[k]) {
      const h = hs[k];
      extractHermitian(ds, h, tmp3);
      const dss = dSs.v[k];
      cCongruenceH(G.v[k], tmp3, h, dss, tmp1);
      const dxs = dXs.v[k];
      const z = Z.v[k];
      for (let e = 0; e < 2 * h * h; e++) dxs[e] = z[e] - dss[e];
      cCongruence(G.v[k], dxs, h, tmp3, tmp1);
      embedComplex(tmp3, h, dX.v[k]);
      continue;
    }
    const dss = dSs.v[k];
    congruenceT(G.v[k], ds, n, dss, tmp1);
    const dxs = dXs.v[k];
    const z = Z.v[k];
    for (let e = 0; e < dxs.length; e++) dxs[e] = z[e] - dss[e];
    congruence(G.v[k], dxs, n, dX.v[k], tmp1);
  }
  for (let p = 0; p < nL; p++) {
    dsL[p] = -atyL[p] + cp.cL[p] * dtau + eta * rdL[p];
    dsLs[p] = gL[p] * dsL[p];
    dxLs[p] = zL[p] - dsLs[p];
    dxL[p] = gL[p] * dxLs[p];
  }
  dir.dtau = dtau;
  dir.dkappa = (rtk - kappa * dtau) / tau;
}

/**
 * Mehrotra's second-order term from the current (affine) direction: the Hermitian part of the
 * scaled product ΔX_s ΔS_s in λ-space into ws.corr, and Δx_s∘Δs_s on the orthant into ws.corrL.
 */
export function mehrotraCorrector(d: SolverData, ws: Workspace): void {
  const { nb, nL, herm, hs, sizes } = d;
  const { dXs, dSs, dxLs, dsLs } = ws.dir;
  const { corr, corrL, tmp2 } = ws;
  for (let k = 0; k < nb; k++) {
    const n = sizes[k];
    if (herm[k]) {
      const h = hs[k];
      const hh = h * h;
      cMul(dXs.v[k], dSs.v[k], h, tmp2);
      const out = corr.v[k];
      for (let i = 0; i < h; i++) {
        for (let j = 0; j < h; j++) {
          out[i * h + j] = 0.5 * (tmp2[i * h + j] + tmp2[j * h + i]);
          out[hh + i * h + j] = 0.5 * (tmp2[hh + i * h + j] - tmp2[hh + j * h + i]);
        }
      }
      continue;
    }
    matMul(dXs.v[k], dSs.v[k], n, tmp2);
    const out = corr.v[k];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = 0.5 * (tmp2[i * n + j] + tmp2[j * n + i]);
  }
  for (let p = 0; p < nL; p++) corrL[p] = dxLs[p] * dsLs[p];
}
