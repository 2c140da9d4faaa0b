/**
 * The Hermitian eigensolver: H = V diag(λ) V*, eigenvalues ascending.
 *
 * Stage 1 reduces H to real symmetric tridiagonal form with complex Householder reflectors
 * (Golub & Van Loan, Matrix Computations, 4th ed., §8.3.1), working on the lower triangle only:
 * the Hermitian matrix–vector product and the rank-2 update of step k are fused with those of
 * step k+1 into a single pass over the trailing triangle, so each step reads and writes the matrix
 * once. A diagonal unitary of phases then makes the off-diagonal real and non-negative.
 *
 * Stage 2 (eigenvalues only) is the implicit QL iteration with Wilkinson-type shifts (the tql1/
 * tql2 procedures of Bowdler, Martin, Reinsch & Wilkinson), O(n²).
 *
 * Stage 2 (with vectors) is Cuppen's divide and conquer (Cuppen 1981; the form used by LAPACK's
 * dstedc/dlaed0–dlaed4): split the tridiagonal by a rank-one tear, solve the halves, deflate small
 * components and close pairs (Dongarra & Sorensen 1987), solve the secular equation for the rest
 * with a safeguarded two-pole rational iteration (in the spirit of Li's "middle way", LAPACK
 * dlaed4, started from dlaed4's two-pole guess at the midpoint: about 3.4 evaluations per root),
 * and build the eigenvectors of the rank-one update from the recomputed vector ẑ of Gu &
 * Eisenstat (SIAM J. Matrix Anal. Appl. 16 (1995) 172–191), which keeps them orthogonal to
 * working precision. Blocks of at most 12 rows are solved by QL with accumulated rotations.
 *
 * Stage 3 forms V = Q D Z: the real tridiagonal eigenvectors Z, the phases D and the reflectors Q,
 * applied two eigenvectors at a time, reflectors in pairs (a two-reflector compact WY form), the
 * update by one pair fused with the dot products of the next.
 *
 * Where the time goes (SIMD path, values and vectors, node --cpu-prof after warm-up): at n = 64
 * about 35–40% in the back-transformation kernel, 22% in the reduction, 15–18% in the merges
 * (kernels and bookkeeping), 5–7% in the QL leaves, 8% in scaling, copies and allocation; at
 * n = 128 about 45%, 27%, 12%, 3%, 6%. What is left is mostly the two O(n³) kernels, which run
 * near the peak of 128-bit SIMD without fused multiply-add.
 *
 * Two paths compute the same thing. Where WebAssembly with 128-bit SIMD is available (Node 20,
 * current browsers and web workers), from order 16 up, the kernels (src/linalg/wasm/
 * eigh-kernels.as, loaded by eigh-wasm.ts) run the scale and the scaled Hermitian part of the input
 * (formed while copying it into their own interleaved layout), the whole Householder reduction loop
 * (pairs of rows and of columns as f64x2), for eigenvalues only the QL iteration, the reflector
 * pairs of the back-transformation, the O(k²) parts of each divide and conquer merge (secular
 * equation, ẑ, the normalised vectors of the rank-one update) and its matrix product, and the
 * copies around them (phases, final transpose, merge write-back). The deflation bookkeeping and
 * the QL leaves of divide and conquer stay in TypeScript; the
 * whole solver is the scalar TypeScript below where the kernels are unavailable or switched off
 * (RHOSIGMA_EIGH_WASM=0 or setEighWasmEnabled(false)). The kernels sum in a different order, so
 * the two paths agree to rounding, not bit for bit. Measured (CPU-time medians, bench/eigh.ts,
 * three runs on the shared 2-core development machine at load 2.5–3.3): the SIMD path is
 * 2.6–3.1× faster than the scalar one and, against numpy.linalg.eigh on one OpenBLAS thread,
 * 1.14–1.35× at n = 64, 1.54–2.06× at 128 (1.54–1.58 in two of the three runs), 1.50–1.62× at
 * 256; eigenvalues only 0.71–1.12×, 1.13–1.36×, 1.19–1.41×. A fourth run, with numpy at its
 * quiet-machine times, gave 1.99×, 2.04×, 1.90× (see bench/eigh.ts: the ratio moves with the load
 * during each side's part of the run).
 *
 * Eigenvalues only at n = 256 (2026-12-03, CPU-time medians of the kernels alone, load 7): the
 * reduction 6.3 ms (89.5 Mflop: 14 GFlop/s, near numpy's zhetrd rate with AVX-512 and fused
 * multiply-add, which WebAssembly's 128-bit SIMD lacks), the QL iteration 1.1 ms, the scale and
 * copy 0.1 ms. The interleaved layout took the reduction from about 7.4 to 6.3 ms: with split
 * real/imaginary arrays its inner loop walked a dozen pointers. Removing a quarter of the inner
 * loop's arithmetic (an experiment, not kept) cut its time by a sixth: the loop is bound by its
 * instruction throughput, not by memory.
 *
 * Hand-written because no JavaScript library offers a fast complex Hermitian eigensolver: mathjs's
 * `eigs` and ml-matrix's real symmetric solver on the 2n embedding are one to three orders of
 * magnitude slower (see bench/eigh.ts). Storage is split real/imaginary Float64Arrays, row-major.
 * What it does not do: no subset of eigenvalues, no multithreading, no blocked (BLAS-3) reduction;
 * it does not check that the input is Hermitian (only its Hermitian part is used).
 *
 * Cost: about (16/3) n³ real flops for the reduction, O(n²) for eigenvalues alone, and with
 * vectors about 8 n³ for the back-transformation plus at most about (4/3) n³ for divide and
 * conquer (less when deflation is frequent: clustered or degenerate spectra).
 */
import { CMatrix, zeros } from './cmatrix.js';
import { Workspace, type EighKernels } from './eigh-wasm.js';

export interface EighResult {
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Orthonormal eigenvectors as the columns of a unitary matrix, when asked for. */
  vectors?: CMatrix;
}

export class EigenSolverError extends Error {}

const EPS = 2 ** -52;
/**
 * Below this order the scalar path runs even where the SIMD kernels are on: they gain only 10–20%
 * of a few microseconds there (measured at n = 4–16), and small problems, the common case for
 * qubits and qutrits, then give bit-for-bit the same results as the scalar solver. (Callers that
 * feed eigh's noise-level eigenvalues into ill-conditioned formulas otherwise see different noise.)
 */
const SIMD_MIN_N = 16;
/** Squared norm below which a column of the (unit-scaled) matrix counts as already reduced. */
const TINY2 = 1e-290;

