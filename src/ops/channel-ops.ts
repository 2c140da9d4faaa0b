/**
 * Ops on channels and states: `apply-channel` (PROTOCOL.md), `channel-check`, `channel-convert`,
 * `channel-preset`, `compose-channels`, `complementary-channel` and `state-preset`.
 *
 * Each op reads plain data with the codec, calls the quantum layer (src/quantum) and writes plain data
 * back. Conventions (Choi input factor first, Stinespring environment last, the parametrisation of each
 * preset) are stated in the op summaries and returned as a `convention` field where a reader could guess
 * wrong. Decisions that depend on the tolerance (Kraus rank from a Choi matrix, CP/TP/unital) return the
 * numbers they were made from.
 *
 * Deliberately not here: numerics (src/quantum), parsing details (codec.ts).
 * Cost: dominated by the quantum layer — one eigendecomposition of the Choi matrix (size d_in·d_out) for
 * conversions and checks; apply-channel O(r · d_out d_in R² (d_in + d_out)) for rest dimension R.
 */
import { product } from '../linalg/subsystems.js';
import type { CMatrix } from '../linalg/cmatrix.js';
import { RhoError } from '../errors.js';
import type { Channel } from '../quantum/types.js';
import {
  applyChannel, channelDiagnostics, choiDiagnostics, choiToKrausDetailed, complementaryChannel, composeSequence,
  krausToChoi, krausToStinespring, type ChannelDiagnostics,
} from '../quantum/channels.js';
import {
  amplitudeDamping, conditionalExpectation, dephasing, depolarizing, erasure, generalizedAmplitudeDamping, groupTwirl,
  measurePrepare, partialTraceChannel, pinchingByProjectors, pinchingInBasis, unitaryChannel,
} from '../quantum/presets.js';
import {
  blochState, ghzState, isotropicState, maximallyEntangled, maximallyMixed, stateFromKet, thermalStateWithPartition,
  wernerState, wState,
} from '../quantum/states.js';
import { defineOp } from './registry.js';
import {
  readChannel, readDims, readHermitian, readKet, readMatrix, readSquareMatrix, readState, readSystems, schemas,
  writeChannel, writeMatrix, writeNumber, writeState,
} from './codec.js';
import { channelShape, dense, plain, sequence, sideOf, type CostEstimate } from './cost.js';
import { MAX_CHANNEL_ENTRIES } from '../limits.js';

// ---------------------------------------------------------------------------------------------------
// Helpers

/** A channel given as {"choi": J, ...}: the raw matrix and dims, without conversion (so nothing is refused). */
function readChoiForm(value: Record<string, unknown>, path: string): { J: CMatrix; fromDims: number[]; toDims: number[] } {
  const J = readSquareMatrix(value.choi, `${path}.choi`);
  const n = J.rows;
  let fromDims: number[];
  let toDims: number[];
  if (value.from !== undefined) {
    fromDims = readDims(value.from, `${path}.from`);
    const din = product(fromDims);
    if (n % din !== 0) throw new RhoError('dimension-mismatch', `The Choi matrix side ${n} is not a multiple of the input dimension ${din}.`, `${path}.from`);
    toDims = value.to === undefined ? [n / din] : readDims(value.to, `${path}.to`);
  } else if (value.to !== undefined) {
    toDims = readDims(value.to, `${path}.to`);
    const dout = product(toDims);
    if (n % dout !== 0) throw new RhoError('dimension-mismatch', `The Choi matrix side ${n} is not a multiple of the output dimension ${dout}.`, `${path}.to`);
    fromDims = [n / dout];
  } else {
    throw new RhoError('missing-argument', 'A Choi matrix needs "from" (or "to") to tell the input and output apart.', `${path}.from`);
  }
  if (product(fromDims) * product(toDims) !== n) {
    throw new RhoError('dimension-mismatch', `The Choi matrix is ${n}x${n} but input and output dimensions multiply to ${product(fromDims) * product(toDims)}.`, `${path}.choi`);
  }
  return { J, fromDims, toDims };
}

