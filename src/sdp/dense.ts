/**
 * Small real dense kernels for the SDP solver's per-block work: products, Cholesky with a
 * dependent-row guard, the smallest eigenvalue (Householder tridiagonalization and bisection, for
 * step lengths), a cyclic Jacobi symmetric eigensolver and a one-sided Jacobi SVD.
 *
 * Why hand-written instead of ml-matrix: the interior-point method does this work on every cone
 * block at every iteration, and the problems of this field have thousands of 2×2 or 4×4 blocks.
 * ml-matrix wraps every matrix in an object of arrays-of-arrays; on a 2×2 block the wrapping costs
 * more than the arithmetic. Measured on the project machine (Node 20, 2 shared cores under load,
 * so absolute numbers are noisy; the ratio is the point): 2×2 Cholesky via
 * `new CholeskyDecomposition(new Matrix(...))` 1.5–2.3 µs, `cholesky()` below on a Float64Array
 * 0.18–0.29 µs; 200×200 Cholesky 21–28 ms (ml-matrix) vs 6–11 ms (`choleskyInPlaceGuarded`).
 * The guarded Cholesky also does what ml-matrix's does not: it treats numerically dependent
 * constraints (see below) instead of failing. ml-matrix's LU is still used for the symmetric
 * indefinite reduced system when there are free variables (schur.ts), where it is adequate.
 * Jacobi methods are chosen for their high relative accuracy on the graded matrices that appear
 * near the optimum (scaled complementarity pairs), not for speed on large blocks.
 *
 * Does not: handle complex matrices (complex Hermitian blocks enter the solver through their real
 * embedding), check arguments, or allocate more than the result.
 *
 * Cost: products O(n^3); Cholesky n^3/3; Jacobi eigen and SVD about 6–10 sweeps of O(n^3) each,
 * fine for the block sizes of this field (n ≤ ~100) and slow beyond a few hundred.
 * All matrices are row-major Float64Arrays of n×n entries.
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

/** Frobenius inner product Σ a_ij b_ij. */
export function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k] * b[k];
  return s;
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
  // is the largest dense kernel of an iteration at a few hundred constraints; this register
  // blocking is about 1.5–2× faster in V8 than one column and four rows per pass).
  let j = 0;
  for (; j + 1 < n; j += 2) {
    const jo = j * n;
    const j1o = jo + n;
    // The 2×2 diagonal block.
    let d0 = a[jo + j];
    let s10 = a[j1o + j];
    let d1 = a[j1o + j + 1];
    for (let k = 0; k < j; k++) {
      const x = a[jo + k];
      const y = a[j1o + k];
      d0 -= x * x;
      s10 -= y * x;
      d1 -= y * y;
    }
    const l00 = pivot(d0, a[jo + j]);
    const l10 = s10 / l00;
    const l11 = pivot(d1 - l10 * l10, a[j1o + j + 1]);
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
      for (let k = 0; k < j; k++) {
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
      for (let k = 0; k < j; k++) {
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
  if (j < n) {
    // last column (odd n): only its diagonal
    const jo = j * n;
    let d = a[jo + j];
    for (let k = 0; k < j; k++) d -= a[jo + k] * a[jo + k];
    a[jo + j] = pivot(d, a[jo + j]);
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

/** Solve Lᵀ·x = b in place. */
export function backSolveT(l: Float64Array, n: number, b: Float64Array, cols = 1): void {
  for (let i = n - 1; i >= 0; i--) {
    for (let c = 0; c < cols; c++) {
      let s = b[i * cols + c];
      for (let k = i + 1; k < n; k++) s -= l[k * n + i] * b[k * cols + c];
      b[i * cols + c] = s / l[i * n + i];
    }
  }
}

/**
 * Eigenvalues (and optionally eigenvectors as columns of V) of a symmetric matrix by cyclic
 * Jacobi rotations. Input is not modified.
 */
export function symEig(a: Float64Array, n: number, wantVectors = false, work?: Float64Array): { values: Float64Array; vectors: Float64Array | null } {
  const m = work ? work.subarray(0, n * n) : new Float64Array(n * n);
  m.set(a.subarray(0, n * n));
  const v = wantVectors ? new Float64Array(n * n) : null;
  if (v) for (let i = 0; i < n; i++) v[i * n + i] = 1;
  for (let sweep = 0; sweep < 60; sweep++) {
    let off = 0;
    let diag = 0;
    for (let i = 0; i < n; i++) {
      diag += m[i * n + i] * m[i * n + i];
      for (let j = i + 1; j < n; j++) off += m[i * n + j] * m[i * n + j];
    }
    if (off <= (4 * n * Number.EPSILON) ** 2 * diag || off === 0) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = m[p * n + q];
        if (apq === 0) continue;
        const app = m[p * n + p];
        const aqq = m[q * n + q];
        if (Math.abs(apq) < 1e-300) {
          m[p * n + q] = m[q * n + p] = 0;
          continue;
        }
        const theta = (aqq - app) / (2 * apq);
        const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const mkp = m[k * n + p];
          const mkq = m[k * n + q];
          m[k * n + p] = c * mkp - s * mkq;
          m[k * n + q] = s * mkp + c * mkq;
        }
        for (let k = 0; k < n; k++) {
          const mpk = m[p * n + k];
          const mqk = m[q * n + k];
          m[p * n + k] = c * mpk - s * mqk;
          m[q * n + k] = s * mpk + c * mqk;
        }
        m[p * n + q] = m[q * n + p] = 0;
        if (v) {
          for (let k = 0; k < n; k++) {
            const vkp = v[k * n + p];
            const vkq = v[k * n + q];
            v[k * n + p] = c * vkp - s * vkq;
            v[k * n + q] = s * vkp + c * vkq;
          }
        }
      }
    }
  }
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) values[i] = m[i * n + i];
  return { values, vectors: v };
}