export function eigh(h: CMatrix, options: { vectors?: boolean } = {}): EighResult {
  const wantVectors = options.vectors ?? true;
  const n = h.rows;
  if (h.cols !== n) throw new RangeError(`eigh: matrix is ${h.rows}x${h.cols}, not square`);
  if (n === 0) return { values: new Float64Array(0), vectors: wantVectors ? zeros(0, 0) : undefined };

  // Work on the Hermitian part, scaled to unit largest entry (guards against overflow/underflow).
  // Arrays the SIMD kernels touch live in one workspace (in the kernels' memory when they are on).
  // Eigenvalues only, every entry read is written first (the kernels' reduction, the phases, QL), so
  // the kernels' memory is not zero-filled; divide and conquer and the back-transformation rely on zeros.
  const ws = Workspace.create((wantVectors ? 7 : 4) * n * n + 24 * n + 8 + reductionScratch(n), 10 * n + 8, 48, n >= SIMD_MIN_N, wantVectors);
  const K = ws.kernels;
  const hr = h.re;
  const hi = h.im;
  const are = ws.f64(n * n);
  const aim = ws.f64(n * n);
  let scaleBy = 0;
  if (K) {
    // The kernels take the whole matrix and form the scaled Hermitian part as they copy it (below).
    are.set(hr);
    aim.set(hi);
    scaleBy = K.largestEntry(are.byteOffset, aim.byteOffset, n * n);
  } else {
    for (let k = 0; k < n * n; k++) {
      const a = Math.abs(hr[k]) + Math.abs(hi[k]);
      if (!(a < Infinity)) throw new EigenSolverError('eigh: matrix has a non-finite entry');
      if (a > scaleBy) scaleBy = a;
    }
  }
  if (!(scaleBy < Infinity)) throw new EigenSolverError('eigh: matrix has a non-finite entry');
  if (scaleBy === 0) {
    const vectors = zeros(n, n);
    for (let i = 0; i < n; i++) vectors.re[i * n + i] = 1;
    return { values: new Float64Array(n), vectors: wantVectors ? vectors : undefined };
  }
  const inv = 1 / scaleBy;
  if (!K) {
    // Lower triangle (with diagonal) of the scaled Hermitian part; the upper triangle is unused.
    for (let i = 0; i < n; i++) {
      for (let j = 0; j <= i; j++) {
        are[i * n + j] = 0.5 * (hr[i * n + j] + hr[j * n + i]) * inv;
        aim[i * n + j] = 0.5 * (hi[i * n + j] - hi[j * n + i]) * inv;
      }
      aim[i * n + i] = 0;
    }
  }

  const d = ws.f64(n);
  const eRe = ws.f64(n);
  const eIm = ws.f64(n);
  // Reflector k (I - beta_k v v*) acts on indices k+1..n-1; v is stored at vRe/vIm[k*n + k+1 ..].
  const vRe = ws.f64(n * n);
  const vIm = ws.f64(n * n);
  const betas = ws.f64(n);
  tridiagonalize(are, aim, n, inv, d, eRe, eIm, vRe, vIm, betas, ws);

  // Phases making the off-diagonal real: delta_{k+1} = delta_k e_k / |e_k|.
  const e = ws.f64(n);
  const dRe = ws.f64(n);
  const dIm = ws.f64(n);
  dRe[0] = 1;
  dIm[0] = 0;
  for (let k = 0; k < n - 1; k++) {
    const m = Math.sqrt(eRe[k] * eRe[k] + eIm[k] * eIm[k]);
    e[k] = m;
    if (m > 0) {
      const ur = eRe[k] / m;
      const ui = eIm[k] / m;
      dRe[k + 1] = dRe[k] * ur - dIm[k] * ui;
      dIm[k + 1] = dRe[k] * ui + dIm[k] * ur;
    } else {
      dRe[k + 1] = 1;
      dIm[k + 1] = 0;
    }
  }

  if (!wantVectors) {
    if (ws.kernels) {
      if (ws.kernels.tridiagonalValues(d.byteOffset, e.byteOffset, n) !== 0) {
        throw new EigenSolverError('eigh: QL iteration did not converge');
      }
    } else tridiagonalQL(d, e, null, n);
    const values = Float64Array.from(d).sort();
    for (let i = 0; i < n; i++) values[i] *= scaleBy;
    return { values };
  }

  // zt: row j holds tridiagonal eigenvector j (ascending eigenvalues after divide and conquer).
  const zt = ws.f64(n * n);
  divideAndConquer(d, e, zt, n, ws);
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) values[i] = d[i] * scaleBy;

  // Mt: row c = eigenvector c of H, built as D z_c and then Q applied (in the storage of A, no
  // longer needed).
  const mRe = are;
  const mIm = aim;
  if (K) K.phaseRows(zt.byteOffset, dRe.byteOffset, dIm.byteOffset, mRe.byteOffset, mIm.byteOffset, n);
  else {
    for (let c = 0; c < n; c++) {
      const row = c * n;
      for (let r = 0; r < n; r++) {
        const z = zt[row + r];
        mRe[row + r] = dRe[r] * z;
        mIm[row + r] = dIm[r] * z;
      }
    }
  }
  applyReflectors(mRe, mIm, n, vRe, vIm, betas, ws);

  const V = zeros(n, n);
  const Vr = V.re;
  const Vi = V.im;
  if (K) {
    // Transposed in the kernels' memory (into zt and vRe, no longer needed), then copied out.
    K.transposePair(mRe.byteOffset, mIm.byteOffset, n, zt.byteOffset, vRe.byteOffset);
    Vr.set(zt);
    Vi.set(vRe);
  } else {
    for (let c = 0; c < n; c++) {
      const row = c * n;
      for (let r = 0; r < n; r++) {
        Vr[r * n + c] = mRe[row + r];
        Vi[r * n + c] = mIm[row + r];
      }
    }
  }
  return { values, vectors: V };
}

/** Eigenvalues only, ascending. */
export function eigvalsh(h: CMatrix): Float64Array {
  return eigh(h, { vectors: false }).values;
}

/** Doubles of scratch the kernels' reduction needs: the interleaved lower triangle and the step's vectors. */
function reductionScratch(n: number): number {
  return 2 * n * (n + 1) + 8 * (n + 2);
}

/**
 * Householder reduction of the Hermitian matrix whose lower triangle is (are, aim) to tridiagonal
 * form: diagonal d, subdiagonal e (complex, e[k] at position (k+1, k)). Reflector k is stored in
 * row k of vRe/vIm with its beta in betas[k] (0 when the column needed no reflection).
 *
 * Step k: p = beta A22 v, w = p - (beta/2)(v* p) v, A22 -= v w* + w v*. The update of step k is
 * applied to column k+1 first, reflector k+1 is formed from it, and then one pass over the rest of
 * the lower triangle both applies the update of step k and accumulates A33 v_{k+1}.
 *
 * With the kernels, (are, aim) hold the whole unscaled matrix instead, and the kernels form the
 * lower triangle of its Hermitian part times `inv` as they copy it into their own layout.
 */