function hasChoi(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value) && 'choi' in value;
}

/** Prefix paths of errors thrown by the quantum layer about "choi" with the request's field. */
function underPath<T>(prefix: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof RhoError && e.path !== undefined && e.path.startsWith('choi')) {
      throw new RhoError(e.code, e.message, `${prefix}.${e.path}`, e.detail);
    }
    throw e;
  }
}

/**
 * A channel in Kraus form; when it came as a Choi matrix, or `minimal` is asked for, also the eigenvalues
 * of J dropped as zero (the tolerance-dependent Kraus rank decision).
 */
function readKrausWithRank(value: unknown, path: string, tolerance: number, minimal: boolean) {
  if (hasChoi(value)) {
    const { J, fromDims, toDims } = readChoiForm(value, path);
    const res = underPath(path, () => choiToKrausDetailed(J, fromDims, toDims, tolerance));
    return { channel: res.channel, rank: { droppedEigenvalues: res.dropped, threshold: res.threshold } };
  }
  const channel = readChannel(value, path, tolerance);
  if (!minimal) return { channel, rank: undefined };
  const res = choiToKrausDetailed(krausToChoi(channel), channel.fromDims, channel.toDims, tolerance);
  return { channel: res.channel, rank: { droppedEigenvalues: res.dropped, threshold: res.threshold } };
}

const rankNote =
  'Kraus operators come from the eigenvectors of the Choi matrix whose eigenvalues exceed threshold = tolerance · λ_max; the eigenvalues dropped as zero are listed, since the Kraus count depends on this decision.';

function writeDiagnostics(d: ChannelDiagnostics) {
  return {
    completelyPositive: d.completelyPositive,
    tracePreserving: d.tracePreserving,
    unital: d.unital,
    minChoiEigenvalue: writeNumber(d.minChoiEigenvalue),
    choiNorm: writeNumber(d.choiNorm),
    traceDefect: writeNumber(Math.max(d.traceDefectChoi, d.traceDefectKraus ?? 0)),
    traceDefectChoi: writeNumber(d.traceDefectChoi),
    traceDefectKraus: d.traceDefectKraus === null ? null : writeNumber(d.traceDefectKraus),
    unitalDefect: writeNumber(d.unitalDefect),
    tolerance: d.tolerance,
  };
}

/** Refuse request fields that the chosen preset does not take (the schema lists the union of all of them). */
function onlyFields(req: Record<string, any>, allowed: readonly string[], name: string, common: readonly string[]): void {
  const ok = new Set([...allowed, ...common]);
  for (const key of Object.keys(req)) {
    if (!ok.has(key)) {
      const takes = allowed.length ? allowed.join(', ') : 'no parameters';
      throw new RhoError('invalid-argument', `The preset "${name}" does not take "${key}"; it takes: ${takes}.`, key);
    }
  }
}

function need(req: Record<string, any>, key: string, name: string): unknown {
  if (req[key] === undefined) throw new RhoError('missing-argument', `The preset "${name}" needs "${key}".`, key);
  return req[key];
}

function readMatrixList(value: unknown, path: string): CMatrix[] {
  if (!Array.isArray(value) || value.length === 0) throw new RhoError('invalid-argument', 'Expected a non-empty list of matrices.', path);
  return value.map((m, k) => readMatrix(m, `${path}[${k}]`));
}

// The common request fields (handle.ts COMMON_FIELDS) and the preset's name, which every preset accepts.
const COMMON = ['op', 'tolerance', 'base', 'id', 'deadline', 'answerMatrices', 'name'] as const;
const integer = (description: string, minimum = 1) => ({ type: 'integer', minimum, description });
const num = (description: string) => ({ type: 'number', description });
const matrixList = (description: string) => ({ type: 'array', minItems: 1, maxItems: 4096, items: schemas.matrix, description });

