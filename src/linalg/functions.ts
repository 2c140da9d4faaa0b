/**
 * Functions of Hermitian matrices through the spectral decomposition, f(H) = V f(Λ) V*,
 * and the notions of support and numerical rank they need.
 *
 * Also the complex powers H^{p(1+it)} of the rotated Petz maps.
 *
 * Support convention: an eigenvalue counts as zero when |λ| <= tol · ‖H‖ (operator norm), with
 * `tol` an explicit argument (default DEFAULT_SUPPORT_TOLERANCE). Powers with negative exponents and
 * the logarithm are taken on the support only (negative powers are pseudo-inverse powers; log is 0
 * off the support). Non-integer powers and the logarithm need a positive semidefinite input:
 * eigenvalues below −tol·‖H‖ throw a RangeError; those within the tolerance are treated as zero.
 */
import { CMatrix, zeros } from './cmatrix.js';
import { eigh, EighResult } from './eigh.js';

/** Default relative tolerance below which an eigenvalue is taken to be zero. */
export const DEFAULT_SUPPORT_TOLERANCE = 1e-12;

/**
 * V diag(f) V* from an eigendecomposition; with `fi`, V diag(f + i·fi) V* for a complex function of
 * the eigenvalues (a normal, in general not Hermitian, matrix).
 */
export function fromSpectrum(vectors: CMatrix, f: ArrayLike<number>, fi?: ArrayLike<number>): CMatrix {
  const n = vectors.rows;
  const m = vectors.cols;
  const out = zeros(n, n);
  const Vr = vectors.re;
  const Vi = vectors.im;
  // U = V diag(f) is formed row by row on the fly; out_ij = sum_k f_k V_ik conj(V_jk).
  const ur = new Float64Array(m);
  const ui = new Float64Array(m);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < m; k++) {
      const a = Vr[i * m + k];
      const b = Vi[i * m + k];
      const g = fi ? fi[k] : 0;
      ur[k] = f[k] * a - g * b;
      ui[k] = f[k] * b + g * a;
    }
    // Real f: the result is Hermitian, so only j ≥ i is computed.
    for (let j = fi ? 0 : i; j < n; j++) {
      let sr = 0;
      let si = 0;
      for (let k = 0; k < m; k++) {
        const vr = Vr[j * m + k];
        const vi = Vi[j * m + k];
        sr += ur[k] * vr + ui[k] * vi;
        si += ui[k] * vr - ur[k] * vi;
      }
      out.re[i * n + j] = sr;
      out.im[i * n + j] = si;
      if (!fi) {
        out.re[j * n + i] = sr;
        out.im[j * n + i] = -si;
      }
    }
    if (!fi) out.im[i * n + i] = 0;
  }
  return out;
}

/** Largest |λ| of a spectrum. */
export function spectralNorm(values: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) m = Math.max(m, Math.abs(values[i]));
  return m;
}

/** The absolute threshold tol · max|λ| used to decide which eigenvalues are zero. */
export function zeroThreshold(values: ArrayLike<number>, tol = DEFAULT_SUPPORT_TOLERANCE): number {
  return tol * spectralNorm(values);
}

/** f(H) for a real function f applied to every eigenvalue. */
export function hermitianFunction(h: CMatrix, f: (x: number) => number, eig?: EighResult): CMatrix {
  const { values, vectors } = eig ?? eigh(h, { vectors: true });
  return fromSpectrum(vectors!, Array.from(values, f));
}

function checkPositive(values: ArrayLike<number>, tol: number, what: string): number {
  const thr = zeroThreshold(values, tol);
  for (let i = 0; i < values.length; i++) {
    if (values[i] < -thr) throw new RangeError(`${what}: matrix has eigenvalue ${values[i]} < 0`);
  }
  return thr;
}

/**
 * H^p on the support of a positive semidefinite H. p = 0 gives the support projector; negative p the
 * pseudo-inverse power.
 */
export function matrixPower(h: CMatrix, p: number, tol = DEFAULT_SUPPORT_TOLERANCE, eig?: EighResult): CMatrix {
  const e = eig ?? eigh(h, { vectors: true });
  const thr = checkPositive(e.values, tol, 'matrixPower');
  return fromSpectrum(e.vectors!, Array.from(e.values, (x) => (x > thr ? Math.pow(x, p) : 0)));
}

/** Logarithm on the support (natural log unless `base` is given); zero off the support. */
export function logm(h: CMatrix, base: number = Math.E, tol = DEFAULT_SUPPORT_TOLERANCE, eig?: EighResult): CMatrix {
  const e = eig ?? eigh(h, { vectors: true });
  const thr = checkPositive(e.values, tol, 'logm');
  const lb = Math.log(base);
  return fromSpectrum(e.vectors!, Array.from(e.values, (x) => (x > thr ? Math.log(x) / lb : 0)));
}

/** Square root of a positive semidefinite matrix. */
export function sqrtm(h: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE, eig?: EighResult): CMatrix {
  const e = eig ?? eigh(h, { vectors: true });
  const thr = checkPositive(e.values, tol, 'sqrtm');
  return fromSpectrum(e.vectors!, Array.from(e.values, (x) => (x > thr ? Math.sqrt(x) : 0)));
}

/** Exponential of a Hermitian matrix. */
export function expm(h: CMatrix, eig?: EighResult): CMatrix {
  const e = eig ?? eigh(h, { vectors: true });
  return fromSpectrum(e.vectors!, Array.from(e.values, Math.exp));
}

/** Projector onto the span of eigenvectors with eigenvalue above tol · ‖H‖. */
export function supportProjector(h: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE, eig?: EighResult): CMatrix {
  const e = eig ?? eigh(h, { vectors: true });
  const thr = zeroThreshold(e.values, tol);
  return fromSpectrum(e.vectors!, Array.from(e.values, (x) => (Math.abs(x) > thr ? 1 : 0)));
}

/** Number of eigenvalues with |λ| > tol · ‖H‖. */
export function numericalRank(h: CMatrix, tol = DEFAULT_SUPPORT_TOLERANCE): number {
  const values = eigh(h, { vectors: false }).values;
  const thr = zeroThreshold(values, tol);
  let r = 0;
  for (let i = 0; i < values.length; i++) if (Math.abs(values[i]) > thr) r++;
  return r;
}

/**
 * H^{p(1+it)} on the support of a positive semidefinite H (eigenvalues above tol·max|λ|), 0 on the
 * kernel: λ^p (cos(pt ln λ) + i sin(pt ln λ)) per eigenvalue. Returns the matrix, the rank and the
 * smallest kept eigenvalue. (t = 0: the ordinary power on the support.)
 */
export function complexPower(eig: EighResult, p: number, t: number, tol = DEFAULT_SUPPORT_TOLERANCE): { matrix: CMatrix; rank: number; smallest: number } {
  const { values, vectors } = eig;
  const thr = zeroThreshold(values, tol);
  const fr = new Float64Array(values.length);
  const fi = new Float64Array(values.length);
  let rank = 0;
  let smallest = Infinity;
  values.forEach((v, k) => {
    if (v > thr && v > 0) {
      rank++;
      smallest = Math.min(smallest, v);
      const mag = Math.pow(v, p);
      const ph = p * t * Math.log(v);
      fr[k] = mag * Math.cos(ph);
      fi[k] = mag * Math.sin(ph);
    }
  });
  return { matrix: fromSpectrum(vectors!, fr, fi), rank, smallest: rank > 0 ? smallest : 0 };
}