function tridiagonalize(
  are: Float64Array, aim: Float64Array, n: number, inv: number,
  d: Float64Array, eRe: Float64Array, eIm: Float64Array,
  vRe: Float64Array, vIm: Float64Array, betas: Float64Array, ws: Workspace,
): void {
  const kern = ws.kernels;
  if (kern) {
    // The whole loop below, in the kernels (the same steps and sums, on an interleaved copy of the
    // lower triangle, pairs of rows and columns in SIMD): scratch for the copy and the step's vectors.
    const work = ws.f64(reductionScratch(n));
    kern.tridiagonalize(
      are.byteOffset, aim.byteOffset, n, inv, d.byteOffset, eRe.byteOffset, eIm.byteOffset, vRe.byteOffset, vIm.byteOffset,
      betas.byteOffset, work.byteOffset,
    );
    return;
  }
  const pRe = ws.f64(n);
  const pIm = ws.f64(n);
  // Current update vectors (v, w) of the previous step, full length n (zeros outside range).
  let haveUpdate = false;
  let wRe = ws.f64(n);
  let wIm = ws.f64(n);
  let nwRe = ws.f64(n);
  let nwIm = ws.f64(n);
  let prevBase = 0;

  for (let k = 0; k < n; k++) {
    const pb = prevBase;
    // 1. Apply the pending update (from step k-1) to column k, rows k..n-1.
    if (haveUpdate) {
      const vkr = vRe[pb + k];
      const vki = vIm[pb + k];
      const wkr = wRe[k];
      const wki = wIm[k];
      for (let i = k; i < n; i++) {
        const vir = vRe[pb + i];
        const vii = vIm[pb + i];
        const wir = wRe[i];
        const wii = wIm[i];
        are[i * n + k] -= vir * wkr + vii * wki + wir * vkr + wii * vki;
        aim[i * n + k] -= vii * wkr - vir * wki + wii * vkr - wir * vki;
      }
      aim[k * n + k] = 0;
    }
    d[k] = are[k * n + k];
    if (k >= n - 1) break;

    // 2. Reflector k from column k, rows k+1..n-1.
    const base = k * n;
    let xnorm2 = 0;
    for (let i = k + 1; i < n; i++) {
      const xr = are[i * n + k];
      const xi = aim[i * n + k];
      xnorm2 += xr * xr + xi * xi;
    }
    const x0r = are[(k + 1) * n + k];
    const x0i = aim[(k + 1) * n + k];
    const alpha2 = x0r * x0r + x0i * x0i;
    let beta = 0;
    // The matrix is scaled to unit largest entry: a column part below 1e-145 in norm is left in
    // place (an absolute perturbation far below rounding of ‖H‖), which also keeps squares clear
    // of underflow.
    if (k < n - 2 && xnorm2 - alpha2 > TINY2) {
      const alpha = Math.sqrt(alpha2);
      const xnorm = Math.sqrt(xnorm2);
      const phr = alpha > 0 ? x0r / alpha : 1;
      const phi = alpha > 0 ? x0i / alpha : 0;
      // v = (x + phase·‖x‖ e1) / ‖x + phase·‖x‖ e1‖, so that H = I - 2 v v* with beta = 2.
      const sc = 1 / Math.sqrt(2 * xnorm * (xnorm + alpha));
      for (let i = k + 1; i < n; i++) {
        vRe[base + i] = are[i * n + k] * sc;
        vIm[base + i] = aim[i * n + k] * sc;
      }
      vRe[base + k + 1] += phr * xnorm * sc;
      vIm[base + k + 1] += phi * xnorm * sc;
      beta = 2;
      eRe[k] = -phr * xnorm;
      eIm[k] = -phi * xnorm;
    } else {
      // Column already reduced (or the last 2x2 block): no reflector.
      eRe[k] = x0r;
      eIm[k] = x0i;
    }
    betas[k] = beta;

    // 3. One pass over rows/cols k+1..n-1 of the lower triangle: apply the pending update and
    //    accumulate p = A22 v for the new reflector.
    const useV = beta !== 0;
    if (!haveUpdate && !useV) continue;
    for (let i = k + 1; i < n; i++) {
      pRe[i] = 0;
      pIm[i] = 0;
    }
    let i0 = k + 1;
    if (haveUpdate && useV) {
      // Main case, two rows at a time: the loads of v_j, w_j, u_j and p_j are shared.
      for (; i0 + 1 < n; i0 += 2) fusedRowPair(are, aim, n, i0, k + 1, vRe, vIm, pb, wRe, wIm, base, pRe, pIm);
    }
    for (let i = i0; i < n; i++) {
      const row = i * n;
      const uir = useV ? vRe[base + i] : 0;
      const uii = useV ? vIm[base + i] : 0;
      let sr = 0;
      let si = 0;
      if (haveUpdate) {
        const vir = vRe[pb + i];
        const vii = vIm[pb + i];
        const wir = wRe[i];
        const wii = wIm[i];
        if (useV) {
          for (let j = k + 1; j < i; j++) {
            const vjr = vRe[pb + j];
            const vji = vIm[pb + j];
            const wjr = wRe[j];
            const wji = wIm[j];
            const ar = are[row + j] - (vir * wjr + vii * wji + wir * vjr + wii * vji);
            const ai = aim[row + j] - (vii * wjr - vir * wji + wii * vjr - wir * vji);
            are[row + j] = ar;
            aim[row + j] = ai;
            const ujr = vRe[base + j];
            const uji = vIm[base + j];
            sr += ar * ujr - ai * uji;
            si += ar * uji + ai * ujr;
            pRe[j] += ar * uir + ai * uii;
            pIm[j] += ar * uii - ai * uir;
          }
        } else {
          for (let j = k + 1; j < i; j++) {
            const vjr = vRe[pb + j];
            const vji = vIm[pb + j];
            const wjr = wRe[j];
            const wji = wIm[j];
            are[row + j] -= vir * wjr + vii * wji + wir * vjr + wii * vji;
            aim[row + j] -= vii * wjr - vir * wji + wii * vjr - wir * vji;
          }
        }
        are[row + i] -= 2 * (vir * wir + vii * wii);
      } else {
        for (let j = k + 1; j < i; j++) {
          const ar = are[row + j];
          const ai = aim[row + j];
          const ujr = vRe[base + j];
          const uji = vIm[base + j];
          sr += ar * ujr - ai * uji;
          si += ar * uji + ai * ujr;
          pRe[j] += ar * uir + ai * uii;
          pIm[j] += ar * uii - ai * uir;
        }
      }
      const dii = are[row + i];
      pRe[i] += sr + dii * uir;
      pIm[i] += si + dii * uii;
    }
    haveUpdate = false;
    if (!useV) continue;

    // 4. w = beta p - (beta^2/2)(v* p) v for the next step.
    let vpr = 0;
    for (let i = k + 1; i < n; i++) vpr += vRe[base + i] * pRe[i] + vIm[base + i] * pIm[i];
    const K = 0.5 * beta * beta * vpr;
    for (let i = k + 1; i < n; i++) {
      nwRe[i] = beta * pRe[i] - K * vRe[base + i];
      nwIm[i] = beta * pIm[i] - K * vIm[base + i];
    }
    const tr = wRe;
    const ti = wIm;
    wRe = nwRe;
    wIm = nwIm;
    nwRe = tr;
    nwIm = ti;
    haveUpdate = true;
    prevBase = base;
  }
}

