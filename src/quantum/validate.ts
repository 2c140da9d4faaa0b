/**
 * Validation of density matrices with an explicit tolerance: Hermitian, positive semidefinite and of
 * unit trace, each failure a RhoError naming the entry or eigenvalue at fault. Nothing is repaired.
 *
 * Tolerance semantics (documented in PROTOCOL.md): Hermiticity defect max|M_ij − conj(M_ji)| and the most
 * negative eigenvalue are compared with tol · max(‖M‖_F, 1e-300) (relative to the norm); the trace with tol
 * (absolute, since the target is 1). Positivity costs one eigenvalue decomposition, O(n^3).
 */
import { CMatrix, frobeniusNorm, hermiticityDefect, isFinite, trace } from '../linalg/cmatrix.js';
import { eigvalsh } from '../linalg/eigh.js';
import { product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';

export const DEFAULT_TOLERANCE = 1e-9;

export function checkSquareFinite(m: CMatrix, path = 'matrix'): void {
  if (m.rows === 0) throw new RhoError('invalid-argument', 'The matrix is empty.', path);
  if (m.rows !== m.cols) {
    throw new RhoError('dimension-mismatch', `The matrix is ${m.rows}x${m.cols}; it must be square.`, path);
  }
  if (!isFinite(m)) throw new RhoError('invalid-argument', 'The matrix has a NaN or infinite entry.', path);
}

export function checkDims(m: CMatrix, dims: readonly number[], path = 'dims'): void {
  if (dims.length === 0 || dims.some((d) => !Number.isInteger(d) || d < 1)) {
    throw new RhoError('invalid-argument', 'Subsystem dimensions must be a non-empty list of positive integers.', path);
  }
  if (product(dims) !== m.rows) {
    throw new RhoError(
      'dimension-mismatch',
      `The subsystem dimensions [${dims.join(', ')}] multiply to ${product(dims)}, but the matrix is ${m.rows}x${m.cols}.`,
      path,
    );
  }
}

export function checkHermitian(m: CMatrix, tolerance = DEFAULT_TOLERANCE, path = 'matrix'): void {
  checkSquareFinite(m, path);
  const scale = Math.max(frobeniusNorm(m), 1e-300);
  const { size, row, col } = hermiticityDefect(m);
  if (size > tolerance * scale) {
    throw new RhoError(
      'not-hermitian',
      `The matrix is not Hermitian: entry [${row}][${col}] differs from the conjugate of [${col}][${row}] by ${size.toExponential(3)}.`,
      `${path}[${row}][${col}]`,
      { defect: size },
    );
  }
}

/** Throws unless m is a density matrix within the tolerance; returns its eigenvalues (ascending). */
export function checkDensityMatrix(m: CMatrix, tolerance = DEFAULT_TOLERANCE, path = 'matrix'): Float64Array {
  checkHermitian(m, tolerance, path);
  const tr = trace(m).re;
  if (Math.abs(tr - 1) > tolerance) {
    throw new RhoError('trace-not-one', `The trace is ${tr}, not 1 (tolerance ${tolerance}).`, path, { trace: tr });
  }
  const values = eigvalsh(m);
  const scale = Math.max(frobeniusNorm(m), 1e-300);
  if (values[0] < -tolerance * scale) {
    throw new RhoError(
      'not-positive',
      `The matrix is not positive semidefinite: it has the eigenvalue ${values[0].toExponential(6)}.`,
      path,
      { eigenvalue: values[0] },
    );
  }
  return values;
}

/** Throws unless m is positive semidefinite (any trace) within the tolerance. */
export function checkPositive(m: CMatrix, tolerance = DEFAULT_TOLERANCE, path = 'matrix'): Float64Array {
  checkHermitian(m, tolerance, path);
  const values = eigvalsh(m);
  const scale = Math.max(frobeniusNorm(m), 1e-300);
  if (values[0] < -tolerance * scale) {
    throw new RhoError(
      'not-positive',
      `The matrix is not positive semidefinite: it has the eigenvalue ${values[0].toExponential(6)}.`,
      path,
      { eigenvalue: values[0] },
    );
  }
  return values;
}
