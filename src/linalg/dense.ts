/**
 * Small real dense kernels on row-major n×n Float64Arrays: products, congruences, Cholesky (plain, and
 * guarded against numerically dependent rows for Schur complements), triangular solves, and a
 * one-sided Jacobi SVD. The interior-point SDP solver (src/sdp) runs them on every cone block at every
 * iteration; the smallest eigenvalue it needs for step lengths is in smallest-eigenvalue.ts, the
 * complex kernels of Hermitian blocks in dense-complex.ts.
 *
 * Why hand-written instead of ml-matrix: the problems of this field have thousands of 2×2 or 4×4
 * blocks, and ml-matrix wraps every matrix in an object of arrays-of-arrays whose construction costs
 * more than the arithmetic on such blocks (bench/RESULTS.md, "dense kernels", has the measurement).
 * The guarded Cholesky also treats numerically dependent constraints instead of failing. Jacobi SVD is
 * chosen for its high relative accuracy on the graded matrices that appear near an SDP optimum
 * (scaled complementarity products), not for speed on large blocks.
 *
 * Does not: handle complex matrices (dense-complex.ts), check arguments, or allocate more than the
 * result. Cost: products O(n³); Cholesky n³/3; Jacobi SVD about 6–10 sweeps of O(n³) each, fine for
 * blocks up to about 100 and slow beyond a few hundred.
 */

/** out = A·B (n×n). `out` must not alias A or B. */
export function matMul(a: Float64Array, b: Float64Array, n: number, out: Float64Array = new Float64Array(n * n)): Float64Array {
  out.fill(0);
  for (let i = 0; i < n; i++) {
    const io = i * n;
    for (let k = 0; k < n; k++) {
      const aik = a[io + k];
      if (aik === 0) continue;
      const ko = k * n;
      for (let j = 0; j < n; j++) out[io + j] += aik * b[ko + j];
    }
  }
  return out;
}

/** out = Aᵀ·B. */
export function matTMul(a: Float64Array, b: Float64Array, n: number, out: Float64Array = new Float64Array(n * n)): Float64Array {
  out.fill(0);
  for (let k = 0; k < n; k++) {
    const ko = k * n;
    for (let i = 0; i < n; i++) {
      const aki = a[ko + i];
      if (aki === 0) continue;
      const io = i * n;
      for (let j = 0; j < n; j++) out[io + j] += aki * b[ko + j];
    }
  }
  return out;
}

/** out = A·Bᵀ. */
export function matMulT(a: Float64Array, b: Float64Array, n: number, out: Float64Array = new Float64Array(n * n)): Float64Array {
  for (let i = 0; i < n; i++) {
    const io = i * n;
    for (let j = 0; j < n; j++) {
      const jo = j * n;
      let s = 0;
      for (let k = 0; k < n; k++) s += a[io + k] * b[jo + k];
      out[io + j] = s;
    }
  }
  return out;
}

/** Gᵀ·M·G for symmetric M; result symmetrized. */
export function congruenceT(g: Float64Array, m: Float64Array, n: number, out: Float64Array = new Float64Array(n * n), tmp: Float64Array = new Float64Array(n * n)): Float64Array {
  matMul(m, g, n, tmp);
  matTMul(g, tmp, n, out);
  symmetrize(out, n);
  return out;
}

/** G·M·Gᵀ for symmetric M; result symmetrized. */
export function congruence(g: Float64Array, m: Float64Array, n: number, out: Float64Array = new Float64Array(n * n), tmp: Float64Array = new Float64Array(n * n)): Float64Array {
  matMulT(m, g, n, tmp);
  matMul(g, tmp, n, out);
  symmetrize(out, n);
  return out;
}

export function symmetrize(a: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const v = 0.5 * (a[i * n + j] + a[j * n + i]);
      a[i * n + j] = v;
      a[j * n + i] = v;
    }
  }
}

/**
 * Lower Cholesky factor of a symmetric positive definite matrix, or null when a pivot is not
 * positive (the matrix is not numerically positive definite). Reads only the lower triangle.
 */
