/**
 * Small dense complex kernels, written for the Hermitian blocks of the SDP solver (src/sdp).
 *
 * The solver stores a Hermitian h×h block through its real embedding [[Re, −Im], [Im, Re]]
 * (2h×2h, compile.ts) for the linear maps A(·) and Aᵀ(·), but every O(n³) per-block operation of
 * an iteration (NT scaling, congruences, step lengths, corrector) is done here on the complex h×h
 * matrix instead: the embedding is an algebra homomorphism (emb(AB) = emb(A)emb(B),
 * emb(A^H) = emb(A)ᵀ), so the iteration is the same, at about half the real flops of the embedded
 * kernels (4 real multiply-adds per complex one, on an eighth of the entries).
 *
 * Layout: a complex h×h matrix is one Float64Array of at least 2h² numbers, real parts row-major in
 * [0, h²), imaginary parts in [h², 2h²). Outputs must not alias inputs unless a kernel says so.
 * Hand-written (no complex dense library for Node fits these tiny sizes without per-call overhead).
 *
 * The smallest eigenvalue of a Hermitian matrix (step lengths) is in smallest-eigenvalue.ts.
 *
 * Does not: pivot, block for cache, or handle sizes beyond what the solver's blocks need (h ≲ 64).
 * Cost: h³-type loops, stated per function.
 *
 * Two column kernels at the end work on CMatrix (cmatrix.ts's split storage) instead: the diagonal of
 * V* A V, and weighted sums of projectors onto columns.
 */
import { zeros, type CMatrix } from './cmatrix.js';

import { orthogonalizeColumns } from './graded.js';

/** Complex Hermitian h×h from its real embedding (2h×2h), averaging the two copies. */
export function extractHermitian(emb: Float64Array, h: number, out: Float64Array): void {
  const n2 = 2 * h;
  const hh = h * h;
  for (let i = 0; i < h; i++) {
    const top = i * n2;
    const bot = (i + h) * n2;
    for (let j = 0; j < h; j++) {
      out[i * h + j] = 0.5 * (emb[top + j] + emb[bot + j + h]);
      out[hh + i * h + j] = 0.5 * (emb[bot + j] - emb[top + j + h]);
    }
  }
}

/** The real embedding [[Re, −Im], [Im, Re]] (2h×2h) of a complex h×h matrix. */
export function embedComplex(c: Float64Array, h: number, out: Float64Array): void {
  const n2 = 2 * h;
  const hh = h * h;
  for (let i = 0; i < h; i++) {
    const top = i * n2;
    const bot = (i + h) * n2;
    for (let j = 0; j < h; j++) {
      const re = c[i * h + j];
      const im = c[hh + i * h + j];
      out[top + j] = re;
      out[top + j + h] = -im;
      out[bot + j] = im;
      out[bot + j + h] = re;
    }
  }
}

/** Make a complex matrix exactly Hermitian: (A + A^H)/2, in place. */
export function hermitize(a: Float64Array, h: number): void {
  const hh = h * h;
  for (let i = 0; i < h; i++) {
    a[hh + i * h + i] = 0;
    for (let j = i + 1; j < h; j++) {
      const re = 0.5 * (a[i * h + j] + a[j * h + i]);
      const im = 0.5 * (a[hh + i * h + j] - a[hh + j * h + i]);
      a[i * h + j] = re;
      a[j * h + i] = re;
      a[hh + i * h + j] = im;
      a[hh + j * h + i] = -im;
    }
  }
}

/**
 * Lower Cholesky factor L of a Hermitian positive definite matrix (A = L L^H), reading the lower
 * triangle; false when a pivot is not positive. h³/3 complex multiply-adds.
 */
