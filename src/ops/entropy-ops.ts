/**
 * Ops for entropies and divergences: `entropy`, `divergence` (PROTOCOL.md), `conditional-entropy`,
 * `mutual-information`, `conditional-mutual-information` (PROTOCOL.md) and `conditional-renyi-entropy`.
 *
 * Conventions: ρ is a density matrix (validated by the codec); σ in `divergence` is a positive
 * semidefinite operator of any trace (read with readOperatorState), because the trade uses
 * unnormalised second arguments such as 1_A ⊗ ρ_B; every divergence then obeys
 * D(ρ‖cσ) = D(ρ‖σ) − log c. Orders α may be the string "Infinity" where a family allows α = ∞.
 * Support decisions use the optional `supportTolerance` (relative to the largest eigenvalue, default
 * 1e-12), separate from the request's validation `tolerance`; the answers carry what those decisions
 * were made from (ranks, leakage of ρ outside supp σ). Infinite values come with `reason`.
 *
 * Extension point for other families: `extraDivergenceFamilies` (below). The SDP-based
 * `hypothesis-testing` family registers itself there from its own module; until then a request for
 * it is answered with 'unknown-family' listing the families that are known.
 *
 * Deliberately not here: numerics (src/quantities). Cost: that of the quantities.
 */
import type { CMatrix } from '../linalg/cmatrix.js';
import { RhoError } from '../errors.js';
import { entropy } from '../quantities/entropy.js';
import { divergence, DIVERGENCE_FAMILIES, DivergenceResult } from '../quantities/divergences.js';
import {
  conditionalEntropy, mutualInformation, conditionalMutualInformation, conditionalRenyiEntropy,
} from '../quantities/conditional.js';
import { defineOp, OpContext, OpResult } from './registry.js';
import {
  readNumber, readOperatorState, readState, readSupportTolerance, readSystems, schemas, supportToleranceProperty, writeMatrix,
} from './codec.js';
import { dense, sideOf } from './cost.js';

const supportToleranceSchema = supportToleranceProperty(
  'Relative tolerance below which an eigenvalue counts as zero, and the largest weight of ρ outside supp σ still taken as zero (default 1e-12); separate from "tolerance", which validates inputs.',
);

const orderSchema = (description: string) => ({
  description,
  anyOf: [{ type: 'number', minimum: 0 }, { const: 'Infinity' }],
});

function readOrder(value: unknown, path: string): number {
  if (value === 'Infinity') return Infinity;
  return readNumber(value, path, { min: 0 });
}

/**
 * Iterations an iterative method is assumed to take in a cost estimate (the measured relative entropy's
 * ascent, the optimised sandwiched conditional entropy); more are stopped by the deadline.
 */
const TYPICAL_ITERATIONS = 100;

/** The cost of a divergence request: dense steps for the closed forms, an ascent for measured, an SDP for D_H. */
function divergenceCost(req: Record<string, any>) {
  const n = sideOf(req.rho);
  if (req.family === 'measured') {
    const steps = Math.min(req.maxIterations ?? 3000, TYPICAL_ITERATIONS);
    return dense(n, 4 * steps, `${steps} ascent steps of four dense steps`);
  }
  if (req.family === 'hypothesis-testing') {
    // The one-dimensional Neyman–Pearson dual (src/oneshot/neyman-pearson.ts): 8–20 steps, each an
    // eigendecomposition with vectors and the diagonal of V*ρV.
    return dense(n, 40, 'about 20 steps of the one-dimensional Neyman–Pearson dual, two dense steps each');
  }
  return dense(n, 8);
}

// ---------------------------------------------------------------------------------------------------
// Extension point

/** What a registered divergence family receives: the validated pair and the whole request. */
export interface ExtraDivergenceInput {
  rho: CMatrix;
  sigma: CMatrix;
  request: Record<string, any>;
  context: OpContext;
  supportTolerance: number;
}

/**
 * Divergence families defined in other modules (e.g. `hypothesis-testing`, an SDP). A module registers
 * with `extraDivergenceFamilies.set(name, compute)`; `compute` returns `{ value, ...extras }` as plain data
 * (Infinity allowed, with `reason`). Family-specific arguments must be among the `divergence` op's
 * schema properties (`epsilon` is there for hypothesis testing).
 */
