/**
 * Unitarily invariant norms: trace norm (sum of singular values) and operator norm (largest
 * singular value). Singular values come from the eigenvalues of A*A (or of A itself when A is
 * Hermitian, which is exact and cheaper); this squares the condition number, which matters only
 * for singular values far below ‖A‖, irrelevant to the sums and maxima taken here.
 */
import { adjoint, CMatrix, hermiticityDefect, maxAbs, mul } from './cmatrix.js';
import { eigvalsh } from './eigh.js';

function isNumericallyHermitian(a: CMatrix): boolean {
  if (a.rows !== a.cols) return false;
  const scale = maxAbs(a);
  return hermiticityDefect(a).size <= 1e-14 * Math.max(scale, Number.MIN_VALUE);
}

/** Singular values in descending order. */
export function singularValues(a: CMatrix): Float64Array {
  let values: Float64Array;
  if (isNumericallyHermitian(a)) {
    values = eigvalsh(a).map(Math.abs);
  } else {
    const g = a.rows >= a.cols ? mul(adjoint(a), a) : mul(a, adjoint(a));
    values = eigvalsh(g).map((x) => Math.sqrt(Math.max(x, 0)));
  }
  return values.sort().reverse();
}

export function traceNorm(a: CMatrix): number {
  return singularValues(a).reduce((s, x) => s + x, 0);
}

export function operatorNorm(a: CMatrix): number {
  const s = singularValues(a);
  return s.length ? s[0] : 0;
}
