/**
 * Spectral kernels with high relative accuracy for graded matrices: operators of the form D₁ X D₂
 * (diagonal scalings of very different sizes around a well-conditioned core), which is how every
 * intermediate product of the Rényi divergences looks in the eigenbases of ρ and σ, e.g.
 * σ^g ρ^a σ^g ~ (diag(s^g) V*U diag(r^{a/2}))(…)*.
 *
 *  - `gradedSvd(B)`: singular values (and right/left singular vectors on request) of a complex m×k
 *    matrix. Rows are sorted by decreasing norm, then Householder QR with column pivoting gives
 *    B P = Q R, and one-sided (Hestenes) Jacobi orthogonalises the columns of R*. This is the
 *    preconditioned Jacobi SVD of Demmel & Veselić (SIAM J. Matrix Anal. Appl. 13 (1992) 1204) and
 *    Drmač & Veselić (SIAM J. Matrix Anal. Appl. 29 (2008) 1322): the QR step with row sorting and
 *    column pivoting is backward stable row- and column-wise (Cox & Higham, BIT 38 (1998) 1), so a
 *    singular value of 1e-120 relative to the largest comes out with a relative error of a few
 *    rounding units times the condition of the core, where an eigensolver on B*B (or any method
 *    with absolute accuracy ε‖B‖) would return noise. Zero singular values come out as exact zeros
 *    only when the matrix is exactly rank deficient; no threshold is applied here.
 *  - `scaledEigenDeviations(logD, K)`: the eigenvalues λ_k = d_k²(1 + δ_k) of D(1 + K)D for a positive
 *    diagonal D (given by ln d_k) and a small Hermitian K, returning the deviations δ_k themselves to
 *    a few rounding units of ‖K‖, however different the d_k and however small K is. Two-sided
 *    Jacobi rotations on the scaled matrix D⁻¹ M D⁻¹ with the diagonal kept as its deviation from 1
 *    (our own arrangement of the relative-accuracy Jacobi method of Demmel & Veselić 1992). This is
 *    what makes a Rényi divergence continuous at α = 1: the trace of a power of such an operator,
 *    minus its value at α = 1, is then a sum of terms of the size of K, each accurate, instead of a
 *    difference of two numbers near 1.
 *
 * Hand-written because no JavaScript library has a relative-accuracy SVD (ml-matrix and mathjs use
 * Golub–Kahan bidiagonalisation, accurate to ε‖B‖ only) or the scaled eigen-deviation solver.
 * Deliberately not here: support decisions (callers decide which eigenvalues of ρ and σ count),
 * blocking or threads; these are for the small matrices of the divergences (n ≲ 100).
 * Cost: gradedSvd O(m k²) for the QR plus about 4–8 Jacobi sweeps of O(k³); scaledEigenDeviations
 * 2–4 sweeps of O(k³) when ‖K‖ is small (quadratic convergence).
 */
import { CMatrix, zeros, adjoint } from './cmatrix.js';

const EPS = 2 ** -52;

export interface GradedSvd {
  /** Singular values, descending (min(m, k) of them). */
  values: Float64Array;
  /** k × min(m, k): right singular vectors as columns, in the order of `values`. */
  right?: CMatrix;
  /** m × min(m, k): left singular vectors as columns. */
  left?: CMatrix;
}

