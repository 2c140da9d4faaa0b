/**
 * Monotone (contrast-free) Riemannian metrics on density matrices, Petz's classification, and the
 * double operator integral they are built from.
 *
 * Petz's theorem (D. Petz, "Monotone metrics on matrix spaces", Linear Algebra Appl. 244, 81–96
 * (1996); also Hiai & Petz, Introduction to Matrix Analysis and Applications, 2014, Ch. on monotone
 * metrics): the monotone metrics are exactly
 *   γ_ρ^f(X, Y) = Tr X* (J_ρ^f)^{-1}(Y),   J_ρ^f = R_ρ^{1/2} f(L_ρ R_ρ^{-1}) R_ρ^{1/2} = f(L_ρ R_ρ^{-1}) R_ρ,
 * with L_ρ X = ρX, R_ρ X = Xρ (commuting superoperators) and f: (0,∞) → (0,∞) operator monotone,
 * symmetric (f(t) = t f(1/t)) and normalised (f(1) = 1). In the eigenbasis of ρ = Σ λ_i |i⟩⟨i|,
 * J_ρ^f acts on the matrix unit |i⟩⟨j| as multiplication by λ_j f(λ_i/λ_j) = m_f(λ_i, λ_j), the
 * operator mean (perspective) of f, so
 *   γ_ρ^f(X, Y) = Σ_ij conj(X_ij) Y_ij / m_f(λ_i, λ_j),   m_f(x, y) = y f(x/y).
 * The normalisation f(1) = 1 makes γ^f reduce to the Fisher–Rao metric Σ_i |X_ii|²/λ_i on
 * diagonal (commuting) tangent vectors. (Formula checked against Petz 1996 as recalled, and
 * independently in the tests: the Kubo–Mori case against the Fréchet derivative of log, the SLD
 * case against a Lyapunov solve in scipy.)
 *
 * Presets: SLD / Bures f(t) = (1+t)/2 (arithmetic mean; the smallest monotone metric),
 * Kubo–Mori / Bogoliubov f(t) = (t−1)/log t (logarithmic mean), Wigner–Yanase f(t) = ¼(1+√t)²,
 * harmonic f(t) = 2t/(1+t) (harmonic mean; the largest monotone metric). A user's f is accepted as a
 * JS function; we check f(1) = 1, positivity and symmetry at sample points and run a Löwner-matrix
 * test (Löwner's theorem: f is operator monotone iff all its divided-difference matrices are
 * positive semidefinite) on a fixed set of points. Those checks are necessary, not sufficient: an
 * f that passes them is not proven operator monotone.
 *
 * Near t = 1 a user's f is replaced by its first-order expansion 1 + (t−1)/2 when |t − 1| ≤ 1e-6:
 * every symmetric normalised f has f'(1) = 1/2, and Petz's sandwich 2t/(1+t) ≤ f(t) ≤ (1+t)/2 bounds
 * the error by (t−1)²/2 ≤ 5e-13, whereas formulas like (t−1)/log t lose all accuracy there.
 *
 * Rank-deficient ρ: m_f(λ_i, λ_j) can vanish (always when λ_i = λ_j = 0; for Kubo–Mori and the
 * harmonic mean also when one of them is 0). A tangent vector with weight on such an entry has
 * infinite length: the result is Infinity with a reason, unless `restrictToSupport` is set, in
 * which case those entries are dropped and their size reported. Which eigenvalues count as zero is
 * a tolerance decision (relative tolerance `tol`, default 1e-12); which entries of X count as zero
 * another (`vectorTol`, relative to the largest entry of X, default 1e-12).
 *
 * Double operator integral (Daleckii & Krein, "Integration and differentiation of functions of
 * Hermitian operators and applications to the theory of perturbations", AMS Transl. (2) 47 (1965);
 * Bhatia, Matrix Analysis, 1997, Thm V.3.3): for Hermitian A = Σ λ_i P_i, B = Σ μ_j Q_j and a
 * kernel φ, T_φ(X) = Σ_ij φ(λ_i, μ_j) P_i X Q_j. With φ the divided difference f^[1] of f and
 * A = B it is the Fréchet derivative: d/dt f(A + tX)|_{t=0} = T_{f^[1]}(X).
 *
 * Deliberately not here: non-symmetric f (they do not give real symmetric metrics), metrics on
 * channels, geodesic distances other than Bures (see distances.ts).
 *
 * Cost: one eigendecomposition of ρ and two basis changes, O(n³); the Löwner test is O(1).
 */
