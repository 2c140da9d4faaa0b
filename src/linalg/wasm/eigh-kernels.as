// AssemblyScript source of the WebAssembly SIMD (f64x2) kernels of the Hermitian eigensolver
// (src/linalg/eigh.ts). Compiled by src/linalg/wasm/build.mjs (`npm run build:wasm`, part of
// `npm run build`) into src/linalg/wasm/eigh-kernels.wasm.ts, which is committed so that tests and
// browser bundles need no compiler; a test checks that the committed module equals a fresh compile.
//
// What it is for: the loops that hold nearly all of eigh's work, written with 128-bit vectors of
// two doubles: the input's scale and Hermitian part, the whole Householder reduction loop (its
// fused pass over pairs of rows, on an interleaved copy), the QL iteration for eigenvalues only, the
// reflector pairs of the back-transformation, the O(k²) parts of each divide-and-conquer merge
// (secular equation, Gu–Eisenstat ẑ, the normalised vectors of the rank-one update) and its matrix
// product, and the data movement around them (phases, final transpose, merge write-back); also
// the codec's pass over a square matrix (src/ops/codec.ts: finiteness, norm, Hermiticity defect),
// so that a fresh process runs compiled code from its first matrix. The
// extension is .as (not .ts) so that the project's TypeScript compiler does not try to type-check
// AssemblyScript's types (f64, usize, v128).
// What it deliberately does not do: allocate, throw, or call out; every argument is a byte address
// into the memory that the host (src/linalg/eigh-wasm.ts) imports, or an index. No bounds checks
// beyond WebAssembly's own: the host sizes the memory before each call. The arithmetic follows the
// scalar TypeScript of eigh.ts step for step (same algorithms, thresholds and stopping rules);
// only the order of some sums differs.
// Cost: the same flop counts as the scalar TypeScript loops they replace (see eigh.ts); each loop
// runs over two consecutive indices per vector instruction, with a scalar tail for an odd count.
//
// Hand-written because no library offers SIMD kernels for split (real/imaginary) complex storage in
// a form that runs in both Node and browsers without a native build. AssemblyScript rather than
// hand-written WebAssembly text: both compile on Node 20 from npm packages with no binary download,
// and AssemblyScript's loops are far easier to read and check than stack code.
// Measured against the scalar TypeScript path (whole eigh, values and vectors, CPU-time medians of
// interleaved runs in one process, shared 2-core machine, bench/eigh.ts): 2.6–3.1× faster at
// n = 64, 128 and 256.

// ---------------------------------------------------------------------------------------------
// Householder reduction (tridiagonalize in eigh.ts, step for step), on an interleaved copy.
// ---------------------------------------------------------------------------------------------
//
// Layout: the lower triangle is copied into X, where row i holds its columns in pairs, 32 bytes
// per pair: [re_j, re_j+1, im_j, im_j+1] (rows padded to an even length). The vectors of a step
// live in B, 128 bytes per pair of indices: eight f64x2 fields, each [x_j, x_j+1]: the previous
// reflector v and its update vector w (the pending update A -= v w* + w v*), the new reflector u,
// and the accumulator p = A u. So the inner loop walks three pointers with constant offsets (the
// split storage needed a dozen, whose address arithmetic and spills cost more than the
// arithmetic). Fields that do not apply in a step (no pending update, or no new reflector) are
// zero, which leaves the values exact (a - 0 = a).

const F_VR: usize = 0, F_VI: usize = 16, F_WR: usize = 32, F_WI: usize = 48;
const F_UR: usize = 64, F_UI: usize = 80, F_PR: usize = 96, F_PI: usize = 112;

/** The same threshold as eigh.ts's TINY2. */
const TINY2: f64 = 1e-290;

@inline function f64At(p: usize, i: i32): f64 {
  return load<f64>(p + ((<usize>i) << 3));
}
@inline function f64Set(p: usize, i: i32, x: f64): void {
  store<f64>(p + ((<usize>i) << 3), x);
}
/** Byte offset of column j within a row of X (real part; the imaginary part is 16 bytes on). */
@inline function colX(j: i32): usize {
  return (((<usize>j) >> 1) << 5) + (((<usize>j) & 1) << 3);
}
/** Byte offset of index j within B (field 0; field f is f bytes on). */
@inline function idxB(j: i32): usize {
  return (((<usize>j) >> 1) << 7) + (((<usize>j) & 1) << 3);
}

/**
 * Rows i and i+1 of the fused pass, columns j0..i+1 of the lower triangle: A -= v w* + w v*, then
 * p += A u (Hermitian symmetry for the upper part). r0, r1: addresses of rows i and i+1 in X.
 */