/** Singular values (and vectors on request) with high relative accuracy; see the module header. */
export function gradedSvd(b: CMatrix, options: { right?: boolean; left?: boolean } = {}): GradedSvd {
  const wantRight = options.right ?? false;
  const wantLeft = options.left ?? false;
  if (b.rows < b.cols) {
    // The SVD of B* has the roles of the vectors exchanged.
    const t = adjoint(b);
    const s = gradedSvd(t, { right: wantLeft, left: wantRight });
    return { values: s.values, right: s.left, left: s.right };
  }
  const m = b.rows;
  const k = b.cols;
  if (k === 0) return { values: new Float64Array(0), right: wantRight ? zeros(0, 0) : undefined, left: wantLeft ? zeros(m, 0) : undefined };
  for (let i = 0; i < b.re.length; i++) {
    if (!Number.isFinite(b.re[i]) || !Number.isFinite(b.im[i])) throw new RangeError('gradedSvd: matrix has a non-finite entry');
  }
  // 1. Rows by decreasing norm (Powell & Reid's row sorting).
  const rowNorm = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let s = 0;
    for (let j = 0; j < k; j++) s += b.re[i * k + j] ** 2 + b.im[i * k + j] ** 2;
    rowNorm[i] = s;
  }
  const rowPerm = Array.from({ length: m }, (_, i) => i).sort((x, y) => rowNorm[y] - rowNorm[x]);
  const ar = new Float64Array(m * k);
  const ai = new Float64Array(m * k);
  for (let i = 0; i < m; i++) {
    const src = rowPerm[i] * k;
    for (let j = 0; j < k; j++) {
      ar[i * k + j] = b.re[src + j];
      ai[i * k + j] = b.im[src + j];
    }
  }
  // 2. Householder QR with column pivoting: A P = Q R, reflectors kept for the left vectors.
  const colPerm = Array.from({ length: k }, (_, j) => j);
  const vr: Float64Array[] = [];
  const vi: Float64Array[] = [];
  const taus: number[] = [];
  for (let j = 0; j < k; j++) {
    let best = -1;
    let bestNorm = -1;
    for (let c = j; c < k; c++) {
      const s = columnNorm(ar, ai, k, c, j, m);
      if (s > bestNorm) {
        bestNorm = s;
        best = c;
      }
    }
    if (best !== j) {
      for (let i = 0; i < m; i++) {
        swap(ar, i * k + j, i * k + best);
        swap(ai, i * k + j, i * k + best);
      }
      const t = colPerm[j];
      colPerm[j] = colPerm[best];
      colPerm[best] = t;
    }
    const len = m - j;
    const hr = new Float64Array(len);
    const hi = new Float64Array(len);
    let tau = 0;
    if (bestNorm > 0) {
      // x = A[j:, j]; alpha = −phase(x_0)‖x‖; u = (x − alpha e_1)/‖x‖; H = I − tau u u* with
      // tau = 2/(u*u) = ‖x‖/(‖x‖ + |x_0|) ∈ [1/2, 1]: u is O(1) however small x is (no squares of x).
      const x0r = ar[j * k + j];
      const x0i = ai[j * k + j];
      const xn = bestNorm;
      const a0 = Math.hypot(x0r, x0i);
      const phr = a0 > 0 ? x0r / a0 : 1;
      const phi = a0 > 0 ? x0i / a0 : 0;
      for (let i = 0; i < len; i++) {
        hr[i] = ar[(j + i) * k + j] / xn;
        hi[i] = ai[(j + i) * k + j] / xn;
      }
      hr[0] += phr;
      hi[0] += phi;
      tau = xn / (xn + a0);
      for (let c = j + 1; c < k; c++) {
        let sr = 0;
        let si = 0;
        for (let i = 0; i < len; i++) {
          const yr = ar[(j + i) * k + c];
          const yi = ai[(j + i) * k + c];
          sr += hr[i] * yr + hi[i] * yi;
          si += hr[i] * yi - hi[i] * yr;
        }
        sr *= tau;
        si *= tau;
        for (let i = 0; i < len; i++) {
          ar[(j + i) * k + c] -= hr[i] * sr - hi[i] * si;
          ai[(j + i) * k + c] -= hr[i] * si + hi[i] * sr;
        }
      }
      ar[j * k + j] = -phr * xn;
      ai[j * k + j] = -phi * xn;
      for (let i = 1; i < len; i++) {
        ar[(j + i) * k + j] = 0;
        ai[(j + i) * k + j] = 0;
      }
    }
    vr.push(hr);
    vi.push(hi);
    taus.push(tau);
  }
  // 3. One-sided Jacobi on G = R* (k × k, lower triangular): G W = U Σ.
  const gr = new Float64Array(k * k);
  const gi = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = i; j < k; j++) {
      gr[j * k + i] = ar[i * k + j];
      gi[j * k + i] = -ai[i * k + j];
    }
  }
  const wr = wantLeft ? new Float64Array(k * k) : null;
  const wi = wantLeft ? new Float64Array(k * k) : null;
  if (wr) for (let i = 0; i < k; i++) wr[i * k + i] = 1;
  orthogonalizeColumns(gr, gi, k, k, wr, wi);
  const sigma = new Float64Array(k);
  for (let j = 0; j < k; j++) sigma[j] = columnNorm(gr, gi, k, j, 0, k);
  const order = Array.from({ length: k }, (_, j) => j).sort((x, y) => sigma[y] - sigma[x]);
  const values = Float64Array.from(order, (j) => sigma[j]);
  const out: GradedSvd = { values };
  if (wantRight) {
    // Right singular vectors of R are the normalised columns of G W; those of B are P times them.
    const right = zeros(k, k);
    order.forEach((j, c) => {
      const s = sigma[j];
      if (s > 0) {
        for (let i = 0; i < k; i++) {
          right.re[colPerm[i] * k + c] = gr[i * k + j] / s;
          right.im[colPerm[i] * k + c] = gi[i * k + j] / s;
        }
      }
    });
    if (values[k - 1] === 0) completeBasis(right, values);
    out.right = right;
  }
  if (wantLeft) {
    // Left singular vectors of B: (row permutation)ᵀ Q W, Q = H_0 H_1 … applied to [W; 0].
    const lr = new Float64Array(m * k);
    const li = new Float64Array(m * k);
    for (let i = 0; i < k; i++) {
      for (let c = 0; c < k; c++) {
        lr[i * k + c] = wr![i * k + order[c]];
        li[i * k + c] = wi![i * k + order[c]];
      }
    }
    for (let j = k - 1; j >= 0; j--) {
      const hr = vr[j];
      const hi = vi[j];
      const tau = taus[j];
      if (tau === 0) continue;
      for (let c = 0; c < k; c++) {
        let sr = 0;
        let si = 0;
        for (let i = 0; i < hr.length; i++) {
          const yr = lr[(j + i) * k + c];
          const yi = li[(j + i) * k + c];
          sr += hr[i] * yr + hi[i] * yi;
          si += hr[i] * yi - hi[i] * yr;
        }
        sr *= tau;
        si *= tau;
        for (let i = 0; i < hr.length; i++) {
          lr[(j + i) * k + c] -= hr[i] * sr - hi[i] * si;
          li[(j + i) * k + c] -= hr[i] * si + hi[i] * sr;
        }
      }
    }
    const left = zeros(m, k);
    for (let i = 0; i < m; i++) {
      const dst = rowPerm[i] * k;
      for (let c = 0; c < k; c++) {
        left.re[dst + c] = lr[i * k + c];
        left.im[dst + c] = li[i * k + c];
      }
    }
    out.left = left;
  }
  return out;
}

