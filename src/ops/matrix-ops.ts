/**
 * Ops on plain matrices (no state validation beyond what each op needs): `spectrum` of a Hermitian
 * matrix, and the subsystem operations `partial-trace`, `partial-transpose` and `reorder-subsystems` on a
 * square matrix acting on a tensor product with dimensions `dims`.
 *
 * Deliberately not here: anything that needs a density matrix (entropies, divergences live in their own op
 * modules). The subsystem ops are linear and apply to any square operator, so they do not check positivity.
 * Cost: spectrum O(n^3) (the project's eigensolver); the subsystem ops O(n^2) after reading the input.
 */
import { eigh } from '../linalg/eigh.js';
import { marginal, partialTrace, partialTranspose, reorderSubsystems } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import { defineOp } from './registry.js';
import {
  readDims, readHermitianWithDefect, readLabels, readSquareMatrix, readSystems, schemas, writeComplexMatrix, writeMatrix,
} from './codec.js';
import { dense, plain, sideOf } from './cost.js';

defineOp({
  name: 'spectrum',
  summary: 'Eigenvalues (ascending) of a Hermitian matrix, and optionally its eigenvectors as the columns of a unitary.',
  args: {
    type: 'object',
    properties: {
      matrix: { ...schemas.matrix, description: 'A Hermitian matrix (within the tolerance; its Hermitian part is diagonalised).' },
      vectors: { type: 'boolean', description: 'Also return the eigenvectors, as the columns of a complex matrix {re, im}.' },
    },
    required: ['matrix'],
  },
  cost: (req) => dense(sideOf(req.matrix), 1, 'one eigendecomposition'),
  run(req, { tolerance }) {
    const { matrix: m, defect } = readHermitianWithDefect(req.matrix, 'matrix', tolerance);
    const wantVectors = req.vectors === true;
    const { values, vectors } = eigh(m, { vectors: wantVectors });
    const out: { value: number[]; vectors?: unknown; hermiticityDefect: number } = {
      value: Array.from(values),
      // The largest |M_ij − conj(M_ji)|: the input was taken as Hermitian up to this much.
      hermiticityDefect: defect,
    };
    if (wantVectors) out.vectors = writeComplexMatrix(vectors!);
    return out;
  },
});

/** The cost of reading, rearranging and writing an n×n matrix. */
function rearrangement(n: number) {
  return plain(16 * n * n, 64 * n * n, `rearranging a ${n}×${n} matrix`);
}

/** Matrix, dims and labels of a subsystem op's request. */
function readLayout(req: Record<string, any>) {
  const matrix = readSquareMatrix(req.matrix, 'matrix');
  const dims = readDims(req.dims, 'dims', matrix.rows);
  const labels = req.labels === undefined ? undefined : readLabels(req.labels, 'labels', dims.length);
  return { matrix, dims, labels };
}

const layoutArgs = {
  matrix: { ...schemas.matrix, description: 'A square matrix acting on the tensor product of the subsystems.' },
  dims: schemas.dims,
  labels: { ...schemas.labels, description: 'Optional names of the subsystems, usable in place of indices.' },
};

defineOp({
  name: 'partial-trace',
  summary: 'Partial trace of a matrix over some subsystems ("over"), or onto the subsystems kept ("keep", in the order listed).',
  args: {
    type: 'object',
    properties: {
      ...layoutArgs,
      over: { ...schemas.systems, description: 'The subsystems traced out.' },
      keep: { ...schemas.systems, description: 'The subsystems kept, in the order wanted (alternative to "over").' },
    },
    required: ['matrix', 'dims'],
  },
  tolerance: false,
  cost: (req) => rearrangement(sideOf(req.matrix)),
  run(req) {
    const { matrix, dims, labels } = readLayout(req);
    if ((req.over === undefined) === (req.keep === undefined)) {
      throw new RhoError('invalid-argument', 'Give exactly one of "over" (subsystems traced out) and "keep" (subsystems kept).', req.over === undefined ? 'over' : 'keep');
    }
    let keep: number[];
    let result;
    if (req.over !== undefined) {
      const over = readSystems(req.over, 'over', dims.length, { labels });
      const gone = new Set(over);
      keep = dims.map((_, k) => k).filter((k) => !gone.has(k));
      result = partialTrace(matrix, dims, over);
    } else {
      keep = readSystems(req.keep, 'keep', dims.length, { labels });
      result = marginal(matrix, dims, keep);
    }
    const out: Record<string, unknown> & { value: unknown } = {
      value: writeMatrix(result),
      dims: keep.length ? keep.map((k) => dims[k]) : [1],
    };
    if (labels && keep.length) out.labels = keep.map((k) => labels[k]);
    return out;
  },
});

defineOp({
  name: 'partial-transpose',
  summary: 'Partial transpose of a matrix on the listed subsystems (in the computational basis).',
  args: {
    type: 'object',
    properties: { ...layoutArgs, on: { ...schemas.systems, description: 'The subsystems transposed.' } },
    required: ['matrix', 'dims', 'on'],
  },
  tolerance: false,
  cost: (req) => rearrangement(sideOf(req.matrix)),
  run(req) {
    const { matrix, dims, labels } = readLayout(req);
    const on = readSystems(req.on, 'on', dims.length, { labels });
    const out: Record<string, unknown> & { value: unknown } = { value: writeMatrix(partialTranspose(matrix, dims, on)), dims };
    if (labels) out.labels = labels;
    return out;
  },
});

defineOp({
  name: 'reorder-subsystems',
  summary: 'Reorder the tensor factors of a matrix: subsystem k of the result is subsystem order[k] of the input.',
  args: {
    type: 'object',
    properties: {
      ...layoutArgs,
      order: { ...schemas.systems, description: 'Every subsystem once, in the new order.' },
    },
    required: ['matrix', 'dims', 'order'],
  },
  tolerance: false,
  cost: (req) => rearrangement(sideOf(req.matrix)),
  run(req) {
    const { matrix, dims, labels } = readLayout(req);
    const order = readSystems(req.order, 'order', dims.length, { labels });
    if (order.length !== dims.length) {
      throw new RhoError('invalid-argument', `"order" must list every one of the ${dims.length} subsystems exactly once.`, 'order');
    }
    const out: Record<string, unknown> & { value: unknown } = {
      value: writeMatrix(reorderSubsystems(matrix, dims, order)),
      dims: order.map((k) => dims[k]),
    };
    if (labels) out.labels = order.map((k) => labels[k]);
    return out;
  },
});