export function cholesky(a: Float64Array, n: number, l: Float64Array = new Float64Array(n * n)): Float64Array | null {
  l.fill(0);
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j];
    for (let k = 0; k < j; k++) d -= l[j * n + k] * l[j * n + k];
    if (!(d > 0)) return null;
    const ljj = Math.sqrt(d);
    l[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j];
      for (let k = 0; k < j; k++) s -= l[i * n + k] * l[j * n + k];
      l[i * n + j] = s / ljj;
    }
  }
  return l;
}

/** Pivots replaced by this value when a row is numerically dependent on earlier rows. */
export const HUGE_PIVOT = 1e64;

/**
 * Cholesky of a symmetric positive semidefinite matrix in place (lower triangle), for Schur
 * complements. A pivot that falls below `relTol` times the row's original diagonal marks a
 * constraint numerically dependent on earlier ones: it is set to HUGE_PIVOT, which makes that
 * component of the solution (numerically) zero, the standard treatment of dependent equality
 * constraints in interior-point codes. Returns the number of such pivots.
 */
export function choleskyInPlaceGuarded(a: Float64Array, n: number, relTol = 1e-13): number {
  const diag = new Float64Array(n);
  for (let i = 0; i < n; i++) diag[i] = a[i * n + i];
  if (n < 2 * CHOLESKY_PANEL) return factorColumns(a, n, 0, n, diag, relTol);
  // Blocked (left-looking by panels of CHOLESKY_PANEL columns): each panel first takes the contributions
  // of all columns left of it (panelUpdate: every row below is read once per panel instead of once per
  // two columns, the pivot rows stay in cache), then is factored by the two-column kernel over its own
  // columns only. Same arithmetic, summed in another order; at n ≈ 1000 (the fidelity of recovery's
  // Schur complement, 8 MB) the unblocked kernel streams the matrix from memory for every column pair.
  let dependent = 0;
  for (let j0 = 0; j0 < n; j0 += CHOLESKY_PANEL) {
    const j1 = Math.min(n, j0 + CHOLESKY_PANEL);
    if (j0 > 0) panelUpdate(a, n, j0, j1);
    dependent += factorColumns(a, n, j0, j1, diag, relTol);
  }
  return dependent;
}

/** Columns per panel of the blocked Cholesky (even, so panels keep the kernel's column pairs). */
const CHOLESKY_PANEL = 64;

/** a[i][c] −= Σ_{k<j0} a[i][k]·a[c][k] for rows i ≥ j0 and panel columns c in [j0, j1) (upper entries of the panel's own rows get garbage that factorColumns zeroes). */
function panelUpdate(a: Float64Array, n: number, j0: number, j1: number): void {
  let i = j0;
  for (; i + 3 < n; i += 4) {
    const i0 = i * n;
    const i1 = i0 + n;
    const i2 = i1 + n;
    const i3 = i2 + n;
    const cEnd = Math.min(j1, i + 4);
    let c = j0;
    for (; c + 1 < cEnd; c += 2) {
      const co = c * n;
      const c1o = co + n;
      let s00 = 0, s01 = 0, s10 = 0, s11 = 0, s20 = 0, s21 = 0, s30 = 0, s31 = 0;
      for (let k = 0; k < j0; k++) {
        const p = a[co + k];
        const q = a[c1o + k];
        const x0 = a[i0 + k];
        const x1 = a[i1 + k];
        const x2 = a[i2 + k];
        const x3 = a[i3 + k];
        s00 += x0 * p;
        s01 += x0 * q;
        s10 += x1 * p;
        s11 += x1 * q;
        s20 += x2 * p;
        s21 += x2 * q;
        s30 += x3 * p;
        s31 += x3 * q;
      }
      a[i0 + c] -= s00;
      a[i0 + c + 1] -= s01;
      a[i1 + c] -= s10;
      a[i1 + c + 1] -= s11;
      a[i2 + c] -= s20;
      a[i2 + c + 1] -= s21;
      a[i3 + c] -= s30;
      a[i3 + c + 1] -= s31;
    }
    for (; c < cEnd; c++) {
      const co = c * n;
      let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
      for (let k = 0; k < j0; k++) {
        const p = a[co + k];
        s0 += a[i0 + k] * p;
        s1 += a[i1 + k] * p;
        s2 += a[i2 + k] * p;
        s3 += a[i3 + k] * p;
      }
      a[i0 + c] -= s0;
      a[i1 + c] -= s1;
      a[i2 + c] -= s2;
      a[i3 + c] -= s3;
    }
  }
  for (; i < n; i++) {
    const io = i * n;
    const cEnd = Math.min(j1, i + 1);
    for (let c = j0; c < cEnd; c++) {
      const co = c * n;
      let sum = 0;
      for (let k = 0; k < j0; k++) sum += a[io + k] * a[co + k];
      a[io + c] -= sum;
    }
  }
}

