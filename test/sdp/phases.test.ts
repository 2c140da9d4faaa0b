// The interior-point phases one by one (src/sdp/residuals.ts, nt-scaling.ts, direction.ts, step.ts,
// termination.ts), each at a random interior iterate of a small mixed problem (a symmetric, a Hermitian,
// an orthant and a free block), against the defining equations of the method: the homogeneous
// self-dual embedding (Xu, Hung & Ye 1996, Ann. Oper. Res. 62, 151) and the Nesterov–Todd scaling
// (Todd, Toh & Tütüncü 1998, SIAM J. Optim. 8, 769; the identities recalled from memory).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { type SdpProblem } from '../../src/sdp/index.js';
import { Iterate, Workspace, solverData, type SolverData } from '../../src/sdp/iterate.js';
import { applyA, applyAT, computeResiduals } from '../../src/sdp/residuals.js';
import { ntScaling } from '../../src/sdp/nt-scaling.js';
import { mehrotraCorrector, newtonDirection, prepareDirections } from '../../src/sdp/direction.js';
import { maxStep, safeguardedStep } from '../../src/sdp/step.js';
import { BestIterate } from '../../src/sdp/termination.js';
import { SchurSystem } from '../../src/sdp/schur.js';
import { embedComplex } from '../../src/linalg/dense-complex.js';
import { minEig } from '../../src/linalg/smallest-eigenvalue.js';
import { gaussian, rng } from '../helpers/random.js';

/** A small problem touching every cone kind (data random, fixed by the seed). */
function mixedProblem(r: () => number): SdpProblem {
  const g = () => gaussian(r);
  const constraints = [];
  for (let i = 0; i < 6; i++) {
    constraints.push({
      terms: [
        { block: 0, entries: [[0, 0, g()], [0, 1, g()], [1, 2, g()], [2, 2, g()]] as [number, number, number][] },
        { block: 1, entries: [[0, 0, g()], [0, 1, g(), g()], [1, 1, g()]] as [number, number, number, number?][] as never },
        { block: 2, vector: [g(), g()] },
        ...(i < 1 ? [{ block: 3, vector: [1] }] : []),
      ],
      equals: g(),
    });
  }
  return {
    cones: [{ kind: 'symmetric', size: 3 }, { kind: 'hermitian', size: 2 }, { kind: 'nonnegative', size: 2 }, { kind: 'free', size: 1 }],
    objective: [
      { block: 0, matrix: [[1 + r(), 0.2, 0], [0.2, 1, 0.1], [0, 0.1, 2]] },
      { block: 1, entries: [[0, 0, 1], [0, 1, 0.3, -0.2], [1, 1, 1.5]] },
      { block: 2, vector: [1, 2] },
      { block: 3, vector: [0.5] },
    ],
    constraints,
  };
}

/** Random positive definite n×n (row-major) G Gᵀ + n·1. */
function randomPd(n: number, r: () => number): Float64Array {
  const g = Array.from({ length: n * n }, () => gaussian(r));
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let s = i === j ? n : 0;
    for (let k = 0; k < n; k++) s += g[i * n + k] * g[j * n + k];
    out[i * n + j] = s;
  }
  return out;
}

/** Embedded random Hermitian positive definite h×h (2h×2h). */
function randomHermitianPdEmbedded(h: number, r: () => number): Float64Array {
  const gr = Array.from({ length: h * h }, () => gaussian(r));
  const gi = Array.from({ length: h * h }, () => gaussian(r));
  const c = new Float64Array(2 * h * h);
  for (let i = 0; i < h; i++) for (let j = 0; j < h; j++) {
    let sr = i === j ? h : 0;
    let si = 0;
    for (let k = 0; k < h; k++) {
      // (G G^H)_ij = Σ g_ik conj(g_jk)
      sr += gr[i * h + k] * gr[j * h + k] + gi[i * h + k] * gi[j * h + k];
      si += gi[i * h + k] * gr[j * h + k] - gr[i * h + k] * gi[j * h + k];
    }
    c[i * h + j] = sr;
    c[h * h + i * h + j] = si;
  }
  const out = new Float64Array(4 * h * h);
  embedComplex(c, h, out);
  return out;
}

