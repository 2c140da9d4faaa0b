/**
 * The state of one interior-point solve, made explicit: the problem data fixed for the solve
 * (SolverData), the iterate of the homogeneous self-dual embedding (Iterate), and the storage every
 * phase of an iteration reads and writes (Workspace: NT scaling, residuals, Newton direction, scratch),
 * all allocated once per solve so that thousands of small blocks cause no garbage per iteration.
 *
 * The phases themselves are one module each: residuals.ts, nt-scaling.ts, direction.ts, step.ts,
 * termination.ts; solver.ts runs them in order. Each phase is a function of (data, iterate, workspace),
 * so a test can set up any iterate and check one phase against its definition.
 *
 * Storage conventions: a PSD block of internal size n (twice the user's size for a Hermitian block,
 * which is stored through its real embedding, compile.ts) is a row-major n×n slot of one Float64Array
 * per kind (Blocks). Hermitian blocks keep their O(n³) per-block work in complex arithmetic
 * (src/linalg/dense-complex.ts layout) in the first 2h² numbers of their slot (h = n/2) for the
 * scaling G, W, the scaled directions and the corrector; X, S, their steps and every matrix that the
 * linear maps A(·), Aᵀ(·) read stay embedded.
 *
 * Does not: compute anything beyond the starting point and the moves along a direction.
 * Cost: memory O(Σ n_k² + m + orthant + free) numbers, a few dozen arrays of that size.
 */
import { compile, type Compiled } from './compile.js';
import { equilibrate, type Scaling } from './scaling.js';
import { extractHermitian } from '../linalg/dense-complex.js';
import type { SdpProblem } from './types.js';

/** Per-PSD-block storage in one buffer: `v[k]` is block k's slot of `sizes[k]` numbers. */
export class Blocks {
  readonly data: Float64Array;
  readonly v: Float64Array[];
  constructor(sizes: readonly number[]) {
    let total = 0;
    for (const s of sizes) total += s;
    this.data = new Float64Array(total);
    this.v = [];
    let off = 0;
    for (const s of sizes) {
      this.v.push(this.data.subarray(off, off + s));
      off += s;
    }
  }
}

export function dotv(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k] * b[k];
  return s;
}

export function norm2(a: ArrayLike<number>): number {
  return Math.sqrt(dotv(a, a));
}

/** The problem data of one solve, fixed throughout: the equilibrated problem and its sizes and norms. */
export interface SolverData {
  /** The compiled problem in the user's scale (for the reported numbers). */
  user: Compiled;
  /** The equilibration (scaling.ts) and the problem the iterations run on. */
  scaling: Scaling;
  cp: Compiled;
  /** Number of PSD blocks, barrier degree, constraints, orthant and free sizes. */
  nb: number;
  nu: number;
  m: number;
  nL: number;
  nF: number;
  /** Internal sizes of the PSD blocks, their squares, the complex sizes h = n/2 of Hermitian blocks. */
  sizes: number[];
  sq: number[];
  hs: number[];
  herm: boolean[];
  nmax: number;
  /** Objective of each Hermitian block as a complex h×h matrix (empty for symmetric blocks). */
  cC: Float64Array[];
  /** ‖b‖ and ‖c‖ of the equilibrated problem, and of the user's. */
  bNorm: number;
  cNorm: number;
  bNormUser: number;
  cNormUser: number;
}

/** Compile, equilibrate and measure a problem (throws RhoError for a malformed one). */
export function solverData(problem: SdpProblem): SolverData {
  const user = compile(problem);
  const scaling = equilibrate(user);
  const cp = scaling.cp;
  const sizes = cp.psd.map((blk) => blk.n);
  const sq = sizes.map((n) => n * n);
  const hs = sizes.map((n) => n / 2);
  const cC = cp.psd.map((blk, k) => {
    if (!blk.hermitian) return new Float64Array(0);
    const out = new Float64Array(sq[k] / 2);
    extractHermitian(blk.c, hs[k], out);
    return out;
  });
  const cNorm = (c: Compiled): number => {
    let s = dotv(c.cL, c.cL) + dotv(c.cF, c.cF);
    for (const blk of c.psd) s += dotv(blk.c, blk.c);
    return Math.sqrt(s);
  };
  return {
    user,
    scaling,
    cp,
    nb: cp.psd.length,
    nu: cp.degree,
    m: cp.m,
    nL: cp.nL,
    nF: cp.nF,
    sizes,
    sq,
    hs,
    herm: cp.psd.map((blk) => blk.hermitian),
    nmax: Math.max(1, ...sizes),
    cC,
    bNorm: norm2(cp.b),
    cNorm: cNorm(cp),
    bNormUser: norm2(user.b),
    cNormUser: cNorm(user),
  };
}