/** Cost of conversions and checks that work on the Choi matrix (side d_in·d_out). */
function choiCost(channel: unknown): CostEstimate {
  const { din, dout } = channelShape(channel);
  return dense(din * dout, 2, 'eigendecompositions of the Choi matrix');
}

/** Cost of a preset built from parameters: the user-given matrices' checks, and at most the channel limits. */
function presetCost(req: Record<string, any>): CostEstimate {
  const given = ['povm', 'states', 'projectors', 'unitaries'].flatMap((k) => (Array.isArray(req[k]) ? req[k] : []));
  for (const k of ['unitary', 'basis', 'hamiltonian', 'ket']) if (req[k] !== undefined) given.push(req[k]);
  const side = Math.max(1, ...given.map((m) => sideOf(m)));
  return sequence(dense(side, Math.max(1, given.length), 'checks of the given matrices'), plain(1e8, 2 * 16 * MAX_CHANNEL_ENTRIES, 'building the preset'));
}

/** Cost of composing channels: the products of Kraus operators, reduced through the Choi matrix as they grow. */
function compositionCost(channels: unknown[]): CostEstimate {
  const first = channelShape(channels[0]);
  let count = Math.max(1, first.kraus);
  let flops = 0;
  let bytes = 16 * count * first.din * first.dout;
  let dmid = first.dout;
  for (const c of channels.slice(1)) {
    const s = channelShape(c);
    const products = count * Math.max(1, s.kraus);
    flops += 8 * products * s.dout * dmid * first.din;
    bytes = Math.max(bytes, 16 * products * s.dout * first.din);
    count = Math.min(products, first.din * s.dout);
    flops += dense(first.din * s.dout, 1).flops;
    dmid = s.dout;
  }
  return { flops, bytes, basis: `composing ${channels.length} channels (${count} Kraus operators at the end)` };
}

// ---------------------------------------------------------------------------------------------------
// apply-channel

defineOp({
  name: 'apply-channel',
  summary:
    'The output state (N_on ⊗ id)(ρ) of a channel acting on the listed subsystems of ρ (default: all). With as many output factors as listed subsystems, each output replaces its subsystem in place; otherwise the outputs take the place of the first listed subsystem.',
  args: {
    type: 'object',
    properties: {
      channel: schemas.channel,
      rho: schemas.state,
      on: { ...schemas.systems, description: 'The subsystems the channel acts on, in the order of its input factors (indices or labels); default all.' },
    },
    required: ['channel', 'rho'],
  },
  cost: (req) => {
    const { din, dout, kraus } = channelShape(req.channel);
    const n = sideOf(req.rho);
    const rest = n / Math.max(1, din);
    const r = Math.max(1, kraus);
    return { flops: 8 * r * dout * din * rest * rest * (din + dout), bytes: 16 * (4 * n * n + 4 * (dout * rest) ** 2 + r * dout * din), basis: `applying ${r} Kraus operators to a ${n}×${n} state` };
  },
  run(req, { tolerance }) {
    const channel = readChannel(req.channel, 'channel', tolerance);
    const rho = readState(req.rho, 'rho', tolerance);
    const on = req.on === undefined ? undefined : readSystems(req.on, 'on', rho.dims.length, { labels: rho.labels, allowEmpty: false });
    const out = applyChannel(channel, rho, on);
    return { value: writeMatrix(out.matrix), state: writeState(out) };
  },
});

// ---------------------------------------------------------------------------------------------------
// channel-check