function factorColumns(a: Float64Array, n: number, j0: number, j1: number, diag: Float64Array, relTol: number): number {
  // Columns j0..j1−1 of the factor; contributions of columns < j0 were already subtracted (panelUpdate).
  let dependent = 0;
  const pivot = (d: number, orig: number): number => {
    if (!(d > relTol * Math.abs(orig)) || !(d > 0)) {
      dependent++;
      return HUGE_PIVOT;
    }
    return Math.sqrt(d);
  };
  // Two columns at a time, four rows at a time: each pass over k loads four entries of the rows
  // below and two of the pivot rows for eight multiply-adds (the Schur complement's factorization
  // is the largest dense kernel of an iteration at a few hundred constraints; bench/RESULTS.md
  // has the measurement that chose this register blocking).
  let j = j0;
  for (; j + 1 < j1; j += 2) {
    const jo = j * n;
    const j1o = jo + n;
    // The 2×2 diagonal block.
    let d0 = a[jo + j];
    let s10 = a[j1o + j];
    let d1 = a[j1o + j + 1];
    for (let k = j0; k < j; k++) {
      const x = a[jo + k];
      const y = a[j1o + k];
      d0 -= x * x;
      s10 -= y * x;
      d1 -= y * y;
    }
    const l00 = pivot(d0, diag[j]);
    const l10 = s10 / l00;
    const l11 = pivot(d1 - l10 * l10, diag[j + 1]);
    a[jo + j] = l00;
    a[j1o + j] = l10;
    a[j1o + j + 1] = l11;
    const inv0 = 1 / l00;
    const inv1 = 1 / l11;
    const huge0 = l00 === HUGE_PIVOT;
    const huge1 = l11 === HUGE_PIVOT;
    let i = j + 2;
    for (; i + 3 < n; i += 4) {
      const i0 = i * n;
      const i1 = i0 + n;
      const i2 = i1 + n;
      const i3 = i2 + n;
      let s00 = a[i0 + j];
      let s01 = a[i0 + j + 1];
      let s10_ = a[i1 + j];
      let s11 = a[i1 + j + 1];
      let s20 = a[i2 + j];
      let s21 = a[i2 + j + 1];
      let s30 = a[i3 + j];
      let s31 = a[i3 + j + 1];
      for (let k = j0; k < j; k++) {
        const p = a[jo + k];
        const q = a[j1o + k];
        const x0 = a[i0 + k];
        const x1 = a[i1 + k];
        const x2 = a[i2 + k];
        const x3 = a[i3 + k];
        s00 -= x0 * p;
        s01 -= x0 * q;
        s10_ -= x1 * p;
        s11 -= x1 * q;
        s20 -= x2 * p;
        s21 -= x2 * q;
        s30 -= x3 * p;
        s31 -= x3 * q;
      }
      const c0 = huge0 ? s00 / l00 : s00 * inv0;
      const c1 = huge0 ? s10_ / l00 : s10_ * inv0;
      const c2 = huge0 ? s20 / l00 : s20 * inv0;
      const c3 = huge0 ? s30 / l00 : s30 * inv0;
      a[i0 + j] = c0;
      a[i1 + j] = c1;
      a[i2 + j] = c2;
      a[i3 + j] = c3;
      s01 -= c0 * l10;
      s11 -= c1 * l10;
      s21 -= c2 * l10;
      s31 -= c3 * l10;
      a[i0 + j + 1] = huge1 ? s01 / l11 : s01 * inv1;
      a[i1 + j + 1] = huge1 ? s11 / l11 : s11 * inv1;
      a[i2 + j + 1] = huge1 ? s21 / l11 : s21 * inv1;
      a[i3 + j + 1] = huge1 ? s31 / l11 : s31 * inv1;
    }
    for (; i < n; i++) {
      const io = i * n;
      let s0 = a[io + j];
      let s1 = a[io + j + 1];
      for (let k = j0; k < j; k++) {
        const x = a[io + k];
        s0 -= x * a[jo + k];
        s1 -= x * a[j1o + k];
      }
      const c0 = huge0 ? s0 / l00 : s0 * inv0;
      a[io + j] = c0;
      s1 -= c0 * l10;
      a[io + j + 1] = huge1 ? s1 / l11 : s1 * inv1;
    }
    for (let k = j + 1; k < n; k++) a[jo + k] = 0;
    for (let k = j + 2; k < n; k++) a[j1o + k] = 0;
  }
  if (j < j1) {
    // last column (odd n): only its diagonal
    const jo = j * n;
    let d = a[jo + j];
    for (let k = j0; k < j; k++) d -= a[jo + k] * a[jo + k];
    a[jo + j] = pivot(d, diag[j]);
  }
  return dependent;
}