/** A Newton direction: the steps of every variable, unscaled and (for cones) NT-scaled. */
export class Direction {
  readonly dX: Blocks;
  readonly dS: Blocks;
  /** Scaled steps G⁻¹ΔX G⁻ᵀ and Gᵀ ΔS G (complex h×h for Hermitian blocks). */
  readonly dXs: Blocks;
  readonly dSs: Blocks;
  readonly dxL: Float64Array;
  readonly dsL: Float64Array;
  readonly dxLs: Float64Array;
  readonly dsLs: Float64Array;
  readonly dxF: Float64Array;
  readonly dy: Float64Array;
  dtau = 0;
  dkappa = 0;
  constructor(d: SolverData) {
    this.dX = new Blocks(d.sq);
    this.dS = new Blocks(d.sq);
    this.dXs = new Blocks(d.sq);
    this.dSs = new Blocks(d.sq);
    this.dxL = new Float64Array(d.nL);
    this.dsL = new Float64Array(d.nL);
    this.dxLs = new Float64Array(d.nL);
    this.dsLs = new Float64Array(d.nL);
    this.dxF = new Float64Array(d.nF);
    this.dy = new Float64Array(d.m);
  }
}

/** The iterate (X, S, x_L, s_L, x_F, y, τ, κ) of the homogeneous self-dual embedding. */
export class Iterate {
  readonly X: Blocks;
  readonly S: Blocks;
  readonly xL: Float64Array;
  readonly sL: Float64Array;
  readonly xF: Float64Array;
  readonly y: Float64Array;
  tau = 1;
  kappa = 1;
  constructor(d: SolverData) {
    this.X = new Blocks(d.sq);
    this.S = new Blocks(d.sq);
    this.xL = new Float64Array(d.nL);
    this.sL = new Float64Array(d.nL);
    this.xF = new Float64Array(d.nF);
    this.y = new Float64Array(d.m);
  }

  /** The standard starting point x = s = e (identity blocks, ones), y = 0, x_F = 0, τ = κ = 1. */
  static start(d: SolverData): Iterate {
    const it = new Iterate(d);
    d.cp.psd.forEach((blk, k) => {
      for (let i = 0; i < blk.n; i++) it.X.v[k][i * blk.n + i] = it.S.v[k][i * blk.n + i] = 1;
    });
    it.xL.fill(1);
    it.sL.fill(1);
    return it;
  }

  copyFrom(t: Iterate): void {
    this.X.data.set(t.X.data);
    this.S.data.set(t.S.data);
    this.xL.set(t.xL);
    this.sL.set(t.sL);
    this.xF.set(t.xF);
    this.y.set(t.y);
    this.tau = t.tau;
    this.kappa = t.kappa;
  }

  /** Move along `dir` by `delta` (a step, or a correction of one): v += delta·Δv for every variable. */
  move(delta: number, dir: Direction): void {
    const Xd = this.X.data;
    const Sd = this.S.data;
    const dXd = dir.dX.data;
    const dSd = dir.dS.data;
    for (let e = 0; e < Xd.length; e++) {
      Xd[e] += delta * dXd[e];
      Sd[e] += delta * dSd[e];
    }
    const { xL, sL, xF, y } = this;
    for (let p = 0; p < xL.length; p++) {
      xL[p] += delta * dir.dxL[p];
      sL[p] += delta * dir.dsL[p];
    }
    for (let f = 0; f < xF.length; f++) xF[f] += delta * dir.dxF[f];
    for (let i = 0; i < y.length; i++) y[i] += delta * dir.dy[i];
    this.tau += delta * dir.dtau;
    this.kappa += delta * dir.dkappa;
  }

  /** this = from − a·dir (the iterate before a step of length a along dir). */
  setBefore(from: Iterate, a: number, dir: Direction): void {
    for (let e = 0; e < this.X.data.length; e++) {
      this.X.data[e] = from.X.data[e] - a * dir.dX.data[e];
      this.S.data[e] = from.S.data[e] - a * dir.dS.data[e];
    }
    for (let p = 0; p < this.xL.length; p++) {
      this.xL[p] = from.xL[p] - a * dir.dxL[p];
      this.sL[p] = from.sL[p] - a * dir.dsL[p];
    }
    for (let f = 0; f < this.xF.length; f++) this.xF[f] = from.xF[f] - a * dir.dxF[f];
    for (let i = 0; i < this.y.length; i++) this.y[i] = from.y[i] - a * dir.dy[i];
    this.tau = from.tau - a * dir.dtau;
    this.kappa = from.kappa - a * dir.dkappa;
  }
}

