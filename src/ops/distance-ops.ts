/**
 * Ops for fidelity-type quantities, distances and monotone metrics: `fidelity` and `trace-distance`
 * (PROTOCOL.md), `bures-distance`, `purified-distance`, `chernoff-exponent`, `monotone-metric`,
 * `fisher-information` and `expectation-divergence`.
 *
 * Each op reads plain data with the codec (states validated there), calls src/quantities and writes
 * plain data back. Support decisions inside the quantities use the optional argument
 * `supportTolerance` (relative to the largest eigenvalue, default 1e-12), which is separate from the
 * request's validation `tolerance`; answers carry the numbers those decisions were made from (ranks,
 * truncation bounds, overlaps, dropped parts). Metric functions given as expression strings in `t`
 * are read with the project's restricted expression reader (expressions.ts).
 *
 * Deliberately not here: numerics (src/quantities), parsing details (codec.ts, expressions.ts).
 * Cost: that of the quantities, O(n³) each.
 */
import { type CMatrix, trace } from '../linalg/cmatrix.js';
import { RhoError } from '../errors.js';
import { fidelity, generalizedFidelity } from '../quantities/fidelity.js';
import { traceDistance, buresDistance, buresAngle } from '../quantities/distances.js';
import { chernoffExponent } from '../quantities/chernoff.js';
import { METRIC_PRESETS, MetricFunction, metricFromFunction, monotoneMetric } from '../quantities/metrics.js';
import { quantumFisherInformation, symmetricLogarithmicDerivative } from '../quantities/fisher.js';
import {
  ExpectationDivergenceResult, divergenceToBlockExpectation, divergenceToChannelExpectation,
} from '../quantities/expectation.js';
import { defineOp } from './registry.js';
import {
  readChannel, readHermitian, readOperatorState, readState, readSupportTolerance, schemas, supportToleranceProperty,
  writeMatrix, writeNumber,
} from './codec.js';
import { compileRealFunction } from './expressions.js';
import { channelShape, dense, sequence, sideOf } from './cost.js';

const supportToleranceSchema = supportToleranceProperty();

function sameSize(a: { rows: number }, b: { rows: number }, pathB: string): void {
  if (a.rows !== b.rows) {
    throw new RhoError('dimension-mismatch', `The two operators have different sizes (${a.rows} and ${b.rows}).`, pathB);
  }
}

/** Reads the two density matrices `rho` and `sigma` of a pair op and checks they have one size. */
function readStatePair(req: Record<string, unknown>, tolerance: number): { rho: CMatrix; sigma: CMatrix } {
  const rho = readState(req.rho, 'rho', tolerance).matrix;
  const sigma = readState(req.sigma, 'sigma', tolerance).matrix;
  sameSize(rho, sigma, 'sigma');
  return { rho, sigma };
}

const pairArgs = {
  rho: { ...schemas.state, description: 'A density matrix.' },
  sigma: { ...schemas.state, description: 'A density matrix of the same size.' },
};

defineOp({
  name: 'fidelity',
  summary: 'Uhlmann fidelity F(ρ,σ) = ‖√ρ√σ‖₁² (squared), with the root ‖√ρ√σ‖₁, from the singular values of √Λ V*U √M on both supports.',
  args: { type: 'object', properties: { ...pairArgs, supportTolerance: supportToleranceSchema }, required: ['rho', 'sigma'] },
  cost: (req) => dense(sideOf(req.rho), 4),
  run(req, { tolerance }) {
    const { rho, sigma } = readStatePair(req, tolerance);
    const tol = readSupportTolerance(req);
    const f = fidelity(rho, sigma, tol);
    return {
      value: f.value,
      root: f.root,
      rankRho: f.rankRho,
      rankSigma: f.rankSigma,
      // Bound on the change of the root caused by dropping eigenvalues below the support tolerance.
      truncationBound: f.truncationBound,
      supportTolerance: tol,
    };
  },
});

defineOp({
  name: 'trace-distance',
  summary: 'Trace distance ½‖ρ − σ‖₁, from the eigenvalues of the Hermitian difference.',
  args: { type: 'object', properties: pairArgs, required: ['rho', 'sigma'] },
  cost: (req) => dense(sideOf(req.rho), 2),
  run(req, { tolerance }) {
    const { rho, sigma } = readStatePair(req, tolerance);
    return { value: traceDistance(rho, sigma) };
  },
});