/** Solve L·x = b in place (L lower, n×n), for `cols` right-hand sides stored row-major n×cols. */
export function forwardSolve(l: Float64Array, n: number, b: Float64Array, cols = 1): void {
  for (let i = 0; i < n; i++) {
    const io = i * n;
    for (let c = 0; c < cols; c++) {
      let s = b[i * cols + c];
      for (let k = 0; k < i; k++) s -= l[io + k] * b[k * cols + c];
      b[i * cols + c] = s / l[io + i];
    }
  }
}

/** Solve L·x = b in place for one right-hand side (row-oriented dot products, contiguous). */
export function forwardSolve1(l: Float64Array, n: number, b: Float64Array): void {
  for (let i = 0; i < n; i++) {
    const io = i * n;
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[io + k] * b[k];
    b[i] = s / l[io + i];
  }
}

/** Solve Lᵀ·x = b in place for one right-hand side (row i of L subtracted once x_i is known: contiguous). */
export function backSolveT1(l: Float64Array, n: number, b: Float64Array): void {
  for (let i = n - 1; i >= 0; i--) {
    const io = i * n;
    const xi = b[i] / l[io + i];
    b[i] = xi;
    if (xi !== 0) for (let k = 0; k < i; k++) b[k] -= l[io + k] * xi;
  }
}

/**
 * Singular value decomposition B = U·diag(σ)·Vᵀ by one-sided Jacobi (Hestenes): rotations
 * orthogonalize the columns of B·V. Returns σ and V; the columns of B·V are σ_i u_i. Chosen for
 * its high relative accuracy on small singular values (the complementarity products near the
 * optimum), which forming BᵀB would square away.
 */
export function svdJacobi(
  b: Float64Array,
  n: number,
  v: Float64Array = new Float64Array(n * n),
  sigma: Float64Array = new Float64Array(n),
  work?: Float64Array,
): { sigma: Float64Array; v: Float64Array } {
  const u = work ? work.subarray(0, n * n) : new Float64Array(n * n);
  u.set(b.subarray(0, n * n));
  v.fill(0);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  // Columns count as orthogonal at a few ulps times n (a tighter test is never met in rounding).
  const tol = 4 * n * Number.EPSILON;
  for (let sweep = 0; sweep < 60; sweep++) {
    let rotated = false;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        let alpha = 0;
        let beta = 0;
        let gamma = 0;
        for (let k = 0; k < n; k++) {
          const up = u[k * n + p];
          const uq = u[k * n + q];
          alpha += up * up;
          beta += uq * uq;
          gamma += up * uq;
        }
        if (gamma === 0 || Math.abs(gamma) <= tol * Math.sqrt(alpha * beta)) continue;
        rotated = true;
        const zeta = (beta - alpha) / (2 * gamma);
        const t = (zeta >= 0 ? 1 : -1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = c * t;
        for (let k = 0; k < n; k++) {
          const up = u[k * n + p];
          const uq = u[k * n + q];
          u[k * n + p] = c * up - s * uq;
          u[k * n + q] = s * up + c * uq;
          const vp = v[k * n + p];
          const vq = v[k * n + q];
          v[k * n + p] = c * vp - s * vq;
          v[k * n + q] = s * vp + c * vq;
        }
      }
    }
    if (!rotated) break;
  }
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += u[k * n + j] * u[k * n + j];
    sigma[j] = Math.sqrt(s);
  }
  return { sigma, v };
}
