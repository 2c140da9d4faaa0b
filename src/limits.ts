/**
 * The engine's limits on the cost of one request (docs/protocol.md, "Limits and deadlines"): every op
 * estimates its work and memory from the request's sizes before it starts (src/ops/cost.ts), and the
 * SDP solver checks the same kind of estimate on the problem it is given (src/sdp/cost.ts). Above either
 * limit the request is refused with 'too-large', naming the estimate and the limit (`overLimits`).
 *
 * The numbers: 10¹² operations is a few minutes of this engine's dense kernels on one core (the SDP
 * solver's Cholesky runs at 3.5–4 × 10⁹ per second on the development machines); 1 GiB keeps one request
 * inside what a browser tab or a kernel's engine process can hold. Time within the limits is bounded by
 * the request's deadline (src/deadline.ts).
 *
 * The size limits (matrix sides, Kraus families) are here too, so that the layers that build matrices
 * from parameters (src/quantum/presets.ts, states.ts) refuse what the codec would refuse as input.
 *
 * Deliberately not here: the estimates themselves (each op's `cost`, src/sdp/cost.ts). Cost: nothing.
 */
import { RhoError } from './errors.js';

/** Largest number of rows or columns of any matrix, and largest ket length. */
export const MAX_DIMENSION = 1024;
/** Largest number of entries of one matrix (MAX_DIMENSION² — a 1024×1024 complex matrix is 16 MiB). */
export const MAX_ENTRIES = MAX_DIMENSION * MAX_DIMENSION;
/** Largest number of Kraus operators of one channel. */
export const MAX_KRAUS = 1024;
/** Largest total number of entries over all Kraus operators of one channel (64 MiB as complex doubles). */
export const MAX_CHANNEL_ENTRIES = 4 * MAX_ENTRIES;
/** Largest number of subsystems in a `dims` list. */
export const MAX_SUBSYSTEMS = 64;

/** Largest estimated number of floating-point operations of one request. */
export const MAX_WORK = 1e12;

/** Largest estimated peak memory of one request, in bytes (1 GiB). */
export const MAX_BYTES = 2 ** 30;

/**
 * Largest estimated work between two looks at the deadline (one SDP iteration, one eigendecomposition):
 * about an eigendecomposition of side 1024 with vectors, a few seconds. The deadline can be overrun by
 * at most one such step.
 */
export const MAX_STEP_WORK = 4e10;

/** An estimate of what a computation costs, and what it was estimated from. */
export interface CostEstimate {
  /** Floating-point operations (an order of magnitude, not a count). */
  flops: number;
  /** Peak memory in bytes (likewise). */
  bytes: number;
  /** The largest step done without looking at the deadline (one SDP iteration, one eigendecomposition); default `flops`. */
  step?: number;
  /** What the estimate was made from, in words: "an SDP with one Hermitian 288×288 block and 20737 constraints". */
  basis: string;
}

/** Bytes in words: "340 MiB", "6.4 GiB". */
export function formatBytes(bytes: number): string {
  return bytes >= 2 ** 30 ? `${(bytes / 2 ** 30).toFixed(1)} GiB` : `${Math.max(1, Math.ceil(bytes / 2 ** 20))} MiB`;
}

/** The 'too-large' refusal of an estimate above MAX_BYTES or MAX_WORK (at `path`), or undefined within both. */
export function overLimits(c: CostEstimate, path?: string): RhoError | undefined {
  const step = c.step ?? c.flops;
  let estimate: string;
  let limit: string;
  if (c.bytes > MAX_BYTES) {
    estimate = `memory of ${c.basis} is ${formatBytes(c.bytes)}`;
    limit = formatBytes(MAX_BYTES);
  } else if (c.flops > MAX_WORK) {
    estimate = `work of ${c.basis} is ${c.flops.toExponential(1)} operations`;
    limit = `${MAX_WORK.toExponential(0)} operations`;
  } else if (step > MAX_STEP_WORK) {
    estimate = `work of one step of ${c.basis} (done without a look at the deadline) is ${step.toExponential(1)} operations`;
    limit = `${MAX_STEP_WORK.toExponential(0)} operations per step`;
  } else return undefined;
  return new RhoError('too-large', `The estimated ${estimate}, above the limit of ${limit}.`, path, {
    estimate: { operations: c.flops, bytes: c.bytes, step },
    limit: { operations: MAX_WORK, bytes: MAX_BYTES, step: MAX_STEP_WORK },
    basis: c.basis,
  });
}

/** Throws 'too-large' (at `path`) unless a matrix side is within MAX_DIMENSION. */
export function checkSide(side: number, path: string, what = 'The matrix side'): void {
  if (side > MAX_DIMENSION) {
    throw new RhoError('too-large', `${what} would be ${side}, above the limit of ${MAX_DIMENSION}.`, path, { size: side, limit: MAX_DIMENSION });
  }
}

/** Throws 'too-large' (at `path`) unless `count` Kraus operators of rows × cols are within the channel limits. */
export function checkKrausFamily(count: number, rows: number, cols: number, path: string): void {
  checkSide(rows, path, 'The output dimension');
  checkSide(cols, path, 'The input dimension');
  if (count > MAX_KRAUS) {
    throw new RhoError('too-large', `The channel would have ${count} Kraus operators, above the limit of ${MAX_KRAUS}.`, path, { size: count, limit: MAX_KRAUS });
  }
  if (count * rows * cols > MAX_CHANNEL_ENTRIES) {
    throw new RhoError('too-large', `The channel's Kraus operators would hold ${count * rows * cols} entries, above the limit of ${MAX_CHANNEL_ENTRIES}.`, path, { size: count * rows * cols, limit: MAX_CHANNEL_ENTRIES });
  }
}
