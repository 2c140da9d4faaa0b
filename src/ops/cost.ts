/**
 * Helpers for the `cost` every op declares (src/ops/registry.ts): reading sizes out of a request that
 * has passed its JSON Schema but not yet been read by the codec (the side of a state, its dims, the
 * dimension of a group of subsystems, a channel's shape), and the estimates of the engine's kernels
 * (eigendecompositions, products, SDPs through src/sdp/cost.ts). `handle` compares an op's estimate with
 * the limits of src/limits.ts and refuses the request with 'too-large' before its work starts.
 *
 * Writing a cost for a new op: estimate the work of the op's dominant steps from the sizes, e.g.
 *   cost: (req) => dense(sideOf(req.rho), 4, 'four eigendecompositions')
 * or, for an SDP, `sdp({ blocks: [{ size: n, hermitian: true }], constraints: n * n + 1 })` with the
 * block sizes and constraint count the op's problem will have. The estimate is an order of magnitude,
 * taken with typical iteration counts; the deadline stops what runs longer (src/deadline.ts).
 *
 * The readers never throw: on anything unexpected they return 0 (or an empty list), so a cost
 * function cannot turn a malformed request into a wrong error; the codec reports those.
 * Deliberately not here: the limits (src/limits.ts), the check itself (handle.ts).
 * Cost: O(rows) per value looked at.
 */
import type { CostEstimate } from '../limits.js';
import { sdpCost, type SdpShape } from '../sdp/cost.js';

export type { CostEstimate };

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** [rows, columns] of a matrix value in any protocol form, or [0, 0]. */
export function shapeOf(v: unknown): [number, number] {
  if (Array.isArray(v)) return [v.length, Array.isArray(v[0]) ? v[0].length : 0];
  if (isObject(v)) {
    if (Array.isArray(v.shape) && v.shape.length === 2) return [Number(v.shape[0]) || 0, Number(v.shape[1]) || 0];
    if (Array.isArray(v.re)) return shapeOf(v.re);
  }
  return [0, 0];
}

/** The side of a state ({"matrix"}, {"ket"} or a bare matrix) or of a square matrix value, or 0. */
export function sideOf(v: unknown): number {
  if (isObject(v)) {
    if ('matrix' in v) return shapeOf(v.matrix)[0];
    if ('ket' in v) {
      const k = v.ket;
      if (Array.isArray(k)) return k.length;
      if (isObject(k) && Array.isArray(k.re)) return k.re.length;
      return 0;
    }
  }
  return shapeOf(v)[0];
}

/** The subsystem dimensions of a state value (its "dims", or one system of its side). */
export function dimsOf(v: unknown): number[] {
  if (isObject(v) && Array.isArray(v.dims) && v.dims.every((d) => typeof d === 'number')) return v.dims as number[];
  const n = sideOf(v);
  return n > 0 ? [n] : [];
}

/** The dimension of a group of subsystems (indices, or labels of the state) of a state value; 1 when empty. */
export function groupDimension(state: unknown, systems: unknown): number {
  const dims = dimsOf(state);
  const labels = isObject(state) && Array.isArray(state.labels) ? (state.labels as unknown[]) : [];
  if (!Array.isArray(systems)) return 1;
  let d = 1;
  for (const s of systems) {
    const k = typeof s === 'number' ? s : labels.indexOf(s);
    d *= dims[k] ?? 1;
  }
  return d;
}

/** Input and output dimensions and number of Kraus operators (0 for a Choi matrix) of a channel value. */
export function channelShape(v: unknown): { din: number; dout: number; kraus: number } {
  if (!isObject(v)) return { din: 0, dout: 0, kraus: 0 };
  const prod = (x: unknown) => (Array.isArray(x) ? x.reduce((a: number, b) => a * (Number(b) || 1), 1) : 0);
  if (Array.isArray(v.kraus)) {
    const [rows, cols] = shapeOf(v.kraus[0]);
    return { din: cols, dout: rows, kraus: v.kraus.length };
  }
  const side = shapeOf(v.choi)[0];
  const din = v.from !== undefined ? prod(v.from) : v.to !== undefined ? side / Math.max(1, prod(v.to)) : 0;
  const dout = din > 0 ? side / din : 0;
  return { din, dout, kraus: side };
}

/** Floating-point operations of one Hermitian eigendecomposition of side n with vectors (complex arithmetic). */
export function eigenWork(n: number): number {
  // 25 n³ puts the eigensolver on the SDP solver's scale (both about 4 × 10⁹ of these per second here).
  return 25 * n ** 3;
}

/**
 * The estimate of an op whose work is `count` eigendecompositions and as many products of side n
 * (most non-SDP ops: entropies, divergences, fidelities), holding a few dozen n × n complex matrices.
 */
export function dense(n: number, count: number, basis = `${count} dense steps`): CostEstimate {
  const step = eigenWork(n) + 8 * n ** 3;
  return { flops: count * step, bytes: (24 + 2 * Math.min(count, 16)) * 16 * n * n, step, basis: `${basis} on ${n}×${n} matrices` };
}

/** The estimate of one SDP solve of this shape (src/sdp/cost.ts), plus `extra` work around it. */
export function sdp(shape: SdpShape, extra?: CostEstimate): CostEstimate {
  const c = sdpCost(shape);
  return extra ? { ...sequence(c, extra), basis: c.basis } : c;
}

/** Work of several steps done one after the other: flops add, memory is the largest. */
export function sequence(...costs: CostEstimate[]): CostEstimate {
  const worst = costs.reduce((a, b) => (b.flops > a.flops ? b : a), costs[0]);
  return {
    flops: costs.reduce((s, c) => s + c.flops, 0),
    bytes: Math.max(...costs.map((c) => c.bytes)),
    step: Math.max(...costs.map((c) => c.step ?? c.flops)),
    basis: worst.basis,
  };
}

/** An estimate for work that is not dense linear algebra (reading, copying): `flops` operations, `bytes` held. */
export function plain(flops: number, bytes: number, basis: string): CostEstimate {
  return { flops, bytes, basis };
}