function rowPairX(r0: usize, r1: usize, B: usize, i: i32, j0: i32): void {
  const b0 = B + idxB(i), b1 = B + idxB(i + 1);
  const v0r = load<f64>(b0, F_VR), v0i = load<f64>(b0, F_VI), w0r = load<f64>(b0, F_WR), w0i = load<f64>(b0, F_WI);
  const v1r = load<f64>(b1, F_VR), v1i = load<f64>(b1, F_VI), w1r = load<f64>(b1, F_WR), w1i = load<f64>(b1, F_WI);
  const u0r = load<f64>(b0, F_UR), u0i = load<f64>(b0, F_UI), u1r = load<f64>(b1, F_UR), u1i = load<f64>(b1, F_UI);
  let s0r: f64 = 0, s0i: f64 = 0, s1r: f64 = 0, s1i: f64 = 0;
  let j = j0;
  if ((j & 1) != 0 && j < i) {
    // A leading odd column, on its own, so that the vector loop starts at a pair.
    const x0 = r0 + colX(j), x1 = r1 + colX(j), bj = B + idxB(j);
    const vjr = load<f64>(bj, F_VR), vji = load<f64>(bj, F_VI), wjr = load<f64>(bj, F_WR), wji = load<f64>(bj, F_WI);
    const ujr = load<f64>(bj, F_UR), uji = load<f64>(bj, F_UI);
    const a0r = load<f64>(x0) - (v0r * wjr + v0i * wji + (w0r * vjr + w0i * vji));
    const a0i = load<f64>(x0, 16) - (v0i * wjr - v0r * wji + (w0i * vjr - w0r * vji));
    const a1r = load<f64>(x1) - (v1r * wjr + v1i * wji + (w1r * vjr + w1i * vji));
    const a1i = load<f64>(x1, 16) - (v1i * wjr - v1r * wji + (w1i * vjr - w1r * vji));
    store<f64>(x0, a0r); store<f64>(x0, a0i, 16); store<f64>(x1, a1r); store<f64>(x1, a1i, 16);
    s0r += a0r * ujr - a0i * uji; s0i += a0r * uji + a0i * ujr;
    s1r += a1r * ujr - a1i * uji; s1i += a1r * uji + a1i * ujr;
    store<f64>(bj, load<f64>(bj, F_PR) + (a0r * u0r + a0i * u0i + (a1r * u1r + a1i * u1i)), F_PR);
    store<f64>(bj, load<f64>(bj, F_PI) + (a0r * u0i - a0i * u0r + (a1r * u1i - a1i * u1r)), F_PI);
    j++;
  }
  const V0r = f64x2.splat(v0r), V0i = f64x2.splat(v0i), W0r = f64x2.splat(w0r), W0i = f64x2.splat(w0i);
  const V1r = f64x2.splat(v1r), V1i = f64x2.splat(v1i), W1r = f64x2.splat(w1r), W1i = f64x2.splat(w1i);
  const U0r = f64x2.splat(u0r), U0i = f64x2.splat(u0i), U1r = f64x2.splat(u1r), U1i = f64x2.splat(u1i);
  let S0r = f64x2.splat(0), S0i = f64x2.splat(0), S1r = f64x2.splat(0), S1i = f64x2.splat(0);
  let x0 = r0 + colX(j), x1 = r1 + colX(j), bj = B + idxB(j);
  const end = r0 + colX(i & ~1);
  for (; x0 < end; x0 += 32, x1 += 32, bj += 128) {
    const vjr = v128.load(bj, F_VR), vji = v128.load(bj, F_VI);
    const wjr = v128.load(bj, F_WR), wji = v128.load(bj, F_WI);
    const a0r = f64x2.sub(v128.load(x0), f64x2.add(
      f64x2.add(f64x2.mul(V0r, wjr), f64x2.mul(V0i, wji)), f64x2.add(f64x2.mul(W0r, vjr), f64x2.mul(W0i, vji))));
    const a0i = f64x2.sub(v128.load(x0, 16), f64x2.add(
      f64x2.sub(f64x2.mul(V0i, wjr), f64x2.mul(V0r, wji)), f64x2.sub(f64x2.mul(W0i, vjr), f64x2.mul(W0r, vji))));
    const a1r = f64x2.sub(v128.load(x1), f64x2.add(
      f64x2.add(f64x2.mul(V1r, wjr), f64x2.mul(V1i, wji)), f64x2.add(f64x2.mul(W1r, vjr), f64x2.mul(W1i, vji))));
    const a1i = f64x2.sub(v128.load(x1, 16), f64x2.add(
      f64x2.sub(f64x2.mul(V1i, wjr), f64x2.mul(V1r, wji)), f64x2.sub(f64x2.mul(W1i, vjr), f64x2.mul(W1r, vji))));
    v128.store(x0, a0r);
    v128.store(x0, a0i, 16);
    v128.store(x1, a1r);
    v128.store(x1, a1i, 16);
    const ujr = v128.load(bj, F_UR), uji = v128.load(bj, F_UI);
    S0r = f64x2.add(S0r, f64x2.sub(f64x2.mul(a0r, ujr), f64x2.mul(a0i, uji)));
    S0i = f64x2.add(S0i, f64x2.add(f64x2.mul(a0r, uji), f64x2.mul(a0i, ujr)));
    S1r = f64x2.add(S1r, f64x2.sub(f64x2.mul(a1r, ujr), f64x2.mul(a1i, uji)));
    S1i = f64x2.add(S1i, f64x2.add(f64x2.mul(a1r, uji), f64x2.mul(a1i, ujr)));
    v128.store(bj, f64x2.add(v128.load(bj, F_PR), f64x2.add(
      f64x2.add(f64x2.mul(a0r, U0r), f64x2.mul(a0i, U0i)), f64x2.add(f64x2.mul(a1r, U1r), f64x2.mul(a1i, U1i)))), F_PR);
    v128.store(bj, f64x2.add(v128.load(bj, F_PI), f64x2.add(
      f64x2.sub(f64x2.mul(a0r, U0i), f64x2.mul(a0i, U0r)), f64x2.sub(f64x2.mul(a1r, U1i), f64x2.mul(a1i, U1r)))), F_PI);
  }
  s0r += f64x2.extract_lane(S0r, 0) + f64x2.extract_lane(S0r, 1);
  s0i += f64x2.extract_lane(S0i, 0) + f64x2.extract_lane(S0i, 1);
  s1r += f64x2.extract_lane(S1r, 0) + f64x2.extract_lane(S1r, 1);
  s1i += f64x2.extract_lane(S1i, 0) + f64x2.extract_lane(S1i, 1);
  if ((i & 1) != 0 && j < i) {
    // The column i-1 (even) left before the diagonal pair.
    const jj = i - 1;
    const y0 = r0 + colX(jj), y1 = r1 + colX(jj), bq = B + idxB(jj);
    const vjr = load<f64>(bq, F_VR), vji = load<f64>(bq, F_VI), wjr = load<f64>(bq, F_WR), wji = load<f64>(bq, F_WI);
    const ujr = load<f64>(bq, F_UR), uji = load<f64>(bq, F_UI);
    const a0r = load<f64>(y0) - (v0r * wjr + v0i * wji + (w0r * vjr + w0i * vji));
    const a0i = load<f64>(y0, 16) - (v0i * wjr - v0r * wji + (w0i * vjr - w0r * vji));
    const a1r = load<f64>(y1) - (v1r * wjr + v1i * wji + (w1r * vjr + w1i * vji));
    const a1i = load<f64>(y1, 16) - (v1i * wjr - v1r * wji + (w1i * vjr - w1r * vji));
    store<f64>(y0, a0r); store<f64>(y0, a0i, 16); store<f64>(y1, a1r); store<f64>(y1, a1i, 16);
    s0r += a0r * ujr - a0i * uji; s0i += a0r * uji + a0i * ujr;
    s1r += a1r * ujr - a1i * uji; s1i += a1r * uji + a1i * ujr;
    store<f64>(bq, load<f64>(bq, F_PR) + (a0r * u0r + a0i * u0i + (a1r * u1r + a1i * u1i)), F_PR);
    store<f64>(bq, load<f64>(bq, F_PI) + (a0r * u0i - a0i * u0r + (a1r * u1i - a1i * u1r)), F_PI);
  }
  // Element (i+1, i) and the two diagonal entries.
  const e10 = r1 + colX(i), e00 = r0 + colX(i), e11 = r1 + colX(i + 1);
  const ar = load<f64>(e10) - (v1r * w0r + v1i * w0i + w1r * v0r + w1i * v0i);
  const ai = load<f64>(e10, 16) - (v1i * w0r - v1r * w0i + w1i * v0r - w1r * v0i);
  store<f64>(e10, ar);
  store<f64>(e10, ai, 16);
  const d0 = load<f64>(e00) - 2 * (v0r * w0r + v0i * w0i);
  const d1 = load<f64>(e11) - 2 * (v1r * w1r + v1i * w1i);
  store<f64>(e00, d0);
  store<f64>(e11, d1);
  s1r += ar * u0r - ai * u0i;
  s1i += ar * u0i + ai * u0r;
  store<f64>(b0, load<f64>(b0, F_PR) + (s0r + d0 * u0r + ar * u1r + ai * u1i), F_PR);
  store<f64>(b0, load<f64>(b0, F_PI) + (s0i + d0 * u0i + ar * u1i - ai * u1r), F_PI);
  store<f64>(b1, load<f64>(b1, F_PR) + (s1r + d1 * u1r), F_PR);
  store<f64>(b1, load<f64>(b1, F_PI) + (s1i + d1 * u1i), F_PI);
}

/** Row i alone (the last row of an odd count): the same as rowPairX for one row. */
function rowOneX(r: usize, B: usize, i: i32, j0: i32): void {
  const b = B + idxB(i);
  const vir = load<f64>(b, F_VR), vii = load<f64>(b, F_VI), wir = load<f64>(b, F_WR), wii = load<f64>(b, F_WI);
  const uir = load<f64>(b, F_UR), uii = load<f64>(b, F_UI);
  let sr: f64 = 0, si: f64 = 0;
  for (let j = j0; j < i; j++) {
    const x = r + colX(j), bj = B + idxB(j);
    const vjr = load<f64>(bj, F_VR), vji = load<f64>(bj, F_VI), wjr = load<f64>(bj, F_WR), wji = load<f64>(bj, F_WI);
    const ar = load<f64>(x) - (vir * wjr + vii * wji + wir * vjr + wii * vji);
    const ai = load<f64>(x, 16) - (vii * wjr - vir * wji + wii * vjr - wir * vji);
    store<f64>(x, ar);
    store<f64>(x, ai, 16);
    const ujr = load<f64>(bj, F_UR), uji = load<f64>(bj, F_UI);
    sr += ar * ujr - ai * uji;
    si += ar * uji + ai * ujr;
    store<f64>(bj, load<f64>(bj, F_PR) + (ar * uir + ai * uii), F_PR);
    store<f64>(bj, load<f64>(bj, F_PI) + (ar * uii - ai * uir), F_PI);
  }
  const x = r + colX(i);
  const dii = load<f64>(x) - 2 * (vir * wir + vii * wii);
  store<f64>(x, dii);
  store<f64>(b, load<f64>(b, F_PR) + (sr + dii * uir), F_PR);
  store<f64>(b, load<f64>(b, F_PI) + (si + dii * uii), F_PI);
}

/**
 * max_k |re_k| + |im_k| over count entries: the scale of eigh's input (Infinity or NaN when an
 * entry is not finite; the host refuses the matrix then).
 */