/** A random interior iterate of the problem. */
function randomIterate(d: SolverData, r: () => number): Iterate {
  const it = new Iterate(d);
  d.sizes.forEach((n, k) => {
    const fill = (t: Float64Array) => t.set(d.herm[k] ? randomHermitianPdEmbedded(n / 2, r) : randomPd(n, r));
    fill(it.X.v[k]);
    fill(it.S.v[k]);
  });
  for (let p = 0; p < d.nL; p++) {
    it.xL[p] = 0.5 + r();
    it.sL[p] = 0.5 + r();
  }
  for (let f = 0; f < d.nF; f++) it.xF[f] = gaussian(r);
  for (let i = 0; i < d.m; i++) it.y[i] = gaussian(r);
  it.tau = 0.5 + r();
  it.kappa = 0.5 + r();
  return it;
}

function mulDense(a: Float64Array, b: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) for (let j = 0; j < n; j++) out[i * n + j] += a[i * n + k] * b[k * n + j];
  return out;
}
function transpose(a: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[j * n + i] = a[i * n + j];
  return out;
}
function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let k = 0; k < a.length; k++) m = Math.max(m, Math.abs(a[k] - b[k]));
  return m;
}

function setup(seed: number) {
  const r = rng(seed);
  const d = solverData(mixedProblem(r));
  const it = randomIterate(d, r);
  const ws = new Workspace(d);
  return { r, d, it, ws };
}