export const extraDivergenceFamilies = new Map<string, (input: ExtraDivergenceInput) => OpResult>();

/**
 * The family-specific fields each divergence family uses; a request giving one its family does not use
 * is refused naming the field (an "alpha" on umegaki would otherwise be ignored silently). A module that
 * registers a family in extraDivergenceFamilies sets its fields here too; a family without an entry is
 * not checked.
 */
export const divergenceFamilyFields = new Map<string, readonly string[]>([
  ['umegaki', []],
  ['petz', ['alpha']],
  ['sandwiched', ['alpha']],
  ['alpha-z', ['alpha', 'z']],
  ['geometric', ['alpha']],
  ['max', []],
  ['min', []],
  ['measured', ['alpha', 'maxIterations']],
  ['hypothesis-testing', ['epsilon']],
]);

const FAMILY_SPECIFIC = ['alpha', 'z', 'epsilon', 'maxIterations'] as const;

/** Refuses a family-specific field that `family` does not use. */
function refuseUnusedFields(family: string, req: Record<string, unknown>): void {
  const uses = divergenceFamilyFields.get(family);
  if (!uses) return;
  for (const field of FAMILY_SPECIFIC) {
    if (req[field] !== undefined && !uses.includes(field)) {
      const takes = uses.length ? `it takes ${uses.map((f) => `"${f}"`).join(', ')}` : 'it takes no parameter';
      throw new RhoError('invalid-argument', `The ${family} divergence does not use "${field}"; ${takes}.`, field);
    }
  }
}

function knownFamilies(): string[] {
  return [...DIVERGENCE_FAMILIES, ...extraDivergenceFamilies.keys()];
}

function writeDivergence(d: DivergenceResult): OpResult {
  const out: OpResult = { value: d.value };
  for (const [k, v] of Object.entries(d)) {
    if (k === 'value' || k === 'tolerance' || v === undefined) continue;
    out[k] = k === 'measurement' ? writeMatrix(v as CMatrix) : v;
  }
  out.supportTolerance = d.tolerance;
  return out;
}

// ---------------------------------------------------------------------------------------------------

defineOp({
  name: 'entropy',
  summary: 'Von Neumann entropy −Tr ρ log ρ (alpha = 1, the default) or Rényi entropy log(Tr ρ^α)/(1−α); alpha = 0 gives log rank, "Infinity" the min-entropy −log λ_max.',
  args: {
    type: 'object',
    properties: {
      rho: { ...schemas.state, description: 'A density matrix.' },
      alpha: orderSchema('The Rényi order: a number ≥ 0 or "Infinity"; default 1 (von Neumann).'),
      supportTolerance: supportToleranceSchema,
    },
    required: ['rho'],
  },
  base: true,
  cost: (req) => dense(sideOf(req.rho), 1, 'one eigendecomposition'),
  run(req, { tolerance, base }) {
    const rho = readState(req.rho, 'rho', tolerance).matrix;
    const alpha = req.alpha === undefined ? 1 : readOrder(req.alpha, 'alpha');
    const tol = readSupportTolerance(req);
    const e = entropy(rho, alpha, { base, tol });
    return { value: e.value, alpha: e.alpha, rank: e.rank, supportTolerance: tol };
  },
});