defineOp({
  name: 'channel-check',
  summary:
    'Whether a map is completely positive (smallest Choi eigenvalue), trace preserving (‖Σ K*K − I‖ and ‖Tr_B J − I‖) and unital (‖N(I) − I‖), each with the size of the violation; value: true when CP and TP at the tolerance.',
  args: {
    type: 'object',
    properties: { channel: schemas.channel },
    required: ['channel'],
  },
  cost: (req) => choiCost(req.channel),
  run(req, { tolerance }) {
    let d: ChannelDiagnostics;
    if (hasChoi(req.channel)) {
      const { J, fromDims, toDims } = readChoiForm(req.channel, 'channel');
      d = underPath('channel', () => choiDiagnostics(J, fromDims, toDims, tolerance));
    } else {
      d = channelDiagnostics(readChannel(req.channel, 'channel', tolerance), tolerance);
    }
    return {
      value: d.completelyPositive && d.tracePreserving,
      ...writeDiagnostics(d),
      note: 'Defects are operator norms. CP is decided as λ_min(J) ≥ −tolerance·max(1, ‖J‖), TP and unitality as defect ≤ tolerance: numerical judgements, not proofs.',
    };
  },
});

// ---------------------------------------------------------------------------------------------------
// channel-convert

defineOp({
  name: 'channel-convert',
  summary:
    'A channel in another form: "kraus" (minimal when asked or when given a Choi matrix), "choi" (J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input first) or "stinespring" (V: A → B ⊗ E, environment last, V = Σ_k K_k ⊗ |k⟩).',
  args: {
    type: 'object',
    properties: {
      channel: schemas.channel,
      form: { enum: ['kraus', 'choi', 'stinespring'], description: 'The form wanted.' },
      minimal: { type: 'boolean', description: 'Reduce to the fewest Kraus operators (through the Choi matrix) first; default false.' },
    },
    required: ['channel', 'form'],
  },
  cost: (req) => choiCost(req.channel),
  run(req, { tolerance }) {
    const form = req.form as 'kraus' | 'choi' | 'stinespring';
    if (req.minimal !== undefined && form === 'choi') {
      throw new RhoError('invalid-argument', '"minimal" does not apply to the Choi form (a channel has one Choi matrix).', 'minimal');
    }
    const minimal = req.minimal === true;
    const { channel, rank } = readKrausWithRank(req.channel, 'channel', tolerance, minimal);
    const dims = { from: [...channel.fromDims], to: [...channel.toDims] };
    const rankInfo = rank ? { droppedEigenvalues: rank.droppedEigenvalues, threshold: rank.threshold, note: rankNote } : {};
    if (form === 'choi') {
      return { value: writeMatrix(krausToChoi(channel)), ...dims, convention: 'J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input factor first, unnormalised (Tr J = d_in for a trace-preserving map).' };
    }
    if (form === 'kraus') {
      return { value: channel.kraus.map(writeMatrix), ...dims, count: channel.kraus.length, ...rankInfo };
    }
    const s = krausToStinespring(channel);
    return {
      value: writeMatrix(s.isometry),
      ...dims,
      environmentDim: s.environmentDim,
      convention: 'V: A → B ⊗ E with the environment last: V|ψ⟩ = Σ_k K_k|ψ⟩ ⊗ |k⟩_E; V is an isometry exactly when the channel is trace preserving.',
      ...rankInfo,
    };
  },
});

// ---------------------------------------------------------------------------------------------------
// channel-preset

interface PresetSpec {
  fields: string[];
  convention: string;
  build(req: Record<string, any>, tolerance: number): Channel;
}

