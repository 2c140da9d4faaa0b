/**
 * The Schur complement system of one interior-point iteration, assembled block by block and
 * factored by its group structure.
 *
 *   [ M    A_f ] [Δy  ]   [r ]      M_ij = Σ_k ⟨A_ik, W_k A_jk W_k⟩ + Σ_p a_ip a_jp d_p
 *   [ A_fᵀ  0  ] [Δx_f] = [r_f]     (W_k: NT scaling of PSD block k; d_p = x_p/s_p on the orthant)
 *
 * Assembly cost is per block: block k of internal size n touched by m_k constraints costs at most
 * m_k·min(nnz·n², 2n³) + m_k²·nnz, whichever of "form W A W densely" or "pair sparse entries
 * directly" is cheaper for each constraint (partial-trace constraints have n^(1/2)-ish entries). On
 * Hermitian blocks a coefficient is taken as A = A₀ + A₀* (one of each mirrored pair, oriented so A₀ has
 * few distinct rows R): W A W = T₀ + T₀* with T₀ = W[:,R] Ã₀ W[C,:] at |R|·n² instead of nnz·n², and
 * pairs are summed over A₀ only (Re tr(A W B W) = 2 Re[tr(A₀WB₀W) + tr(A₀WB₀*W)]), a quarter of the
 * entry pairs. Nothing is ever of size "total dimension squared". A term ½ Re tr(A_a P A_b P) can be
 * subtracted on one block (elimination.ts, which eliminates a fixed sub-block in closed form).
 *
 * Factorization follows compile.ts's grouping: M restricted to a group is dense (Cholesky of each
 * group, hand-written for the tiny sizes here, see dense.ts), groups are coupled only through
 * global rows and the free columns, which are eliminated last in one dense reduced system:
 * R = [M_gg A_fg; A_fgᵀ 0] − Σ_groups B_gᵀ D_g⁻¹ B_g. R is factored by our guarded Cholesky when
 * there are no free variables (positive definite) and by ml-matrix's LU otherwise (symmetric
 * indefinite). Cost per factorization: Σ_g (n_g³/3 + n_g²·r + n_g·r²) + r³ with r = globals + free,
 * i.e. linear in the number of groups when r is small.
 *
 * Does not: reorder within a group (no fill-reducing ordering), exploit sparsity inside a group,
 * or detect that a chain of two-block constraints merged everything into one large group (then
 * it is a plain dense Cholesky of M, still correct).
 */
import { LuDecomposition, Matrix } from 'ml-matrix';
import { backSolveT1, choleskyInPlaceGuarded, forwardSolve, forwardSolve1 } from '../linalg/dense.js';
import { cMul } from '../linalg/dense-complex.js';
import type { Compiled } from './compile.js';

/**
 * A Hermitian block's constraint coefficients, flat: constraint a's entries are ptr[a]..ptr[a+1]−1,
 * each (p, q, re + i·im) with its conjugate mirror listed separately, idx = q·n + p (n the complex
 * size); group/local: the constraint's Schur group (−1 for global rows) and index inside it.
 */
interface HermitianEntries {
  ptr: Int32Array;
  p: Int32Array;
  q: Int32Array;
  re: Float64Array;
  im: Float64Array;
  idx: Int32Array;
  group: Int32Array;
  local: Int32Array;
  /**
   * The same coefficients as A = A₀ + A₀* (A₀: the stored entries p ≤ q, diagonal ones halved), per
   * constraint hptr[a]..hptr[a+1]−1 with hIdx = q·n + p, and A₀'s distinct rows (rows[rptr[a]..]) and
   * columns (cols[cptr[a]..]) with each entry's slot in them: for W A W = T₀ + T₀*, T₀ = W[:,R] Ã₀ W[C,:].
   */
  hptr: Int32Array;
  hP: Int32Array;
  hQ: Int32Array;
  hIdx: Int32Array;
  hRe: Float64Array;
  hIm: Float64Array;
  rptr: Int32Array;
  rows: Int32Array;
  cptr: Int32Array;
  cols: Int32Array;
  slotR: Int32Array;
  slotC: Int32Array;
}