defineOp({
  name: 'bures-distance',
  summary: 'Bures distance √(2(1 − √F)) with F the squared fidelity; also the Bures angle arccos √F and the root fidelity.',
  args: { type: 'object', properties: { ...pairArgs, supportTolerance: supportToleranceSchema }, required: ['rho', 'sigma'] },
  cost: (req) => dense(sideOf(req.rho), 6),
  run(req, { tolerance }) {
    const { rho, sigma } = readStatePair(req, tolerance);
    const tol = readSupportTolerance(req);
    const f = fidelity(rho, sigma, tol);
    return { value: buresDistance(rho, sigma, tol), angle: buresAngle(rho, sigma, tol), root: f.root, supportTolerance: tol };
  },
});

defineOp({
  name: 'purified-distance',
  summary:
    'Purified distance √(1 − F̄) with F̄ the generalized (squared) fidelity (‖√ρ√σ‖₁ + √((1−Tr ρ)(1−Tr σ)))²; ρ, σ positive semidefinite with trace at most 1 (subnormalised states allowed).',
  args: {
    type: 'object',
    properties: {
      rho: { ...schemas.state, description: 'A positive semidefinite matrix of trace at most 1.' },
      sigma: { ...schemas.state, description: 'A positive semidefinite matrix of trace at most 1, same size.' },
      supportTolerance: supportToleranceSchema,
    },
    required: ['rho', 'sigma'],
  },
  cost: (req) => dense(sideOf(req.rho), 4),
  run(req, { tolerance }) {
    const rho = readOperatorState(req.rho, 'rho', tolerance).matrix;
    const sigma = readOperatorState(req.sigma, 'sigma', tolerance).matrix;
    sameSize(rho, sigma, 'sigma');
    for (const [name, m] of [['rho', rho], ['sigma', sigma]] as const) {
      const t = trace(m).re;
      if (t > 1 + tolerance) {
        throw new RhoError('invalid-argument', `The trace of ${name} is ${t}; the purified distance needs trace at most 1.`, name, { trace: t });
      }
    }
    const tol = readSupportTolerance(req);
    const g = generalizedFidelity(rho, sigma, tol, tolerance);
    return {
      value: Math.sqrt(Math.max(1 - g.value, 0)),
      generalizedFidelity: g.value,
      traceRho: g.traceRho,
      traceSigma: g.traceSigma,
      supportTolerance: tol,
    };
  },
});

defineOp({
  name: 'chernoff-exponent',
  summary:
    'Quantum Chernoff exponent ξ = −log min_{0≤s≤1} Tr ρ^s σ^{1−s} (powers on the supports), with the optimal s; Infinity with a reason for orthogonal supports.',
  args: { type: 'object', properties: { ...pairArgs, supportTolerance: supportToleranceSchema }, required: ['rho', 'sigma'] },
  cost: (req) => dense(sideOf(req.rho), 4),
  base: true,
  run(req, { tolerance, base }) {
    const { rho, sigma } = readStatePair(req, tolerance);
    const tol = readSupportTolerance(req);
    const c = chernoffExponent(rho, sigma, { base, tol });
    const out: Record<string, unknown> & { value: unknown } = {
      value: writeNumber(c.value),
      s: c.s,
      minimum: c.minimum,
      supportOverlap: c.supportOverlap,
      supportTolerance: tol,
    };
    if (c.reason) out.reason = c.reason;
    return out;
  },
});

const METRIC_NAMES = Object.keys(METRIC_PRESETS);

const metricSchema = {
  type: 'string',
  minLength: 1,
  maxLength: 500,
  description:
    `The monotone metric: ${METRIC_NAMES.map((n) => `"${n}"`).join(', ')}, or an expression in t for an operator monotone f with f(1) = 1 and f(t) = t f(1/t), e.g. "(1+t)/2" (default "sld").`,
};