const CHANNEL_PRESETS: Record<string, PresetSpec> = {
  depolarizing: {
    fields: ['d', 'p'],
    convention: 'ρ ↦ (1 − p)ρ + p Tr(ρ) I/d, with 0 ≤ p ≤ d²/(d² − 1); Kraus operators are the Weyl operators X^a Z^b.',
    build: (r) => depolarizing(need(r, 'd', 'depolarizing') as number, need(r, 'p', 'depolarizing') as number),
  },
  dephasing: {
    fields: ['d', 'p'],
    convention: 'ρ ↦ (1 − p)ρ + p·diag(ρ) in the computational basis, 0 ≤ p ≤ 1 (a qubit phase flip with probability p/2).',
    build: (r) => dephasing(need(r, 'd', 'dephasing') as number, need(r, 'p', 'dephasing') as number),
  },
  'amplitude-damping': {
    fields: ['gamma'],
    convention: 'Qubit decay |1⟩ → |0⟩ with probability γ: K_0 = |0⟩⟨0| + √(1−γ)|1⟩⟨1|, K_1 = √γ|0⟩⟨1|.',
    build: (r) => amplitudeDamping(need(r, 'gamma', 'amplitude-damping') as number),
  },
  'generalized-amplitude-damping': {
    fields: ['gamma', 'N'],
    convention: 'Amplitude damping with probability γ towards the thermal qubit diag(1 − N, N); N ∈ [0, 1] is the excited population of the environment.',
    build: (r) => generalizedAmplitudeDamping(need(r, 'gamma', 'generalized-amplitude-damping') as number, need(r, 'N', 'generalized-amplitude-damping') as number),
  },
  erasure: {
    fields: ['d', 'p'],
    convention: 'C^d → C^{d+1}: ρ ↦ (1 − p)ρ ⊕ p|d⟩⟨d|, the erasure flag being the last level.',
    build: (r) => erasure(need(r, 'd', 'erasure') as number, need(r, 'p', 'erasure') as number),
  },
  unitary: {
    fields: ['unitary', 'dims'],
    convention: 'ρ ↦ UρU*; U is checked to be unitary within the tolerance.',
    build: (r, tol) => {
      const U = readSquareMatrix(need(r, 'unitary', 'unitary'), 'unitary');
      const dims = r.dims === undefined ? undefined : readDims(r.dims, 'dims', U.rows);
      return unitaryChannel(U, dims, tol);
    },
  },
  'partial-trace': {
    fields: ['dims', 'traceOut'],
    convention: 'The partial trace over the subsystems "traceOut", from the product of "dims" to the kept subsystems in their order.',
    build: (r) => {
      const dims = readDims(need(r, 'dims', 'partial-trace'), 'dims');
      const traceOut = readSystems(need(r, 'traceOut', 'partial-trace'), 'traceOut', dims.length, { allowEmpty: false });
      return partialTraceChannel(dims, traceOut);
    },
  },
  'measure-prepare': {
    fields: ['povm', 'states', 'from', 'to'],
    convention: 'ρ ↦ Σ_x Tr(M_x ρ) σ_x for a POVM {M_x} (checked: positive, summing to I) and states {σ_x}.',
    build: (r, tol) => {
      const povm = readMatrixList(need(r, 'povm', 'measure-prepare'), 'povm');
      const list = need(r, 'states', 'measure-prepare');
      if (!Array.isArray(list) || list.length === 0) throw new RhoError('invalid-argument', 'Expected a non-empty list of states.', 'states');
      const states = list.map((s, k) => readState(s, `states[${k}]`, tol));
      const fromDims = r.from === undefined ? undefined : readDims(r.from, 'from');
      const toDims = r.to === undefined ? states[0].dims : readDims(r.to, 'to');
      return measurePrepare(povm, states.map((s) => s.matrix), tol, fromDims, toDims);
    },
  },
  pinching: {
    fields: ['basis', 'projectors', 'd', 'dims'],
    convention: 'ρ ↦ Σ_k P_k ρ P_k: with "projectors" (orthogonal, summing to I), with "basis" (a unitary whose columns are the basis; P_i = |u_i⟩⟨u_i|), or with "d" alone (the computational basis).',
    build: (r, tol) => {
      const given = ['basis', 'projectors', 'd'].filter((k) => r[k] !== undefined);
      if (given.length !== 1) {
        throw new RhoError('invalid-argument', 'Pinching needs exactly one of "basis", "projectors" or "d".', given[1] ?? 'basis');
      }
      const dims = r.dims === undefined ? undefined : readDims(r.dims, 'dims');
      if (r.projectors !== undefined) return pinchingByProjectors(readMatrixList(r.projectors, 'projectors'), tol, dims);
      if (r.basis !== undefined) return pinchingInBasis(readSquareMatrix(r.basis, 'basis'), tol, dims);
      return pinchingInBasis(r.d as number, tol, dims);
    },
  },
  'conditional-expectation': {
    fields: ['blocks', 'multiplicities', 'basis'],
    convention:
      'The trace-preserving conditional expectation onto ⊕_k (M_{n_k} ⊗ I_{m_k}) (blocks n_k consecutive, multiplicity factor second; optionally conjugated by the unitary "basis"): E(X) = ⊕_k Tr_{m_k}(P_k X P_k) ⊗ I_{m_k}/m_k, Kraus operators m_k^{-1/2}(I_{n_k} ⊗ |a⟩⟨b|).',
    build: (r, tol) => {
      const blocks = readDims(need(r, 'blocks', 'conditional-expectation'), 'blocks');
      const mults = r.multiplicities === undefined ? blocks.map(() => 1) : readDims(r.multiplicities, 'multiplicities');
      const basis = r.basis === undefined ? undefined : readSquareMatrix(r.basis, 'basis');
      return conditionalExpectation(blocks, mults, basis, tol);
    },
  },
  'group-twirl': {
    fields: ['unitaries', 'dims'],
    convention: 'X ↦ (1/|G|) Σ_g U_g X U_g* over the listed unitaries (each checked; closure under products is not checked).',
    build: (r, tol) => {
      const us = readMatrixList(need(r, 'unitaries', 'group-twirl'), 'unitaries');
      const dims = r.dims === undefined ? undefined : readDims(r.dims, 'dims');
      return groupTwirl(us, dims, tol);
    },
  },
};