defineOp({
  name: 'divergence',
  summary:
    'Quantum divergence D(ρ‖σ) of a chosen family: umegaki, petz (alpha), sandwiched (alpha), alpha-z (alpha, z), geometric (alpha), max, min, measured (the measured relative entropy, or with alpha the measured Rényi divergence), and families registered by other modules; σ may have any trace.',
  args: {
    type: 'object',
    properties: {
      family: { type: 'string', description: 'The divergence family.' },
      rho: { ...schemas.state, description: 'A density matrix.' },
      sigma: { ...schemas.state, description: 'A positive semidefinite operator of the same size, of any trace.' },
      alpha: orderSchema('The Rényi order, for petz ([0, ∞)), sandwiched ([1/2, ∞] incl. "Infinity"), alpha-z ((0, ∞)), geometric ((0, 2]) and measured ([1/2, ∞), default 1).'),
      z: { type: 'number', exclusiveMinimum: 0, description: 'The z of the alpha-z family, > 0.' },
      epsilon: { type: 'number', minimum: 0, maximum: 1, description: 'The ε of families that need one (hypothesis-testing).' },
      maxIterations: { type: 'integer', minimum: 1, maximum: 100000, description: 'measured: largest number of ascent steps (default 3000).' },
      supportTolerance: supportToleranceSchema,
    },
    required: ['family', 'rho', 'sigma'],
  },
  base: true,
  cost: divergenceCost,
  run(req, context) {
    const family = checkDivergenceFamily(req);
    const rho = readState(req.rho, 'rho', context.tolerance).matrix;
    const sigma = readOperatorState(req.sigma, 'sigma', context.tolerance).matrix;
    if (rho.rows !== sigma.rows) {
      throw new RhoError('dimension-mismatch', `rho is ${rho.rows}x${rho.rows} but sigma is ${sigma.rows}x${sigma.rows}.`, 'sigma');
    }
    return divergenceOfPair(family, rho, sigma, req, context);
  },
});

/**
 * The request's divergence family, known (built in or registered) and given only the fields it uses;
 * for ops that evaluate a divergence of the request's family (divergence, data-processing).
 */
export function checkDivergenceFamily(req: Record<string, any>): string {
  const family = String(req.family);
  if (!extraDivergenceFamilies.has(family) && !(DIVERGENCE_FAMILIES as readonly string[]).includes(family)) {
    throw new RhoError('unknown-family', `Unknown divergence family "${family}"; known families: ${knownFamilies().join(', ')}.`, 'family');
  }
  refuseUnusedFields(family, req);
  return family;
}

/** D(ρ‖σ) of the request's family (its alpha, z, ... fields) as the divergence op answers it. */
export function divergenceOfPair(family: string, rho: CMatrix, sigma: CMatrix, req: Record<string, any>, context: OpContext): OpResult {
  const supportTolerance = readSupportTolerance(req);
  const extra = extraDivergenceFamilies.get(family);
  if (extra) return extra({ rho, sigma, request: req, context, supportTolerance });
  const alpha = req.alpha === undefined ? undefined : readOrder(req.alpha, 'alpha');
  const z = req.z === undefined ? undefined : readNumber(req.z, 'z', { min: 0, minExclusive: true });
  const d = divergence(family, rho, sigma, {
    alpha,
    z,
    base: context.base,
    tol: supportTolerance,
    maxIterations: req.maxIterations,
  });
  return writeDivergence(d);
}

const groupSchema = (what: string) => ({ ...schemas.systems, description: `${what}: subsystem indices (or labels).` });
const multipartite = { ...schemas.state, description: 'A density matrix with "dims" giving its subsystems.' };

function readGroups(req: Record<string, any>, names: string[], tolerance: number, nonEmpty: string[]) {
  const state = readState(req.rho, 'rho', tolerance);
  const groups = names.map((n) =>
    readSystems(req[n], n, state.dims.length, { labels: state.labels, allowEmpty: !nonEmpty.includes(n) }),
  );
  return { state, groups };
}

defineOp({
  name: 'conditional-entropy',
  summary: 'Conditional von Neumann entropy H(A|B) = H(AB) − H(B) for groups a and b of subsystems.',
  args: {
    type: 'object',
    properties: { rho: multipartite, a: groupSchema('A'), b: groupSchema('B (may be empty)'), supportTolerance: supportToleranceSchema },
    required: ['rho', 'a', 'b'],
  },
  base: true,
  cost: (req) => dense(sideOf(req.rho), 4, 'eigendecompositions of the state and its marginals'),
  run(req, { tolerance, base }) {
    const { state, groups: [a, b] } = readGroups(req, ['a', 'b'], tolerance, ['a']);
    const r = conditionalEntropy(state.matrix, state.dims, a, b, { base, tol: readSupportTolerance(req) });
    return { value: r.value, entropies: r.parts, supportTolerance: r.tolerance };
  },
});

