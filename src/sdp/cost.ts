/**
 * What one solve costs, estimated from the problem's shape alone (block sizes and the number of
 * constraints), before anything is built or allocated: the ops layer calls `sdpCost` from a request's
 * sizes to refuse a request with 'too-large' before the work (docs/protocol.md, "Limits and
 * deadlines"), and `solveSdp` checks the same estimate on the problem it is handed against the
 * engine's limits (src/limits.ts), as a safety net for callers that did not (`checkSdpLimits`).
 *
 * The model (per interior-point iteration, m constraints, block k of complex size h_k or real size
 * n_k): the Schur complement is m × m and dense in the worst case — and in the usual one, since the
 * constraints of the project's SDPs share their blocks — so factoring it costs m³/3 and holding it
 * (with its factor) 16·m² bytes; assembling it costs about m·Σ_k 8·h_k² (a few entries per
 * constraint and block) plus 2·m² for the pairs; the per-block steps (Cholesky factors, the Jacobi
 * SVD of the scaling, the step-length eigenvalues) cost about 40·h³ each, four times that in complex
 * arithmetic. A solve is taken as `SDP_TYPICAL_ITERATIONS` iterations (the solver typically needs
 * 8–40; more are stopped by the deadline). Checked against the solver on diamond-distance shapes
 * (m = 1297 and 2402: 0.21 s and 1.1 s per iteration here, 3.5–4 × 10⁹ of these operations per second;
 * 97 MB of buffers at m = 2402, against 92 MB estimated).
 *
 * A fixed principal sub-block (elimination.ts: Watrous's fidelity SDP with ρ given) leaves the Schur
 * complement; the shape says so (`schur.eliminated`) and the groups are those of the rest.
 *
 * Deliberately not here: timing (no estimate is turned into seconds; machines differ), and any change
 * to how the solver works. Cost: O(number of blocks) for sdpCost; shapeOf walks the constraints' terms.
 */
import { overLimits, type CostEstimate } from '../limits.js';
import type { SdpProblem } from './types.js';
import { GLOBAL_ATOM_THRESHOLD, compile } from './compile.js';
import { findFixedBlock } from './elimination.js';

/** Iterations a solve is assumed to take in the estimate. */
export const SDP_TYPICAL_ITERATIONS = 25;

/** The shape of an SDP: its blocks and its number of equality constraints. */
export interface SdpShape {
  /** Matrix blocks (Hermitian or real symmetric) of side `size`; `vector` for nonnegative or free coordinates. */
  blocks: readonly { size: number; hermitian?: boolean; vector?: boolean }[];
  constraints: number;
  /**
   * Optional: how the Schur complement splits (compile.ts groups constraints that share blocks; two
   * groups share no entry): the sizes of the groups and the number of global rows coupling them.
   * Without it the Schur complement is taken as one dense m × m matrix. `eliminated`: constraints that
   * fix a principal sub-block and are solved in closed form (elimination.ts), in none of the groups;
   * they cost O(h³) per solve on their block, within the block work below.
   */
  schur?: { groups: readonly number[]; globals: number; eliminated?: number };
}

/** The estimate of a solve of this shape (see the header for the model). */
export function sdpCost(shape: SdpShape): CostEstimate {
  const m = shape.constraints;
  let assembly = 0;
  let blockWork = 0;
  let blockBytes = 0;
  let vectorSize = 0;
  for (const b of shape.blocks) {
    if (b.vector) {
      vectorSize += b.size;
      continue;
    }
    const w = b.hermitian ? 4 : 1;
    assembly += 8 * b.size * b.size * w;
    blockWork += 40 * b.size ** 3 * w;
    // X, S, W, their steps, factors and workspace: about forty matrices of the block's size.
    blockBytes += 40 * b.size * b.size * 8 * (b.hermitian ? 2 : 1);
  }
  const groups = shape.schur?.groups ?? [m];
  const r = shape.schur?.globals ?? 0;
  let factor = r ** 3 / 3;
  let entries = r * m;
  for (const g of groups) {
    factor += g ** 3 / 3 + g * g * r + g * r * r;
    entries += g * g;
  }
  const perIteration = factor + m * assembly + 2 * entries + blockWork + 8 * m * vectorSize;
  const counts = new Map<string, number>();
  for (const b of shape.blocks) {
    if (b.vector) continue;
    const key = `${b.hermitian ? 'Hermitian' : 'real'} ${b.size}×${b.size}`;
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  const blocks = [...counts].map(([k, c]) => (c === 1 ? `one ${k} block` : `${c} ${k} blocks`)).join(', ');
  return {
    flops: SDP_TYPICAL_ITERATIONS * perIteration,
    step: perIteration,
    bytes: 16 * entries + blockBytes + 64 * m + 160 * vectorSize,
    basis: `an SDP with ${blocks || 'no blocks'} and ${m} constraints${groups.length === 1 && r === 0 ? ` (its Schur complement is ${groups[0]}×${groups[0]}${shape.schur?.eliminated ? `, ${shape.schur.eliminated} fixed coordinates eliminated in closed form` : ''})` : ''}`,
  };
}

/**
 * The shape of a problem as it will be handed to the solver, with its Schur complement's groups found
 * the way compile.ts finds them (constraints joined through the blocks they share; a constraint on more
 * than GLOBAL_ATOM_THRESHOLD blocks is a global row), except that a vector block counts as one block
 * here (compile.ts splits it into coordinates), which can only make the groups larger.
 */
export function shapeOf(problem: SdpProblem, eliminate?: { cone: number; count: number }): SdpShape {
  const nb = problem.cones.length;
  const parent = Array.from({ length: nb }, (_, k) => k);
  const find = (k: number): number => {
    while (parent[k] !== k) k = parent[k] = parent[parent[k]];
    return k;
  };
  const owner: number[] = [];
  let globals = 0;
  for (const c of problem.constraints) {
    const blocks = [...new Set(c.terms.map((t) => t.block))].filter((b) => b >= 0 && b < nb);
    if (blocks.length === 0) continue;
    if (blocks.length > GLOBAL_ATOM_THRESHOLD) {
      globals++;
      continue;
    }
    for (const b of blocks.slice(1)) parent[find(b)] = find(blocks[0]);
    owner.push(blocks[0]);
  }
  const count = new Map<number, number>();
  for (const b of owner) count.set(find(b), (count.get(find(b)) ?? 0) + 1);
  if (eliminate) count.set(find(eliminate.cone), (count.get(find(eliminate.cone)) ?? 0) - eliminate.count);
  return {
    blocks: problem.cones.map((c) => ({ size: c.size, hermitian: c.kind === 'hermitian', vector: c.kind === 'nonnegative' || c.kind === 'free' })),
    constraints: problem.constraints.length,
    schur: { groups: [...count.values()].filter((g) => g > 0), globals, ...(eliminate ? { eliminated: eliminate.count } : {}) },
  };
}

/**
 * Throws RhoError 'too-large' when the estimate of `problem` is above the engine's limits (src/limits.ts).
 * Only when the plain estimate is over them is the problem compiled to look for a fixed sub-block that
 * the solver eliminates (elimination.ts), and the estimate redone without it.
 */
export function checkSdpLimits(problem: SdpProblem): void {
  let refusal = overLimits(sdpCost(shapeOf(problem)));
  if (!refusal) return;
  const cp = compile(problem);
  const fb = findFixedBlock(cp);
  if (fb) refusal = overLimits(sdpCost(shapeOf(problem, { cone: cp.psd[fb.k].cone, count: fb.rows.length })));
  if (refusal) throw refusal;
}