defineOp({
  name: 'channel-preset',
  summary: `A named channel as Kraus operators: ${Object.keys(CHANNEL_PRESETS).join(', ')}; each takes its own parameters as fields of the request.`,
  args: {
    type: 'object',
    properties: {
      name: { enum: Object.keys(CHANNEL_PRESETS), description: 'The channel.' },
      d: integer('Dimension (depolarizing, dephasing, erasure, pinching in the computational basis).'),
      p: num('Probability parameter (depolarizing, dephasing, erasure).'),
      gamma: num('Damping probability γ ∈ [0, 1] (amplitude damping, generalized amplitude damping).'),
      N: num('Excited population of the environment, N ∈ [0, 1] (generalized amplitude damping).'),
      unitary: { ...schemas.matrix, description: 'A unitary matrix (unitary).' },
      dims: { ...schemas.dims, description: 'Subsystem dimensions (partial-trace: of the input; others: optional split of the space).' },
      traceOut: { ...schemas.systems, description: 'Subsystems traced out (partial-trace).' },
      povm: matrixList('POVM elements (measure-prepare).'),
      states: { type: 'array', minItems: 1, maxItems: 4096, items: schemas.state, description: 'States prepared, one per POVM element (measure-prepare).' },
      from: { ...schemas.dims, description: 'Optional input dims (measure-prepare).' },
      to: { ...schemas.dims, description: 'Optional output dims (measure-prepare).' },
      basis: { ...schemas.matrix, description: 'A unitary whose columns are a basis (pinching, conditional-expectation).' },
      projectors: matrixList('Orthogonal projectors summing to the identity (pinching).'),
      blocks: { ...schemas.dims, description: 'Block sizes n_k (conditional-expectation).' },
      multiplicities: { ...schemas.dims, description: 'Multiplicities m_k, one per block; default all 1 (conditional-expectation).' },
      unitaries: matrixList('The unitaries U_g of a finite group (group-twirl).'),
    },
    required: ['name'],
  },
  cost: presetCost,
  run(req, { tolerance }) {
    const spec = CHANNEL_PRESETS[req.name as string];
    onlyFields(req, spec.fields, req.name, COMMON);
    const channel = spec.build(req, tolerance);
    return { value: writeChannel(channel), name: req.name, convention: spec.convention };
  },
});