import { CMatrix, zeros, maxAbs } from '../linalg/cmatrix.js';
import { eigh, eigvalsh, EighResult } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE, zeroThreshold } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import { compress } from '../linalg/spectral.js';

/** A symmetric normalised operator monotone function with its mean m(x, y) = y f(x/y). */
export interface MetricFunction {
  name: string;
  /** f on (0, ∞). */
  f: (t: number) => number;
  /** m_f(x, y) = y f(x/y) for x, y ≥ 0, with m(0, 0) = 0 and m(x, 0) = x f(0+). */
  mean: (x: number, y: number) => number;
  /** Notes from the checks of a user-supplied f (empty for presets). */
  warnings: string[];
}

/** log mean (x − y)/(ln x − ln y), stable near x = y. */
function logarithmicMean(x: number, y: number): number {
  if (x === y) return x;
  if (x <= 0 || y <= 0) return 0;
  const u = Math.log1p((x - y) / y);
  return u === 0 ? x : (x - y) / u;
}

export const SLD_METRIC: MetricFunction = {
  name: 'sld',
  f: (t) => (1 + t) / 2,
  mean: (x, y) => (x + y) / 2,
  warnings: [],
};

export const KUBO_MORI_METRIC: MetricFunction = {
  name: 'kubo-mori',
  f: (t) => (t === 1 ? 1 : t === 0 ? 0 : (t - 1) / Math.log(t)),
  mean: logarithmicMean,
  warnings: [],
};

export const WIGNER_YANASE_METRIC: MetricFunction = {
  name: 'wigner-yanase',
  f: (t) => 0.25 * (1 + Math.sqrt(t)) ** 2,
  mean: (x, y) => 0.25 * (Math.sqrt(x) + Math.sqrt(y)) ** 2,
  warnings: [],
};

export const HARMONIC_METRIC: MetricFunction = {
  name: 'harmonic',
  f: (t) => (2 * t) / (1 + t),
  mean: (x, y) => (x + y === 0 ? 0 : (2 * x * y) / (x + y)),
  warnings: [],
};

export const METRIC_PRESETS: Record<string, MetricFunction> = {
  sld: SLD_METRIC,
  'kubo-mori': KUBO_MORI_METRIC,
  'wigner-yanase': WIGNER_YANASE_METRIC,
  harmonic: HARMONIC_METRIC,
};

const SAMPLE_POINTS = [1e-3, 0.05, 0.3, 0.7, 1.5, 3, 10, 200];

/**
 * Wrap a user's f as a MetricFunction after checks: finite and positive on sample points, f(1) = 1
 * (or, when f(1) is NaN, a removable singularity with limit 1 from both sides) and f(t) = t f(1/t) to relative 1e-9 (else RhoError 'invalid-argument'); a Löwner-matrix test on
 * the sample points adds a warning when it fails (then f is not operator monotone and the result is
 * not a monotone metric).
 */
