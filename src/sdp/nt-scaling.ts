/**
 * Phase 2: the Nesterov–Todd scaling of an iterate (Todd, Toh & Tütüncü 1998), which is also the
 * solver's test that an iterate is numerically interior.
 *
 *   PSD block: X = L Lᵀ, S = R Rᵀ, Rᵀ L = U Σ Vᵀ, G = L V Σ^(−1/2);  then Gᵀ S G = G⁻¹ X G⁻ᵀ = Σ =: λ
 *              and W = G Gᵀ satisfies W S W = X.
 *   orthant:   g = √(x/s), λ = √(x s), d = x/s.
 *
 * Hermitian blocks do the same in complex arithmetic on h×h matrices (Cholesky, product, one-sided
 * Jacobi SVD), and λ is stored doubled, as the spectrum of the real embedding.
 *
 * Does not: repair an iterate that is not interior (the safeguarded step in step.ts shortens the step
 * instead). Cost per PSD block: two Cholesky factorizations, one product and a Jacobi SVD, O(n³).
 */
import { cholesky, matMul, matTMul, svdJacobi } from '../linalg/dense.js';
import { cCholesky, cGram, cHMul, cMul, cSvdJacobi, extractHermitian } from '../linalg/dense-complex.js';
import type { Iterate, SolverData, Workspace } from './iterate.js';

/**
 * The NT scaling of `it` into ws.nt. False when the iterate is not numerically interior: a Cholesky
 * factor fails, a scaled eigenvalue λ is not positive and finite, τ, κ or an orthant coordinate is not
 * positive, or y or a free variable is not finite.
 */
export function ntScaling(d: SolverData, it: Iterate, ws: Workspace): boolean {
  const { nb, nL, m, nF, sizes, herm, hs } = d;
  const { tau, kappa, xL, sL, y, xF, X, S } = it;
  const { G, W, lam, Lx, Ls, Bm, V, gL, lamL, dL } = ws.nt;
  const { tmp1, tmp3, tmp4 } = ws;
  if (!(tau > 0 && tau < Infinity) || !(kappa > 0 && kappa < Infinity)) return false;
  for (let p = 0; p < nL; p++) if (!(xL[p] > 0 && xL[p] < Infinity) || !(sL[p] > 0 && sL[p] < Infinity)) return false;
  for (let i = 0; i < m; i++) if (!isFinite(y[i])) return false;
  for (let f = 0; f < nF; f++) if (!isFinite(xF[f])) return false;
  for (let k = 0; k < nb; k++) {
    const n = sizes[k];
    if (herm[k]) {
      const h = hs[k];
      const hh = h * h;
      extractHermitian(X.v[k], h, tmp3);
      extractHermitian(S.v[k], h, tmp4);
      const lx = Lx.v[k];
      const ls = Ls.v[k];
      if (!cCholesky(tmp3, h, lx) || !cCholesky(tmp4, h, ls)) return false;
      cHMul(ls, lx, h, Bm.v[k]);
      const sigma = lam.v[k];
      cSvdJacobi(Bm.v[k], h, V.v[k], sigma, tmp1);
      for (let j = h; j < n; j++) sigma[j] = sigma[j - h]; // the embedding's doubled spectrum
      const g = G.v[k];
      cMul(lx, V.v[k], h, g);
      for (let j = 0; j < h; j++) {
        const f = 1 / Math.sqrt(sigma[j]);
        for (let i = 0; i < h; i++) {
          g[i * h + j] *= f;
          g[hh + i * h + j] *= f;
        }
      }
      cGram(g, h, W.v[k]);
      continue;
    }
    const lx = cholesky(X.v[k], n, Lx.v[k]);
    const ls = cholesky(S.v[k], n, Ls.v[k]);
    if (!lx || !ls) return false;
    matTMul(ls, lx, n, Bm.v[k]);
    const sigma = lam.v[k];
    svdJacobi(Bm.v[k], n, V.v[k], sigma, tmp1);
    const g = G.v[k];
    matMul(lx, V.v[k], n, g);
    for (let j = 0; j < n; j++) {
      const f = 1 / Math.sqrt(sigma[j]);
      for (let i = 0; i < n; i++) g[i * n + j] *= f;
    }
    const w = W.v[k];
    for (let i = 0; i < n; i++) {
      for (let j = i; j < n; j++) {
        let s = 0;
        for (let c = 0; c < n; c++) s += g[i * n + c] * g[j * n + c];
        w[i * n + j] = s;
        w[j * n + i] = s;
      }
    }
  }
  for (let k = 0; k < nb; k++) for (const l of lam.v[k]) if (!(l > 0 && l < Infinity)) return false;
  for (let p = 0; p < nL; p++) {
    gL[p] = Math.sqrt(xL[p] / sL[p]);
    lamL[p] = Math.sqrt(xL[p] * sL[p]);
    dL[p] = xL[p] / sL[p];
  }
  return true;
}