function readMetric(value: unknown, path: string): MetricFunction {
  if (value === undefined) return METRIC_PRESETS.sld;
  if (typeof value !== 'string') throw new RhoError('invalid-argument', 'The metric must be a name or an expression string in t.', path);
  const key = value.trim().toLowerCase();
  if (Object.hasOwn(METRIC_PRESETS, key)) return METRIC_PRESETS[key];
  const f = compileRealFunction(value, 't', path);
  return metricFromFunction(f, value, path);
}

/** Reads a Hermitian tangent vector at `rho` (same size as `rho`) from the argument `key`. */
function readTangent(req: Record<string, unknown>, key: string, rho: CMatrix, tolerance: number): CMatrix {
  const x = readHermitian(req[key], key, tolerance);
  sameSize(rho, x, key);
  return x;
}

/**
 * The answer of a metric op: the value, the metric's name and the rank of ρ, the op's own fields, the
 * support tolerance, then the reason for an infinite value and the warnings, when there are any.
 */
function metricAnswer(
  r: { value: number; metric: string; rank: number; reason?: string; warnings: string[] },
  fields: Record<string, unknown>,
  tol: number,
): Record<string, unknown> & { value: unknown } {
  const out: Record<string, unknown> & { value: unknown } = {
    value: writeNumber(r.value),
    metric: r.metric,
    rank: r.rank,
    ...fields,
    supportTolerance: tol,
  };
  if (r.reason) out.reason = r.reason;
  if (r.warnings.length) out.warnings = r.warnings;
  return out;
}

defineOp({
  name: 'monotone-metric',
  summary:
    'Monotone metric γ_ρ^f(X, Y) = Σ_ij conj(X_ij) Y_ij / (λ_j f(λ_i/λ_j)) in the eigenbasis of ρ (Petz 1996), for Hermitian tangent vectors X, Y (Y defaults to X); Infinity with a reason when X leaves the domain at a rank-deficient ρ.',
  args: {
    type: 'object',
    properties: {
      rho: { ...schemas.state, description: 'A density matrix (the base point).' },
      x: { ...schemas.matrix, description: 'A Hermitian tangent vector.' },
      y: { ...schemas.matrix, description: 'A second Hermitian tangent vector (default: x).' },
      metric: metricSchema,
      restrictToSupport: { type: 'boolean', description: 'Drop the entries where the mean of eigenvalues vanishes instead of answering Infinity.' },
      supportTolerance: supportToleranceSchema,
    },
    required: ['rho', 'x'],
  },
  cost: (req) => dense(sideOf(req.rho), 3),
  run(req, { tolerance }) {
    const rho = readState(req.rho, 'rho', tolerance).matrix;
    const x = readTangent(req, 'x', rho, tolerance);
    const y = req.y === undefined ? x : readTangent(req, 'y', rho, tolerance);
    const metric = readMetric(req.metric, 'metric');
    const tol = readSupportTolerance(req);
    const g = monotoneMetric(rho, x, y, metric, { tol, restrictToSupport: req.restrictToSupport === true });
    return metricAnswer(g, { dropped: g.dropped }, tol);
  },
});

defineOp({
  name: 'fisher-information',
  summary:
    'Quantum Fisher information γ_ρ^f(∂ρ, ∂ρ) of a one-parameter family at ρ with derivative ∂ρ; for the default SLD metric 2 Σ_{λ_i+λ_j>0} |⟨i|∂ρ|j⟩|²/(λ_i+λ_j) (Braunstein–Caves). Normalised by f(1) = 1: classical Fisher information on commuting families.',
  args: {
    type: 'object',
    properties: {
      rho: { ...schemas.state, description: 'The density matrix ρ(θ) at the point.' },
      derivative: { ...schemas.matrix, description: 'dρ/dθ at the point (Hermitian).' },
      metric: metricSchema,
      sld: { type: 'boolean', description: 'Also return the symmetric logarithmic derivative L (∂ρ = (ρL + Lρ)/2).' },
      supportTolerance: supportToleranceSchema,
    },
    required: ['rho', 'derivative'],
  },
  cost: (req) => dense(sideOf(req.rho), 4),
  run(req, { tolerance }) {
    const rho = readState(req.rho, 'rho', tolerance).matrix;
    const d = readTangent(req, 'derivative', rho, tolerance);
    const metric = readMetric(req.metric, 'metric');
    const tol = readSupportTolerance(req);
    const q = quantumFisherInformation(rho, d, { metric, tol });
    const out = metricAnswer(q, { kernelBlock: q.kernelBlock }, tol);
    if (req.sld === true) out.sld = writeMatrix(symmetricLogarithmicDerivative(rho, d, tol));
    return out;
  },
});