export class SchurSystem {
  private readonly cp: Compiled;
  private readonly nG: number;
  private readonly r: number;
  private readonly D: Float64Array[];
  private readonly B: Float64Array[];
  private readonly R: Float64Array;
  // Unfactored copies for iterative refinement.
  private readonly D0: Float64Array[];
  private readonly B0: Float64Array[];
  private readonly R0: Float64Array;
  private lu: LuDecomposition | null = null;
  // Scratch for block assembly, sized by the largest block (no allocation per block).
  private readonly sT: Float64Array;
  private readonly sTmp: Float64Array;
  private readonly sA: Float64Array;
  private readonly sSuffix: Float64Array;
  // Hermitian blocks: coefficient entries expanded with their mirrors (p, q, re, im), per
  // constraint, and complex scratch for W and W A W (size of the largest Hermitian block).
  private readonly hx: (HermitianEntries | null)[];
  private readonly sRow: Float64Array;
  // Complex scratch in dense-complex.ts's layout (real parts, then imaginary parts).
  private readonly cT: Float64Array;
  private readonly cA: Float64Array;
  private readonly cU: Float64Array;
  private readonly cSmall: Float64Array;
  private readonly cY: Float64Array;
  dependent = 0;

  constructor(cp: Compiled) {
    this.cp = cp;
    this.nG = cp.globals.length;
    this.r = this.nG + cp.nF;
    this.D = cp.groups.map((g) => new Float64Array(g.length * g.length));
    this.B = cp.groups.map((g) => new Float64Array(g.length * this.r));
    this.R = new Float64Array(this.r * this.r);
    this.D0 = this.D.map((d) => new Float64Array(d.length));
    this.B0 = this.B.map((d) => new Float64Array(d.length));
    this.R0 = new Float64Array(this.R.length);
    const nmax = Math.max(1, ...cp.psd.map((b) => b.n));
    const mmax = Math.max(1, ...cp.psd.map((b) => b.cons.length));
    this.sT = new Float64Array(nmax * nmax);
    this.sTmp = new Float64Array(nmax * nmax);
    this.sA = new Float64Array(nmax * nmax);
    this.sSuffix = new Float64Array(mmax + 1);
    this.sRow = new Float64Array(mmax);
    this.hx = cp.psd.map((blk) => {
      if (!blk.complex) return null;
      const cx = blk.complex;
      const h = blk.n / 2;
      const mk = cx.p.length;
      const ptr = new Int32Array(mk + 1);
      for (let a = 0; a < mk; a++) {
        let len = 0;
        for (let t = 0; t < cx.p[a].length; t++) len += cx.p[a][t] === cx.q[a][t] ? 1 : 2;
        ptr[a + 1] = ptr[a] + len;
      }
      const tot = ptr[mk];
      const out: HermitianEntries = {
        ptr,
        p: new Int32Array(tot),
        q: new Int32Array(tot),
        re: new Float64Array(tot),
        im: new Float64Array(tot),
        idx: new Int32Array(tot),
        group: new Int32Array(mk),
        local: new Int32Array(mk),
        hptr: new Int32Array(mk + 1),
        hP: new Int32Array(cx.p.reduce((t, x) => t + x.length, 0)),
        hQ: new Int32Array(cx.p.reduce((t, x) => t + x.length, 0)),
        hIdx: new Int32Array(cx.p.reduce((t, x) => t + x.length, 0)),
        hRe: new Float64Array(cx.p.reduce((t, x) => t + x.length, 0)),
        hIm: new Float64Array(cx.p.reduce((t, x) => t + x.length, 0)),
        rptr: new Int32Array(mk + 1),
        rows: new Int32Array(tot),
        cptr: new Int32Array(mk + 1),
        cols: new Int32Array(tot),
        slotR: new Int32Array(tot),
        slotC: new Int32Array(tot),
      };
      for (let a = 0; a < mk; a++) {
        const p = cx.p[a];
        const q = cx.q[a];
        const re = cx.re[a];
        const im = cx.im[a];
        let e = ptr[a];
        const put = (pp: number, qq: number, vr: number, vi: number) => {
          out.p[e] = pp;
          out.q[e] = qq;
          out.re[e] = vr;
          out.im[e] = vi;
          out.idx[e] = qq * h + pp;
          e++;
        };
        for (let t = 0; t < p.length; t++) {
          put(p[t], q[t], re[t], p[t] === q[t] ? 0 : im[t]);
          if (p[t] !== q[t]) put(q[t], p[t], re[t], -im[t]);
        }
        out.group[a] = cp.groupOf[blk.cons[a]];
        out.local[a] = cp.localIndex[blk.cons[a]];
        // A₀ (one of each mirrored pair, diagonal halved) with its distinct rows and columns. Each pair may
        // enter A₀ either way round; a greedy vertex cover picks the orientation, so that the rows are few
        // (the σ-coupling constraints: d_B rows (b, o) against d_B columns (b′, o′)).
        const len = p.length;
        const cnt = new Map<number, number>();
        for (let t = 0; t < len; t++) {
          cnt.set(p[t], (cnt.get(p[t]) ?? 0) + 1);
          if (p[t] !== q[t]) cnt.set(q[t], (cnt.get(q[t]) ?? 0) + 1);
        }
        const rowOf = new Int32Array(len).fill(-1);
        for (let left = len; left > 0;) {
          let x = -1;
          let best = 0;
          for (const [key, c] of cnt) if (c > best) [x, best] = [key, c];
          cnt.set(x, 0);
          for (let t = 0; t < len; t++) {
            if (rowOf[t] >= 0 || (p[t] !== x && q[t] !== x)) continue;
            rowOf[t] = x;
            left--;
            const other = p[t] === x ? q[t] : p[t];
            if (other !== x) cnt.set(other, (cnt.get(other) ?? 0) - 1);
          }
        }
        const rmap = new Map<number, number>();
        const cmap = new Map<number, number>();
        const h0 = out.hptr[a];
        for (let t = 0; t < len; t++) {
          const u = h0 + t;
          const flip = rowOf[t] !== p[t];
          const pr = flip ? q[t] : p[t];
          const qc = flip ? p[t] : q[t];
          const half = p[t] === q[t] ? 0.5 : 1;
          out.hP[u] = pr;
          out.hQ[u] = qc;
          out.hIdx[u] = qc * h + pr;
          out.hRe[u] = half * re[t];
          out.hIm[u] = p[t] === q[t] ? 0 : flip ? -im[t] : im[t];
          let sr = rmap.get(pr);
          if (sr === undefined) {
            sr = rmap.size;
            rmap.set(pr, sr);
            out.rows[out.rptr[a] + sr] = pr;
          }
          let sc = cmap.get(qc);
          if (sc === undefined) {
            sc = cmap.size;
            cmap.set(qc, sc);
            out.cols[out.cptr[a] + sc] = qc;
          }
          out.slotR[u] = sr;
          out.slotC[u] = sc;
        }
        out.hptr[a + 1] = h0 + p.length;
        out.rptr[a + 1] = out.rptr[a] + rmap.size;
        out.cptr[a + 1] = out.cptr[a] + cmap.size;
      }
      return out;
    });
    const hmax = Math.max(1, ...cp.psd.filter((b) => b.complex).map((b) => b.n / 2));
    const hh = hmax * hmax;
    let rc = 1;
    for (const e of this.hx) if (e) for (let a = 0; a + 1 < e.rptr.length; a++) rc = Math.max(rc, (e.rptr[a + 1] - e.rptr[a]) * (e.cptr[a + 1] - e.cptr[a]));
    this.cSmall = new Float64Array(2 * rc);
    this.cY = new Float64Array(2 * hh);
    this.cT = new Float64Array(2 * hh);
    this.cA = new Float64Array(2 * hh);
    this.cU = new Float64Array(2 * hh);
  }

