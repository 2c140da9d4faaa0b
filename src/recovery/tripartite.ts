/**
 * Tripartite bookkeeping for the recovery quantities: a density matrix on any number of subsystems
 * with three disjoint groups A, B, C of subsystem indices is brought to the order A ⊗ B ⊗ C (each
 * group's subsystems in the order listed; subsystems in no group are traced out), and a state in
 * that order can be put back into the original relative order of the subsystems.
 *
 * Deliberately not here: any physics beyond partial traces and permutations; no validation of the
 * density matrix itself (the ops layer does that).
 * Cost: one partial trace and one permutation, O(n²) in the matrix size.
 */
import { CMatrix, marginal, reorderSubsystems, product } from '../linalg/index.js';
import { RhoError } from '../errors.js';

export interface Tripartite {
  /** ρ_ABC in the order A ⊗ B ⊗ C. */
  rho: CMatrix;
  dA: number;
  dB: number;
  dC: number;
  /** The original subsystem indices in the order A, B, C. */
  order: number[];
  /** Their dimensions, in that order. */
  dims: number[];
  /** How many subsystems are in each group. */
  sizes: [number, number, number];
}

/** Checks that a, b, c are disjoint lists of valid subsystem indices (paths "a", "b", "c"). */
export function checkTripartiteGroups(count: number, a: readonly number[], b: readonly number[], c: readonly number[]): void {
  const seen = new Map<number, string>();
  for (const [name, g] of [['a', a], ['b', b], ['c', c]] as const) {
    g.forEach((s, k) => {
      if (!Number.isInteger(s) || s < 0 || s >= count) {
        throw new RhoError('invalid-argument', `Subsystem ${s} does not exist; indices run from 0 to ${count - 1}.`, `${name}[${k}]`);
      }
      const other = seen.get(s);
      if (other !== undefined) {
        throw new RhoError('invalid-argument', `Subsystem ${s} is in both ${other} and ${name}; the groups must be disjoint.`, `${name}[${k}]`);
      }
      seen.set(s, name);
    });
  }
}

/** ρ_ABC from ρ on `dims` and the groups a, b, c. */
export function tripartite(rho: CMatrix, dims: readonly number[], a: readonly number[], b: readonly number[], c: readonly number[]): Tripartite {
  checkTripartiteGroups(dims.length, a, b, c);
  const order = [...a, ...b, ...c];
  const m = order.length === 0 ? { rows: 1, cols: 1, re: new Float64Array([1]), im: new Float64Array(1) } : marginal(rho, dims, order);
  return {
    rho: m,
    dA: product(a.map((s) => dims[s])),
    dB: product(b.map((s) => dims[s])),
    dC: product(c.map((s) => dims[s])),
    order,
    dims: order.map((s) => dims[s]),
    sizes: [a.length, b.length, c.length],
  };
}

/**
 * A state in the A ⊗ B ⊗ C order of `t` put back into the original relative order of the
 * subsystems in a ∪ b ∪ c (ascending indices). Returns the matrix and its dims.
 */
export function toOriginalOrder(sigma: CMatrix, t: Tripartite): { matrix: CMatrix; dims: number[]; systems: number[] } {
  const systems = [...t.order].sort((x, y) => x - y);
  if (systems.length <= 1) return { matrix: sigma, dims: [...t.dims], systems };
  const perm = systems.map((s) => t.order.indexOf(s));
  const matrix = perm.every((p, k) => p === k) ? sigma : reorderSubsystems(sigma, t.dims, perm);
  return { matrix, dims: systems.map((s) => t.dims[t.order.indexOf(s)]), systems };
}
