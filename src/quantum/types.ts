/**
 * The engine's two physical objects, as plain data.
 *
 * A `State` is a density matrix on a tensor product of subsystems (dims multiply to its size).
 * A `Channel` is a completely positive map given by Kraus operators, each of shape
 * prod(toDims) x prod(fromDims); trace preservation is not assumed (check it where it matters).
 */
import type { CMatrix } from '../linalg/cmatrix.js';

export interface State {
  matrix: CMatrix;
  dims: number[];
  labels?: string[];
}

export interface Channel {
  kraus: CMatrix[];
  fromDims: number[];
  toDims: number[];
}