  /**
   * Schur contributions of a Hermitian block in complex arithmetic. The internal block is the
   * embedding emb(·) = [[Re, −Im], [Im, Re]] with coefficients emb(A)/2, and W is the embedding of
   * the complex NT scaling W_c, so ⟨emb(A_a)/2, W emb(A_b)/2 W⟩ = ½ Re tr(A_a W_c A_b W_c): the
   * same number from matrices of half the size (about a quarter of the real flops).
   *
   * The coefficients are flat arrays (HermitianEntries), and a pair of constraints in the same
   * group adds straight into the group's upper triangle (mirrored once after assembly), so the
   * O(m_k²) pair loop of coordinate-type constraints (one or two entries each, the bulk of the
   * one-shot quantities' rows) runs without per-pair dispatch.
   */
  private assembleHermitianBlock(k: number, w: Float64Array, sign = 1): void {
    const blk = this.cp.psd[k];
    const E = this.hx[k]!;
    const n = blk.n / 2;
    const nn = n * n;
    const mk = blk.cons.length;
    if (mk === 0) return;
    const ptr = E.ptr;
    const P = E.p;
    const Q = E.q;
    const RE = E.re;
    const IM = E.im;
    const IDX = E.idx;
    const grp = E.group;
    const loc = E.local;
    // W arrives as the complex n×n scaling (dense-complex.ts layout: real parts, then imaginary parts).
    const wr = w;
    const wi = w.subarray(nn, 2 * nn);
    const suffix = this.sSuffix;
    suffix[mk] = 0;
    for (let a = mk - 1; a >= 0; a--) suffix[a] = suffix[a + 1] + ptr[a + 1] - ptr[a];
    const T = this.cT;
    const Tr = T;
    const Ti = T.subarray(nn, 2 * nn);
    const row = this.sRow;
    for (let a = 0; a < mk; a++) {
      const a0 = ptr[a];
      const a1 = ptr[a + 1];
      const na = a1 - a0;
      const formCost = Math.min(na * nn, 2 * nn * n) + suffix[a];
      const pairCost = 2 * na * suffix[a];
      if (formCost < pairCost) {
        // T = W A_a W (complex n×n)
        const nr = E.rptr[a + 1] - E.rptr[a];
        const nc = E.cptr[a + 1] - E.cptr[a];
        let halfPairs = false;
        if (nr * nn + nr * nc * n < Math.min(na * nn, 2 * nn * n)) {
          // Few distinct rows R and columns C of A₀: T₀ = W[:,R] Ã₀ W[C,:], T = T₀ + T₀* (σ-coupling
          // constraints of the fidelity of recovery: d_B rows for d_B² entries).
          halfPairs = true;
          const As = this.cSmall;
          const ncc = nr * nc;
          As.fill(0, 0, 2 * ncc);
          for (let u = E.hptr[a]; u < E.hptr[a + 1]; u++) {
            const sl = E.slotR[u] * nc + E.slotC[u];
            As[sl] += E.hRe[u];
            As[ncc + sl] += E.hIm[u];
          }
          // Y = Ã₀ W[C,:] (|R| × n)
          const Y = this.cY;
          const r0 = E.rptr[a];
          const c0 = E.cptr[a];
          Y.fill(0, 0, 2 * nr * n);
          for (let i = 0; i < nr; i++) {
            const yo = i * n;
            for (let j = 0; j < nc; j++) {
              const ar = As[i * nc + j];
              const ai = As[ncc + i * nc + j];
              if (ar === 0 && ai === 0) continue;
              const wo = E.cols[c0 + j] * n;
              for (let y = 0; y < n; y++) {
                const wr0 = wr[wo + y];
                const wi0 = wi[wo + y];
                Y[yo + y] += ar * wr0 - ai * wi0;
                Y[nr * n + yo + y] += ar * wi0 + ai * wr0;
              }
            }
          }
          // T₀ = W[:,R] Y, then T = T₀ + T₀*
          Tr.fill(0, 0, nn);
          Ti.fill(0, 0, nn);
          for (let x = 0; x < n; x++) {
            const xo = x * n;
            for (let i = 0; i < nr; i++) {
              const col = E.rows[r0 + i];
              const cr = wr[xo + col];
              const ci = wi[xo + col];
              const yo = i * n;
              const yio = nr * n + yo;
              for (let y = 0; y < n; y++) {
                const yr = Y[yo + y];
                const yi = Y[yio + y];
                Tr[xo + y] += cr * yr - ci * yi;
                Ti[xo + y] += cr * yi + ci * yr;
              }
            }
          }
          for (let x = 0; x < n; x++) {
            Tr[x * n + x] *= 2;
            Ti[x * n + x] = 0;
            for (let y = x + 1; y < n; y++) {
              const sr = Tr[x * n + y] + Tr[y * n + x];
              const si = Ti[x * n + y] - Ti[y * n + x];
              Tr[x * n + y] = sr;
              Ti[x * n + y] = si;
              Tr[y * n + x] = sr;
              Ti[y * n + x] = -si;
            }
          }
        } else if (na * n < 2 * nn) {
          Tr.fill(0, 0, nn);
          Ti.fill(0, 0, nn);
          for (let t = a0; t < a1; t++) {
            const p = P[t];
            const qo = Q[t] * n;
            const ar = RE[t];
            const ai = IM[t];
            for (let x = 0; x < n; x++) {
              // c = α W_xp
              const xr = wr[x * n + p];
              const xi = wi[x * n + p];
              const cr = ar * xr - ai * xi;
              const ci = ar * xi + ai * xr;
              const xo = x * n;
              for (let y = 0; y < n; y++) {
                const yr = wr[qo + y];
                const yi = wi[qo + y];
                Tr[xo + y] += cr * yr - ci * yi;
                Ti[xo + y] += cr * yi + ci * yr;
              }
            }
          }
        } else {
          const A = this.cA;
          A.fill(0, 0, 2 * nn);
          for (let t = a0; t < a1; t++) {
            A[P[t] * n + Q[t]] += RE[t];
            A[nn + P[t] * n + Q[t]] += IM[t];
          }
          cMul(w, A, n, this.cU);
          cMul(this.cU, w, n, T);
        }
        // Re(β T_sr) summed over b's expanded entries (r, s, β); IDX holds s·n + r. T is Hermitian, so
        // twice the sum over A₀'s entries is the same number (half the work) when T is exactly so.
        if (halfPairs) {
          const HI = E.hIdx;
          const HR = E.hRe;
          const HM = E.hIm;
          const HP = E.hptr;
          for (let b = a; b < mk; b++) {
            let sum = 0;
            for (let u = HP[b]; u < HP[b + 1]; u++) {
              const idx = HI[u];
              sum += HR[u] * Tr[idx] - HM[u] * Ti[idx];
            }
            row[b] = 2 * sum;
          }
        } else for (let b = a; b < mk; b++) {
          let sum = 0;
          for (let u = ptr[b]; u < ptr[b + 1]; u++) {
            const idx = IDX[u];
            sum += RE[u] * Tr[idx] - IM[u] * Ti[idx];
          }
          row[b] = sum;
        }
      } else {
        // Pairs of entries directly, over A₀ only: Re tr(A W B W) = 2 Re[tr(A₀ W B₀ W) + tr(A₀ W B₀* W)]
        // (A = A₀ + A₀*, W Hermitian), with tr(αE_pq W βE_rs W) = αβ W_qr W_sp: a quarter of the pairs of
        // the expanded entries.
        const HP = E.hptr;
        const HPp = E.hP;
        const HQ = E.hQ;
        const HR = E.hRe;
        const HM = E.hIm;
        const t0 = HP[a];
        const t1 = HP[a + 1];
        for (let b = a; b < mk; b++) {
          let sum = 0;
          for (let t = t0; t < t1; t++) {
            const pa = HPp[t];
            const qo = HQ[t] * n;
            const ar = HR[t];
            const ai = HM[t];
            for (let u = HP[b]; u < HP[b + 1]; u++) {
              const rb = HPp[u];
              const sb = HQ[u];
              const br = HR[u];
              const bi = HM[u];
              const i1 = qo + rb;
              const i2 = sb * n + pa;
              const i3 = qo + sb;
              const i4 = rb * n + pa;
              const x1r = wr[i1] * wr[i2] - wi[i1] * wi[i2];
              const x1i = wr[i1] * wi[i2] + wi[i1] * wr[i2];
              const x2r = wr[i3] * wr[i4] - wi[i3] * wi[i4];
              const x2i = wr[i3] * wi[i4] + wi[i3] * wr[i4];
              // αβ·x₁ + αβ̄·x₂, real part
              sum += (ar * br - ai * bi) * x1r - (ar * bi + ai * br) * x1i + (ar * br + ai * bi) * x2r - (ai * br - ar * bi) * x2i;
            }
          }
          row[b] = 2 * sum;
        }
      }
      // Scatter ½·row into the Schur complement (−½·row for a subtracted term).
      if (sign !== 1) for (let b = a; b < mk; b++) row[b] *= sign;
      const ga = grp[a];
      const i = blk.cons[a];
      if (ga >= 0) {
        const d = this.D[ga];
        const ng = this.cp.groups[ga].length;
        const la = loc[a];
        for (let b = a; b < mk; b++) {
          const v = 0.5 * row[b];
          if (grp[b] === ga) {
            const lb = loc[b];
            if (la <= lb) d[la * ng + lb] += v;
            else d[lb * ng + la] += v;
          } else this.addPair(i, blk.cons[b], v);
        }
      } else {
        for (let b = a; b < mk; b++) this.addPair(i, blk.cons[b], 0.5 * row[b]);
      }
    }
  }

