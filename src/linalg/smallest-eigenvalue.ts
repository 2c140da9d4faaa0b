/**
 * The smallest eigenvalue of a real symmetric or complex Hermitian matrix: Householder reduction to a
 * real symmetric tridiagonal matrix (eigenvalues only, the reflectors are not kept), then bisection on
 * Sturm counts. One bisection serves both: a Hermitian tridiagonal matrix has the eigenvalues of the
 * real one with the moduli of its off-diagonal, so both reductions hand over squared off-diagonals.
 *
 * For the SDP solver's step lengths to the cone boundary, which need the most negative eigenvalue of
 * a scaled direction to a few ulps of its norm (absolute, not relative accuracy), at every iteration
 * on every block: cheaper than a full eigendecomposition (src/linalg/eigh.ts) by the eigenvector work.
 *
 * Does not: compute eigenvectors, other eigenvalues, or relative accuracy for tiny eigenvalues of
 * graded matrices (use eigh.ts for those). Cost: 4n³/3 real (complex: 4h³/3 complex) multiply-adds for
 * the reduction, then O(n) per bisection step, at most ~60 steps to a few ulps.
 * Layouts: real matrices row-major n×n; complex ones as in dense-complex.ts (real parts, then
 * imaginary parts).
 */

/**
 * Smallest eigenvalue of a symmetric matrix (row-major n×n, only its lower triangle read; not
 * modified). `work`: optional scratch of at least n² + 3n numbers.
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
  const off2 = m.subarray(n * n + n, n * n + 2 * n); // off2[i]: squared coupling of i and i+1
  const v = m.subarray(n * n + 2 * n, n * n + 3 * n);
  tridiagonalizeSymmetric(m, n, diag, off2, v);
  return smallestTridiagonal(diag, off2, n);
}

/**
 * Householder reduction of the symmetric matrix in `m` (destroyed; lower triangle used) to a
 * tridiagonal matrix with diagonal `diag` and squared off-diagonal `off2` (off2[i] between i and i+1).
 * `v` is scratch of length n.
 */