/**
 * Rows i and i+1 of the fused pass (columns j0..i+1 of the lower triangle): apply the update
 * A -= v w* + w v* (v at vRe/vIm[pb + ..], w in wRe/wIm) and accumulate p += A u for the new
 * reflector u (at vRe/vIm[base + ..]), using A's Hermitian symmetry for the upper triangle.
 */
function fusedRowPair(
  are: Float64Array, aim: Float64Array, n: number, i: number, j0: number,
  vRe: Float64Array, vIm: Float64Array, pb: number, wRe: Float64Array, wIm: Float64Array, base: number,
  pRe: Float64Array, pIm: Float64Array,
): void {
  const i1 = i + 1;
  const row0 = i * n;
  const row1 = row0 + n;
  const v0r = vRe[pb + i], v0i = vIm[pb + i], w0r = wRe[i], w0i = wIm[i];
  const v1r = vRe[pb + i1], v1i = vIm[pb + i1], w1r = wRe[i1], w1i = wIm[i1];
  const u0r = vRe[base + i], u0i = vIm[base + i];
  const u1r = vRe[base + i1], u1i = vIm[base + i1];
  let s0r = 0, s0i = 0, s1r = 0, s1i = 0;
  for (let j = j0; j < i; j++) {
    const vjr = vRe[pb + j];
    const vji = vIm[pb + j];
    const wjr = wRe[j];
    const wji = wIm[j];
    const ujr = vRe[base + j];
    const uji = vIm[base + j];
    const a0r = are[row0 + j] - (v0r * wjr + v0i * wji + w0r * vjr + w0i * vji);
    const a0i = aim[row0 + j] - (v0i * wjr - v0r * wji + w0i * vjr - w0r * vji);
    const a1r = are[row1 + j] - (v1r * wjr + v1i * wji + w1r * vjr + w1i * vji);
    const a1i = aim[row1 + j] - (v1i * wjr - v1r * wji + w1i * vjr - w1r * vji);
    are[row0 + j] = a0r;
    aim[row0 + j] = a0i;
    are[row1 + j] = a1r;
    aim[row1 + j] = a1i;
    s0r += a0r * ujr - a0i * uji;
    s0i += a0r * uji + a0i * ujr;
    s1r += a1r * ujr - a1i * uji;
    s1i += a1r * uji + a1i * ujr;
    pRe[j] += a0r * u0r + a0i * u0i + a1r * u1r + a1i * u1i;
    pIm[j] += a0r * u0i - a0i * u0r + a1r * u1i - a1i * u1r;
  }
  // Element (i+1, i) and the two diagonal entries.
  const ar = are[row1 + i] - (v1r * w0r + v1i * w0i + w1r * v0r + w1i * v0i);
  const ai = aim[row1 + i] - (v1i * w0r - v1r * w0i + w1i * v0r - w1r * v0i);
  are[row1 + i] = ar;
  aim[row1 + i] = ai;
  const d0 = are[row0 + i] - 2 * (v0r * w0r + v0i * w0i);
  const d1 = are[row1 + i1] - 2 * (v1r * w1r + v1i * w1i);
  are[row0 + i] = d0;
  are[row1 + i1] = d1;
  s1r += ar * u0r - ai * u0i;
  s1i += ar * u0i + ai * u0r;
  pRe[i] += s0r + d0 * u0r + ar * u1r + ai * u1i;
  pIm[i] += s0i + d0 * u0i + ar * u1i - ai * u1r;
  pRe[i1] += s1r + d1 * u1r;
  pIm[i1] += s1i + d1 * u1i;
}

/**
 * Q applied to the rows of (mRe, mIm), each row one vector: m <- H_0 H_1 ... H_{n-3} m, where
 * H_k = I - beta_k v_k v_k*. Reflectors are taken in pairs (a > b, a applied first): with
 * x = v* m on the unmodified vector, s_a = beta_a x_a and s_b = beta_b (x_b - (v_b* v_a) s_a),
 * and H_b H_a m = m - v_a s_a - v_b s_b (a two-reflector compact WY form). Each pass over a
 * vector applies one pair and accumulates the dot products of the next pair; two vectors at a
 * time share the loads of the reflectors. Reflector rows hold zeros at indices <= k.
 */