  private addPair(i: number, j: number, v: number): void {
    const cp = this.cp;
    const gi = cp.groupOf[i];
    const gj = cp.groupOf[j];
    const li = cp.localIndex[i];
    const lj = cp.localIndex[j];
    if (gi >= 0 && gj >= 0) {
      // same group necessarily
      // upper triangle only; assembleAndFactor mirrors it
      const n = cp.groups[gi].length;
      const d = this.D[gi];
      if (li <= lj) d[li * n + lj] += v;
      else d[lj * n + li] += v;
    } else if (gi >= 0) {
      this.B[gi][li * this.r + lj] += v;
    } else if (gj >= 0) {
      this.B[gj][lj * this.r + li] += v;
    } else {
      this.R[li * this.r + lj] += v;
      if (i !== j) this.R[lj * this.r + li] += v;
    }
  }

  /**
   * Assemble and factor for scalings W (per PSD block: dense n×n real for symmetric blocks, the
   * complex n/2×n/2 scaling in complexdense.ts's layout for Hermitian blocks) and orthant weights d.
   */
  assembleAndFactor(W: Float64Array[], d: Float64Array, subtract?: { block: number; w: Float64Array }): void {
    const cp = this.cp;
    for (const a of this.D) a.fill(0);
    for (const a of this.B) a.fill(0);
    this.R.fill(0);
    cp.psd.forEach((blk, k) => (blk.complex ? this.assembleHermitianBlock(k, W[k]) : this.assembleBlock(blk, W[k])));
    // A term ½ Re tr(A_a P A_b P) taken off one Hermitian block (elimination.ts: a fixed sub-block solved in closed form).
    if (subtract) this.assembleHermitianBlock(subtract.block, subtract.w, -1);
    for (let p = 0; p < cp.nL; p++) {
      const s = cp.linColPtr[p];
      const e = cp.linColPtr[p + 1];
      const dp = d[p];
      for (let a = s; a < e; a++) {
        const va = cp.linColVal[a] * dp;
        const i = cp.linColRow[a];
        for (let b = a; b < e; b++) this.addPair(i, cp.linColRow[b], va * cp.linColVal[b]);
      }
    }
    // Free columns (constant).
    for (let i = 0; i < cp.m; i++) {
      for (let e = cp.freeRowPtr[i]; e < cp.freeRowPtr[i + 1]; e++) {
        const col = this.nG + cp.freeIdx[e];
        const v = cp.freeVal[e];
        const g = cp.groupOf[i];
        const li = cp.localIndex[i];
        if (g >= 0) this.B[g][li * this.r + col] += v;
        else {
          this.R[li * this.r + col] += v;
          this.R[col * this.r + li] += v;
        }
      }
    }
    // Group blocks were accumulated in their upper triangle: mirror.
    this.D.forEach((a, g) => {
      const n = cp.groups[g].length;
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) a[j * n + i] = a[i * n + j];
      this.D0[g].set(a);
    });
    this.B.forEach((a, g) => this.B0[g].set(a));
    this.R0.set(this.R);
    this.factor();
  }

  private assembleBlock(blk: Compiled['psd'][number], w: Float64Array): void {
    const n = blk.n;
    const mk = blk.cons.length;
    if (mk === 0) return;
    const nnz = (a: number) => blk.tv[a].length;
    const suffix = this.sSuffix;
    suffix[mk] = 0;
    for (let a = mk - 1; a >= 0; a--) suffix[a] = suffix[a + 1] + nnz(a);
    const T = this.sT.subarray(0, n * n);
    const tmp = this.sTmp.subarray(0, n * n);
    for (let a = 0; a < mk; a++) {
      const pa = blk.tp[a];
      const qa = blk.tq[a];
      const va = blk.tv[a];
      const i = blk.cons[a];
      const formCost = Math.min(nnz(a) * n * n, 2 * n * n * n) + suffix[a];
      const pairCost = 2 * nnz(a) * suffix[a];
      if (formCost < pairCost) {
        // T = W A_a W
        if (nnz(a) * n < 2 * n * n) {
          T.fill(0);
          for (let t = 0; t < nnz(a); t++) {
            const p = pa[t];
            const q = qa[t];
            const v = va[t];
            for (let r = 0; r < n; r++) {
              const wrp = w[r * n + p] * v;
              const wrq = w[r * n + q] * v;
              const ro = r * n;
              if (p === q) {
                for (let c = 0; c < n; c++) T[ro + c] += wrp * w[p * n + c];
              } else {
                for (let c = 0; c < n; c++) T[ro + c] += wrp * w[q * n + c] + wrq * w[p * n + c];
              }
            }
          }
        } else {
          const A = this.sA.subarray(0, n * n);
          A.fill(0);
          for (let t = 0; t < nnz(a); t++) {
            A[pa[t] * n + qa[t]] = va[t];
            A[qa[t] * n + pa[t]] = va[t];
          }
          // tmp = W A ; T = tmp W
          tmp.fill(0);
          for (let r = 0; r < n; r++) {
            for (let k = 0; k < n; k++) {
              const wrk = w[r * n + k];
              if (wrk === 0) continue;
              for (let c = 0; c < n; c++) tmp[r * n + c] += wrk * A[k * n + c];
            }
          }
          T.fill(0);
          for (let r = 0; r < n; r++) {
            for (let k = 0; k < n; k++) {
              const t = tmp[r * n + k];
              if (t === 0) continue;
              for (let c = 0; c < n; c++) T[r * n + c] += t * w[k * n + c];
            }
          }
        }
        for (let bIdx = a; bIdx < mk; bIdx++) {
          const pb = blk.tp[bIdx];
          const qb = blk.tq[bIdx];
          const vb = blk.tv[bIdx];
          let s = 0;
          for (let t = 0; t < vb.length; t++) {
            const p = pb[t];
            const q = qb[t];
            s += p === q ? vb[t] * T[p * n + q] : vb[t] * (T[p * n + q] + T[q * n + p]);
          }
          this.addPair(i, blk.cons[bIdx], s);
        }
      } else {
        for (let bIdx = a; bIdx < mk; bIdx++) {
          const pb = blk.tp[bIdx];
          const qb = blk.tq[bIdx];
          const vb = blk.tv[bIdx];
          let s = 0;
          for (let u = 0; u < vb.length; u++) {
            const p = pb[u];
            const q = qb[u];
            // ⟨E_pq, W E_rs W⟩ with E symmetric unit (both mirrors)
            for (let t = 0; t < va.length; t++) {
              const r = pa[t];
              const c = qa[t];
              let val: number;
              if (r === c) val = w[p * n + r] * w[r * n + q];
              else val = w[p * n + r] * w[c * n + q] + w[p * n + c] * w[r * n + q];
              s += (p === q ? 1 : 2) * vb[u] * va[t] * val;
            }
          }
          this.addPair(i, blk.cons[bIdx], s);
        }
      }
    }
  }

  private factor(): void {
    const r = this.r;
    this.dependent = 0;
    this.cp.groups.forEach((g, gi) => {
      const n = g.length;
      const d = this.D[gi];
      this.dependent += choleskyInPlaceGuarded(d, n);
      if (r > 0) {
        const F = this.B[gi];
        forwardSolve(d, n, F, r); // F = L⁻¹ B
        // R −= Fᵀ F
        for (let k = 0; k < n; k++) {
          const ko = k * r;
          for (let a = 0; a < r; a++) {
            const fa = F[ko + a];
            if (fa === 0) continue;
            for (let b = 0; b < r; b++) this.R[a * r + b] -= fa * F[ko + b];
          }
        }
      }
    });
    this.lu = null;
    if (r === 0) return;
    if (this.cp.nF === 0) {
      this.dependent += choleskyInPlaceGuarded(this.R, r);
    } else {
      const rows: number[][] = [];
      for (let a = 0; a < r; a++) rows.push(Array.from(this.R.subarray(a * r, (a + 1) * r)));
      this.lu = new LuDecomposition(new Matrix(rows));
    }
  }

  /** Solve once with the factored system (no refinement). */
  private solveOnce(rhs: Float64Array, out: Float64Array): Float64Array {
    const cp = this.cp;
    const r = this.r;
    const rr = this.bufR1;
    for (let a = 0; a < this.nG; a++) rr[a] = rhs[cp.globals[a]];
    for (let f = 0; f < cp.nF; f++) rr[this.nG + f] = rhs[cp.m + f];
    // Local parts are solved in `out` in place (group g's entries at its constraints' positions),
    // using one scratch vector per group size.
    const groups = cp.groups;
    for (let gi = 0; gi < groups.length; gi++) {
      const g = groups[gi];
      const n = g.length;
      const z = this.zScratch(n);
      for (let a = 0; a < n; a++) z[a] = rhs[g[a]];
      forwardSolve1(this.D[gi], n, z);
      for (let a = 0; a < n; a++) out[g[a]] = z[a];
      if (r > 0) {
        const F = this.B[gi];
        for (let k = 0; k < n; k++) {
          const zk = z[k];
          if (zk === 0) continue;
          for (let a = 0; a < r; a++) rr[a] -= F[k * r + a] * zk;
        }
      }
    }
    let u = rr;
    if (r > 0) {
      if (this.lu) {
        const sol = this.lu.solve(Matrix.columnVector(Array.from(rr)));
        u = Float64Array.from(sol.getColumn(0));
      } else {
        forwardSolve1(this.R, r, u);
        backSolveT1(this.R, r, u);
      }
    }
    for (let gi = 0; gi < groups.length; gi++) {
      const g = groups[gi];
      const n = g.length;
      const z = this.zScratch(n);
      for (let a = 0; a < n; a++) z[a] = out[g[a]];
      if (r > 0) {
        const F = this.B[gi];
        for (let k = 0; k < n; k++) {
          let s = 0;
          for (let a = 0; a < r; a++) s += F[k * r + a] * u[a];
          z[k] -= s;
        }
      }
      backSolveT1(this.D[gi], n, z);
      for (let a = 0; a < n; a++) out[g[a]] = z[a];
    }
    for (let a = 0; a < this.nG; a++) out[cp.globals[a]] = u[a];
    for (let f = 0; f < cp.nF; f++) out[cp.m + f] = u[this.nG + f];
    return out;
  }

  // Work vectors of solve(), allocated once (no garbage per iteration).
  private zBuf = new Float64Array(16);
  private bufR1 = new Float64Array(0);
  private bufR2 = new Float64Array(0);
  private bufR3 = new Float64Array(0);
  private bufAx = new Float64Array(0);
  private bufRes = new Float64Array(0);
  private bufDx = new Float64Array(0);
  /** Scratch for a group of n constraints (only its first n entries are used). */
  private zScratch(n: number): Float64Array {
    if (this.zBuf.length < n) this.zBuf = new Float64Array(n);
    return this.zBuf;
  }

  /** The unfactored system times v (length m + free variables), into out. */
  apply(v: Float64Array, out: Float64Array): Float64Array {
    this.ensureBuffers();
    return this.multiply(v, out);
  }

  private ensureBuffers(): void {
    const len = this.cp.m + this.cp.nF;
    if (this.bufRes.length !== len) {
      this.bufAx = new Float64Array(len);
      this.bufRes = new Float64Array(len);
      this.bufDx = new Float64Array(len);
      this.bufR1 = new Float64Array(this.r);
      this.bufR2 = new Float64Array(this.r);
      this.bufR3 = new Float64Array(this.r);
    }
  }

  /** Multiply by the unfactored system. */
  private multiply(v: Float64Array, out: Float64Array): Float64Array {
    const cp = this.cp;
    const r = this.r;
    const u = this.bufR2;
    for (let a = 0; a < this.nG; a++) u[a] = v[cp.globals[a]];
    for (let f = 0; f < cp.nF; f++) u[this.nG + f] = v[cp.m + f];
    const ru = this.bufR3;
    for (let a = 0; a < r; a++) {
      let s = 0;
      for (let b = 0; b < r; b++) s += this.R0[a * r + b] * u[b];
      ru[a] = s;
    }
    const groups = cp.groups;
    for (let gi = 0; gi < groups.length; gi++) {
      const g = groups[gi];
      const n = g.length;
      const D = this.D0[gi];
      const B = this.B0[gi];
      const z = this.zScratch(n);
      for (let b = 0; b < n; b++) z[b] = v[g[b]];
      for (let a = 0; a < n; a++) {
        let s = 0;
        const ao = a * n;
        for (let b = 0; b < n; b++) s += D[ao + b] * z[b];
        for (let c = 0; c < r; c++) s += B[a * r + c] * u[c];
        out[g[a]] = s;
        const va = z[a];
        if (va !== 0) for (let c = 0; c < r; c++) ru[c] += B[a * r + c] * va;
      }
    }
    for (let a = 0; a < this.nG; a++) out[cp.globals[a]] = ru[a];
    for (let f = 0; f < cp.nF; f++) out[cp.m + f] = ru[this.nG + f];
    return out;
  }

  /** Solve with `refinements` steps of iterative refinement against the unfactored system. */
  /**
   * Solve with `refinements` steps of iterative refinement against the unfactored system, into
   * `out` (length m + free variables; a new array when omitted).
   */
  solve(rhs: Float64Array, refinements = 1, out?: Float64Array): Float64Array {
    const len = this.cp.m + this.cp.nF;
    this.ensureBuffers();
    const x = this.solveOnce(rhs, out ?? new Float64Array(len));
    if (this.dependent > 0) return x; // refinement would fight the dropped rows
    for (let k = 0; k < refinements; k++) {
      const ax = this.multiply(x, this.bufAx);
      const res = this.bufRes;
      for (let a = 0; a < len; a++) res[a] = rhs[a] - ax[a];
      const dx = this.solveOnce(res, this.bufDx);
      for (let a = 0; a < len; a++) x[a] += dx[a];
    }
    return x;
  }
}