// ---------------------------------------------------------------------------------------------------
// compose-channels, complementary-channel

defineOp({
  name: 'compose-channels',
  summary:
    'The composition of channels applied in the order listed (the first acts first); Kraus operators are the products, reduced to a minimal family through the Choi matrix when there are more than d_in·d_out.',
  args: {
    type: 'object',
    properties: {
      channels: { type: 'array', minItems: 1, maxItems: 64, items: schemas.channel, description: 'Channels, first applied first.' },
    },
    required: ['channels'],
  },
  cost: (req) => compositionCost(req.channels),
  run(req, { tolerance }) {
    const channels = (req.channels as unknown[]).map((c, k) => readChannel(c, `channels[${k}]`, tolerance));
    return { value: writeChannel(composeSequence(channels, tolerance)) };
  },
});

defineOp({
  name: 'complementary-channel',
  summary:
    'The complementary channel N^c(ρ) = Tr_B VρV* from the Stinespring isometry V: A → B ⊗ E (environment last); by default from a minimal Kraus family, so the environment is as small as possible.',
  args: {
    type: 'object',
    properties: {
      channel: schemas.channel,
      minimal: { type: 'boolean', description: 'Reduce to the fewest Kraus operators first (smallest environment); default true.' },
    },
    required: ['channel'],
  },
  cost: (req) => choiCost(req.channel),
  run(req, { tolerance }) {
    const { channel, rank } = readKrausWithRank(req.channel, 'channel', tolerance, req.minimal !== false);
    const comp = complementaryChannel(channel);
    return {
      value: writeChannel(comp),
      environmentDim: channel.kraus.length,
      ...(rank ? { droppedEigenvalues: rank.droppedEigenvalues, threshold: rank.threshold, note: rankNote } : {}),
    };
  },
});

// ---------------------------------------------------------------------------------------------------
// state-preset

interface StateSpec {
  fields: string[];
  convention?: string;
  build(req: Record<string, any>, tolerance: number): { state: ReturnType<typeof maximallyMixed>; extra?: Record<string, unknown> };
}