/** Column sums of squares outside [TINY2, HUGE2] are recomputed scaled (no underflow or overflow). */
const TINY2 = 1e-290;
const HUGE2 = 1e290;

/**
 * One-sided (Hestenes) Jacobi on the columns of the complex rows × cols matrix (gr, gi), split real
 * and imaginary parts, row-major: for each pair (p, q) a phase on column q makes g_p* g_q real, then a
 * real rotation makes it 0, until every pair is orthogonal to `tol` relative to the column norms
 * (|g_p* g_q| ≤ tol ‖g_p‖‖g_q‖, default cols·ε) or `maxSweeps` sweeps have run. The rotations are
 * accumulated into (wr, wi) (cols × cols) when given. On return the columns of G are σ_j u_j; their
 * norms are the singular values of the original G (high relative accuracy for column-graded G,
 * Demmel & Veselić 1992). Column sums of squares beyond 1e±290 are recomputed from the columns scaled by
 * their largest entries, so entries down to 1e-300 keep their relative accuracy; otherwise the
 * arithmetic is the plain textbook one. This is the one Jacobi SVD kernel for complex matrices (the SDP
 * solver's cSvdJacobi in dense-complex.ts calls it on its own storage).
 */
export function orthogonalizeColumns(
  gr: Float64Array, gi: Float64Array, rows: number, cols: number,
  wr: Float64Array | null = null, wi: Float64Array | null = null, tol = cols * EPS, maxSweeps = 80,
): void {
  for (let sweep = 0; sweep < maxSweeps; sweep++) {
    let rotated = false;
    for (let p = 0; p < cols - 1; p++) {
      for (let q = p + 1; q < cols; q++) {
        let alpha = 0;
        let beta = 0;
        let cr = 0;
        let ci = 0;
        for (let i = 0; i < rows; i++) {
          const pr = gr[i * cols + p];
          const pi = gi[i * cols + p];
          const qr = gr[i * cols + q];
          const qi = gi[i * cols + q];
          alpha += pr * pr + pi * pi;
          beta += qr * qr + qi * qi;
          cr += pr * qr + pi * qi;
          ci += pr * qi - pi * qr;
        }
        let zeta: number;
        let er: number;
        let ei: number;
        if (alpha >= TINY2 && beta >= TINY2 && alpha <= HUGE2 && beta <= HUGE2) {
          const g = Math.hypot(cr, ci);
          if (g === 0 || g <= tol * Math.sqrt(alpha * beta)) continue;
          er = cr / g;
          ei = -ci / g;
          zeta = (beta - alpha) / (2 * g);
        } else {
          // The same sums for the columns scaled by their largest moduli mp, mq: alpha, beta, gamma
          // then stand for ‖g_p‖²/mp², ‖g_q‖²/mq², g_p* g_q/(mp mq).
          let mp = 0;
          let mq = 0;
          for (let i = 0; i < rows; i++) {
            mp = Math.max(mp, Math.abs(gr[i * cols + p]), Math.abs(gi[i * cols + p]));
            mq = Math.max(mq, Math.abs(gr[i * cols + q]), Math.abs(gi[i * cols + q]));
          }
          if (mp === 0 || mq === 0) continue;
          const fp = inverseScale(mp);
          const fq = inverseScale(mq);
          alpha = 0;
          beta = 0;
          cr = 0;
          ci = 0;
          for (let i = 0; i < rows; i++) {
            const pr = gr[i * cols + p] * fp;
            const pi = gi[i * cols + p] * fp;
            const qr = gr[i * cols + q] * fq;
            const qi = gi[i * cols + q] * fq;
            alpha += pr * pr + pi * pi;
            beta += qr * qr + qi * qi;
            cr += pr * qr + pi * qi;
            ci += pr * qi - pi * qr;
          }
          const g = Math.hypot(cr, ci);
          if (g === 0 || g <= tol * Math.sqrt(alpha) * Math.sqrt(beta)) continue;
          er = cr / g;
          ei = -ci / g;
          const ratio = fp / fq; // mq/mp
          zeta = (ratio * beta - alpha / ratio) / (2 * g);
        }
        rotated = true;
        // Column q times conj(γ)/|γ| makes g_p* g_q real; then the real rotation of the pair, from
        // ζ = (‖g_q‖² − ‖g_p‖²)/(2|γ|).
        const t = (zeta >= 0 ? 1 : -1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = c * t;
        rotatePair(gr, gi, rows, cols, p, q, er, ei, c, s);
        if (wr && wi) rotatePair(wr, wi, cols, cols, p, q, er, ei, c, s);
      }
    }
    if (!rotated) return;
  }
}

function rotatePair(
  xr: Float64Array, xi: Float64Array, rows: number, cols: number, p: number, q: number,
  er: number, ei: number, c: number, s: number,
): void {
  for (let i = 0; i < rows; i++) {
    const ip = i * cols + p;
    const iq = i * cols + q;
    const pr = xr[ip];
    const pi = xi[ip];
    const q0r = xr[iq];
    const q0i = xi[iq];
    const qr = er * q0r - ei * q0i;
    const qi = er * q0i + ei * q0r;
    xr[ip] = c * pr - s * qr;
    xi[ip] = c * pi - s * qi;
    xr[iq] = s * pr + c * qr;
    xi[iq] = s * pi + c * qi;
  }
}

/** Fills the columns of exactly zero singular values with an orthonormal completion (Gram–Schmidt). */
function completeBasis(v: CMatrix, values: Float64Array): void {
  const k = v.rows;
  let filled = 0;
  while (filled < k && values[filled] > 0) filled++;
  for (let e = 0; e < k && filled < k; e++) {
    const xr = new Float64Array(k);
    const xi = new Float64Array(k);
    xr[e] = 1;
    for (let pass = 0; pass < 2; pass++) {
      for (let c = 0; c < filled; c++) {
        let sr = 0;
        let si = 0;
        for (let i = 0; i < k; i++) {
          sr += v.re[i * k + c] * xr[i] + v.im[i * k + c] * xi[i];
          si += v.re[i * k + c] * xi[i] - v.im[i * k + c] * xr[i];
        }
        for (let i = 0; i < k; i++) {
          xr[i] -= v.re[i * k + c] * sr - v.im[i * k + c] * si;
          xi[i] -= v.re[i * k + c] * si + v.im[i * k + c] * sr;
        }
      }
    }
    let nrm = 0;
    for (let i = 0; i < k; i++) nrm += xr[i] ** 2 + xi[i] ** 2;
    nrm = Math.sqrt(nrm);
    if (nrm < 0.5) continue;
    for (let i = 0; i < k; i++) {
      v.re[i * k + filled] = xr[i] / nrm;
      v.im[i * k + filled] = xi[i] / nrm;
    }
    filled++;
  }
}

/** 2-norm of column c, rows [from, to), scaled by the largest modulus (no underflow of squares). */
function columnNorm(xr: Float64Array, xi: Float64Array, cols: number, c: number, from: number, to: number): number {
  let big = 0;
  for (let i = from; i < to; i++) big = Math.max(big, Math.abs(xr[i * cols + c]), Math.abs(xi[i * cols + c]));
  if (big === 0) return 0;
  const f = inverseScale(big);
  let s = 0;
  for (let i = from; i < to; i++) s += (xr[i * cols + c] * f) ** 2 + (xi[i * cols + c] * f) ** 2;
  return Math.sqrt(s) / f;
}

/** 1/x, or 2^1022 when 1/x overflows (x subnormal): a factor that brings x near 1 without overflow. */
function inverseScale(x: number): number {
  const f = 1 / x;
  return Number.isFinite(f) ? f : 2 ** 1022;
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i];
  a[i] = a[j];
  a[j] = t;
}

