/**
 * Unitarily invariant norms: trace norm (sum of singular values) and operator norm (largest
 * singular value). A numerically Hermitian A gives its singular values as |eigenvalues| (exact and
 * cheaper); any other A goes through the relative-accuracy SVD of graded.ts (never through A*A,
 * which would square the condition number and turn singular values below √ε‖A‖ into noise).
 * Deliberately not here: other norms (Schatten p, Ky Fan). Cost: one eigendecomposition or one SVD,
 * O(n³).
 */
import { CMatrix, hermiticityDefect, maxAbs } from './cmatrix.js';
import { eigvalsh } from './eigh.js';
import { gradedSvd } from './graded.js';

function isNumericallyHermitian(a: CMatrix): boolean {
  if (a.rows !== a.cols) return false;
  const scale = maxAbs(a);
  return hermiticityDefect(a).size <= 1e-14 * Math.max(scale, Number.MIN_VALUE);
}

/** Singular values in descending order. */
export function singularValues(a: CMatrix): Float64Array {
  if (isNumericallyHermitian(a)) return eigvalsh(a).map(Math.abs).sort().reverse();
  return gradedSvd(a).values;
}

export function traceNorm(a: CMatrix): number {
  return singularValues(a).reduce((s, x) => s + x, 0);
}

export function operatorNorm(a: CMatrix): number {
  const s = singularValues(a);
  return s.length ? s[0] : 0;
}