function tridiagonalizeSymmetric(m: Float64Array, n: number, diag: Float64Array, off2: Float64Array, v: Float64Array): void {
  for (let k = 0; k < n - 2; k++) {
    // Reflector H = 1 − β u uᵀ on rows/cols k+1..n−1 annihilating m[k+2.., k].
    let alpha2 = 0;
    for (let i = k + 1; i < n; i++) alpha2 += m[i * n + k] * m[i * n + k];
    const x0 = m[(k + 1) * n + k];
    if (alpha2 === 0 || alpha2 === x0 * x0) {
      off2[k] = x0 * x0;
      continue;
    }
    const alpha = x0 >= 0 ? -Math.sqrt(alpha2) : Math.sqrt(alpha2);
    // u = x − α e1 stored in column k (rows k+1..)
    m[(k + 1) * n + k] = x0 - alpha;
    const unorm2 = alpha2 - x0 * x0 + (x0 - alpha) * (x0 - alpha);
    const beta = 2 / unorm2;
    off2[k] = alpha2;
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
  if (n >= 2) off2[n - 2] = m[(n - 1) * n + n - 2] ** 2;
}

/**
 * Smallest eigenvalue of a Hermitian h×h matrix (lower triangle read; `a` is destroyed): complex
 * Householder reduction to a Hermitian tridiagonal matrix, then the bisection below. When every
 * eigenvalue is ≥ `floor`, returns `floor` without bisecting (callers that only need eigenvalues below
 * a threshold). `diag`, `off2`, `w`: scratch of h, h and 2h numbers.
 */
export function minEigHermitianInPlace(a: Float64Array, h: number, diag: Float64Array, off2: Float64Array, w: Float64Array, floor = -Infinity): number {
  const hh = h * h;
  // 1×1: the eigenvalue itself, or `floor` when it is at least floor (never max(a₀, floor), which
  // would report floor for an eigenvalue below it; bench/RESULTS.md, "SDP", tells that story).
  if (h === 1) return floor > -Infinity && a[0] >= floor ? floor : a[0];
  for (let k = 0; k < h - 2; k++) {
    // x = A[k+1.., k]
    let alpha2 = 0;
    for (let i = k + 1; i < h; i++) {
      const r = a[i * h + k];
      const im = a[hh + i * h + k];
      alpha2 += r * r + im * im;
    }
    const x0r = a[(k + 1) * h + k];
    const x0i = a[hh + (k + 1) * h + k];
    const x0abs = Math.hypot(x0r, x0i);
    if (alpha2 === 0 || alpha2 <= x0abs * x0abs) {
      off2[k] = x0abs * x0abs;
      continue;
    }
    const nrm = Math.sqrt(alpha2);
    // α = −e^{iθ}‖x‖ with x0 = |x0| e^{iθ}; u = x − α e1 stored in column k
    const phr = x0abs === 0 ? 1 : x0r / x0abs;
    const phi = x0abs === 0 ? 0 : x0i / x0abs;
    const ur0 = x0r + phr * nrm;
    const ui0 = x0i + phi * nrm;
    a[(k + 1) * h + k] = ur0;
    a[hh + (k + 1) * h + k] = ui0;
    const unorm2 = alpha2 - x0abs * x0abs + ur0 * ur0 + ui0 * ui0;
    const beta = 2 / unorm2;
    off2[k] = alpha2;
    // p = β A u over the trailing block (Hermitian, lower triangle stored)
    for (let i = k + 1; i < h; i++) {
      let sr = 0;
      let si = 0;
      const io = i * h;
      for (let j = k + 1; j <= i; j++) {
        const ar = a[io + j];
        const ai = a[hh + io + j];
        const br = a[j * h + k];
        const bi = a[hh + j * h + k];
        sr += ar * br - ai * bi;
        si += ar * bi + ai * br;
      }
      for (let j = i + 1; j < h; j++) {
        // conj(A_ji) u_j
        const ar = a[j * h + i];
        const ai = -a[hh + j * h + i];
        const br = a[j * h + k];
        const bi = a[hh + j * h + k];
        sr += ar * br - ai * bi;
        si += ar * bi + ai * br;
      }
      w[i] = beta * sr;
      w[h + i] = beta * si;
    }
    // K = (β/2) u^H p (real for Hermitian A); w = p − K u
    let kr = 0;
    for (let i = k + 1; i < h; i++) kr += a[i * h + k] * w[i] + a[hh + i * h + k] * w[h + i];
    const K = 0.5 * beta * kr;
    for (let i = k + 1; i < h; i++) {
      w[i] -= K * a[i * h + k];
      w[h + i] -= K * a[hh + i * h + k];
    }
    // A ← A − u w^H − w u^H (lower triangle)
    for (let i = k + 1; i < h; i++) {
      const uir = a[i * h + k];
      const uii = a[hh + i * h + k];
      const wir = w[i];
      const wii = w[h + i];
      const io = i * h;
      for (let j = k + 1; j <= i; j++) {
        const ujr = a[j * h + k];
        const uji = a[hh + j * h + k];
        const wjr = w[j];
        const wji = w[h + j];
        // u_i conj(w_j) + w_i conj(u_j)
        a[io + j] -= uir * wjr + uii * wji + wir * ujr + wii * uji;
        a[hh + io + j] -= uii * wjr - uir * wji + wii * ujr - wir * uji;
      }
    }
  }
  for (let i = 0; i < h; i++) diag[i] = a[i * h + i];
  {
    const r = a[(h - 1) * h + h - 2];
    const im = a[hh + (h - 1) * h + h - 2];
    off2[h - 2] = r * r + im * im;
  }
  return smallestTridiagonal(diag, off2, h, floor);
}

/** Number of eigenvalues below x of the symmetric tridiagonal (diag, squared off-diagonal off2): Sturm count of the LDLᵀ pivots. */
function sturmCount(diag: Float64Array, off2: Float64Array, n: number, x: number, tiny: number): number {
  let count = 0;
  let q = diag[0] - x;
  if (q < 0) count++;
  for (let i = 1; i < n; i++) {
    if (q === 0) q = tiny;
    q = diag[i] - x - off2[i - 1] / q;
    if (q < 0) count++;
  }
  return count;
}

/**
 * Smallest eigenvalue of the symmetric tridiagonal matrix with diagonal `diag` and squared
 * off-diagonal `off2`, by bisection inside the Gershgorin interval; `floor` itself when every
 * eigenvalue is at least `floor` (default −∞: always the eigenvalue).
 */
export function smallestTridiagonal(diag: Float64Array, off2: Float64Array, n: number, floor = -Infinity): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const r = (i > 0 ? Math.sqrt(off2[i - 1]) : 0) + (i < n - 1 ? Math.sqrt(off2[i]) : 0);
    lo = Math.min(lo, diag[i] - r);
    hi = Math.max(hi, diag[i] + r);
  }
  const scale = Math.max(Math.abs(lo), Math.abs(hi), Number.MIN_VALUE);
  const tiny = Number.EPSILON * scale * 1e-3 + Number.MIN_VALUE;
  // Invariant: count(lo) = 0, count(hi) ≥ 1.
  hi = hi + Number.EPSILON * scale;
  lo = lo - Number.EPSILON * scale;
  if (floor > -Infinity) {
    if (lo >= floor) return floor;
    if (hi > floor && sturmCount(diag, off2, n, floor, tiny) === 0) return floor;
    hi = Math.min(hi, floor);
  }
  for (let it = 0; it < 200; it++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi || hi - lo <= 2 * Number.EPSILON * scale) break;
    if (sturmCount(diag, off2, n, mid, tiny) >= 1) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}