export function cCholesky(a: Float64Array, h: number, l: Float64Array): boolean {
  const hh = h * h;
  l.fill(0, 0, 2 * hh);
  for (let j = 0; j < h; j++) {
    const jo = j * h;
    let d = a[jo + j];
    for (let k = 0; k < j; k++) {
      const r = l[jo + k];
      const i = l[hh + jo + k];
      d -= r * r + i * i;
    }
    if (!(d > 0)) return false;
    const ljj = Math.sqrt(d);
    const inv = 1 / ljj;
    l[jo + j] = ljj;
    for (let i = j + 1; i < h; i++) {
      const io = i * h;
      let sr = a[io + j];
      let si = a[hh + io + j];
      // s −= L_ik conj(L_jk)
      for (let k = 0; k < j; k++) {
        const ar = l[io + k];
        const ai = l[hh + io + k];
        const br = l[jo + k];
        const bi = l[hh + jo + k];
        sr -= ar * br + ai * bi;
        si -= ai * br - ar * bi;
      }
      l[io + j] = sr * inv;
      l[hh + io + j] = si * inv;
    }
  }
  return true;
}

/** out = A·B. h³ complex multiply-adds. */
export function cMul(a: Float64Array, b: Float64Array, h: number, out: Float64Array): void {
  const hh = h * h;
  out.fill(0, 0, 2 * hh);
  for (let i = 0; i < h; i++) {
    const io = i * h;
    for (let k = 0; k < h; k++) {
      const xr = a[io + k];
      const xi = a[hh + io + k];
      if (xr === 0 && xi === 0) continue;
      const ko = k * h;
      for (let j = 0; j < h; j++) {
        const yr = b[ko + j];
        const yi = b[hh + ko + j];
        out[io + j] += xr * yr - xi * yi;
        out[hh + io + j] += xr * yi + xi * yr;
      }
    }
  }
}

/** out = A^H·B. h³ complex multiply-adds. */
export function cHMul(a: Float64Array, b: Float64Array, h: number, out: Float64Array): void {
  const hh = h * h;
  out.fill(0, 0, 2 * hh);
  for (let k = 0; k < h; k++) {
    const ko = k * h;
    for (let i = 0; i < h; i++) {
      const xr = a[ko + i];
      const xi = -a[hh + ko + i];
      if (xr === 0 && xi === 0) continue;
      const io = i * h;
      for (let j = 0; j < h; j++) {
        const yr = b[ko + j];
        const yi = b[hh + ko + j];
        out[io + j] += xr * yr - xi * yi;
        out[hh + io + j] += xr * yi + xi * yr;
      }
    }
  }
}

/** out = A·B^H. h³ complex multiply-adds. */
export function cMulH(a: Float64Array, b: Float64Array, h: number, out: Float64Array): void {
  const hh = h * h;
  for (let i = 0; i < h; i++) {
    const io = i * h;
    for (let j = 0; j < h; j++) {
      const jo = j * h;
      let sr = 0;
      let si = 0;
      for (let k = 0; k < h; k++) {
        const xr = a[io + k];
        const xi = a[hh + io + k];
        const yr = b[jo + k];
        const yi = -b[hh + jo + k];
        sr += xr * yr - xi * yi;
        si += xr * yi + xi * yr;
      }
      out[io + j] = sr;
      out[hh + io + j] = si;
    }
  }
}

/** out = G·M·G^H for Hermitian M; result made exactly Hermitian. 2h³ complex multiply-adds. */
export function cCongruence(g: Float64Array, m: Float64Array, h: number, out: Float64Array, tmp: Float64Array): void {
  cMulH(m, g, h, tmp); // M G^H
  cMul(g, tmp, h, out);
  hermitize(out, h);
}

/** out = G^H·M·G for Hermitian M; result made exactly Hermitian. 2h³ complex multiply-adds. */
export function cCongruenceH(g: Float64Array, m: Float64Array, h: number, out: Float64Array, tmp: Float64Array): void {
  cMul(m, g, h, tmp); // M G
  cHMul(g, tmp, h, out);
  hermitize(out, h);
}

