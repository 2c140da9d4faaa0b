/**
 * The Hermitian eigensolver: H = V diag(λ) V*, eigenvalues ascending.
 *
 * Stage 1 reduces H to real symmetric tridiagonal form with complex Householder reflectors
 * (as in the textbook algorithm, Golub & Van Loan, Matrix Computations, §8.3), then a diagonal
 * unitary of phases makes the off-diagonal real and non-negative. Stage 2 is the implicit QL
 * iteration with Wilkinson-type shifts on the tridiagonal matrix (the classic tql2 procedure of
 * Bowdler, Martin, Reinsch & Wilkinson), accumulating real rotations. Eigenvectors are then
 * V = Q D Z with Q the reflectors, D the phases and Z the real rotations.
 *
 * Hand-written because no JavaScript library offers a complex Hermitian eigensolver: mathjs's
 * `eigs` on complex input and ml-matrix's real symmetric solver on the 2n embedding are both far
 * slower (see bench/eigh.ts). Storage is split real/imaginary Float64Arrays, row-major; the
 * rotations act on rows of Z^T so the innermost loops are contiguous.
 *
 * Cost: about (16/3) n^3 real flops for the reduction, O(n^2) for eigenvalues alone and about
 * 3 n^3 more for the vectors. The input is taken to be Hermitian: only its Hermitian part is used.
 */
import { CMatrix, zeros } from './cmatrix.js';

export interface EighResult {
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Orthonormal eigenvectors as the columns of a unitary matrix, when asked for. */
  vectors?: CMatrix;
}

export class EigenSolverError extends Error {}