export function largestEntry(re: usize, im: usize, count: i32): f64 {
  let M = f64x2.splat(0);
  let bad = f64x2.splat(0);
  let k = 0;
  for (; k + 1 < count; k += 2) {
    const o = (<usize>k) << 3;
    const a = f64x2.add(f64x2.abs(v128.load(re + o)), f64x2.abs(v128.load(im + o)));
    M = f64x2.pmax(M, a);
    bad = f64x2.add(bad, f64x2.sub(a, a)); // NaN from here on once an entry is infinite or NaN
  }
  let m = f64x2.extract_lane(M, 0) > f64x2.extract_lane(M, 1) ? f64x2.extract_lane(M, 0) : f64x2.extract_lane(M, 1);
  if (k < count) {
    const a = Math.abs(f64At(re, k)) + Math.abs(f64At(im, k));
    if (a > m) m = a;
    if (a - a != 0) return NaN;
  }
  if (f64x2.extract_lane(bad, 0) != 0 || f64x2.extract_lane(bad, 1) != 0) return NaN;
  return m;
}

/**
 * Reduction of the Hermitian part of the matrix (are, aim) (n x n, row-major, the whole matrix)
 * times inv to tridiagonal form: the algorithm of tridiagonalize in eigh.ts (see there), on the
 * interleaved copy described above, made in tiles of 16 x 16 (the transposed reads stay in
 * cache). Outputs d, eRe, eIm (n each), the reflectors in the rows of vRe/vIm and their betas.
 * work: scratch, 16-byte aligned, of at least 2 n (n + 1) + 8 (n + 2) doubles (X, then B);
 * (are, aim) are left as they were.
 */
export function tridiagonalize(
  are: usize, aim: usize, n: i32, inv: f64, d: usize, eRe: usize, eIm: usize, vRe: usize, vIm: usize,
  betas: usize, work: usize,
): void {
  const rb = ((<usize>(n + 1)) >> 1) << 5;
  const X = work;
  const B = X + (<usize>n) * rb;
  const nb = (<usize>n) << 3;
  const half = 0.5 * inv;
  for (let ib = 0; ib < n; ib += 16) {
    const iEnd = ib + 16 < n ? ib + 16 : n;
    for (let jb = 0; jb <= ib; jb += 16) {
      for (let i = ib; i < iEnd; i++) {
        const src = (<usize>i) * nb, row = X + (<usize>i) * rb;
        const jEnd = jb + 16 < i + 1 ? jb + 16 : i + 1;
        for (let j = jb; j < jEnd; j++) {
          const o = (<usize>j) << 3;
          const t = (<usize>j) * nb + ((<usize>i) << 3);
          store<f64>(row + colX(j), (load<f64>(are + src + o) + load<f64>(are + t)) * half);
          store<f64>(row + colX(j), j == i ? 0 : (load<f64>(aim + src + o) - load<f64>(aim + t)) * half, 16);
        }
      }
    }
  }
  memory.fill(B, 0, ((<usize>(n + 2)) >> 1) << 7);
  let haveUpdate = false;
  for (let k = 0; k < n; k++) {
    if (haveUpdate) {
      // 1. The pending update on column k, rows k..n-1.
      const bk = B + idxB(k);
      const vkr = load<f64>(bk, F_VR), vki = load<f64>(bk, F_VI), wkr = load<f64>(bk, F_WR), wki = load<f64>(bk, F_WI);
      const ck = colX(k);
      for (let i = k; i < n; i++) {
        const bi = B + idxB(i), x = X + (<usize>i) * rb + ck;
        const vir = load<f64>(bi, F_VR), vii = load<f64>(bi, F_VI), wir = load<f64>(bi, F_WR), wii = load<f64>(bi, F_WI);
        store<f64>(x, load<f64>(x) - (vir * wkr + vii * wki + wir * vkr + wii * vki));
        store<f64>(x, load<f64>(x, 16) - (vii * wkr - vir * wki + wii * vkr - wir * vki), 16);
      }
      store<f64>(X + (<usize>k) * rb + ck, 0, 16);
    }
    f64Set(d, k, load<f64>(X + (<usize>k) * rb + colX(k)));
    if (k >= n - 1) break;

    // 2. Reflector k from column k, rows k+1..n-1, into u (and row k of vRe/vIm).
    const ck = colX(k);
    const vB = vRe + ((<usize>(k * n)) << 3), vBI = vIm + ((<usize>(k * n)) << 3);
    let xnorm2: f64 = 0;
    for (let i = k + 1; i < n; i++) {
      const x = X + (<usize>i) * rb + ck;
      const xr = load<f64>(x), xi = load<f64>(x, 16);
      xnorm2 += xr * xr + xi * xi;
    }
    const x0 = X + (<usize>(k + 1)) * rb + ck;
    const x0r = load<f64>(x0), x0i = load<f64>(x0, 16);
    const alpha2 = x0r * x0r + x0i * x0i;
    let beta: f64 = 0;
    if (k < n - 2 && xnorm2 - alpha2 > TINY2) {
      const alpha = Math.sqrt(alpha2);
      const xnorm = Math.sqrt(xnorm2);
      const phr = alpha > 0 ? x0r / alpha : 1;
      const phi = alpha > 0 ? x0i / alpha : 0;
      const sc = 1 / Math.sqrt(2 * xnorm * (xnorm + alpha));
      for (let i = k + 1; i < n; i++) {
        const x = X + (<usize>i) * rb + ck;
        let ur = load<f64>(x) * sc, ui = load<f64>(x, 16) * sc;
        if (i == k + 1) {
          ur += phr * xnorm * sc;
          ui += phi * xnorm * sc;
        }
        f64Set(vB, i, ur);
        f64Set(vBI, i, ui);
        const bi = B + idxB(i);
        store<f64>(bi, ur, F_UR);
        store<f64>(bi, ui, F_UI);
      }
      beta = 2;
      f64Set(eRe, k, -phr * xnorm);
      f64Set(eIm, k, -phi * xnorm);
    } else {
      f64Set(eRe, k, x0r);
      f64Set(eIm, k, x0i);
    }
    f64Set(betas, k, beta);

    const useV = beta != 0;
    if (!haveUpdate && !useV) continue;
    // 3. One pass over rows/columns k+1..n-1: the pending update, and p = A u.
    for (let i = k + 1; i < n; i++) {
      const bi = B + idxB(i);
      store<f64>(bi, 0, F_PR);
      store<f64>(bi, 0, F_PI);
      if (!useV) {
        store<f64>(bi, 0, F_UR);
        store<f64>(bi, 0, F_UI);
      }
    }
    let i = k + 1;
    for (; i + 1 < n; i += 2) rowPairX(X + (<usize>i) * rb, X + (<usize>(i + 1)) * rb, B, i, k + 1);
    if (i < n) rowOneX(X + (<usize>i) * rb, B, i, k + 1);

    // 4. The next update: v <- u, w <- beta p - (beta²/2)(u* p) u; none when there is no reflector.
    let vpr: f64 = 0;
    if (useV) {
      for (let q = k + 1; q < n; q++) {
        const bq = B + idxB(q);
        vpr += load<f64>(bq, F_UR) * load<f64>(bq, F_PR) + load<f64>(bq, F_UI) * load<f64>(bq, F_PI);
      }
    }
    const K = 0.5 * beta * beta * vpr;
    for (let q = k + 1; q < n; q++) {
      const bq = B + idxB(q);
      const ur = load<f64>(bq, F_UR), ui = load<f64>(bq, F_UI);
      store<f64>(bq, ur, F_VR);
      store<f64>(bq, ui, F_VI);
      store<f64>(bq, beta * load<f64>(bq, F_PR) - K * ur, F_WR);
      store<f64>(bq, beta * load<f64>(bq, F_PI) - K * ui, F_WI);
      store<f64>(bq, 0, F_UR);
      store<f64>(bq, 0, F_UI);
    }
    haveUpdate = useV;
  }
}

// ---------------------------------------------------------------------------------------------
// Back-transformation: reflector pairs applied to two vectors at a time.
// ---------------------------------------------------------------------------------------------

// Dot products x = v* m of the reflector pair (A, B) with the vectors at m0 and m1, over [lo, hi).
// Held in globals between the calls of one pass (returning eight numbers otherwise needs memory).
let xa0r: f64 = 0, xa0i: f64 = 0, xb0r: f64 = 0, xb0i: f64 = 0;
let xa1r: f64 = 0, xa1i: f64 = 0, xb1r: f64 = 0, xb1i: f64 = 0;

function hsum(x: v128): f64 {
  return f64x2.extract_lane(x, 0) + f64x2.extract_lane(x, 1);
}