/** out = G·G^H (Hermitian; upper half computed, mirrored). h³/2 complex multiply-adds. */
export function cGram(g: Float64Array, h: number, out: Float64Array): void {
  const hh = h * h;
  for (let i = 0; i < h; i++) {
    const io = i * h;
    for (let j = i; j < h; j++) {
      const jo = j * h;
      let sr = 0;
      let si = 0;
      for (let k = 0; k < h; k++) {
        const xr = g[io + k];
        const xi = g[hh + io + k];
        const yr = g[jo + k];
        const yi = g[hh + jo + k];
        sr += xr * yr + xi * yi;
        si += xi * yr - xr * yi;
      }
      out[io + j] = sr;
      out[jo + i] = sr;
      out[hh + io + j] = i === j ? 0 : si;
      out[hh + jo + i] = i === j ? 0 : -si;
    }
  }
}

/**
 * Singular values and right singular vectors of a complex h×h matrix B by one-sided Jacobi
 * (Hestenes): each pair of columns of U = B·V is made orthogonal by a phase on column q (so that
 * u_p^H u_q is real) followed by the real Jacobi rotation. Returns σ (not sorted) and V (unitary);
 * the columns of B·V are σ_i u_i. Kept from the real solver for its high relative accuracy on
 * small singular values, which forming B^H B would square away. `work`: at least 2h² numbers.
 * About 2h³ complex multiply-adds per sweep, typically 4–8 sweeps.
 */
export function cSvdJacobi(b: Float64Array, h: number, v: Float64Array, sigma: Float64Array, work: Float64Array): void {
  const hh = h * h;
  const u = work;
  for (let e = 0; e < 2 * hh; e++) u[e] = b[e];
  v.fill(0, 0, 2 * hh);
  for (let i = 0; i < h; i++) v[i * h + i] = 1;
  // The one complex Jacobi kernel (graded.ts), on the two halves of this storage.
  orthogonalizeColumns(u.subarray(0, hh), u.subarray(hh, 2 * hh), h, h, v.subarray(0, hh), v.subarray(hh, 2 * hh), 4 * h * Number.EPSILON, 60);
  for (let j = 0; j < h; j++) {
    let s = 0;
    for (let k = 0; k < h; k++) {
      const r = u[k * h + j];
      const i = u[hh + k * h + j];
      s += r * r + i * i;
    }
    sigma[j] = Math.sqrt(s);
  }
}


// ---------------------------------------------------------------------------------------------------
// Column kernels on CMatrix (split real/imaginary row-major storage, src/linalg/cmatrix.ts).

/**
 * out[i] = Re v_i* A v_i for every column v_i of V (n×n), A Hermitian n×n (its upper triangle read):
 * the diagonal of V* A V without forming the product. Σ_r A_rr |v_r|² + 2 Re Σ_{r<c} conj(v_r) A_rc v_c,
 * two columns per pass over A. n³/2 complex multiply-adds. Hand-written because the full product
 * V* A V (mul twice) costs four times as much and only its diagonal is wanted.
 */