const STATE_PRESETS: Record<string, StateSpec> = {
  'maximally-mixed': {
    fields: ['d', 'dims'],
    convention: 'I/D on the product of "dims" (or one system of dimension "d").',
    build: (r) => {
      if ((r.d === undefined) === (r.dims === undefined)) throw new RhoError('invalid-argument', 'Give exactly one of "d" and "dims".', 'd');
      return { state: maximallyMixed(r.dims === undefined ? (r.d as number) : readDims(r.dims, 'dims')) };
    },
  },
  'maximally-entangled': {
    fields: ['d'],
    convention: '|Φ⟩⟨Φ| with |Φ⟩ = d^{-1/2} Σ_i |ii⟩ on C^d ⊗ C^d.',
    build: (r) => ({ state: maximallyEntangled(need(r, 'd', 'maximally-entangled') as number) }),
  },
  werner: {
    fields: ['d', 'p'],
    convention:
      'Werner state with antisymmetric weight p = Tr(ρ P_anti): ρ = p·P_anti/dim(anti) + (1 − p)·P_sym/dim(sym) (Werner 1989); the swap expectation is Tr(ρF) = 1 − 2p; for d = 2, p is the singlet fidelity.',
    build: (r) => ({ state: wernerState(need(r, 'd', 'werner') as number, need(r, 'p', 'werner') as number) }),
  },
  isotropic: {
    fields: ['d', 'fidelity'],
    convention: 'Isotropic state ρ = F·Φ + (1 − F)(I − Φ)/(d² − 1) with F = ⟨Φ|ρ|Φ⟩ the fidelity with the maximally entangled state (Horodecki & Horodecki 1999).',
    build: (r) => ({ state: isotropicState(need(r, 'd', 'isotropic') as number, need(r, 'fidelity', 'isotropic') as number) }),
  },
  ghz: {
    fields: ['n', 'd'],
    convention: 'd^{-1/2} Σ_k |k⟩^{⊗n} on n systems of dimension d (default 2).',
    build: (r) => ({ state: ghzState(need(r, 'n', 'ghz') as number, r.d === undefined ? 2 : (r.d as number)) }),
  },
  w: {
    fields: ['n'],
    convention: 'n^{-1/2}(|10…0⟩ + |01…0⟩ + … + |0…01⟩) on n qubits.',
    build: (r) => ({ state: wState(need(r, 'n', 'w') as number) }),
  },
  thermal: {
    fields: ['hamiltonian', 'beta', 'dims'],
    convention: 'exp(−βH)/Z, computed from the spectrum of H shifted by its smallest eigenvalue; logPartition is ln Z.',
    build: (r, tol) => {
      const H = readHermitian(need(r, 'hamiltonian', 'thermal'), 'hamiltonian', tol);
      const dims = r.dims === undefined ? undefined : readDims(r.dims, 'dims', H.rows);
      const beta = need(r, 'beta', 'thermal') as number;
      const { state, logPartition } = thermalStateWithPartition(H, beta, dims, tol);
      if (Number.isFinite(logPartition)) return { state, extra: { logPartition } };
      // The state is fine (computed from shifted exponents); ln Z = −β λ_min + ln Σ_i e^{−β(λ_i − λ_min)} is not representable.
      return {
        state,
        extra: {
          logPartition,
          reason: `ln Z is finite but beyond the largest double: −β·λ_min overflows for β = ${beta}; the state itself is exact (computed from shifted exponents).`,
        },
      };
    },
  },
  bloch: {
    fields: ['bloch'],
    convention: 'The qubit state (I + xX + yY + zZ)/2 for the Bloch vector [x, y, z] of length at most 1.',
    build: (r, tol) => ({ state: blochState(need(r, 'bloch', 'bloch') as number[], tol) }),
  },
  ket: {
    fields: ['ket', 'dims'],
    convention: '|ψ⟩⟨ψ| for a ket of unit norm (not normalised for you).',
    build: (r, tol) => {
      const v = readKet(need(r, 'ket', 'ket'), 'ket');
      const dims = r.dims === undefined ? undefined : readDims(r.dims, 'dims', v.rows);
      return { state: stateFromKet(v, dims, tol) };
    },
  },
};

defineOp({
  name: 'state-preset',
  summary: `A named state: ${Object.keys(STATE_PRESETS).join(', ')}; value is its density matrix, "state" the matrix with dims.`,
  args: {
    type: 'object',
    properties: {
      name: { enum: Object.keys(STATE_PRESETS), description: 'The state family.' },
      d: integer('Local dimension.'),
      dims: { ...schemas.dims, description: 'Subsystem dimensions (maximally-mixed, thermal, ket).' },
      n: integer('Number of parties (ghz, w).'),
      p: num('Antisymmetric weight p ∈ [0, 1] (werner).'),
      fidelity: num('Fidelity with the maximally entangled state, in [0, 1] (isotropic).'),
      hamiltonian: { ...schemas.matrix, description: 'A Hermitian matrix H (thermal).' },
      beta: num('Inverse temperature β (thermal).'),
      bloch: { type: 'array', minItems: 3, maxItems: 3, items: { type: 'number' }, description: 'Bloch vector [x, y, z] (bloch).' },
      ket: schemas.ket,
    },
    required: ['name'],
  },
  cost: presetCost,
  run(req, { tolerance }) {
    const spec = STATE_PRESETS[req.name as string];
    onlyFields(req, spec.fields, req.name, COMMON);
    const { state, extra } = spec.build(req, tolerance);
    return { value: writeMatrix(state.matrix), state: writeState(state), ...(spec.convention ? { convention: spec.convention } : {}), ...(extra ?? {}) };
  },
});