function applyReflectors(
  mRe: Float64Array, mIm: Float64Array, n: number,
  vRe: Float64Array, vIm: Float64Array, betas: Float64Array, ws: Workspace,
): void {
  // Pairs in application order; a lone last reflector is paired with itself at beta 0.
  const list: number[] = [];
  for (let k = n - 3; k >= 0; k--) if (betas[k] !== 0) list.push(k);
  if (list.length === 0) return;
  const np = (list.length + 1) >> 1;
  const pa = ws.i32(np);
  const pbk = ws.i32(np);
  const bb = ws.f64(np);
  const cRe = ws.f64(np);
  const cIm = ws.f64(np);
  for (let q = 0; q < np; q++) {
    const a = list[2 * q];
    const b = 2 * q + 1 < list.length ? list[2 * q + 1] : a;
    pa[q] = a;
    pbk[q] = b;
    bb[q] = b === a ? 0 : betas[b];
    // c = v_b* v_a over the range of a.
    let cr = 0;
    let ci = 0;
    const ab = a * n;
    const bbase = b * n;
    for (let i = a + 1; i < n; i++) {
      const xr = vRe[ab + i], xi = vIm[ab + i];
      const yr = vRe[bbase + i], yi = vIm[bbase + i];
      cr += yr * xr + yi * xi;
      ci += yr * xi - yi * xr;
    }
    cRe[q] = cr;
    cIm[q] = ci;
  }
  const K = ws.kernels;
  if (K) {
    K.applyReflectorPairs(
      mRe.byteOffset, mIm.byteOffset, n, vRe.byteOffset, vIm.byteOffset, betas.byteOffset,
      pa.byteOffset, pbk.byteOffset, bb.byteOffset, cRe.byteOffset, cIm.byteOffset, np,
    );
    return;
  }
  for (let c = 0; c < n; c += 2) {
    const two = c + 1 < n;
    const r0 = c * n;
    const r1 = two ? r0 + n : r0;
    // Dot products for the first pair.
    let a = pa[0];
    let b = pbk[0];
    let A = a * n;
    let B = b * n;
    let xa0r = 0, xa0i = 0, xb0r = 0, xb0i = 0, xa1r = 0, xa1i = 0, xb1r = 0, xb1i = 0;
    for (let i = b + 1; i < n; i++) {
      const ar = vRe[A + i], ai = vIm[A + i], br = vRe[B + i], bi = vIm[B + i];
      const m0r = mRe[r0 + i], m0i = mIm[r0 + i], m1r = mRe[r1 + i], m1i = mIm[r1 + i];
      xa0r += ar * m0r + ai * m0i; xa0i += ar * m0i - ai * m0r;
      xb0r += br * m0r + bi * m0i; xb0i += br * m0i - bi * m0r;
      xa1r += ar * m1r + ai * m1i; xa1i += ar * m1i - ai * m1r;
      xb1r += br * m1r + bi * m1i; xb1i += br * m1i - bi * m1r;
    }
    for (let q = 0; q < np; q++) {
      // Coefficients of pair q.
      const ba = betas[a];
      const bq = bb[q];
      const cr = cRe[q], ci = cIm[q];
      const sa0r = ba * xa0r, sa0i = ba * xa0i, sa1r = ba * xa1r, sa1i = ba * xa1i;
      const sb0r = bq * (xb0r - (cr * sa0r - ci * sa0i));
      const sb0i = bq * (xb0i - (cr * sa0i + ci * sa0r));
      const sb1r = bq * (xb1r - (cr * sa1r - ci * sa1i));
      const sb1i = bq * (xb1i - (cr * sa1i + ci * sa1r));
      if (q + 1 === np) {
        for (let i = b + 1; i < n; i++) {
          const ar = vRe[A + i], ai = vIm[A + i], br = vRe[B + i], bi = vIm[B + i];
          mRe[r0 + i] -= ar * sa0r - ai * sa0i + br * sb0r - bi * sb0i;
          mIm[r0 + i] -= ar * sa0i + ai * sa0r + br * sb0i + bi * sb0r;
          if (two) {
            mRe[r1 + i] -= ar * sa1r - ai * sa1i + br * sb1r - bi * sb1i;
            mIm[r1 + i] -= ar * sa1i + ai * sa1r + br * sb1i + bi * sb1r;
          }
        }
        break;
      }
      const a2 = pa[q + 1];
      const b2 = pbk[q + 1];
      const A2 = a2 * n;
      const B2 = b2 * n;
      xa0r = 0; xa0i = 0; xb0r = 0; xb0i = 0; xa1r = 0; xa1i = 0; xb1r = 0; xb1i = 0;
      // Indices b2+1..b are untouched by pair q.
      for (let i = b2 + 1; i <= b; i++) {
        const ar = vRe[A2 + i], ai = vIm[A2 + i], br = vRe[B2 + i], bi = vIm[B2 + i];
        const m0r = mRe[r0 + i], m0i = mIm[r0 + i], m1r = mRe[r1 + i], m1i = mIm[r1 + i];
        xa0r += ar * m0r + ai * m0i; xa0i += ar * m0i - ai * m0r;
        xb0r += br * m0r + bi * m0i; xb0i += br * m0i - bi * m0r;
        xa1r += ar * m1r + ai * m1i; xa1i += ar * m1i - ai * m1r;
        xb1r += br * m1r + bi * m1i; xb1i += br * m1i - bi * m1r;
      }
      for (let i = b + 1; i < n; i++) {
        let ar = vRe[A + i], ai = vIm[A + i], br = vRe[B + i], bi = vIm[B + i];
        const m0r = mRe[r0 + i] - (ar * sa0r - ai * sa0i + br * sb0r - bi * sb0i);
        const m0i = mIm[r0 + i] - (ar * sa0i + ai * sa0r + br * sb0i + bi * sb0r);
        const m1r = mRe[r1 + i] - (ar * sa1r - ai * sa1i + br * sb1r - bi * sb1i);
        const m1i = mIm[r1 + i] - (ar * sa1i + ai * sa1r + br * sb1i + bi * sb1r);
        mRe[r0 + i] = m0r; mIm[r0 + i] = m0i; mRe[r1 + i] = m1r; mIm[r1 + i] = m1i;
        ar = vRe[A2 + i]; ai = vIm[A2 + i]; br = vRe[B2 + i]; bi = vIm[B2 + i];
        xa0r += ar * m0r + ai * m0i; xa0i += ar * m0i - ai * m0r;
        xb0r += br * m0r + bi * m0i; xb0i += br * m0i - bi * m0r;
        xa1r += ar * m1r + ai * m1i; xa1i += ar * m1i - ai * m1r;
        xb1r += br * m1r + bi * m1i; xb1i += br * m1i - bi * m1r;
      }
      a = a2; b = b2; A = A2; B = B2;
    }
  }
}

/** Blocks at most this size are solved by QL with accumulated rotations. */
const SMALL_BLOCK = 12;

/**
 * Eigen-decomposition of the symmetric tridiagonal matrix (d, e) by divide and conquer. On return
 * d holds the eigenvalues ascending and row j of zt (n x n, initially zero) eigenvector j.
 */
function divideAndConquer(d: Float64Array, e: Float64Array, zt: Float64Array, n: number, ws: Workspace): void {
  const work = new MergeWork(n, ws);
  solveBlock(d, e, zt, n, 0, n, work);
}