function dots(
  aR: usize, aI: usize, bR: usize, bI: usize, m0R: usize, m0I: usize, m1R: usize, m1I: usize, lo: i32, hi: i32,
): void {
  let XA0r = f64x2.splat(0), XA0i = f64x2.splat(0), XB0r = f64x2.splat(0), XB0i = f64x2.splat(0);
  let XA1r = f64x2.splat(0), XA1i = f64x2.splat(0), XB1r = f64x2.splat(0), XB1i = f64x2.splat(0);
  let i = lo;
  for (; i + 1 < hi; i += 2) {
    const o = (<usize>i) << 3;
    const ar = v128.load(aR + o), ai = v128.load(aI + o), br = v128.load(bR + o), bi = v128.load(bI + o);
    const m0r = v128.load(m0R + o), m0i = v128.load(m0I + o), m1r = v128.load(m1R + o), m1i = v128.load(m1I + o);
    XA0r = f64x2.add(XA0r, f64x2.add(f64x2.mul(ar, m0r), f64x2.mul(ai, m0i)));
    XA0i = f64x2.add(XA0i, f64x2.sub(f64x2.mul(ar, m0i), f64x2.mul(ai, m0r)));
    XB0r = f64x2.add(XB0r, f64x2.add(f64x2.mul(br, m0r), f64x2.mul(bi, m0i)));
    XB0i = f64x2.add(XB0i, f64x2.sub(f64x2.mul(br, m0i), f64x2.mul(bi, m0r)));
    XA1r = f64x2.add(XA1r, f64x2.add(f64x2.mul(ar, m1r), f64x2.mul(ai, m1i)));
    XA1i = f64x2.add(XA1i, f64x2.sub(f64x2.mul(ar, m1i), f64x2.mul(ai, m1r)));
    XB1r = f64x2.add(XB1r, f64x2.add(f64x2.mul(br, m1r), f64x2.mul(bi, m1i)));
    XB1i = f64x2.add(XB1i, f64x2.sub(f64x2.mul(br, m1i), f64x2.mul(bi, m1r)));
  }
  let sa0r = hsum(XA0r), sa0i = hsum(XA0i), sb0r = hsum(XB0r), sb0i = hsum(XB0i);
  let sa1r = hsum(XA1r), sa1i = hsum(XA1i), sb1r = hsum(XB1r), sb1i = hsum(XB1i);
  if (i < hi) {
    const o = (<usize>i) << 3;
    const ar = load<f64>(aR + o), ai = load<f64>(aI + o), br = load<f64>(bR + o), bi = load<f64>(bI + o);
    const m0r = load<f64>(m0R + o), m0i = load<f64>(m0I + o), m1r = load<f64>(m1R + o), m1i = load<f64>(m1I + o);
    sa0r += ar * m0r + ai * m0i; sa0i += ar * m0i - ai * m0r;
    sb0r += br * m0r + bi * m0i; sb0i += br * m0i - bi * m0r;
    sa1r += ar * m1r + ai * m1i; sa1i += ar * m1i - ai * m1r;
    sb1r += br * m1r + bi * m1i; sb1i += br * m1i - bi * m1r;
  }
  xa0r = sa0r; xa0i = sa0i; xb0r = sb0r; xb0i = sb0i;
  xa1r = sa1r; xa1i = sa1i; xb1r = sb1r; xb1i = sb1i;
}

/**
 * Q applied to the rows of (mRe, mIm) (n x n, each row one vector): the loop of applyReflectors in
 * eigh.ts. Pair q applies reflector pa[q] then pbk[q] (i32 arrays), with coefficients betas[pa[q]],
 * bb[q] and c = (cRe[q], cIm[q]) = v_b* v_a; reflector k is row k of (vRe, vIm).
 */