describe('interior-point phases at a random interior iterate (definitions of the method)', () => {
  it('residuals are r_p = A x − bτ, r_d = cτ − Aᵀy − s, r_g = b·y − ⟨c, x⟩ − κ and μ = (⟨x, s⟩ + τκ)/(ν + 1) (homogeneous self-dual embedding)', () => {
    const { d, it, ws } = setup(1);
    computeResiduals(d, it, ws);
    const ax = applyA(d.cp, it.X.v, it.xL, it.xF);
    for (let i = 0; i < d.m; i++) assert.ok(Math.abs(ws.res.rp[i] - (ax[i] - d.cp.b[i] * it.tau)) < 1e-12);
    const M = d.sizes.map((n) => new Float64Array(n * n));
    const L = new Float64Array(d.nL);
    const F = new Float64Array(d.nF);
    applyAT(d.cp, it.y, M, L, F);
    d.sizes.forEach((n, k) => {
      for (let e = 0; e < n * n; e++) assert.ok(Math.abs(ws.res.rdK.v[k][e] - (d.cp.psd[k].c[e] * it.tau - M[k][e] - it.S.v[k][e])) < 1e-12);
    });
    let cx = 0;
    d.cp.psd.forEach((blk, k) => blk.c.forEach((c, e) => (cx += c * it.X.v[k][e])));
    d.cp.cL.forEach((c, p) => (cx += c * it.xL[p]));
    d.cp.cF.forEach((c, f) => (cx += c * it.xF[f]));
    const by = d.cp.b.reduce((s, b, i) => s + b * it.y[i], 0);
    assert.ok(Math.abs(ws.res.rg - (by - cx - it.kappa)) < 1e-12);
    let xs = 0;
    for (let e = 0; e < it.X.data.length; e++) xs += it.X.data[e] * it.S.data[e];
    for (let p = 0; p < d.nL; p++) xs += it.xL[p] * it.sL[p];
    assert.ok(Math.abs(ws.res.mu - (xs + it.tau * it.kappa) / (d.nu + 1)) < 1e-12);
  });

  it('the NT scaling W of a symmetric block satisfies W S W = X, and Gᵀ S G = G⁻¹ X G⁻ᵀ = diag(λ) (Todd, Toh & Tütüncü 1998)', () => {
    const { d, it, ws } = setup(2);
    assert.ok(ntScaling(d, it, ws));
    const n = d.sizes[0];
    const { W, G, lam } = ws.nt;
    const wsw = mulDense(mulDense(W.v[0], it.S.v[0], n), W.v[0], n);
    assert.ok(maxAbsDiff(wsw, it.X.v[0]) < 1e-10 * n, 'W S W = X');
    const gtsg = mulDense(mulDense(transpose(G.v[0], n), it.S.v[0], n), G.v[0], n);
    const diag = new Float64Array(n * n);
    for (let i = 0; i < n; i++) diag[i * n + i] = lam.v[0][i];
    assert.ok(maxAbsDiff(gtsg, diag) < 1e-10 * n, 'Gᵀ S G = diag(λ)');
    // Orthant: g² = x/s and λ² = x s.
    for (let p = 0; p < d.nL; p++) {
      assert.ok(Math.abs(ws.nt.gL[p] ** 2 - it.xL[p] / it.sL[p]) < 1e-12 && Math.abs(ws.nt.lamL[p] ** 2 - it.xL[p] * it.sL[p]) < 1e-12);
    }
  });

  it('the NT scaling refuses an iterate that is not interior (X with a negative eigenvalue; τ = 0) (definition of the interior)', () => {
    const { d, it, ws } = setup(3);
    const x = it.X.v[0];
    const n = d.sizes[0];
    for (let i = 0; i < n; i++) x[i * n + i] -= 100;
    assert.equal(ntScaling(d, it, ws), false);
    const b = setup(3);
    b.it.tau = 0;
    assert.equal(ntScaling(b.d, b.it, b.ws), false);
  });

  it('the Newton direction solves the linearized embedding: A Δx − bΔτ = −η r_p, −AᵀΔy − Δs + cΔτ = −η r_d, b·Δy − ⟨c, Δx⟩ − Δκ = −η r_g, κΔτ + τΔκ = σμ − τκ, and the scaled complementarity ½(λ(ΔX_s + ΔS_s) + (ΔX_s + ΔS_s)λ) = σμ − λ² (Xu, Hung & Ye 1996)', () => {
    const { d, it, ws } = setup(4);
    computeResiduals(d, it, ws);
    assert.ok(ntScaling(d, it, ws));
    const schur = new SchurSystem(d.cp);
    prepareDirections(d, it, ws, schur);
    const eta = 0.7;
    const sigmaMu = 0.3 * ws.res.mu;
    newtonDirection(d, it, ws, schur, eta, sigmaMu, false, 0);
    const dir = ws.dir;
    const adx = applyA(d.cp, dir.dX.v, dir.dxL, dir.dxF);
    for (let i = 0; i < d.m; i++) assert.ok(Math.abs(adx[i] - d.cp.b[i] * dir.dtau + eta * ws.res.rp[i]) < 1e-9, `row ${i}`);
    const M = d.sizes.map((n) => new Float64Array(n * n));
    const L = new Float64Array(d.nL);
    const F = new Float64Array(d.nF);
    applyAT(d.cp, dir.dy, M, L, F);
    d.sizes.forEach((n, k) => {
      for (let e = 0; e < n * n; e++) {
        const lhs = -M[k][e] - dir.dS.v[k][e] + d.cp.psd[k].c[e] * dir.dtau;
        assert.ok(Math.abs(lhs + eta * ws.res.rdK.v[k][e]) < 1e-9);
      }
    });
    for (let p = 0; p < d.nL; p++) assert.ok(Math.abs(-L[p] - dir.dsL[p] + d.cp.cL[p] * dir.dtau + eta * ws.res.rdL[p]) < 1e-9);
    for (let f = 0; f < d.nF; f++) assert.ok(Math.abs(-F[f] + d.cp.cF[f] * dir.dtau + eta * ws.res.rdF[f]) < 1e-9, 'free block: Aᵀ_f Δy = c_f Δτ + η r_d');
    let cdx = 0;
    d.cp.psd.forEach((blk, k) => blk.c.forEach((c, e) => (cdx += c * dir.dX.v[k][e])));
    d.cp.cL.forEach((c, p) => (cdx += c * dir.dxL[p]));
    d.cp.cF.forEach((c, f) => (cdx += c * dir.dxF[f]));
    const bdy = d.cp.b.reduce((s, b, i) => s + b * dir.dy[i], 0);
    assert.ok(Math.abs(bdy - cdx - dir.dkappa + eta * ws.res.rg) < 1e-9, 'gap row');
    assert.ok(Math.abs(it.kappa * dir.dtau + it.tau * dir.dkappa - (sigmaMu - it.tau * it.kappa)) < 1e-9, 'τκ row');
    // Symmetric block 0: scaled complementarity.
    const n = d.sizes[0];
    const l = ws.nt.lam.v[0];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const s = dir.dXs.v[0][i * n + j] + dir.dSs.v[0][i * n + j];
      const lhs = 0.5 * (l[i] + l[j]) * s;
      const rhs = i === j ? sigmaMu - l[i] * l[i] : 0;
      assert.ok(Math.abs(lhs - rhs) < 1e-9, `(${i}, ${j})`);
    }
    // Orthant: λ(Δx_s + Δs_s) = σμ − λ².
    for (let p = 0; p < d.nL; p++) {
      const lp = ws.nt.lamL[p];
      assert.ok(Math.abs(lp * (dir.dxLs[p] + dir.dsLs[p]) - (sigmaMu - lp * lp)) < 1e-9);
    }
    // The corrector of this direction is the Hermitian part of ΔX_s ΔS_s.
    mehrotraCorrector(d, ws);
    const prod = mulDense(dir.dXs.v[0], dir.dSs.v[0], n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      assert.ok(Math.abs(ws.corr.v[0][i * n + j] - 0.5 * (prod[i * n + j] + prod[j * n + i])) < 1e-12);
    }
  });

  it('the largest step leaves the iterate on the boundary of the cone: λ_min of the scaled block at α_max is 0, and a safeguarded step asked to go twice as far comes back inside (definition of the step length)', () => {
    const { d, it, ws } = setup(5);
    computeResiduals(d, it, ws);
    assert.ok(ntScaling(d, it, ws));
    const schur = new SchurSystem(d.cp);
    prepareDirections(d, it, ws, schur);
    newtonDirection(d, it, ws, schur, 1, 0, false, 0);
    const a = maxStep(d, it, ws);
    assert.ok(a > 0 && a < Infinity, `α_max = ${a}`);
    // At α_max some cone variable reaches its boundary: the smallest scaled eigenvalue (or ratio) over
    // all blocks is 0 (relative to the block).
    let smallest = Infinity;
    d.sizes.forEach((n, k) => {
      const l = ws.nt.lam.v[k];
      for (const D of [ws.dir.dXs.v[k], ws.dir.dSs.v[k]]) {
        if (d.herm[k]) {
          // Complex h×h scaled step, through its real embedding.
          const h = n / 2;
          const c = new Float64Array(2 * h * h);
          for (let i = 0; i < h; i++) for (let j = 0; j < h; j++) {
            const f = a / Math.sqrt(l[i] * l[j]);
            const [p, q] = i >= j ? [i, j] : [j, i];
            const sign = i >= j ? 1 : -1; // the kernels keep the lower triangle
            c[i * h + j] = (i === j ? 1 : 0) + f * D[p * h + q];
            c[h * h + i * h + j] = sign * f * D[h * h + p * h + q];
          }
          const e = new Float64Array(n * n);
          embedComplex(c, h, e);
          smallest = Math.min(smallest, minEig(e, n));
          continue;
        }
        const t = new Float64Array(n * n);
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) t[i * n + j] = (i === j ? 1 : 0) + (a * D[i * n + j]) / Math.sqrt(l[i] * l[j]);
        smallest = Math.min(smallest, minEig(t, n));
      }
    });
    for (let p = 0; p < d.nL; p++) {
      smallest = Math.min(smallest, 1 + (a * ws.dir.dxLs[p]) / ws.nt.lamL[p], 1 + (a * ws.dir.dsLs[p]) / ws.nt.lamL[p]);
    }
    smallest = Math.min(smallest, 1 + (a * ws.dir.dtau) / it.tau, 1 + (a * ws.dir.dkappa) / it.kappa);
    assert.ok(Math.abs(smallest) < 1e-9, `the boundary is reached at α_max and not before (${smallest})`);
    // A step of 2α_max leaves the cone and is shortened.
    const taken = safeguardedStep(d, it, ws, Math.min(2 * a, 1e6));
    assert.ok(taken.step > 0 && taken.step < 2 * a && taken.shortened > 0, JSON.stringify(taken));
    assert.ok(ntScaling(d, it, ws), 'the accepted iterate is interior');
  });

  it('the best iterate kept is the predecessor of the first iterate that got worse, rebuilt as x − α·Δx (common practice, no published source)', () => {
    const { d, it, ws } = setup(6);
    const before = new Iterate(d);
    before.copyFrom(it);
    const best = new BestIterate();
    best.observe(d, it, ws.dir, 0, 0, 5);
    for (let e = 0; e < ws.dir.dX.data.length; e++) ws.dir.dX.data[e] = 0.01 * (e % 7);
    ws.dir.dtau = 0.1;
    it.move(0.5, ws.dir);
    best.observe(d, it, ws.dir, 0.5, 1, 9);
    const kept = best.stash(1)!;
    assert.ok(kept && best.iteration === 0);
    assert.ok(maxAbsDiff(kept.X.data, before.X.data) < 1e-15 && Math.abs(kept.tau - before.tau) < 1e-15);
    assert.equal(best.stash(0), null, 'nothing to return when the best is the current iterate');
  });
});