class MergeWork {
  readonly z: Float64Array;
  readonly dk: Float64Array;
  readonly zk: Float64Array;
  readonly kept: Int32Array;
  readonly deflated: Int32Array;
  readonly kind: Int8Array;
  readonly org: Int32Array;
  readonly tau: Float64Array;
  readonly delta: Float64Array;
  readonly zhat: Float64Array;
  readonly dq: Float64Array;
  readonly zq: Float64Array;
  readonly u: Float64Array;
  readonly qt: Float64Array;
  readonly out: Float64Array;
  readonly vals: Float64Array;
  readonly order: Int32Array;
  readonly colOrder: Int32Array;
  readonly ptrs: Int32Array;
  readonly perm: Int32Array;
  readonly kernels: EighKernels | null;
  constructor(n: number, ws: Workspace) {
    // Arrays the kernels read or write come from the workspace (the kernels' memory when on).
    this.kernels = ws.kernels;
    this.z = new Float64Array(n);
    this.dk = ws.f64(n);
    this.zk = ws.f64(n);
    this.kept = new Int32Array(n);
    this.deflated = new Int32Array(n);
    this.kind = new Int8Array(n);
    this.org = ws.i32(n);
    this.tau = ws.f64(n);
    this.delta = ws.f64(n);
    this.zhat = ws.f64(n);
    this.dq = ws.f64(n);
    this.zq = ws.f64(n);
    this.u = ws.f64(n * n);
    this.qt = ws.kernels ? new Float64Array(0) : ws.f64(n * n);
    this.out = ws.f64(n * n);
    this.vals = new Float64Array(n);
    this.order = new Int32Array(n);
    this.colOrder = ws.i32(n);
    this.ptrs = ws.i32(n);
    this.perm = ws.i32(n);
  }
}

/** perm[0..m) = the indices 0..m-1 ordered by ascending key (insertion sort: the keys come in
 *  ascending runs, so this is close to linear). */
function sortIndices(key: Float64Array, perm: Int32Array, m: number): void {
  for (let i = 0; i < m; i++) {
    const v = key[i];
    let j = i - 1;
    while (j >= 0 && key[perm[j]] > v) {
      perm[j + 1] = perm[j];
      j--;
    }
    perm[j + 1] = i;
  }
}

function solveBlock(
  d: Float64Array, e: Float64Array, zt: Float64Array, n: number, s: number, m: number, w: MergeWork,
): void {
  if (m <= SMALL_BLOCK) {
    const ld = d.slice(s, s + m);
    const le = new Float64Array(m);
    for (let i = 0; i < m - 1; i++) le[i] = e[s + i];
    const lz = new Float64Array(m * m);
    for (let i = 0; i < m; i++) lz[i * m + i] = 1;
    tridiagonalQL(ld, le, lz, m);
    const idx = w.perm;
    sortIndices(ld, idx, m);
    for (let j = 0; j < m; j++) {
      d[s + j] = ld[idx[j]];
      const src = idx[j] * m;
      const dst = (s + j) * n + s;
      for (let r = 0; r < m; r++) zt[dst + r] = lz[src + r];
    }
    return;
  }
  const n1 = m >> 1;
  const beta = e[s + n1 - 1];
  const ab = Math.abs(beta);
  d[s + n1 - 1] -= ab;
  d[s + n1] -= ab;
  solveBlock(d, e, zt, n, s, n1, w);
  solveBlock(d, e, zt, n, s + n1, m - n1, w);
  merge(d, zt, n, s, n1, m, beta, w);
}

/**
 * Merge step: the block [s, s+m) is diag(T1, T2) + rho u u^T with the halves already solved
 * (eigenvalues ascending in d, vectors in rows of zt). Finds the eigen-decomposition of
 * D + rho z z^T and rotates the vectors.
 */