/** Ratios d_q/d_p beyond e^±200 act as e^±200: the rotations then no longer depend on them. */
const LOG_RATIO_CAP = 200;

/**
 * Deviations δ_k of the eigenvalues λ_k = d_k²(1 + δ_k) of D(1 + K)D, D = diag(e^{logD_k}), for a
 * Hermitian k×k K with 1 + K positive definite (see the module header). The eigenvalue belonging to
 * index k is d_k²(1 + δ_k); indices are not sorted. Accurate to a few rounding units of max|K_ij|
 * (absolute, in δ) plus second-order terms of that size.
 */
export function scaledEigenDeviations(logD: ArrayLike<number>, K: CMatrix): Float64Array {
  const k = K.rows;
  if (K.cols !== k || logD.length !== k) throw new RangeError('scaledEigenDeviations: shapes do not fit');
  const mr = Float64Array.from(K.re);
  const mi = Float64Array.from(K.im);
  const delta = new Float64Array(k);
  let scale = 0;
  for (let i = 0; i < k; i++) {
    delta[i] = K.re[i * k + i];
    for (let j = 0; j < k; j++) scale = Math.max(scale, Math.hypot(K.re[i * k + j], K.im[i * k + j]));
  }
  const thr = 4 * EPS * scale;
  for (let sweep = 0; sweep < 60; sweep++) {
    let rotated = false;
    for (let p = 0; p < k - 1; p++) {
      for (let q = p + 1; q < k; q++) {
        const xr = mr[p * k + q];
        const xi = mi[p * k + q];
        const a = Math.hypot(xr, xi);
        if (a <= thr) continue;
        rotated = true;
        const er = xr / a;
        const ei = xi / a;
        const dl = Math.max(-LOG_RATIO_CAP, Math.min(LOG_RATIO_CAP, logD[q] - logD[p]));
        const rho = Math.exp(dl);
        const zeta = (2 * Math.sinh(dl) + rho * delta[q] - delta[p] / rho) / (2 * a);
        const t = zeta === 0 ? 1 : (zeta > 0 ? 1 : -1) / (Math.abs(zeta) + Math.hypot(1, zeta));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = t * c;
        const sRho = s * rho;
        const sOverRho = s / rho;
        delta[p] -= t * rho * a;
        delta[q] += (t / rho) * a;
        mr[p * k + q] = 0;
        mi[p * k + q] = 0;
        mr[q * k + p] = 0;
        mi[q * k + p] = 0;
        for (let j = 0; j < k; j++) {
          if (j === p || j === q) continue;
          // m_jp' = c m_jp − sρ ē m_jq;  m_jq' = (s/ρ) m_jp + c ē m_jq  (e = m_pq/|m_pq|).
          const jpr = mr[j * k + p];
          const jpi = mi[j * k + p];
          const jqr = mr[j * k + q];
          const jqi = mi[j * k + q];
          const ejqr = er * jqr + ei * jqi; // ē m_jq
          const ejqi = er * jqi - ei * jqr;
          const npr = c * jpr - sRho * ejqr;
          const npi = c * jpi - sRho * ejqi;
          const nqr = sOverRho * jpr + c * ejqr;
          const nqi = sOverRho * jpi + c * ejqi;
          mr[j * k + p] = npr;
          mi[j * k + p] = npi;
          mr[p * k + j] = npr;
          mi[p * k + j] = -npi;
          mr[j * k + q] = nqr;
          mi[j * k + q] = nqi;
          mr[q * k + j] = nqr;
          mi[q * k + j] = -nqi;
        }
      }
    }
    if (!rotated) break;
  }
  return delta;
}