defineOp({
  name: 'mutual-information',
  summary: 'Quantum mutual information I(A:B) = H(A) + H(B) − H(AB) for groups a and b of subsystems.',
  args: {
    type: 'object',
    properties: { rho: multipartite, a: groupSchema('A'), b: groupSchema('B'), supportTolerance: supportToleranceSchema },
    required: ['rho', 'a', 'b'],
  },
  base: true,
  cost: (req) => dense(sideOf(req.rho), 4, 'eigendecompositions of the state and its marginals'),
  run(req, { tolerance, base }) {
    const { state, groups: [a, b] } = readGroups(req, ['a', 'b'], tolerance, ['a', 'b']);
    const r = mutualInformation(state.matrix, state.dims, a, b, { base, tol: readSupportTolerance(req) });
    return { value: r.value, entropies: r.parts, supportTolerance: r.tolerance };
  },
});

defineOp({
  name: 'conditional-mutual-information',
  summary: 'Conditional mutual information I(A;C|B) = H(AB) + H(BC) − H(B) − H(ABC) for groups a, b, c of subsystems (b may be empty).',
  args: {
    type: 'object',
    properties: {
      rho: multipartite, a: groupSchema('A'), b: groupSchema('B (may be empty)'), c: groupSchema('C'), supportTolerance: supportToleranceSchema,
    },
    required: ['rho', 'a', 'b', 'c'],
  },
  base: true,
  cost: (req) => dense(sideOf(req.rho), 4, 'eigendecompositions of the state and its marginals'),
  run(req, { tolerance, base }) {
    const { state, groups: [a, b, c] } = readGroups(req, ['a', 'b', 'c'], tolerance, ['a', 'c']);
    const r = conditionalMutualInformation(state.matrix, state.dims, a, b, c, { base, tol: readSupportTolerance(req) });
    return { value: r.value, entropies: r.parts, supportTolerance: r.tolerance };
  },
});

defineOp({
  name: 'conditional-renyi-entropy',
  summary:
    'Conditional Rényi entropy of A given B, Petz or sandwiched: non-optimised −D_α(ρ_AB‖1_A⊗ρ_B) or optimised sup_σ −D_α(ρ_AB‖1_A⊗σ_B) (closed form for Petz; a monotone iteration with a certified gap bound for sandwiched).',
  args: {
    type: 'object',
    properties: {
      rho: multipartite,
      a: groupSchema('A'),
      b: groupSchema('B (may be empty)'),
      family: { enum: ['petz', 'sandwiched'], description: 'petz or sandwiched.' },
      alpha: orderSchema('The Rényi order: petz [0, ∞) (optimised (0, ∞)); sandwiched [1/2, ∞] (optimised [1/2, ∞)).'),
      optimized: { type: 'boolean', description: 'Optimise over σ_B (true) or take σ_B = ρ_B (false, the default).' },
      maxIterations: { type: 'integer', minimum: 1, maximum: 100000, description: 'Sandwiched optimised: largest number of iterations (default 500).' },
      supportTolerance: supportToleranceSchema,
    },
    required: ['rho', 'a', 'b', 'family', 'alpha'],
  },
  base: true,
  cost: (req) => {
    const iterations = req.optimized === true && req.family === 'sandwiched' ? Math.min(req.maxIterations ?? 500, TYPICAL_ITERATIONS) : 1;
    return dense(sideOf(req.rho), 6 * iterations, iterations > 1 ? `${iterations} iterations of six dense steps` : 'six dense steps');
  },
  run(req, { tolerance, base }) {
    if (req.maxIterations !== undefined && !(req.family === 'sandwiched' && req.optimized === true)) {
      throw new RhoError('invalid-argument', '"maxIterations" is used only by the optimised sandwiched entropy (family "sandwiched" with "optimized": true).', 'maxIterations');
    }
    const { state, groups: [a, b] } = readGroups(req, ['a', 'b'], tolerance, ['a']);
    const r = conditionalRenyiEntropy(state.matrix, state.dims, a, b, {
      family: req.family,
      alpha: readOrder(req.alpha, 'alpha'),
      optimized: req.optimized === true,
      base,
      tol: readSupportTolerance(req),
      maxIterations: req.maxIterations,
    });
    const out: OpResult = { value: r.value };
    for (const [k, v] of Object.entries(r)) {
      if (k === 'value' || k === 'tolerance' || v === undefined) continue;
      out[k] = k === 'sigmaB' ? writeMatrix(v as CMatrix) : v;
    }
    out.supportTolerance = r.tolerance;
    return out;
  },
});