function merge(
  d: Float64Array, zt: Float64Array, n: number, s: number, n1: number, m: number, beta: number, w: MergeWork,
): void {
  const z = w.z;
  const rho = 2 * Math.abs(beta);
  const sgn = beta < 0 ? -1 : 1;
  const r2 = Math.SQRT1_2;
  for (let j = 0; j < n1; j++) z[j] = zt[(s + j) * n + s + n1 - 1] * r2;
  for (let j = n1; j < m; j++) z[j] = sgn * zt[(s + j) * n + s + n1] * r2;

  // Merge the two ascending lists of eigenvalues into one order.
  const order = w.order;
  {
    let a = 0;
    let b = n1;
    for (let p = 0; p < m; p++) {
      if (b >= m || (a < n1 && d[s + a] <= d[s + b])) order[p] = a++;
      else order[p] = b++;
    }
  }
  let dmax = 0;
  let zmax = 0;
  for (let j = 0; j < m; j++) {
    dmax = Math.max(dmax, Math.abs(d[s + j]));
    zmax = Math.max(zmax, Math.abs(z[j]));
  }
  const tol = 8 * EPS * Math.max(dmax, zmax);

  // Deflation (Dongarra & Sorensen): tiny z components, and close pairs via a Givens rotation.
  // kind: 1 = vector lives in the top half only, 3 = bottom half only, 2 = both.
  const kind = w.kind;
  for (let j = 0; j < m; j++) kind[j] = j < n1 ? 1 : 3;
  const kept = w.kept;
  const deflated = w.deflated;
  let nk = 0;
  let nd = 0;
  if (rho * zmax <= tol) {
    for (let p = 0; p < m; p++) deflated[nd++] = order[p];
  } else {
    let pj = -1;
    for (let p = 0; p < m; p++) {
      const j = order[p];
      if (rho * Math.abs(z[j]) <= tol) {
        deflated[nd++] = j;
        continue;
      }
      if (pj < 0) {
        pj = j;
        continue;
      }
      let sn = z[pj];
      let cs = z[j];
      const tau = Math.sqrt(cs * cs + sn * sn);
      const t = d[s + j] - d[s + pj];
      cs /= tau;
      sn = -sn / tau;
      if (Math.abs(t * cs * sn) <= tol) {
        z[j] = tau;
        z[pj] = 0;
        // Rotate the vectors pj and j: x' = c x + s y, y' = c y - s x.
        const xa = (s + pj) * n + s;
        const ya = (s + j) * n + s;
        for (let r = 0; r < m; r++) {
          const x = zt[xa + r];
          const y = zt[ya + r];
          zt[xa + r] = cs * x + sn * y;
          zt[ya + r] = cs * y - sn * x;
        }
        if (kind[pj] !== kind[j]) {
          kind[j] = 2;
          kind[pj] = 2;
        }
        const dp = d[s + pj];
        const dj = d[s + j];
        d[s + pj] = dp * cs * cs + dj * sn * sn;
        d[s + j] = dp * sn * sn + dj * cs * cs;
        deflated[nd++] = pj;
        pj = j;
      } else {
        kept[nk++] = pj;
        pj = j;
      }
    }
    if (pj >= 0) kept[nk++] = pj;
  }

  const vals = w.vals;
  const out = w.out; // rows: new vectors (local components 0..m-1), K kept first then deflated
  if (nk > 0) {
    const dk = w.dk;
    const zk = w.zk;
    for (let i = 0; i < nk; i++) {
      dk[i] = d[s + kept[i]];
      zk[i] = z[kept[i]];
    }
    // New vectors: out_i = sum_j u_ij old_{kept j}. Columns grouped by kind so the top half
    // uses kinds 1, 2 and the bottom half kinds 2, 3 (the zero blocks are skipped).
    const colOrder = w.colOrder;
    let c1 = 0;
    for (let j = 0; j < nk; j++) if (kind[kept[j]] === 1) colOrder[c1++] = j;
    let c2 = c1;
    for (let j = 0; j < nk; j++) if (kind[kept[j]] === 2) colOrder[c2++] = j;
    let c3 = c2;
    for (let j = 0; j < nk; j++) if (kind[kept[j]] === 3) colOrder[c3++] = j;
    const K = w.kernels;
    if (K) {
      // The same steps in the kernels: roots, ẑ and u (columns already in colOrder), and the
      // product read straight from the rows of zt through a list of their addresses.
      const org = w.org;
      const tauA = w.tau;
      K.secularRoots(dk.byteOffset, zk.byteOffset, nk, rho, w.zhat.byteOffset, w.delta.byteOffset, org.byteOffset, tauA.byteOffset);
      K.secularVectors(
        dk.byteOffset, zk.byteOffset, nk, rho, org.byteOffset, tauA.byteOffset, colOrder.byteOffset, w.u.byteOffset,
        w.zhat.byteOffset, w.dq.byteOffset, w.zq.byteOffset,
      );
      for (let i = 0; i < nk; i++) vals[i] = dk[org[i]] + tauA[i];
      const ptrs = w.ptrs;
      const zo = zt.byteOffset + 8 * s;
      for (let q = 0; q < nk; q++) ptrs[q] = zo + 8 * (s + kept[colOrder[q]]) * n;
      K.gemmRows(w.u.byteOffset, nk, nk, ptrs.byteOffset, 0, c2, out.byteOffset, m, 0, n1);
      K.gemmRows(w.u.byteOffset, nk, nk, ptrs.byteOffset, c1, nk, out.byteOffset, m, n1, m);
    } else {
      solveSecular(nk, dk, zk, rho, w);
      const tauA = w.tau;
      const org = w.org;
      const u = w.u; // u[i*nk + j] = (d_j - lambda_i), later the eigenvector entries
      for (let i = 0; i < nk; i++) {
        const o = dk[org[i]];
        const t = tauA[i];
        const row = i * nk;
        for (let j = 0; j < nk; j++) u[row + j] = dk[j] - o - t;
        vals[i] = o + t;
      }
      // Gu–Eisenstat: zhat_j^2 = prod_i (lambda_i - d_j) / (rho prod_{i != j} (d_i - d_j)).
      const zhat = w.zhat;
      for (let j = 0; j < nk; j++) {
        let p = -u[j * nk + j] / rho;
        const dj = dk[j];
        for (let i = 0; i < nk; i++) {
          if (i === j) continue;
          p *= -u[i * nk + j] / (dk[i] - dj);
        }
        const a = Math.sqrt(Math.max(p, 0));
        zhat[j] = zk[j] >= 0 ? a : -a;
      }
      for (let i = 0; i < nk; i++) {
        const row = i * nk;
        let ss = 0;
        for (let j = 0; j < nk; j++) {
          const x = zhat[j] / u[row + j];
          u[row + j] = x;
          ss += x * x;
        }
        const sc = 1 / Math.sqrt(ss);
        for (let j = 0; j < nk; j++) u[row + j] *= sc;
      }
      // qt[r * nk + q] = component r of old vector kept[colOrder[q]]; u permuted likewise.
      const qt = w.qt;
      for (let q = 0; q < nk; q++) {
        const src = (s + kept[colOrder[q]]) * n + s;
        for (let r = 0; r < m; r++) qt[r * nk + q] = zt[src + r];
      }
      const uq = w.delta.length >= nk ? w.delta : new Float64Array(nk);
      for (let i = 0; i < nk; i++) {
        const row = i * nk;
        for (let q = 0; q < nk; q++) uq[q] = u[row + colOrder[q]];
        for (let q = 0; q < nk; q++) u[row + q] = uq[q];
      }
      // out[i*m + r] = sum_q u[i, q] qt[r, q], q over [0, c2) for r < n1 and [c1, nk) for r >= n1.
      gemmNT(u, qt, out, nk, nk, m, 0, n1, 0, c2);
      gemmNT(u, qt, out, nk, nk, m, n1, m, c1, nk);
    }
  }
  for (let q = 0; q < nd; q++) {
    const j = deflated[q];
    vals[nk + q] = d[s + j];
    const src = (s + j) * n + s;
    const dst = (nk + q) * m;
    for (let r = 0; r < m; r++) out[dst + r] = zt[src + r];
  }
  // Sort all m eigenpairs ascending and write back.
  const perm = w.perm;
  sortIndices(vals, perm, m);
  for (let i = 0; i < m; i++) d[s + i] = vals[perm[i]];
  const K = w.kernels;
  if (K) {
    K.copyRows(out.byteOffset, perm.byteOffset, zt.byteOffset + 8 * (s * n + s), n, m);
    return;
  }
  for (let i = 0; i < m; i++) {
    const src = perm[i] * m;
    const dst = (s + i) * n + s;
    for (let r = 0; r < m; r++) zt[dst + r] = out[src + r];
  }
}

/**
 * out[i*m + r] = sum_{q in [q0, q1)} u[i*ku + q] * qt[r*ku + q] for all i < rows, r in [r0, r1).
 * Register-blocked 2 x 2 dot products.
 */
function gemmNT(
  u: Float64Array, qt: Float64Array, out: Float64Array,
  rows: number, ku: number, m: number, r0: number, r1: number, q0: number, q1: number,
): void {
  let i = 0;
  for (; i + 1 < rows; i += 2) {
    const ua = i * ku;
    const ub = ua + ku;
    const oa = i * m;
    const ob = oa + m;
    let r = r0;
    for (; r + 1 < r1; r += 2) {
      const qa = r * ku;
      const qb = qa + ku;
      let s00 = 0, s01 = 0, s10 = 0, s11 = 0;
      for (let q = q0; q < q1; q++) {
        const x0 = u[ua + q];
        const x1 = u[ub + q];
        const y0 = qt[qa + q];
        const y1 = qt[qb + q];
        s00 += x0 * y0;
        s01 += x0 * y1;
        s10 += x1 * y0;
        s11 += x1 * y1;
      }
      out[oa + r] = s00;
      out[oa + r + 1] = s01;
      out[ob + r] = s10;
      out[ob + r + 1] = s11;
    }
    if (r < r1) {
      const qa = r * ku;
      let s0 = 0, s1 = 0;
      for (let q = q0; q < q1; q++) {
        const y = qt[qa + q];
        s0 += u[ua + q] * y;
        s1 += u[ub + q] * y;
      }
      out[oa + r] = s0;
      out[ob + r] = s1;
    }
  }
  if (i < rows) {
    const ua = i * ku;
    const oa = i * m;
    for (let r = r0; r < r1; r++) {
      const qa = r * ku;
      let s0 = 0;
      for (let q = q0; q < q1; q++) s0 += u[ua + q] * qt[qa + q];
      out[oa + r] = s0;
    }
  }
}