/** NT scaling of an interior iterate (nt-scaling.ts writes it). */
export class NtScaling {
  /** G with Gᵀ S G = G⁻¹ X G⁻ᵀ = diag(λ); W = G Gᵀ (complex h×h for Hermitian blocks). */
  readonly G: Blocks;
  readonly W: Blocks;
  /** λ per block (n numbers; a Hermitian block's spectrum doubled, as in its embedding). */
  readonly lam: Blocks;
  /** Orthant: g = √(x/s), λ = √(x s), d = x/s. */
  readonly gL: Float64Array;
  readonly lamL: Float64Array;
  readonly dL: Float64Array;
  /** Scratch: Cholesky factors of X and S, the product Rᵀ L, its right singular vectors. */
  readonly Lx: Blocks;
  readonly Ls: Blocks;
  readonly Bm: Blocks;
  readonly V: Blocks;
  constructor(d: SolverData) {
    this.G = new Blocks(d.sq);
    this.W = new Blocks(d.sq);
    this.lam = new Blocks(d.sizes);
    this.gL = new Float64Array(d.nL);
    this.lamL = new Float64Array(d.nL);
    this.dL = new Float64Array(d.nL);
    this.Lx = new Blocks(d.sq);
    this.Ls = new Blocks(d.sq);
    this.Bm = new Blocks(d.sq);
    this.V = new Blocks(d.sq);
  }
}

/** Residuals of an iterate (residuals.ts writes them). */
export class Residuals {
  /** r_p = A x − b τ. */
  readonly rp: Float64Array;
  /** r_d = c τ − Aᵀy − s, per part. */
  readonly rdK: Blocks;
  readonly rdL: Float64Array;
  readonly rdF: Float64Array;
  /** ⟨c, x⟩, b·y, r_g = b·y − ⟨c, x⟩ − κ, ⟨x, s⟩, μ = (⟨x, s⟩ + τκ)/(ν + 1), ‖r_d‖. */
  cx = 0;
  by = 0;
  rg = 0;
  xs = 0;
  mu = 0;
  rdNorm = 0;
  constructor(d: SolverData) {
    this.rp = new Float64Array(d.m);
    this.rdK = new Blocks(d.sq);
    this.rdL = new Float64Array(d.nL);
    this.rdF = new Float64Array(d.nF);
  }
}

/** Everything else a phase writes: the quantities fixed within one iteration, and scratch. */
export class Workspace {
  readonly nt: NtScaling;
  readonly res: Residuals;
  readonly dir: Direction;
  // Fixed within an iteration (direction.ts, prepareDirections).
  /** D c = W C W per block (embedded), d∘c on the orthant, A(Dc). */
  readonly Dc: Blocks;
  readonly DcL: Float64Array;
  readonly adc: Float64Array;
  /** W r_d W per block (complex h×h for Hermitian blocks). */
  readonly WrdW: Blocks;
  /** p = K⁻¹[A D c + b; c_f] and the denominator of Δτ without the direction's terms. */
  readonly pv: Float64Array;
  denomBase = 0;
  // Per direction.
  readonly Z: Blocks;
  readonly T: Blocks;
  readonly corr: Blocks;
  readonly zL: Float64Array;
  readonly TL: Float64Array;
  readonly corrL: Float64Array;
  readonly h1: Float64Array;
  readonly h2: Float64Array;
  readonly qv: Float64Array;
  readonly AT: Float64Array;
  // Scratch for the linear maps and the per-block kernels.
  readonly Ax: Float64Array;
  readonly atyM: Blocks;
  readonly atyL: Float64Array;
  readonly atyF: Float64Array;
  readonly tmp1: Float64Array;
  readonly tmp2: Float64Array;
  readonly tmp3: Float64Array;
  readonly tmp4: Float64Array;
  readonly stepDiag: Float64Array;
  readonly stepOff2: Float64Array;
  readonly stepV: Float64Array;
  constructor(d: SolverData) {
    const nn = d.nmax * d.nmax;
    this.nt = new NtScaling(d);
    this.res = new Residuals(d);
    this.dir = new Direction(d);
    this.Dc = new Blocks(d.sq);
    this.DcL = new Float64Array(d.nL);
    this.adc = new Float64Array(d.m);
    this.WrdW = new Blocks(d.sq);
    this.pv = new Float64Array(d.m + d.nF);
    this.Z = new Blocks(d.sq);
    this.T = new Blocks(d.sq);
    this.corr = new Blocks(d.sq);
    this.zL = new Float64Array(d.nL);
    this.TL = new Float64Array(d.nL);
    this.corrL = new Float64Array(d.nL);
    this.h1 = new Float64Array(d.m + d.nF);
    this.h2 = new Float64Array(d.m + d.nF);
    this.qv = new Float64Array(d.m + d.nF);
    this.AT = new Float64Array(d.m);
    this.Ax = new Float64Array(d.m);
    this.atyM = new Blocks(d.sq);
    this.atyL = new Float64Array(d.nL);
    this.atyF = new Float64Array(d.nF);
    this.tmp1 = new Float64Array(nn);
    this.tmp2 = new Float64Array(nn);
    this.tmp3 = new Float64Array(nn);
    this.tmp4 = new Float64Array(nn);
    this.stepDiag = new Float64Array(d.nmax);
    this.stepOff2 = new Float64Array(d.nmax);
    this.stepV = new Float64Array(2 * d.nmax);
  }
}