export function columnQuadraticForms(a: CMatrix, v: CMatrix, out: Float64Array = new Float64Array(v.cols)): Float64Array {
  const n = a.rows;
  const m = v.cols;
  const ar = a.re;
  const ai = a.im;
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  const yr = new Float64Array(n);
  const yi = new Float64Array(n);
  let i = 0;
  for (; i + 1 < m; i += 2) {
    for (let r = 0; r < n; r++) {
      xr[r] = v.re[r * m + i];
      xi[r] = v.im[r * m + i];
      yr[r] = v.re[r * m + i + 1];
      yi[r] = v.im[r * m + i + 1];
    }
    let s0 = 0;
    let s1 = 0;
    for (let r = 0; r < n; r++) {
      const ro = r * n;
      // t = Σ_{c>r} A_rc v_c for both columns
      let t0r = 0;
      let t0i = 0;
      let t1r = 0;
      let t1i = 0;
      for (let c = r + 1; c < n; c++) {
        const pr = ar[ro + c];
        const pi = ai[ro + c];
        const ur = xr[c];
        const ui = xi[c];
        const wr = yr[c];
        const wi = yi[c];
        t0r += pr * ur - pi * ui;
        t0i += pr * ui + pi * ur;
        t1r += pr * wr - pi * wi;
        t1i += pr * wi + pi * wr;
      }
      const d = ar[ro + r];
      // Re conj(v_r) t = v_r.re t.re + v_r.im t.im
      s0 += d * (xr[r] * xr[r] + xi[r] * xi[r]) + 2 * (xr[r] * t0r + xi[r] * t0i);
      s1 += d * (yr[r] * yr[r] + yi[r] * yi[r]) + 2 * (yr[r] * t1r + yi[r] * t1i);
    }
    out[i] = s0;
    out[i + 1] = s1;
  }
  if (i < m) {
    for (let r = 0; r < n; r++) {
      xr[r] = v.re[r * m + i];
      xi[r] = v.im[r * m + i];
    }
    let s0 = 0;
    for (let r = 0; r < n; r++) {
      const ro = r * n;
      let t0r = 0;
      let t0i = 0;
      for (let c = r + 1; c < n; c++) {
        const pr = ar[ro + c];
        const pi = ai[ro + c];
        t0r += pr * xr[c] - pi * xi[c];
        t0i += pr * xi[c] + pi * xr[c];
      }
      s0 += ar[ro + r] * (xr[r] * xr[r] + xi[r] * xi[r]) + 2 * (xr[r] * t0r + xi[r] * t0i);
    }
    out[i] = s0;
  }
  return out;
}

/**
 * Σ_k w_k v_{c_k} v_{c_k}* for columns c_k of V (n×m) and real weights w_k: a Hermitian n×n CMatrix
 * (upper triangle computed, mirrored). n²·k/2 complex multiply-adds.
 */
export function weightedColumnGram(v: CMatrix, cols: readonly number[], weights: readonly number[]): CMatrix {
  const n = v.rows;
  const m = v.cols;
  const out = zeros(n, n);
  const k = cols.length;
  // Gather the selected columns scaled by their weights (rows of U: u_r = (w_k v_{r, c_k})_k).
  const ur = new Float64Array(n * k);
  const ui = new Float64Array(n * k);
  for (let r = 0; r < n; r++) {
    for (let q = 0; q < k; q++) {
      ur[r * k + q] = v.re[r * m + cols[q]];
      ui[r * k + q] = v.im[r * m + cols[q]];
    }
  }
  for (let r = 0; r < n; r++) {
    const ro = r * k;
    for (let c = r; c < n; c++) {
      const co = c * k;
      let sr = 0;
      let si = 0;
      for (let q = 0; q < k; q++) {
        // w v_r conj(v_c)
        const w = weights[q];
        const ar = ur[ro + q];
        const ai = ui[ro + q];
        const br = ur[co + q];
        const bi = ui[co + q];
        sr += w * (ar * br + ai * bi);
        si += w * (ai * br - ar * bi);
      }
      out.re[r * n + c] = sr;
      out.im[r * n + c] = si;
      out.re[c * n + r] = sr;
      out.im[c * n + r] = -si;
    }
    out.im[r * n + r] = 0;
  }
  return out;
}

/**
 * Whether A + t·B − s·I (Hermitian CMatrix, n×n) is numerically positive definite: its Cholesky
 * factorization succeeds in floating point (so it is positive definite up to the factorization's
 * backward error, about n·u·‖A + tB‖; a margin s > 0 asks for λ_min(A + tB) > s). n³/3 complex
 * multiply-adds.
 */
export function isPositiveDefiniteCombination(a: CMatrix, b: CMatrix, t: number, s = 0): boolean {
  const n = a.rows;
  const nn = n * n;
  const m = new Float64Array(2 * nn);
  for (let k = 0; k < nn; k++) {
    m[k] = a.re[k] + t * b.re[k];
    m[nn + k] = a.im[k] + t * b.im[k];
  }
  for (let i = 0; i < n; i++) m[i * n + i] -= s;
  return cCholesky(m, n, new Float64Array(2 * nn));
}