/**
 * Smallest eigenvalue of a symmetric matrix: Householder reduction to tridiagonal form (about
 * 4n³/3 flops, eigenvalues only) and bisection on Sturm counts. Accurate to a few ulps of ‖A‖
 * (absolute, not relative): what a step length to the cone boundary needs. About ten times faster
 * than cyclic Jacobi (symEig) at n = 16–32, measured in bench/sdp.ts's shapes; symEig stays for
 * the cases that need relative accuracy or vectors.
 */
export function minEig(a: Float64Array, n: number, work?: Float64Array): number {
  if (n === 1) return a[0];
  if (n === 2) {
    const m = 0.5 * (a[0] + a[3]);
    const d = 0.5 * (a[0] - a[3]);
    return m - Math.hypot(d, a[1]);
  }
  const m = work && work.length >= n * n + 3 * n ? work : new Float64Array(n * n + 3 * n);
  m.set(a.subarray(0, n * n));
  const diag = m.subarray(n * n, n * n + n);
  const off = m.subarray(n * n + n, n * n + 2 * n); // off[i] couples i and i+1
  const v = m.subarray(n * n + 2 * n, n * n + 3 * n);
  tridiagonalize(m, n, diag, off, v);
  return smallestTridiagonal(diag, off, n);
}

/**
 * Householder reduction of the symmetric matrix in `m` (destroyed; lower triangle used) to a
 * tridiagonal matrix with diagonal `diag` and off-diagonal `off` (off[i] between i and i+1).
 * Eigenvalues only (the reflectors are not kept). `v` is scratch of length n.
 */
export function tridiagonalize(m: Float64Array, n: number, diag: Float64Array, off: Float64Array, v: Float64Array): void {
  for (let k = 0; k < n - 2; k++) {
    // Reflector H = 1 − β u uᵀ on rows/cols k+1..n−1 annihilating m[k+2.., k].
    let alpha2 = 0;
    for (let i = k + 1; i < n; i++) alpha2 += m[i * n + k] * m[i * n + k];
    const x0 = m[(k + 1) * n + k];
    if (alpha2 === 0 || alpha2 === x0 * x0) {
      off[k] = x0;
      continue;
    }
    const alpha = x0 >= 0 ? -Math.sqrt(alpha2) : Math.sqrt(alpha2);
    // u = x − α e1 stored in column k (rows k+1..)
    m[(k + 1) * n + k] = x0 - alpha;
    const unorm2 = alpha2 - x0 * x0 + (x0 - alpha) * (x0 - alpha);
    const beta = 2 / unorm2;
    off[k] = alpha;
    // p = β A u (A the trailing block, symmetric; use the lower triangle)
    for (let i = k + 1; i < n; i++) {
      let s = 0;
      const io = i * n;
      for (let j = k + 1; j <= i; j++) s += m[io + j] * m[j * n + k];
      for (let j = i + 1; j < n; j++) s += m[j * n + i] * m[j * n + k];
      v[i] = beta * s;
    }
    // w = p − (β/2)(pᵀu) u
    let pu = 0;
    for (let i = k + 1; i < n; i++) pu += v[i] * m[i * n + k];
    const c = 0.5 * beta * pu;
    for (let i = k + 1; i < n; i++) v[i] -= c * m[i * n + k];
    // A ← A − u wᵀ − w uᵀ (lower triangle)
    for (let i = k + 1; i < n; i++) {
      const ui = m[i * n + k];
      const wi = v[i];
      const io = i * n;
      for (let j = k + 1; j <= i; j++) m[io + j] -= ui * v[j] + wi * m[j * n + k];
    }
  }
  for (let i = 0; i < n; i++) diag[i] = m[i * n + i];
  if (n >= 2) off[n - 2] = m[(n - 1) * n + n - 2];
}

/** Number of eigenvalues of the symmetric tridiagonal (diag, off) below x (Sturm count of the LDLᵀ pivots). */
function sturmCount(diag: Float64Array, off: Float64Array, n: number, x: number, tiny: number): number {
  let count = 0;
  let q = diag[0] - x;
  if (q < 0) count++;
  for (let i = 1; i < n; i++) {
    if (q === 0) q = tiny;
    q = diag[i] - x - (off[i - 1] * off[i - 1]) / q;
    if (q < 0) count++;
  }
  return count;
}

/** Smallest eigenvalue of a symmetric tridiagonal matrix by bisection inside the Gershgorin interval. */
export function smallestTridiagonal(diag: Float64Array, off: Float64Array, n: number): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const r = (i > 0 ? Math.abs(off[i - 1]) : 0) + (i < n - 1 ? Math.abs(off[i]) : 0);
    lo = Math.min(lo, diag[i] - r);
    hi = Math.max(hi, diag[i] + r);
  }
  const scale = Math.max(Math.abs(lo), Math.abs(hi), Number.MIN_VALUE);
  const tiny = Number.EPSILON * scale * 1e-3 + Number.MIN_VALUE;
  // Invariant: count(lo) = 0, count(hi) ≥ 1.
  hi = hi + Number.EPSILON * scale;
  lo = lo - Number.EPSILON * scale;
  for (let it = 0; it < 200; it++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi || hi - lo <= 2 * Number.EPSILON * scale) break;
    if (sturmCount(diag, off, n, mid, tiny) >= 1) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
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