export function applyReflectorPairs(
  mRe: usize, mIm: usize, n: i32, vRe: usize, vIm: usize, betas: usize,
  pa: usize, pbk: usize, bb: usize, cRe: usize, cIm: usize, np: i32,
): void {
  const rowBytes = (<usize>n) << 3;
  for (let c = 0; c < n; c += 2) {
    const two = c + 1 < n;
    const r0 = (<usize>c) * rowBytes;
    const r1 = two ? r0 + rowBytes : r0;
    const m0R = mRe + r0, m0I = mIm + r0, m1R = mRe + r1, m1I = mIm + r1;
    let a = load<i32>(pa);
    let b = load<i32>(pbk);
    let aR = vRe + (<usize>a) * rowBytes, aI = vIm + (<usize>a) * rowBytes;
    let bR = vRe + (<usize>b) * rowBytes, bI = vIm + (<usize>b) * rowBytes;
    dots(aR, aI, bR, bI, m0R, m0I, m1R, m1I, b + 1, n);
    for (let q = 0; q < np; q++) {
      const ba = load<f64>(betas + ((<usize>a) << 3));
      const bq = load<f64>(bb + ((<usize>q) << 3));
      const cr = load<f64>(cRe + ((<usize>q) << 3)), ci = load<f64>(cIm + ((<usize>q) << 3));
      const sa0r = ba * xa0r, sa0i = ba * xa0i, sa1r = ba * xa1r, sa1i = ba * xa1i;
      const sb0r = bq * (xb0r - (cr * sa0r - ci * sa0i));
      const sb0i = bq * (xb0i - (cr * sa0i + ci * sa0r));
      const sb1r = bq * (xb1r - (cr * sa1r - ci * sa1i));
      const sb1i = bq * (xb1i - (cr * sa1i + ci * sa1r));
      const SA0r = f64x2.splat(sa0r), SA0i = f64x2.splat(sa0i), SA1r = f64x2.splat(sa1r), SA1i = f64x2.splat(sa1i);
      const SB0r = f64x2.splat(sb0r), SB0i = f64x2.splat(sb0i), SB1r = f64x2.splat(sb1r), SB1i = f64x2.splat(sb1i);
      if (q + 1 == np) {
        let i = b + 1;
        for (; i + 1 < n; i += 2) {
          const o = (<usize>i) << 3;
          const ar = v128.load(aR + o), ai = v128.load(aI + o), br = v128.load(bR + o), bi = v128.load(bI + o);
          v128.store(m0R + o, f64x2.sub(v128.load(m0R + o), f64x2.add(
            f64x2.sub(f64x2.mul(ar, SA0r), f64x2.mul(ai, SA0i)), f64x2.sub(f64x2.mul(br, SB0r), f64x2.mul(bi, SB0i)))));
          v128.store(m0I + o, f64x2.sub(v128.load(m0I + o), f64x2.add(
            f64x2.add(f64x2.mul(ar, SA0i), f64x2.mul(ai, SA0r)), f64x2.add(f64x2.mul(br, SB0i), f64x2.mul(bi, SB0r)))));
          if (two) {
            v128.store(m1R + o, f64x2.sub(v128.load(m1R + o), f64x2.add(
              f64x2.sub(f64x2.mul(ar, SA1r), f64x2.mul(ai, SA1i)), f64x2.sub(f64x2.mul(br, SB1r), f64x2.mul(bi, SB1i)))));
            v128.store(m1I + o, f64x2.sub(v128.load(m1I + o), f64x2.add(
              f64x2.add(f64x2.mul(ar, SA1i), f64x2.mul(ai, SA1r)), f64x2.add(f64x2.mul(br, SB1i), f64x2.mul(bi, SB1r)))));
          }
        }
        if (i < n) {
          const o = (<usize>i) << 3;
          const ar = load<f64>(aR + o), ai = load<f64>(aI + o), br = load<f64>(bR + o), bi = load<f64>(bI + o);
          store<f64>(m0R + o, load<f64>(m0R + o) - (ar * sa0r - ai * sa0i + (br * sb0r - bi * sb0i)));
          store<f64>(m0I + o, load<f64>(m0I + o) - (ar * sa0i + ai * sa0r + (br * sb0i + bi * sb0r)));
          if (two) {
            store<f64>(m1R + o, load<f64>(m1R + o) - (ar * sa1r - ai * sa1i + (br * sb1r - bi * sb1i)));
            store<f64>(m1I + o, load<f64>(m1I + o) - (ar * sa1i + ai * sa1r + (br * sb1i + bi * sb1r)));
          }
        }
        break;
      }
      const a2 = load<i32>(pa + ((<usize>(q + 1)) << 2));
      const b2 = load<i32>(pbk + ((<usize>(q + 1)) << 2));
      const a2R = vRe + (<usize>a2) * rowBytes, a2I = vIm + (<usize>a2) * rowBytes;
      const b2R = vRe + (<usize>b2) * rowBytes, b2I = vIm + (<usize>b2) * rowBytes;
      // Indices b2+1..b are untouched by pair q.
      dots(a2R, a2I, b2R, b2I, m0R, m0I, m1R, m1I, b2 + 1, b + 1);
      let XA0r = f64x2.splat(0), XA0i = f64x2.splat(0), XB0r = f64x2.splat(0), XB0i = f64x2.splat(0);
      let XA1r = f64x2.splat(0), XA1i = f64x2.splat(0), XB1r = f64x2.splat(0), XB1i = f64x2.splat(0);
      let i = b + 1;
      for (; i + 1 < n; i += 2) {
        const o = (<usize>i) << 3;
        let ar = v128.load(aR + o), ai = v128.load(aI + o), br = v128.load(bR + o), bi = v128.load(bI + o);
        const m0r = f64x2.sub(v128.load(m0R + o), f64x2.add(
          f64x2.sub(f64x2.mul(ar, SA0r), f64x2.mul(ai, SA0i)), f64x2.sub(f64x2.mul(br, SB0r), f64x2.mul(bi, SB0i))));
        const m0i = f64x2.sub(v128.load(m0I + o), f64x2.add(
          f64x2.add(f64x2.mul(ar, SA0i), f64x2.mul(ai, SA0r)), f64x2.add(f64x2.mul(br, SB0i), f64x2.mul(bi, SB0r))));
        const m1r = f64x2.sub(v128.load(m1R + o), f64x2.add(
          f64x2.sub(f64x2.mul(ar, SA1r), f64x2.mul(ai, SA1i)), f64x2.sub(f64x2.mul(br, SB1r), f64x2.mul(bi, SB1i))));
        const m1i = f64x2.sub(v128.load(m1I + o), f64x2.add(
          f64x2.add(f64x2.mul(ar, SA1i), f64x2.mul(ai, SA1r)), f64x2.add(f64x2.mul(br, SB1i), f64x2.mul(bi, SB1r))));
        v128.store(m0R + o, m0r);
        v128.store(m0I + o, m0i);
        v128.store(m1R + o, m1r);
        v128.store(m1I + o, m1i);
        ar = v128.load(a2R + o); ai = v128.load(a2I + o); br = v128.load(b2R + o); bi = v128.load(b2I + o);
        XA0r = f64x2.add(XA0r, f64x2.add(f64x2.mul(ar, m0r), f64x2.mul(ai, m0i)));
        XA0i = f64x2.add(XA0i, f64x2.sub(f64x2.mul(ar, m0i), f64x2.mul(ai, m0r)));
        XB0r = f64x2.add(XB0r, f64x2.add(f64x2.mul(br, m0r), f64x2.mul(bi, m0i)));
        XB0i = f64x2.add(XB0i, f64x2.sub(f64x2.mul(br, m0i), f64x2.mul(bi, m0r)));
        XA1r = f64x2.add(XA1r, f64x2.add(f64x2.mul(ar, m1r), f64x2.mul(ai, m1i)));
        XA1i = f64x2.add(XA1i, f64x2.sub(f64x2.mul(ar, m1i), f64x2.mul(ai, m1r)));
        XB1r = f64x2.add(XB1r, f64x2.add(f64x2.mul(br, m1r), f64x2.mul(bi, m1i)));
        XB1i = f64x2.add(XB1i, f64x2.sub(f64x2.mul(br, m1i), f64x2.mul(bi, m1r)));
      }
      let ya0r = xa0r + hsum(XA0r), ya0i = xa0i + hsum(XA0i), yb0r = xb0r + hsum(XB0r), yb0i = xb0i + hsum(XB0i);
      let ya1r = xa1r + hsum(XA1r), ya1i = xa1i + hsum(XA1i), yb1r = xb1r + hsum(XB1r), yb1i = xb1i + hsum(XB1i);
      if (i < n) {
        const o = (<usize>i) << 3;
        let ar = load<f64>(aR + o), ai = load<f64>(aI + o), br = load<f64>(bR + o), bi = load<f64>(bI + o);
        const m0r = load<f64>(m0R + o) - (ar * sa0r - ai * sa0i + (br * sb0r - bi * sb0i));
        const m0i = load<f64>(m0I + o) - (ar * sa0i + ai * sa0r + (br * sb0i + bi * sb0r));
        const m1r = load<f64>(m1R + o) - (ar * sa1r - ai * sa1i + (br * sb1r - bi * sb1i));
        const m1i = load<f64>(m1I + o) - (ar * sa1i + ai * sa1r + (br * sb1i + bi * sb1r));
        store<f64>(m0R + o, m0r);
        store<f64>(m0I + o, m0i);
        store<f64>(m1R + o, m1r);
        store<f64>(m1I + o, m1i);
        ar = load<f64>(a2R + o); ai = load<f64>(a2I + o); br = load<f64>(b2R + o); bi = load<f64>(b2I + o);
        ya0r += ar * m0r + ai * m0i; ya0i += ar * m0i - ai * m0r;
        yb0r += br * m0r + bi * m0i; yb0i += br * m0i - bi * m0r;
        ya1r += ar * m1r + ai * m1i; ya1i += ar * m1i - ai * m1r;
        yb1r += br * m1r + bi * m1i; yb1i += br * m1i - bi * m1r;
      }
      xa0r = ya0r; xa0i = ya0i; xb0r = yb0r; xb0i = yb0i;
      xa1r = ya1r; xa1i = ya1i; xb1r = yb1r; xb1i = yb1i;
      a = a2; b = b2; aR = a2R; aI = a2I; bR = b2R; bI = b2I;
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Divide and conquer: the matrix products of the merge step.
// ---------------------------------------------------------------------------------------------

/**
 * out[i*m + r] = sum_{q in [q0, q1)} u[i*ku + q] * qt[r*ku + q] for all i < rows, r in [r0, r1):
 * 2 x 2 blocks of dot products, each over q two at a time.
 */
export function gemmNT(
  u: usize, qt: usize, out: usize, rows: i32, ku: i32, m: i32, r0: i32, r1: i32, q0: i32, q1: i32,
): void {
  const kb = (<usize>ku) << 3;
  const mb = (<usize>m) << 3;
  let i = 0;
  for (; i + 1 < rows; i += 2) {
    const ua = u + (<usize>i) * kb;
    const ub = ua + kb;
    const oa = out + (<usize>i) * mb;
    const ob = oa + mb;
    let r = r0;
    for (; r + 1 < r1; r += 2) {
      const qa = qt + (<usize>r) * kb;
      const qb = qa + kb;
      let S00 = f64x2.splat(0), S01 = f64x2.splat(0), S10 = f64x2.splat(0), S11 = f64x2.splat(0);
      let q = q0;
      for (; q + 1 < q1; q += 2) {
        const o = (<usize>q) << 3;
        const x0 = v128.load(ua + o), x1 = v128.load(ub + o);
        const y0 = v128.load(qa + o), y1 = v128.load(qb + o);
        S00 = f64x2.add(S00, f64x2.mul(x0, y0));
        S01 = f64x2.add(S01, f64x2.mul(x0, y1));
        S10 = f64x2.add(S10, f64x2.mul(x1, y0));
        S11 = f64x2.add(S11, f64x2.mul(x1, y1));
      }
      let s00 = hsum(S00), s01 = hsum(S01), s10 = hsum(S10), s11 = hsum(S11);
      if (q < q1) {
        const o = (<usize>q) << 3;
        const x0 = load<f64>(ua + o), x1 = load<f64>(ub + o), y0 = load<f64>(qa + o), y1 = load<f64>(qb + o);
        s00 += x0 * y0; s01 += x0 * y1; s10 += x1 * y0; s11 += x1 * y1;
      }
      const ro = (<usize>r) << 3;
      store<f64>(oa + ro, s00);
      store<f64>(oa + ro + 8, s01);
      store<f64>(ob + ro, s10);
      store<f64>(ob + ro + 8, s11);
    }
    if (r < r1) {
      const qa = qt + (<usize>r) * kb;
      store<f64>(oa + ((<usize>r) << 3), dot(ua, qa, q0, q1));
      store<f64>(ob + ((<usize>r) << 3), dot(ub, qa, q0, q1));
    }
  }
  if (i < rows) {
    const ua = u + (<usize>i) * kb;
    const oa = out + (<usize>i) * mb;
    for (let r = r0; r < r1; r++) store<f64>(oa + ((<usize>r) << 3), dot(ua, qt + (<usize>r) * kb, q0, q1));
  }
}

function dot(x: usize, y: usize, q0: i32, q1: i32): f64 {
  let S = f64x2.splat(0);
  let q = q0;
  for (; q + 1 < q1; q += 2) {
    const o = (<usize>q) << 3;
    S = f64x2.add(S, f64x2.mul(v128.load(x + o), v128.load(y + o)));
  }
  let s = hsum(S);
  if (q < q1) s += load<f64>(x + ((<usize>q) << 3)) * load<f64>(y + ((<usize>q) << 3));
  return s;
}

// ---------------------------------------------------------------------------------------------
// Divide and conquer: the secular equation and the vectors of the rank-one update.
// ---------------------------------------------------------------------------------------------

// Sums of z_j²/(p_j - x) and z_j²/(p_j - x)² over [j0, j1), returned in globals.
let sumS: f64 = 0, sumD: f64 = 0;

function poleSums(p: usize, zz: usize, j0: i32, j1: i32, x: f64): void {
  const X = f64x2.splat(x);
  const ONE = f64x2.splat(1);
  let S = f64x2.splat(0), D = f64x2.splat(0);
  let j = j0;
  for (; j + 1 < j1; j += 2) {
    const o = (<usize>j) << 3;
    const t = f64x2.div(ONE, f64x2.sub(v128.load(p + o), X));
    const a = f64x2.mul(v128.load(zz + o), t);
    S = f64x2.add(S, a);
    D = f64x2.add(D, f64x2.mul(a, t));
  }
  let s = hsum(S), d = hsum(D);
  if (j < j1) {
    const o = (<usize>j) << 3;
    const t = 1 / (load<f64>(p + o) - x);
    const a = load<f64>(zz + o) * t;
    s += a;
    d += a * t;
  }
  sumS = s;
  sumD = d;
}

const EPS: f64 = 2.220446049250313e-16;
/** The same stopping rule as eigh.ts's STEP_STOP. */
const STEP_STOP: f64 = 1e-9;

/**
 * Roots of 1 + rho Σ z_j²/(d_j - λ) = 0 (d ascending, k entries at d, z at z): root i as an offset
 * tau[i] from the pole d[org[i]] (org an i32 array). zz and del are scratch of k doubles. The
 * algorithm and its constants are those of solveSecular in eigh.ts (dlaed4's start, the two-pole
 * "middle way" model, bisection safeguard), with the pole sums two at a time.
 */
export function secularRoots(d: usize, z: usize, k: i32, rho: f64, zz: usize, del: usize, org: usize, tauOut: usize): void {
  let zsum: f64 = 0;
  for (let j = 0; j < k; j++) {
    const o = (<usize>j) << 3;
    const x = load<f64>(z + o);
    store<f64>(zz + o, x * x);
    zsum += x * x;
  }
  for (let i = 0; i < k; i++) {
    const last = i == k - 1;
    const di = load<f64>(d + ((<usize>i) << 3));
    let o: i32 = i;
    let lo: f64 = 0, hi: f64 = 0, tau: f64 = 0;
    if (!last) {
      const gap = load<f64>(d + ((<usize>(i + 1)) << 3)) - di;
      const mid = 0.5 * gap;
      const dm = di + mid;
      poleSums(d, zz, 0, i, dm);
      let c = sumS;
      poleSums(d, zz, i + 2, k, dm);
      c += sumS;
      c += 1 / rho;
      const a0 = load<f64>(zz + ((<usize>i) << 3));
      const a1 = load<f64>(zz + ((<usize>(i + 1)) << 3));
      const w = c - a0 / mid + a1 / (gap - mid);
      if (w >= 0) {
        lo = 0;
        hi = mid;
        const A = c * gap + a0 + a1;
        const B = a0 * gap;
        const r = Math.sqrt(Math.abs(A * A - 4 * B * c));
        tau = A > 0 ? (2 * B) / (A + r) : (A - r) / (2 * c);
      } else {
        o = i + 1;
        lo = -mid;
        hi = 0;
        const A = c * gap - a0 - a1;
        const B = a1 * gap;
        const r = Math.sqrt(Math.abs(A * A + 4 * B * c));
        tau = A < 0 ? (2 * B) / (A - r) : -(A + r) / (2 * c);
      }
    } else {
      hi = rho * zsum;
      tau = 0.5 * hi;
      if (k > 1) {
        const mid = 0.5 * hi;
        const dm = di + mid;
        poleSums(d, zz, 0, i - 1, dm);
        const c = 1 / rho + sumS;
        const gap = di - load<f64>(d + ((<usize>(i - 1)) << 3));
        const a0 = load<f64>(zz + ((<usize>(i - 1)) << 3));
        const a1 = load<f64>(zz + ((<usize>i) << 3));
        const w = c - a0 / (gap + mid) - a1 / mid;
        const A = -c * gap + a0 + a1;
        const B = a1 * gap;
        const r = Math.sqrt(A * A + 4 * B * c);
        const model = A < 0 ? (2 * B) / (r - A) : (A + r) / (2 * c);
        if (w <= 0) {
          lo = mid;
          tau = c <= a0 / (gap + hi) + a1 / hi ? hi : model;
        } else {
          hi = mid;
          tau = model;
        }
      }
    }
    if (!(tau > lo && tau < hi) && !(last && tau == hi)) tau = 0.5 * (lo + hi);
    const dO = load<f64>(d + ((<usize>o) << 3));
    {
      const DO = f64x2.splat(dO);
      let j = 0;
      for (; j + 1 < k; j += 2) {
        const oo = (<usize>j) << 3;
        v128.store(del + oo, f64x2.sub(v128.load(d + oo), DO));
      }
      if (j < k) store<f64>(del + ((<usize>j) << 3), load<f64>(d + ((<usize>j) << 3)) - dO);
    }
    const pl = load<f64>(del + ((<usize>i) << 3));
    const pr = last ? Infinity : load<f64>(del + ((<usize>(i + 1)) << 3));
    for (let iter = 0; iter < 200; iter++) {
      poleSums(del, zz, 0, i + 1, tau);
      const psi = sumS, dpsi = sumD;
      poleSums(del, zz, i + 1, k, tau);
      const phi = sumS, dphi = sumD;
      const f = 1 + rho * (psi + phi);
      if (f == 0) break;
      if (f < 0) lo = tau;
      else hi = tau;
      const err = EPS * (8 + 8 * rho * (phi - psi) + 3 * Math.abs(tau) * rho * (dpsi + dphi));
      if (Math.abs(f) <= err) break;
      const d1 = pl - tau;
      const s1 = rho * d1 * d1 * dpsi;
      let eta: f64;
      if (last) {
        const c = f - s1 / d1;
        eta = c > 0 ? d1 + s1 / c : NaN;
      } else {
        const d2 = pr - tau;
        const s2 = rho * d2 * d2 * dphi;
        const c = f - s1 / d1 - s2 / d2;
        const B = c * (d1 + d2) + s1 + s2;
        const C = f * d1 * d2;
        const disc = Math.max(B * B - 4 * c * C, 0);
        const den = B >= 0 ? B + Math.sqrt(disc) : B - Math.sqrt(disc);
        eta = den != 0 ? (2 * C) / den : NaN;
      }
      let next = tau + eta;
      const tiny = Math.abs(eta) <= STEP_STOP * Math.abs(tau);
      if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
      else if (tiny) {
        tau = next;
        break;
      }
      if (next == tau || hi - lo <= 2 * EPS * Math.max(Math.abs(lo), Math.abs(hi))) {
        tau = next;
        break;
      }
      tau = next;
    }
    store<i32>(org + ((<usize>i) << 2), o);
    store<f64>(tauOut + ((<usize>i) << 3), tau);
  }
}

/**
 * The eigenvectors of D + rho z z^T from the roots of secularRoots: ẑ of Gu & Eisenstat,
 * ẑ_j² = Π_i (λ_i - d_j) / (rho Π_{i≠j} (d_i - d_j)) with the sign of z_j, then row i of u
 * (k x k) = ẑ_c/(d_c - λ_i) normalised, columns in the order c = cols[q] (i32). zhat, dq, zq:
 * scratch of k doubles.
 */
export function secularVectors(
  d: usize, z: usize, k: i32, rho: f64, org: usize, tau: usize, cols: usize, u: usize,
  zhat: usize, dq: usize, zq: usize,
): void {
  for (let j = 0; j < k; j++) store<f64>(zhat + ((<usize>j) << 3), 1);
  for (let i = 0; i < k; i++) {
    const oi = (<usize>i) << 3;
    const o = load<f64>(d + ((<usize>load<i32>(org + ((<usize>i) << 2))) << 3));
    const t = load<f64>(tau + oi);
    const di = load<f64>(d + oi);
    const O = f64x2.splat(o), T = f64x2.splat(t), DI = f64x2.splat(di);
    // Factors (d_j - λ_i)/(d_j - d_i) for j ≠ i, and (λ_i - d_i)/rho for j = i.
    const pairI = i & ~1;
    let j = 0;
    for (; j + 1 < k; j += 2) {
      if (j == pairI) continue;
      const oj = (<usize>j) << 3;
      const dj = v128.load(d + oj);
      const f = f64x2.div(f64x2.sub(f64x2.sub(dj, O), T), f64x2.sub(dj, DI));
      v128.store(zhat + oj, f64x2.mul(v128.load(zhat + oj), f));
    }
    const jEnd = pairI + 2 < k ? pairI + 2 : k;
    for (let jj = pairI; jj < jEnd; jj++) {
      const oj = (<usize>jj) << 3;
      const dj = load<f64>(d + oj);
      const f = jj == i ? -((dj - o) - t) / rho : ((dj - o) - t) / (dj - di);
      store<f64>(zhat + oj, load<f64>(zhat + oj) * f);
    }
    if (j < k && j != pairI) {
      const oj = (<usize>j) << 3;
      const dj = load<f64>(d + oj);
      store<f64>(zhat + oj, load<f64>(zhat + oj) * (((dj - o) - t) / (dj - di)));
    }
  }
  for (let q = 0; q < k; q++) {
    const c = (<usize>load<i32>(cols + ((<usize>q) << 2))) << 3;
    const p = load<f64>(zhat + c);
    const a = Math.sqrt(p > 0 ? p : 0);
    store<f64>(zq + ((<usize>q) << 3), load<f64>(z + c) >= 0 ? a : -a);
    store<f64>(dq + ((<usize>q) << 3), load<f64>(d + c));
  }
  const kb = (<usize>k) << 3;
  for (let i = 0; i < k; i++) {
    const oi = (<usize>i) << 3;
    const o = load<f64>(d + ((<usize>load<i32>(org + ((<usize>i) << 2))) << 3));
    const t = load<f64>(tau + oi);
    const O = f64x2.splat(o), T = f64x2.splat(t);
    const row = u + (<usize>i) * kb;
    let SS = f64x2.splat(0);
    let q = 0;
    for (; q + 1 < k; q += 2) {
      const oq = (<usize>q) << 3;
      const x = f64x2.div(v128.load(zq + oq), f64x2.sub(f64x2.sub(v128.load(dq + oq), O), T));
      v128.store(row + oq, x);
      SS = f64x2.add(SS, f64x2.mul(x, x));
    }
    let ss = hsum(SS);
    if (q < k) {
      const oq = (<usize>q) << 3;
      const x = load<f64>(zq + oq) / ((load<f64>(dq + oq) - o) - t);
      store<f64>(row + oq, x);
      ss += x * x;
    }
    const sc = 1 / Math.sqrt(ss);
    const SC = f64x2.splat(sc);
    q = 0;
    for (; q + 1 < k; q += 2) {
      const oq = (<usize>q) << 3;
      v128.store(row + oq, f64x2.mul(v128.load(row + oq), SC));
    }
    if (q < k) store<f64>(row + ((<usize>q) << 3), load<f64>(row + ((<usize>q) << 3)) * sc);
  }
}

/**
 * out[i*m + r] = Σ_{q in [q0, q1)} u[i*ku + q] · x_q[r] for i < rows and r in [r0, r1), where x_q
 * is the vector at byte address ptrs[q] (an i32 array): the old eigenvectors gathered in place,
 * four rows of out by four components per block.
 */
export function gemmRows(
  u: usize, ku: i32, rows: i32, ptrs: usize, q0: i32, q1: i32, out: usize, m: i32, r0: i32, r1: i32,
): void {
  const kb = (<usize>ku) << 3;
  const mb = (<usize>m) << 3;
  let i = 0;
  for (; i + 3 < rows; i += 4) {
    const u0 = u + (<usize>i) * kb, u1 = u0 + kb, u2 = u1 + kb, u3 = u2 + kb;
    const o0 = out + (<usize>i) * mb, o1 = o0 + mb, o2 = o1 + mb, o3 = o2 + mb;
    let r = r0;
    for (; r + 3 < r1; r += 4) {
      const ro = (<usize>r) << 3;
      let A0 = f64x2.splat(0), B0 = f64x2.splat(0), A1 = f64x2.splat(0), B1 = f64x2.splat(0);
      let A2 = f64x2.splat(0), B2 = f64x2.splat(0), A3 = f64x2.splat(0), B3 = f64x2.splat(0);
      for (let q = q0; q < q1; q++) {
        const oq = (<usize>q) << 3;
        const x = (<usize>load<i32>(ptrs + ((<usize>q) << 2))) + ro;
        const y0 = v128.load(x), y1 = v128.load(x + 16);
        const s0 = f64x2.splat(load<f64>(u0 + oq)), s1 = f64x2.splat(load<f64>(u1 + oq));
        const s2 = f64x2.splat(load<f64>(u2 + oq)), s3 = f64x2.splat(load<f64>(u3 + oq));
        A0 = f64x2.add(A0, f64x2.mul(s0, y0)); B0 = f64x2.add(B0, f64x2.mul(s0, y1));
        A1 = f64x2.add(A1, f64x2.mul(s1, y0)); B1 = f64x2.add(B1, f64x2.mul(s1, y1));
        A2 = f64x2.add(A2, f64x2.mul(s2, y0)); B2 = f64x2.add(B2, f64x2.mul(s2, y1));
        A3 = f64x2.add(A3, f64x2.mul(s3, y0)); B3 = f64x2.add(B3, f64x2.mul(s3, y1));
      }
      v128.store(o0 + ro, A0); v128.store(o0 + ro + 16, B0);
      v128.store(o1 + ro, A1); v128.store(o1 + ro + 16, B1);
      v128.store(o2 + ro, A2); v128.store(o2 + ro + 16, B2);
      v128.store(o3 + ro, A3); v128.store(o3 + ro + 16, B3);
    }
    for (; r < r1; r++) {
      const ro = (<usize>r) << 3;
      let s0: f64 = 0, s1: f64 = 0, s2: f64 = 0, s3: f64 = 0;
      for (let q = q0; q < q1; q++) {
        const oq = (<usize>q) << 3;
        const y = load<f64>((<usize>load<i32>(ptrs + ((<usize>q) << 2))) + ro);
        s0 += load<f64>(u0 + oq) * y; s1 += load<f64>(u1 + oq) * y;
        s2 += load<f64>(u2 + oq) * y; s3 += load<f64>(u3 + oq) * y;
      }
      store<f64>(o0 + ro, s0); store<f64>(o1 + ro, s1); store<f64>(o2 + ro, s2); store<f64>(o3 + ro, s3);
    }
  }
  for (; i < rows; i++) {
    const u0 = u + (<usize>i) * kb;
    const o0 = out + (<usize>i) * mb;
    let r = r0;
    for (; r + 1 < r1; r += 2) {
      const ro = (<usize>r) << 3;
      let A = f64x2.splat(0);
      for (let q = q0; q < q1; q++) {
        const x = (<usize>load<i32>(ptrs + ((<usize>q) << 2))) + ro;
        A = f64x2.add(A, f64x2.mul(f64x2.splat(load<f64>(u0 + ((<usize>q) << 3))), v128.load(x)));
      }
      v128.store(o0 + ro, A);
    }
    if (r < r1) {
      const ro = (<usize>r) << 3;
      let s: f64 = 0;
      for (let q = q0; q < q1; q++) {
        s += load<f64>(u0 + ((<usize>q) << 3)) * load<f64>((<usize>load<i32>(ptrs + ((<usize>q) << 2))) + ro);
      }
      store<f64>(o0 + ro, s);
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Data movement around the kernels above.
// ---------------------------------------------------------------------------------------------

/** Row c of (mRe, mIm) = (dRe + i dIm) ∘ row c of zt, for the n rows of n entries. */
export function phaseRows(zt: usize, dRe: usize, dIm: usize, mRe: usize, mIm: usize, n: i32): void {
  const nb = (<usize>n) << 3;
  for (let c = 0; c < n; c++) {
    const row = (<usize>c) * nb;
    let r = 0;
    for (; r + 1 < n; r += 2) {
      const o = (<usize>r) << 3;
      const z = v128.load(zt + row + o);
      v128.store(mRe + row + o, f64x2.mul(v128.load(dRe + o), z));
      v128.store(mIm + row + o, f64x2.mul(v128.load(dIm + o), z));
    }
    if (r < n) {
      const o = (<usize>r) << 3;
      const z = load<f64>(zt + row + o);
      store<f64>(mRe + row + o, load<f64>(dRe + o) * z);
      store<f64>(mIm + row + o, load<f64>(dIm + o) * z);
    }
  }
}

/** (tRe, tIm) = transpose of (mRe, mIm), n x n, in 8 x 8 tiles. */
export function transposePair(mRe: usize, mIm: usize, n: i32, tRe: usize, tIm: usize): void {
  const nb = (<usize>n) << 3;
  for (let c0 = 0; c0 < n; c0 += 8) {
    const c1 = c0 + 8 < n ? c0 + 8 : n;
    for (let r0 = 0; r0 < n; r0 += 8) {
      const r1 = r0 + 8 < n ? r0 + 8 : n;
      for (let c = c0; c < c1; c++) {
        const src = (<usize>c) * nb;
        const oc = (<usize>c) << 3;
        for (let r = r0; r < r1; r++) {
          const o = (<usize>r) << 3;
          const dst = (<usize>r) * nb + oc;
          store<f64>(tRe + dst, load<f64>(mRe + src + o));
          store<f64>(tIm + dst, load<f64>(mIm + src + o));
        }
      }
    }
  }
}

/** Row i of dst (stride dstStride doubles) = row perm[i] (an i32 array) of src (stride m), m
 *  entries each, for i < m. */
export function copyRows(src: usize, perm: usize, dst: usize, dstStride: i32, m: i32): void {
  const mb = (<usize>m) << 3;
  const db = (<usize>dstStride) << 3;
  for (let i = 0; i < m; i++) {
    const s = src + (<usize>load<i32>(perm + ((<usize>i) << 2))) * mb;
    const d = dst + (<usize>i) * db;
    let r = 0;
    for (; r + 1 < m; r += 2) {
      const o = (<usize>r) << 3;
      v128.store(d + o, v128.load(s + o));
    }
    if (r < m) store<f64>(d + ((<usize>r) << 3), load<f64>(s + ((<usize>r) << 3)));
  }
}

// ---------------------------------------------------------------------------------------------
// Eigenvalues only: implicit QL on the real tridiagonal (tridiagonalQL in eigh.ts without
// vectors, step for step).
// ---------------------------------------------------------------------------------------------

/** sqrt(a² + b²), rescaled only when squares could over/underflow (eigh.ts's hypot). */
function hypotScaled(a: f64, b: f64): f64 {
  const x = Math.abs(a), y = Math.abs(b);
  const big = x > y ? x : y;
  if (big > 1e150 || big < 1e-150) {
    if (big == 0) return 0;
    const sx = x / big, sy = y / big;
    return big * Math.sqrt(sx * sx + sy * sy);
  }
  return Math.sqrt(x * x + y * y);
}

/**
 * Eigenvalues (unsorted, into d) of the symmetric tridiagonal with diagonal d and off-diagonal e
 * (e[i] couples i and i+1; e is overwritten). Returns 0, or 1 when an eigenvalue took more than
 * 60 iterations (the host throws, as eigh.ts does).
 */
export function tridiagonalValues(d: usize, e: usize, n: i32): i32 {
  f64Set(e, n - 1, 0);
  let f: f64 = 0;
  let tst1: f64 = 0;
  for (let l = 0; l < n; l++) {
    const t = Math.abs(f64At(d, l)) + Math.abs(f64At(e, l));
    if (t > tst1) tst1 = t;
    let m = l;
    while (m < n) {
      if (Math.abs(f64At(e, m)) <= EPS * tst1) break;
      m++;
    }
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) return 1;
        let g = f64At(d, l);
        let p = (f64At(d, l + 1) - g) / (2 * f64At(e, l));
        let r = Math.sqrt(p * p + 1);
        if (!(Math.abs(p) < 1e150)) r = Math.abs(p) * Math.sqrt(1 + (1 / p) * (1 / p));
        if (p < 0) r = -r;
        f64Set(d, l, f64At(e, l) / (p + r));
        f64Set(d, l + 1, f64At(e, l) * (p + r));
        const dl1 = f64At(d, l + 1);
        let h = g - f64At(d, l);
        for (let i = l + 2; i < n; i++) f64Set(d, i, f64At(d, i) - h);
        f += h;
        p = f64At(d, m);
        let c: f64 = 1, c2: f64 = 1, c3: f64 = 1;
        const el1 = f64At(e, l + 1);
        let s: f64 = 0, s2: f64 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          const ei = f64At(e, i);
          g = c * ei;
          h = c * p;
          r = hypotScaled(p, ei);
          f64Set(e, i + 1, s * r);
          s = ei / r;
          c = p / r;
          const di = f64At(d, i);
          p = c * di - s * g;
          f64Set(d, i + 1, h + s * (c * g + s * di));
        }
        p = (-s * s2 * c3 * el1 * f64At(e, l)) / dl1;
        f64Set(e, l, s * p);
        f64Set(d, l, c * p);
      } while (Math.abs(f64At(e, l)) > EPS * tst1);
    }
    f64Set(d, l, f64At(d, l) + f);
    f64Set(e, l, 0);
  }
  return 0;
}

// ---------------------------------------------------------------------------------------------
// The codec's one pass over a square matrix (squareFacts in src/ops/codec.ts, the same loops and
// order, so the same sums and the same entry reported on ties).
// ---------------------------------------------------------------------------------------------

/**
 * For the n x n matrix (re, im): the first row-major index whose real or imaginary part is not of
 * magnitude at most `limit` (NaN included), or -1; then (when -1) out[0] = Σ |m_k|², out[1] =
 * max |m_ij − conj(m_ji)|² over i ≤ j in tiles of 32 × 32, out[2], out[3] = its row j and column i.
 */
export function squareFacts(re: usize, im: usize, n: i32, limit: f64, out: usize): i32 {
  const count = n * n;
  let sum: f64 = 0;
  for (let k = 0; k < count; k++) {
    const x = f64At(re, k), y = f64At(im, k);
    if (!(Math.abs(x) <= limit && Math.abs(y) <= limit)) return k;
    sum += x * x + y * y;
  }
  let worst: f64 = 0;
  let row = 0, col = 0;
  for (let ib = 0; ib < n; ib += 32) {
    for (let jb = ib; jb < n; jb += 32) {
      const iEnd = ib + 32 < n ? ib + 32 : n;
      const jEnd = jb + 32 < n ? jb + 32 : n;
      for (let i = ib; i < iEnd; i++) {
        for (let j = jb > i ? jb : i; j < jEnd; j++) {
          const dr = f64At(re, i * n + j) - f64At(re, j * n + i);
          const di = f64At(im, i * n + j) + f64At(im, j * n + i);
          const d2 = dr * dr + di * di;
          if (d2 > worst) {
            worst = d2;
            row = j;
            col = i;
          }
        }
      }
    }
  }
  f64Set(out, 0, sum);
  f64Set(out, 1, worst);
  f64Set(out, 2, <f64>row);
  f64Set(out, 3, <f64>col);
  return -1;
}