export function metricFromFunction(f: (t: number) => number, name = 'custom', path = 'metric'): MetricFunction {
  const warnings: string[] = [];
  let f1 = f(1);
  if (Number.isNaN(f1)) {
    // A removable singularity at 1, as in (t − 1)/log t: use the limit from both sides.
    f1 = 0.5 * (f(1 + 1e-6) + f(1 - 1e-6));
    if (Math.abs(f1 - 1) <= 1e-9) f1 = 1;
  }
  if (!Number.isFinite(f1) || Math.abs(f1 - 1) > 1e-9) {
    throw new RhoError('invalid-argument', `The metric function must satisfy f(1) = 1 (got f(1) = ${f1}).`, path);
  }
  for (const t of SAMPLE_POINTS) {
    const a = f(t);
    const b = t * f(1 / t);
    if (!Number.isFinite(a) || a <= 0) {
      throw new RhoError('invalid-argument', `The metric function must be positive and finite on (0, ∞) (f(${t}) = ${a}).`, path);
    }
    if (Math.abs(a - b) > 1e-9 * Math.max(Math.abs(a), Math.abs(b))) {
      throw new RhoError(
        'invalid-argument',
        `The metric function must be symmetric, f(t) = t f(1/t), for the metric to be real and symmetric (f(${t}) = ${a}, ${t}·f(1/${t}) = ${b}).`,
        path,
      );
    }
  }
  // Löwner matrix [f^[1](t_i, t_j)] on the sample points (diagonal: central-difference derivative).
  const k = SAMPLE_POINTS.length;
  const L = zeros(k, k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const x = SAMPLE_POINTS[i];
      const y = SAMPLE_POINTS[j];
      L.re[i * k + j] = i === j ? (f(x * (1 + 1e-5)) - f(x * (1 - 1e-5))) / (2e-5 * x) : (f(x) - f(y)) / (x - y);
    }
  }
  const lowest = eigvalsh(L)[0];
  if (lowest < -1e-8 * maxAbs(L)) {
    warnings.push(
      `The function failed a Löwner-matrix test (smallest eigenvalue ${lowest.toExponential(3)} < 0 on sample points), so it is not operator monotone: the result is not a monotone metric.`,
    );
  }
  let f0 = f(0);
  if (!Number.isFinite(f0) || f0 < 0) f0 = f(Number.MIN_VALUE);
  if (!Number.isFinite(f0) || f0 < 0) f0 = 0;
  const fs = (t: number): number => {
    if (t === 1) return 1;
    if (Math.abs(t - 1) <= 1e-6) return 1 + (t - 1) / 2;
    return f(t);
  };
  const mean = (x: number, y: number): number => {
    if (x <= 0 && y <= 0) return 0;
    if (y <= 0) return x * f0;
    if (x <= 0) return y * f0;
    // y f(x/y) = x f(y/x); evaluate with the ratio ≤ 1 for the best-conditioned argument.
    const t = x <= y ? x / y : y / x;
    const v = fs(t);
    if (!Number.isFinite(v) || v <= 0) {
      throw new RhoError('invalid-argument', `The metric function is not positive and finite at t = ${t} (f(t) = ${v}).`, path);
    }
    return x <= y ? y * v : x * v;
  };
  return { name, f: fs, mean, warnings };
}

// ---------------------------------------------------------------------------------------------
// Double operator integrals

// doubleOperatorIntegral, dividedDifference and frechetDerivative live in src/linalg/spectral.ts.
export { doubleOperatorIntegral, dividedDifference, frechetDerivative } from '../linalg/spectral.js';

// ---------------------------------------------------------------------------------------------
// The metric itself

export interface MetricOptions {
  /** Relative tolerance below which an eigenvalue of ρ is zero (default 1e-12). */
  tol?: number;
  /** Entries of X, Y (in ρ's eigenbasis) at most vectorTol · max|entry| count as zero (default 1e-12). */
  vectorTol?: number;
  /** Drop entries on which the mean vanishes instead of returning Infinity. */
  restrictToSupport?: boolean;
  /**
   * Drop the kernel–kernel block (both eigenvalues zero) silently but report it: for a smooth family
   * of states the derivative vanishes there. Used by the Fisher information.
   */
  dropKernelBlock?: boolean;
  /** A precomputed eigendecomposition of ρ. */
  eig?: EighResult;
}

export interface MetricResult {
  /** Re γ_ρ^f(X, Y) (Infinity when X has weight where the mean vanishes). */
  value: number;
  /** Im γ_ρ^f(X, Y): 0 up to rounding for Hermitian X, Y; can be non-zero for general X, Y. */
  imaginary: number;
  metric: string;
  /** Rank of ρ used. */
  rank: number;
  /** Frobenius norm of the part of X (and Y) dropped where the mean vanishes (restrictToSupport). */
  dropped: number;
  /** Frobenius norm of X's kernel–kernel block (in ρ's eigenbasis). */
  kernelBlock: number;
  reason?: string;
  warnings: string[];
}