export function eigh(h: CMatrix, options: { vectors?: boolean } = {}): EighResult {
  const wantVectors = options.vectors ?? true;
  const n = h.rows;
  if (h.cols !== n) throw new RangeError(`eigh: matrix is ${h.rows}x${h.cols}, not square`);
  if (n === 0) return { values: new Float64Array(0), vectors: wantVectors ? zeros(0, 0) : undefined };

  // Work on the Hermitian part, scaled to unit largest entry (guards against overflow/underflow).
  let scaleBy = 0;
  for (let k = 0; k < n * n; k++) {
    const a = Math.abs(h.re[k]) + Math.abs(h.im[k]);
    if (!Number.isFinite(a)) throw new EigenSolverError('eigh: matrix has a non-finite entry');
    if (a > scaleBy) scaleBy = a;
  }
  if (scaleBy === 0) {
    const vectors = zeros(n, n);
    for (let i = 0; i < n; i++) vectors.re[i * n + i] = 1;
    return { values: new Float64Array(n), vectors: wantVectors ? vectors : undefined };
  }
  const inv = 1 / scaleBy;
  const are = new Float64Array(n * n);
  const aim = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      are[i * n + j] = 0.5 * (h.re[i * n + j] + h.re[j * n + i]) * inv;
      aim[i * n + j] = 0.5 * (h.im[i * n + j] - h.im[j * n + i]) * inv;
    }
  }

  const d = new Float64Array(n);
  const eRe = new Float64Array(n);
  const eIm = new Float64Array(n);
  // Reflector k acts on indices k+1..n-1; its vector is stored at vRe/vIm[k*n + k+1 ..].
  const vRe = wantVectors ? new Float64Array(n * n) : new Float64Array(n);
  const vIm = wantVectors ? new Float64Array(n * n) : new Float64Array(n);
  const betas = new Float64Array(n);
  const pRe = new Float64Array(n);
  const pIm = new Float64Array(n);

  for (let k = 0; k < n - 2; k++) {
    d[k] = are[k * n + k];
    const base = wantVectors ? k * n : 0;
    let xnorm2 = 0;
    for (let i = k + 1; i < n; i++) {
      const xr = are[i * n + k];
      const xi = aim[i * n + k];
      xnorm2 += xr * xr + xi * xi;
    }
    const x0r = are[(k + 1) * n + k];
    const x0i = aim[(k + 1) * n + k];
    const alpha = Math.hypot(x0r, x0i);
    const xnorm = Math.sqrt(xnorm2);
    if (xnorm === 0 || xnorm2 - alpha * alpha === 0) {
      // Column already reduced: no reflector needed.
      eRe[k] = x0r;
      eIm[k] = x0i;
      betas[k] = 0;
      continue;
    }
    const phr = alpha > 0 ? x0r / alpha : 1;
    const phi = alpha > 0 ? x0i / alpha : 0;
    for (let i = k + 1; i < n; i++) {
      vRe[base + i] = are[i * n + k];
      vIm[base + i] = aim[i * n + k];
    }
    vRe[base + k + 1] += phr * xnorm;
    vIm[base + k + 1] += phi * xnorm;
    const beta = 1 / (xnorm * (xnorm + alpha));
    betas[k] = beta;
    eRe[k] = -phr * xnorm;
    eIm[k] = -phi * xnorm;

    // p = beta A22 v, K = beta/2 v* p, w = p - K v, A22 -= v w* + w v*.
    let vp = 0;
    for (let i = k + 1; i < n; i++) {
      let sr = 0;
      let si = 0;
      const row = i * n;
      for (let j = k + 1; j < n; j++) {
        const ar = are[row + j];
        const ai = aim[row + j];
        const br = vRe[base + j];
        const bi = vIm[base + j];
        sr += ar * br - ai * bi;
        si += ar * bi + ai * br;
      }
      pRe[i] = beta * sr;
      pIm[i] = beta * si;
      vp += vRe[base + i] * pRe[i] + vIm[base + i] * pIm[i];
    }
    const K = 0.5 * beta * vp;
    for (let i = k + 1; i < n; i++) {
      pRe[i] -= K * vRe[base + i];
      pIm[i] -= K * vIm[base + i];
    }
    for (let i = k + 1; i < n; i++) {
      const row = i * n;
      const vir = vRe[base + i];
      const vii = vIm[base + i];
      const wir = pRe[i];
      const wii = pIm[i];
      for (let j = k + 1; j < n; j++) {
        const vjr = vRe[base + j];
        const vji = vIm[base + j];
        const wjr = pRe[j];
        const wji = pIm[j];
        // v_i conj(w_j) + w_i conj(v_j)
        are[row + j] -= vir * wjr + vii * wji + wir * vjr + wii * vji;
        aim[row + j] -= vii * wjr - vir * wji + wii * vjr - wir * vji;
      }
    }
  }
  if (n >= 2) {
    d[n - 2] = are[(n - 2) * n + n - 2];
    eRe[n - 2] = are[(n - 1) * n + n - 2];
    eIm[n - 2] = aim[(n - 1) * n + n - 2];
  }
  d[n - 1] = are[(n - 1) * n + n - 1];

  // Phases making the off-diagonal real: delta_{k+1} = delta_k e_k / |e_k|.
  const e = new Float64Array(n);
  const dRe = new Float64Array(n);
  const dIm = new Float64Array(n);
  dRe[0] = 1;
  for (let k = 0; k < n - 1; k++) {
    const m = Math.hypot(eRe[k], eIm[k]);
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

  const zt = wantVectors ? new Float64Array(n * n) : null;
  if (zt) for (let i = 0; i < n; i++) zt[i * n + i] = 1;
  tridiagonalQL(d, e, zt, n);

  // Sort ascending.
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => d[a] - d[b]);
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) values[i] = d[order[i]] * scaleBy;
  if (!zt) return { values };

  // M = D Z (column c of Z is row c of zt), then apply reflectors from the last to the first.
  const V = zeros(n, n);
  const Vr = V.re;
  const Vi = V.im;
  for (let c = 0; c < n; c++) {
    const src = order[c] * n;
    for (let j = 0; j < n; j++) {
      const z = zt[src + j];
      Vr[j * n + c] = dRe[j] * z;
      Vi[j * n + c] = dIm[j] * z;
    }
  }
  const sRe = new Float64Array(n);
  const sIm = new Float64Array(n);
  for (let k = n - 3; k >= 0; k--) {
    const beta = betas[k];
    if (beta === 0) continue;
    const base = k * n;
    sRe.fill(0);
    sIm.fill(0);
    for (let i = k + 1; i < n; i++) {
      const vr = vRe[base + i];
      const vi = -vIm[base + i]; // conj(v_i)
      const row = i * n;
      for (let c = 0; c < n; c++) {
        const mr = Vr[row + c];
        const mi = Vi[row + c];
        sRe[c] += vr * mr - vi * mi;
        sIm[c] += vr * mi + vi * mr;
      }
    }
    for (let i = k + 1; i < n; i++) {
      const vr = beta * vRe[base + i];
      const vi = beta * vIm[base + i];
      const row = i * n;
      for (let c = 0; c < n; c++) {
        Vr[row + c] -= vr * sRe[c] - vi * sIm[c];
        Vi[row + c] -= vr * sIm[c] + vi * sRe[c];
      }
    }
  }
  return { values, vectors: V };
}

/** Eigenvalues only, ascending. */
export function eigvalsh(h: CMatrix): Float64Array {
  return eigh(h, { vectors: false }).values;
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
  const eps = 2 ** -52;
  const maxIter = 60;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= eps * tst1) break;
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
          r = Math.hypot(p, e[i]);
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
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }
}