function readPositiveIntegers(value: unknown, path: string): number[] {
  if (!Array.isArray(value) || value.length === 0) {
    throw new RhoError('invalid-argument', 'Expected a non-empty list of positive integers.', path);
  }
  return value.map((v, k) => {
    if (!Number.isInteger(v) || (v as number) < 1) {
      throw new RhoError('invalid-argument', `Entry ${k} must be a positive integer (got ${JSON.stringify(v)}).`, `${path}[${k}]`);
    }
    return v as number;
  });
}

const integerList = { type: 'array', minItems: 1, maxItems: 1024, items: { type: 'integer', minimum: 1 } };

defineOp({
  name: 'expectation-divergence',
  summary:
    'Umegaki relative entropy D(ρ‖E(ρ)) to a conditional expectation E, given as a channel (Kraus or Choi) or as the block-diagonal algebra ⊕_k M_{n_k} ⊗ I_{m_k} ("blocks" n_k, "multiplicities" m_k, default 1: a pinching); plus the entropy gap H(E(ρ)) − H(ρ), equal to it for conditional expectations.',
  args: {
    type: 'object',
    properties: {
      rho: { ...schemas.state, description: 'A density matrix.' },
      channel: { ...schemas.channel, description: 'The conditional expectation as a channel (same input and output dimension).' },
      blocks: { ...integerList, description: 'Block sizes n_k of the algebra ⊕_k M_{n_k} ⊗ I_{m_k}, blocks consecutive, multiplicity factor second.' },
      multiplicities: { ...integerList, description: 'Multiplicities m_k (default all 1).' },
      supportTolerance: supportToleranceSchema,
    },
    required: ['rho'],
  },
  cost: (req) => {
    const n = sideOf(req.rho);
    const { kraus } = channelShape(req.channel);
    return sequence(dense(n, 6), { flops: 16 * kraus * n ** 3, bytes: 16 * kraus * n * n, basis: `applying ${kraus} Kraus operators to a ${n}×${n} state` });
  },
  base: true,
  run(req, { tolerance, base }) {
    const rho = readState(req.rho, 'rho', tolerance).matrix;
    const tol = readSupportTolerance(req);
    if ((req.channel === undefined) === (req.blocks === undefined)) {
      throw new RhoError('invalid-argument', 'Give exactly one of "channel" and "blocks".', req.channel === undefined ? 'blocks' : 'channel');
    }
    if (req.multiplicities !== undefined && req.blocks === undefined) {
      throw new RhoError('invalid-argument', '"multiplicities" goes with "blocks".', 'multiplicities');
    }
    let r: ExpectationDivergenceResult;
    if (req.channel !== undefined) {
      const channel = readChannel(req.channel, 'channel', tolerance);
      const din = channel.kraus[0].cols;
      const dout = channel.kraus[0].rows;
      if (din !== rho.rows || dout !== rho.rows) {
        throw new RhoError('dimension-mismatch', `The channel maps dimension ${din} to ${dout}; it must map ${rho.rows} to ${rho.rows}.`, 'channel');
      }
      r = divergenceToChannelExpectation(rho, channel, { base, tol });
    } else {
      const blocks = readPositiveIntegers(req.blocks, 'blocks');
      const mult = req.multiplicities === undefined ? undefined : readPositiveIntegers(req.multiplicities, 'multiplicities');
      r = divergenceToBlockExpectation(rho, blocks, mult, { base, tol });
    }
    const out: Record<string, unknown> & { value: unknown } = {
      value: writeNumber(r.value),
      entropyGap: r.entropyGap,
      leakage: r.leakage,
      expectation: writeMatrix(r.expectation),
      supportTolerance: tol,
    };
    if (r.idempotenceDefect !== undefined) out.idempotenceDefect = r.idempotenceDefect;
    if (r.reason) out.reason = r.reason;
    if (r.notes) out.notes = r.notes;
    return out;
  },
});