/**
 * γ_ρ^f(X, Y) = Σ_ij conj(X_ij) Y_ij / m_f(λ_i, λ_j) in the eigenbasis of ρ (Petz 1996). Y defaults
 * to X. For X ≠ Y with both having weight where the mean vanishes the form is undefined and a
 * RhoError is thrown (unless restrictToSupport).
 */
export function monotoneMetric(
  rho: CMatrix,
  x: CMatrix,
  y: CMatrix = x,
  metric: MetricFunction = SLD_METRIC,
  options: MetricOptions = {},
): MetricResult {
  const n = rho.rows;
  if (x.rows !== n || x.cols !== n || y.rows !== n || y.cols !== n) {
    throw new RhoError('dimension-mismatch', `The tangent vectors must be ${n}x${n} like rho.`, x.rows !== n || x.cols !== n ? 'x' : 'y');
  }
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const vectorTol = options.vectorTol ?? 1e-12;
  const e = options.eig ?? eigh(rho, { vectors: true });
  const thr = zeroThreshold(e.values, tol);
  const lam = Array.from(e.values, (v) => (v > thr ? v : 0));
  const rank = lam.filter((v) => v > 0).length;
  const V = e.vectors!;
  const xe = compress(x, V);
  const same = x === y;
  const ye = same ? xe : compress(y, V);
  const xThr = vectorTol * maxAbs(xe);
  const yThr = vectorTol * maxAbs(ye);
  let re = 0;
  let im = 0;
  let dropped = 0;
  let kernelBlock = 0;
  let infinite = false;
  let where = '';
  const meanMax = Math.max(...lam, 0);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const k = i * n + j;
      const xr = xe.re[k];
      const xi = xe.im[k];
      const yr = ye.re[k];
      const yi = ye.im[k];
      const xa = Math.hypot(xr, xi);
      const ya = Math.hypot(yr, yi);
      if (lam[i] === 0 && lam[j] === 0) kernelBlock += xa * xa;
      let m = metric.mean(lam[i], lam[j]);
      if (!(m > tol * meanMax)) m = 0;
      if (m === 0) {
        const kernelKernel = lam[i] === 0 && lam[j] === 0;
        // One factor negligible: the product conj(X_ij) Y_ij vanishes, no contribution.
        if (xa <= xThr || ya <= yThr) continue;
        if (options.restrictToSupport || (kernelKernel && options.dropKernelBlock)) {
          dropped += xa * xa;
          continue;
        }
        if (!same) {
          throw new RhoError(
            'invalid-argument',
            `The metric is undefined here: both tangent vectors have weight on an entry (${i}, ${j}) of rho's eigenbasis where the ${metric.name} mean of the eigenvalues vanishes.`,
            'y',
          );
        }
        infinite = true;
        if (!where) {
          where = kernelKernel
            ? `the tangent vector has weight ${xa.toExponential(3)} in the kernel of rho (eigenbasis entry (${i}, ${j})), outside the tangent space of states at rho`
            : `the tangent vector has weight ${xa.toExponential(3)} between the support and the kernel of rho (eigenbasis entry (${i}, ${j})), where the ${metric.name} mean of the eigenvalues vanishes`;
        }
        continue;
      }
      // conj(x) y / m
      re += (xr * yr + xi * yi) / m;
      im += (xr * yi - xi * yr) / m;
    }
  }
  const result: MetricResult = {
    value: infinite ? Infinity : re,
    imaginary: infinite ? 0 : im,
    metric: metric.name,
    rank,
    dropped: Math.sqrt(dropped),
    kernelBlock: Math.sqrt(kernelBlock),
    warnings: [...metric.warnings],
  };
  if (infinite) result.reason = `The ${metric.name} metric is infinite: ${where}.`;
  if (options.restrictToSupport && dropped > 0) {
    result.warnings.push(
      `Restricted to the entries where the ${metric.name} mean is positive; dropped a part of Frobenius norm ${Math.sqrt(dropped).toExponential(3)}.`,
    );
  }
  return result;
}