/**
 * Roots of the secular equation f(λ) = 1 + rho Σ_j z_j² / (d_j - λ) = 0 with rho > 0, d strictly
 * ascending and z_j ≠ 0: root i lies in (d_i, d_{i+1}) (the last in (d_{k-1}, d_{k-1} + rho|z|²)).
 * Each root is stored as an offset tau[i] from the nearer pole d[org[i]], so that the differences
 * d_j - λ_i are computed without cancellation. Safeguarded iteration: a two-pole rational model
 * matching f and f' at the current point (the "middle way"), falling back to bisection of the
 * bracket whenever the model's root leaves it.
 */
/** Relative size of a model step below which the secular iteration stops after taking it. */
const STEP_STOP = 1e-9;

function solveSecular(k: number, d: Float64Array, z: Float64Array, rho: number, w: MergeWork): void {
  const zz = w.zhat; // scratch: z_j^2 (zhat is recomputed afterwards)
  const del = w.delta;
  let zsum = 0;
  for (let j = 0; j < k; j++) {
    zz[j] = z[j] * z[j];
    zsum += zz[j];
  }
  for (let i = 0; i < k; i++) {
    let o: number;
    let lo: number;
    let hi: number;
    let tau: number;
    const last = i === k - 1;
    if (!last) {
      // At the midpoint of (d_i, d_{i+1}): c = 1/rho + the sum without the two nearest poles; the
      // sign of f there decides which pole is nearer the root, and the root of the model
      // c + z_i²/(d_i - λ) + z_{i+1}²/(d_{i+1} - λ) is the first guess (LAPACK dlaed4's start).
      const gap = d[i + 1] - d[i];
      const mid = 0.5 * gap;
      const dm = d[i] + mid;
      let c = 0;
      for (let j = 0; j < i; j++) c += zz[j] / (d[j] - dm);
      for (let j = i + 2; j < k; j++) c += zz[j] / (d[j] - dm);
      c += 1 / rho;
      const a0 = zz[i];
      const a1 = zz[i + 1];
      const w = c - a0 / mid + a1 / (gap - mid);
      if (w >= 0) {
        o = i;
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
      o = i;
      lo = 0;
      hi = rho * zsum;
      tau = 0.5 * hi;
      if (k > 1) {
        // Same start for the last root (dlaed4's case i = n), origin d_{k-1}, bracket (0, rho|z|²).
        const mid = 0.5 * hi;
        const dm = d[i] + mid;
        let c = 1 / rho;
        for (let j = 0; j < i - 1; j++) c += zz[j] / (d[j] - dm);
        const gap = d[i] - d[i - 1];
        const a0 = zz[i - 1];
        const a1 = zz[i];
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
    // The poles bounding an interior root's interval are excluded; the last root's hi is no pole.
    if (!(tau > lo && tau < hi) && !(last && tau === hi)) tau = 0.5 * (lo + hi);
    const dO = d[o];
    for (let j = 0; j < k; j++) del[j] = d[j] - dO;
    // Poles bounding the interval, relative to the origin.
    const pl = del[i];
    const pr = last ? Infinity : del[i + 1];
    for (let iter = 0; iter < 200; iter++) {
      let psi = 0;
      let dpsi = 0;
      let phi = 0;
      let dphi = 0;
      for (let j = 0; j <= i; j++) {
        const t = 1 / (del[j] - tau);
        const a = zz[j] * t;
        psi += a;
        dpsi += a * t;
      }
      for (let j = i + 1; j < k; j++) {
        const t = 1 / (del[j] - tau);
        const a = zz[j] * t;
        phi += a;
        dphi += a * t;
      }
      const f = 1 + rho * (psi + phi);
      if (f === 0) break;
      if (f < 0) lo = tau;
      else hi = tau;
      // Error bound on f in the spirit of LAPACK dlaed4.
      const err = EPS * (8 + 8 * rho * (phi - psi) + 3 * Math.abs(tau) * rho * (dpsi + dphi));
      if (Math.abs(f) <= err) break;
      const d1 = pl - tau;
      const s1 = rho * d1 * d1 * dpsi;
      let eta: number;
      if (last) {
        // One-pole model: c + s1/(d1 - eta) = 0.
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
        eta = den !== 0 ? (2 * C) / den : NaN;
      }
      let next = tau + eta;
      // A rational-model step this small relative to tau is taken without checking f again: the
      // model converges quadratically, so the step after it would be below rounding of tau.
      const tiny = Math.abs(eta) <= STEP_STOP * Math.abs(tau);
      if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
      else if (tiny) {
        tau = next;
        break;
      }
      if (next === tau || hi - lo <= 2 * EPS * Math.max(Math.abs(lo), Math.abs(hi))) {
        tau = next;
        break;
      }
      tau = next;
    }
    w.org[i] = o;
    w.tau[i] = tau;
  }
}

/**
 * Implicit QL on the symmetric tridiagonal matrix with diagonal d and off-diagonal e
 * (e[i] couples i and i+1; e[n-1] unused). On return d holds the eigenvalues (unsorted).
 * When zt is given (n x n, row-major, initially the identity) its row i becomes eigenvector i.
 */
function tridiagonalQL(d: Float64Array, e: Float64Array, zt: Float64Array | null, n: number): void {
  e[n - 1] = 0;
  let f = 0;
  let tst1 = 0;
  const maxIter = 60;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= EPS * tst1) break;
      m++;
    }
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > maxIter) throw new EigenSolverError('eigh: QL iteration did not converge');
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = hypot(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          if (zt) {
            const a = i * n;
            const b = (i + 1) * n;
            for (let k = 0; k < n; k++) {
              const t = zt[b + k];
              zt[b + k] = s * zt[a + k] + c * t;
              zt[a + k] = c * zt[a + k] - s * t;
            }
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > EPS * tst1);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }
}

/** sqrt(a² + b²) without Math.hypot's cost; rescales only when squares could over/underflow. */
function hypot(a: number, b: number): number {
  const x = Math.abs(a);
  const y = Math.abs(b);
  const big = x > y ? x : y;
  if (big > 1e150 || big < 1e-150) {
    if (big === 0) return 0;
    const sx = x / big;
    const sy = y / big;
    return big * Math.sqrt(sx * sx + sy * sy);
  }
  return Math.sqrt(x * x + y * y);
}
