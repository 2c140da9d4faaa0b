/**
 * Ops for recoverability: `petz-recovery` and `fidelity-of-recovery` of tripartite states (names and
 * fields fixed by PROTOCOL.md: `rho` with `dims`, and `a`, `b`, `c` arrays of subsystem indices or
 * labels); `petz-map` (the Petz, rotated and averaged rotated maps of any σ and channel, as channels)
 * and `data-processing` (both sides of D(ρ‖σ) ≥ D(N(ρ)‖N(σ)) for any divergence family, Petz
 * recovery, the Junge et al. bound and a verdict).
 *
 * The state is validated by the codec; subsystems in none of the groups are traced out. `recovered`
 * is returned in the original relative order of the subsystems in a ∪ b ∪ c (its `dims` and
 * `systems` say which), not in the A, B, C order. Support decisions (pseudo-inverses of ρ_B, ρ_BC)
 * use `supportTolerance` (relative to the largest eigenvalue, default 1e-12), reported with the
 * ranks they produced.
 *
 * Deliberately not here: numerics (src/recovery).
 * Cost: that of src/recovery (Petz: O(d³) eigendecompositions; fidelity of recovery: an SDP).
 */
import { defineOp, type OpResult } from './registry.js';
import {
  readChannel, readNumber, readOperatorState, readState, readSupportTolerance, readSystems, schemas, supportToleranceProperty, writeCertificate,
  writeMatrix, writeNumber, writeState, writeChannel,
} from './codec.js';
import { channelShape, dense, groupDimension, plain, sdp, sequence, sideOf } from './cost.js';
import { petzRecovery } from '../recovery/petz.js';
import { fidelityOfRecovery } from '../recovery/fidelity-of-recovery.js';
import { toOriginalOrder, checkTripartiteGroups, tripartite } from '../recovery/tripartite.js';
import { markovStructure } from '../recovery/markov-structure.js';
import { reorderSubsystems } from '../linalg/subsystems.js';
import { commutingSquare } from '../recovery/commuting-square.js';
import { conditionalMutualInformation } from '../quantities/conditional.js';
import type { Channel, State } from '../quantum/types.js';
import { averagedPetzMap, rotatedPetzMap, DEFAULT_QUADRATURE_TOLERANCE } from '../recovery/petz-map.js';
import { dataProcessing } from '../recovery/data-processing.js';
import { channelDiagnostics, inputDimension, krausToChoi } from '../quantum/channels.js';
import { alphaZRegion } from '../quantities/alpha-z-region.js';
import { RhoError } from '../errors.js';
import { getOp } from './registry.js';
import { checkDivergenceFamily, divergenceOfPair } from './entropy-ops.js';

const groupArgs = {
  rho: { ...schemas.state, description: 'A density matrix on several subsystems ("dims").' },
  a: { ...schemas.systems, description: 'Subsystems of A (indices from 0, or labels).' },
  b: { ...schemas.systems, description: 'Subsystems of B, the conditioning system the map acts on.' },
  c: { ...schemas.systems, description: 'Subsystems of C, the system to be recovered.' },
  supportTolerance: supportToleranceProperty(),
};

export interface GroupedState {
  state: State;
  a: number[];
  b: number[];
  c: number[];
  supportTolerance: number;
}

/** Reads rho, a, b, c (and supportTolerance) of a recovery request. */
export function readGroupedState(req: Record<string, any>, tolerance: number): GroupedState {
  const state = readState(req.rho, 'rho', tolerance);
  const n = state.dims.length;
  const opts = { labels: state.labels };
  const a = readSystems(req.a, 'a', n, opts);
  const b = readSystems(req.b, 'b', n, opts);
  const c = readSystems(req.c, 'c', n, opts);
  checkTripartiteGroups(n, a, b, c);
  return { state, a, b, c, supportTolerance: readSupportTolerance(req) };
}

defineOp({
  name: 'petz-recovery',
  summary:
    'Fidelity F(ρ_ABC, (id_A ⊗ R)(ρ_AB)) (squared, with the root) of the state recovered by the Petz map R_{B→BC}(X) = ρ_BC^{1/2}(ρ_B^{−1/2} X ρ_B^{−1/2} ⊗ 1_C)ρ_BC^{1/2}, or by the rotated map R^t with "t"; plus the recovered state and the map.',
  args: {
    type: 'object',
    properties: {
      ...groupArgs,
      t: { type: 'number', description: 'Rotation parameter of the rotated Petz map R^t (default 0: the Petz map itself).' },
    },
    required: ['rho', 'a', 'b', 'c'],
  },
  cost: (req) => dense(sideOf(req.rho), 8),
  run(req, { tolerance }): OpResult {
    const g = readGroupedState(req, tolerance);
    const t = req.t === undefined ? 0 : readNumber(req.t, 't');
    const r = petzRecovery(g.state.matrix, g.state.dims, g.a, g.b, g.c, { t, tol: g.supportTolerance });
    const back = toOriginalOrder(r.recovered, r.parts);
    const recovered: State = { matrix: back.matrix, dims: back.dims };
    if (g.state.labels) recovered.labels = back.systems.map((s) => g.state.labels![s]);
    return {
      value: r.value,
      root: r.root,
      recovered: { ...writeState(recovered), systems: back.systems },
      map: writeChannel(r.map.channel),
      t,
      diagnostics: r.diagnostics,
    };
  },
});

defineOp({
  name: 'fidelity-of-recovery',
  summary:
    'Fidelity of recovery F(A;C|B) = max over channels R: B → BC of F(ρ_ABC, (id_A ⊗ R)(ρ_AB)) (squared, with the root), by an SDP over the Choi matrix of R; plus the optimal channel, the fidelity it achieves (closed form) and the certificate (primal: the channel\'s Choi matrix; dual: Y on supp ρ_ABC and Z on B; value and bracket clipped to [0, 1], the excess in certificate.clipped).',
  args: { type: 'object', properties: { ...groupArgs }, required: ['rho', 'a', 'b', 'c'] },
  cost: (req) => {
    const [dA, dB, dC] = [req.a, req.b, req.c].map((g) => groupDimension(req.rho, g));
    const n = dA * dB * dC;
    // The r² ≤ n² constraints fixing the ρ_ABC block are eliminated in closed form (src/sdp/elimination.ts): the
    // Schur complement is the n² σ-coupling rows plus d_B² channel rows.
    return sdp({
      blocks: [{ size: 2 * n, hermitian: true }, { size: dB * dB * dC, hermitian: true }],
      constraints: 2 * n * n + dB * dB,
      schur: { groups: [n * n + dB * dB], globals: 0, eliminated: n * n },
    }, dense(sideOf(req.rho), 6));
  },
  run(req, { tolerance }): OpResult {
    const g = readGroupedState(req, tolerance);
    const f = fidelityOfRecovery(g.state.matrix, g.state.dims, g.a, g.b, g.c, { tol: g.supportTolerance });
    const out: OpResult = {
      value: f.value,
      root: f.root,
      channel: { choi: writeMatrix(f.choi), from: f.channel.fromDims, to: f.channel.toDims },
      // F(ρ_ABC, (id_A ⊗ R)(ρ_AB)) for the returned channel, by the closed form: a checkable lower bound.
      achieved: f.achieved,
      // Objectives of the certificate are those of the root fidelity √F.
      certificate: writeCertificate(f.certificate),
      diagnostics: f.diagnostics,
    };
    if (f.warning) out.warning = f.warning;
    return out;
  },
});

// ---------------------------------------------------------------------------------------------------
// Petz maps of any σ and channel, and data processing

/** Both channel forms of a map, as the protocol's channel values (Kraus and Choi). */
function writeBothForms(c: Channel, choi = krausToChoi(c)) {
  return { kraus: writeChannel(c), choi: { choi: writeMatrix(choi), from: [...c.fromDims], to: [...c.toDims] } };
}

/** σ and the channel of a request, of matching dimensions, with the channel's TP check. */
function readPair(req: Record<string, any>, tolerance: number) {
  const sigma = readOperatorState(req.sigma, 'sigma', tolerance).matrix;
  const channel = readChannel(req.channel, 'channel', tolerance);
  if (inputDimension(channel) !== sigma.rows) {
    throw new RhoError('dimension-mismatch', `sigma is ${sigma.rows}x${sigma.rows} but the channel takes inputs of dimension ${inputDimension(channel)}.`, 'sigma');
  }
  const check = channelDiagnostics(channel, tolerance);
  return { sigma, channel, check };
}

const completionNote =
  'Outside supp N(σ) the map is completed by X ↦ Tr(QX) σ/Tr σ (Q the projector onto ker N(σ)), so it is trace preserving; it acts as the Petz map on every operator supported on supp N(σ).';

/** The cost of a Petz-map request: eigendecompositions of d_in and d_out, products, and for the averaged map the Choi matrix. */
function petzCost(req: Record<string, any>) {
  const { din, dout, kraus } = channelShape(req.channel);
  const r = Math.max(1, kraus);
  const products = plain(16 * r * din * dout * (din + dout), 16 * (r + 4) * din * dout, `${r} Kraus products of size ${din}×${dout}`);
  return sequence(dense(Math.max(din, dout), 6), products, req.averaged ? dense(din * dout, 3, 'the averaged map\'s Choi matrix and its eigendecomposition') : plain(0, 0, ''));
}

defineOp({
  name: 'petz-map',
  summary:
    'The Petz recovery map R_{σ,N}(X) = σ^{1/2} N*(N(σ)^{−1/2} X N(σ)^{−1/2}) σ^{1/2} of a positive σ and a channel N, the rotated map R^t ("t"), or the averaged rotated map ∫ β₀(t) R^t dt with β₀(t) = (π/2)(cosh πt + 1)⁻¹ ("averaged", by a trapezoidal quadrature with its error bound); value: the map in Kraus form, also its Choi form, both channels other ops accept.',
  args: {
    type: 'object',
    properties: {
      sigma: { ...schemas.state, description: 'A positive semidefinite operator on the channel\'s input (a state, or any trace).' },
      channel: { ...schemas.channel, description: 'The channel N (completely positive; trace preserving for R(N(σ)) = σ).' },
      t: { type: 'number', description: 'Rotation parameter of R^t (default 0: the Petz map).' },
      averaged: { type: 'boolean', description: 'The averaged rotated map R̄ = ∫ β₀(t) R^t dt (Junge, Renner, Sutter, Wilde & Winter 2018); excludes "t".' },
      quadratureTolerance: { type: 'number', exclusiveMinimum: 0, maximum: 0.1, description: `Target of the quadrature's error bound on each weight of the averaged map (default ${DEFAULT_QUADRATURE_TOLERANCE}).` },
      supportTolerance: supportToleranceProperty(),
    },
    required: ['sigma', 'channel'],
  },
  cost: petzCost,
  run(req, { tolerance }): OpResult {
    const { sigma, channel, check } = readPair(req, tolerance);
    const tol = readSupportTolerance(req);
    if (req.averaged === true && req.t !== undefined) throw new RhoError('invalid-argument', 'Give either "t" (one rotated map) or "averaged": true, not both.', 't');
    if (req.averaged !== true && req.quadratureTolerance !== undefined) throw new RhoError('invalid-argument', '"quadratureTolerance" is used only with "averaged": true.', 'quadratureTolerance');
    const notes = [completionNote];
    if (!check.tracePreserving) {
      notes.push(`N is not trace preserving at the tolerance (defect ${Math.max(check.traceDefectKraus ?? 0, check.traceDefectChoi).toExponential(2)}): the map is still a channel, but R(N(σ)) = σ need not hold.`);
    }
    if (req.averaged === true) {
      const a = averagedPetzMap(sigma, channel, { tol, quadratureTolerance: req.quadratureTolerance });
      const forms = writeBothForms(a.channel, a.choi);
      return { value: forms.kraus, choi: forms.choi, kind: 'averaged', quadrature: a.quadrature, diagnostics: a.diagnostics, channelTracePreserving: check.tracePreserving, notes };
    }
    const t = req.t === undefined ? 0 : readNumber(req.t, 't');
    const m = rotatedPetzMap(sigma, channel, t, { tol });
    const forms = writeBothForms(m.channel);
    return { value: forms.kraus, choi: forms.choi, kind: t === 0 ? 'petz' : 'rotated', t, diagnostics: m.diagnostics, channelTracePreserving: check.tracePreserving, notes };
  },
});

const divergenceProperties = (getOp('divergence')?.args.properties ?? {}) as Record<string, any>;

defineOp({
  name: 'data-processing',
  summary:
    'Data processing D(ρ‖σ) ≥ D(N(ρ)‖N(σ)) for a channel N and a divergence family (the divergence op\'s families and fields): both sides, the gap, the Petz-recovered state R_{σ,N}(N(ρ)) with its trace distance and fidelity to ρ, for umegaki the bound gap ≥ −log F(ρ, R̄(N(ρ))) of the averaged rotated map (Junge et al. 2018), for alpha-z whether (α, z) is in the known data-processing region, and a verdict (saturated within tolerance or not) with its evidence.',
  args: {
    type: 'object',
    properties: {
      family: divergenceProperties.family ?? { type: 'string' },
      rho: { ...schemas.state, description: 'A density matrix on the channel\'s input.' },
      sigma: { ...schemas.state, description: 'A positive semidefinite operator on the channel\'s input, of any trace.' },
      channel: { ...schemas.channel, description: 'A channel N (completely positive and trace preserving).' },
      alpha: divergenceProperties.alpha,
      z: divergenceProperties.z,
      epsilon: divergenceProperties.epsilon,
      maxIterations: divergenceProperties.maxIterations,
      gapTolerance: { type: 'number', exclusiveMinimum: 0, maximum: 1, description: 'Saturation threshold on the gap, relative to max(1, |D(ρ‖σ)|) (default 1e-8).' },
      recoveryTolerance: { type: 'number', exclusiveMinimum: 0, maximum: 1, description: 'Largest trace distance ½‖ρ − R(N(ρ))‖₁ counted as recovery (default 1e-6).' },
      supportTolerance: supportToleranceProperty(),
    },
    required: ['family', 'rho', 'sigma', 'channel'],
  },
  base: true,
  cost: (req) => {
    const n = sideOf(req.rho);
    const { dout } = channelShape(req.channel);
    const perDivergence = req.family === 'measured' ? 4 * 100 : req.family === 'hypothesis-testing' ? 40 : 8;
    return sequence(dense(Math.max(n, dout), 2 * perDivergence + 12, 'two divergences, two fidelities, the Petz map'), petzCost({ ...req, averaged: req.family === 'umegaki' }));
  },
  run(req, context): OpResult {
    const family = checkDivergenceFamily(req);
    const rho = readState(req.rho, 'rho', context.tolerance).matrix;
    const { sigma, channel, check } = readPair(req, context.tolerance);
    if (rho.rows !== sigma.rows) throw new RhoError('dimension-mismatch', `rho is ${rho.rows}x${rho.rows} but sigma is ${sigma.rows}x${sigma.rows}.`, 'sigma');
    if (!check.tracePreserving) {
      throw new RhoError('not-trace-preserving', `Data processing is about channels: N is not trace preserving (defect ${Math.max(check.traceDefectKraus ?? 0, check.traceDefectChoi).toExponential(2)} > ${context.tolerance}).`, 'channel');
    }
    const gapTolerance = req.gapTolerance === undefined ? undefined : readNumber(req.gapTolerance, 'gapTolerance');
    const recoveryTolerance = req.recoveryTolerance === undefined ? undefined : readNumber(req.recoveryTolerance, 'recoveryTolerance');
    const r = dataProcessing(rho, sigma, channel, (x, y) => divergenceOfPair(family, x, y, req, context) as any, {
      tol: readSupportTolerance(req),
      gapTolerance,
      recoveryTolerance,
      universalBound: family === 'umegaki',
      logBase: Math.log(context.base),
    });
    const out: OpResult = {
      value: r.gap === null ? null : writeNumber(r.gap),
      family,
      input: r.input,
      output: r.output,
      images: { rho: writeMatrix(r.images.rho), sigma: writeMatrix(r.images.sigma) },
      petz: {
        recovered: writeMatrix(r.petz.recovered),
        traceDistance: r.petz.traceDistance,
        fidelity: r.petz.fidelity,
        root: r.petz.root,
        map: writeChannel(r.petz.map),
        diagnostics: r.petz.diagnostics,
      },
      verdict: r.verdict,
    };
    if (r.gapReason) out.reason = r.gapReason;
    if (r.universal) {
      out.universal = {
        bound: writeNumber(r.universal.bound),
        holds: r.universal.holds,
        slack: r.universal.slack,
        fidelity: r.universal.fidelity,
        root: r.universal.root,
        recovered: writeMatrix(r.universal.recovered),
        recoveredTraceNormBound: r.universal.recoveredTraceNormBound,
        quadrature: r.universal.quadrature,
        statement: 'gap ≥ −log F(ρ, R̄_{σ,N}(N(ρ))) (Junge, Renner, Sutter, Wilde & Winter 2018, Thm 2.1), F squared, R̄ the averaged rotated Petz map',
      };
    }
    if (family === 'alpha-z') {
      const alpha = readNumber(req.alpha, 'alpha');
      const z = readNumber(req.z, 'z');
      const region = alphaZRegion(alpha, z);
      out.region = { ...region, source: 'H. Zhang, Adv. Math. 365, 107053 (2020), Thm 1.2 (recalled)' };
      if (!region.inside && r.verdict.status !== 'violated') {
        (out.verdict as Record<string, unknown>).note = 'Outside the known region data processing fails for some triple, not necessarily for this one.';
      }
    }
    return out;
  },
});

// ---------------------------------------------------------------------------------------------------
// Markov structure

defineOp({
  name: 'markov-structure',
  summary:
    'The structure of a quantum Markov chain A − B − C (Hayden, Jozsa, Petz & Winter 2004): H_B ≅ ⊕_k H_{b_k^L} ⊗ H_{b_k^R} with ρ_ABC = ⊕_k q_k ρ_{A b_k^L} ⊗ ρ_{b_k^R C}, found by block-diagonalizing the *-algebra generated on supp ρ_B by ρ_B^{−1/2} Tr_A[(Y ⊗ 1)ρ_AB] ρ_B^{−1/2}; value: the trace distance from ρ to the state rebuilt from the decomposition (≈ 0 for a Markov chain; otherwise it and the same construction from the C side bound the distance to the Markov chains from above, distanceUpperBound); plus the weights, factor dimensions and states, and the unitary on B.',
  args: {
    type: 'object',
    properties: {
      ...groupArgs,
      algebraTolerance: { type: 'number', exclusiveMinimum: 0, maximum: 0.01, description: 'Relative threshold of the null spaces (commutant, centre) and of eigenvalue clusters (√ of it); default 1e-9.' },
      markovTolerance: { type: 'number', exclusiveMinimum: 0, maximum: 1, description: 'Largest reconstruction error (trace distance) counted as a Markov chain; default 1e-8.' },
      seed: { type: 'integer', minimum: 0, maximum: Number.MAX_SAFE_INTEGER, description: 'Seed of the random elements of the algebras (default 1); the answer is reproducible from it.' },
    },
    required: ['rho', 'a', 'b', 'c'],
  },
  base: true,
  cost: (req) => {
    const [dA, dB] = [req.a, req.b].map((g) => groupDimension(req.rho, g));
    const s = dB * dB;
    return sequence(
      plain(8 * (dA * dA + 6) * s * s * s, 16 * (dA * dA + 8) * s * s, `${dA * dA + 3} Gram products of side ${s}`),
      dense(s, 2, 'the null spaces of side d_B²'),
      dense(sideOf(req.rho), 8),
    );
  },
  run(req, { tolerance, base }): OpResult {
    const g = readGroupedState(req, tolerance);
    const parts = tripartite(g.state.matrix, g.state.dims, g.a, g.b, g.c);
    const algebraTolerance = req.algebraTolerance === undefined ? undefined : readNumber(req.algebraTolerance, 'algebraTolerance');
    const markovTolerance = req.markovTolerance === undefined ? 1e-8 : readNumber(req.markovTolerance, 'markovTolerance');
    const s = markovStructure(parts.rho, parts.dA, parts.dB, parts.dC, { algebraTolerance, tol: g.supportTolerance, seed: req.seed });
    const cmi = conditionalMutualInformation(g.state.matrix, g.state.dims, g.a, g.b, g.c, { base, tol: g.supportTolerance });
    const markov = s.reconstructionError <= markovTolerance;
    // Not Markov: the algebra seen from C (the same construction on C ⊗ B ⊗ A) gives another state of the
    // Markov form; the nearer of the two is the upper bound reported.
    let fromC: number | undefined;
    if (!markov) {
      const cba = reorderSubsystems(parts.rho, [parts.dA, parts.dB, parts.dC], [2, 1, 0]);
      fromC = markovStructure(cba, parts.dC, parts.dB, parts.dA, { algebraTolerance, tol: g.supportTolerance, seed: req.seed }).reconstructionError;
    }
    const upperBound = Math.min(s.reconstructionError, fromC ?? Infinity);
    return {
      value: s.reconstructionError,
      markov,
      ...(markov ? {} : { distanceUpperBound: upperBound, reconstructionErrorFromC: fromC }),
      statement: markov
        ? `A Markov chain within tolerance: the decomposition rebuilds ρ to trace distance ${s.reconstructionError.toExponential(2)} ≤ ${markovTolerance.toExponential(1)}.`
        : `Not a Markov chain at the tolerance: the decomposition rebuilds ρ only to trace distance ${s.reconstructionError.toExponential(3)} (${fromC!.toExponential(3)} from the algebra seen from C); the nearer, ${upperBound.toExponential(3)}, is an upper bound on the distance to the Markov chains A − B − C (distanceUpperBound).`,
      caveat: 'Numerical evidence, not a proof: the decomposition rests on rank decisions at the stated tolerances.',
      conditionalMutualInformation: cmi.value,
      blocks: s.blocks.map((b) => ({
        weight: b.weight,
        left: b.left,
        right: b.right,
        stateLeft: { matrix: writeMatrix(b.stateLeft), dims: [parts.dA, b.left] },
        stateRight: { matrix: writeMatrix(b.stateRight), dims: [b.right, parts.dC] },
      })),
      unitary: writeMatrix(s.unitary),
      unitaryDefect: s.unitaryDefect,
      reconstructed: { matrix: writeMatrix(s.reconstructed), dims: [parts.dA, parts.dB, parts.dC], order: 'A, B, C' },
      diagnostics: s.diagnostics,
    };
  },
});

// ---------------------------------------------------------------------------------------------------
// Commuting squares of conditional expectations

defineOp({
  name: 'commuting-square',
  summary:
    'Two trace-preserving conditional expectations E₁, E₂ on M_d (as channels): whether they commute (a commuting square), the conditional expectation E₁₂ onto the intersection (as a channel), the Friedrichs cosine c = ‖E₁E₂ − E₁₂‖ with the measured ‖(E₁E₂)^k − E₁₂‖ beside c^{2k−1}, and for given states D(ρ‖E₁ρ), D(ρ‖E₂ρ), D(ρ‖E₁₂ρ) with the quasi-factorization ratio; value: whether they commute.',
  args: {
    type: 'object',
    properties: {
      first: { ...schemas.channel, description: 'The conditional expectation E₁ (a channel on M_d, e.g. from channel-preset conditional-expectation or pinching).' },
      second: { ...schemas.channel, description: 'The conditional expectation E₂ on the same M_d.' },
      states: { type: 'array', maxItems: 64, items: schemas.state, description: 'States ρ for D(ρ‖E(ρ)) and the quasi-factorization ratio (optional).' },
      steps: { type: 'integer', minimum: 1, maximum: 50, description: 'How many powers (E₁E₂)^k to measure (default 6).' },
      commutingTolerance: { type: 'number', exclusiveMinimum: 0, maximum: 0.1, description: 'Largest ‖E₁E₂ − E₂E₁‖ (superoperator norm) counted as commuting; also the rank decision of the intersection (√ of it); default 1e-9.' },
    },
    required: ['first', 'second'],
  },
  base: true,
  cost: (req) => {
    const { din } = channelShape(req.first);
    const n = din * din;
    const steps = req.steps ?? 6;
    const states = Array.isArray(req.states) ? req.states.length : 0;
    return sequence(
      plain(8 * (2 * steps + 12) * n * n * n, 16 * 12 * n * n, `${2 * steps + 12} superoperator products of side ${n}`),
      dense(n, 2 + 2 * steps, 'the intersection and the norms of side d²'),
      dense(Math.max(1, din), 6 * states, 'three divergences per state'),
    );
  },
  run(req, { tolerance, base }): OpResult {
    const first = readChannel(req.first, 'first', tolerance);
    const second = readChannel(req.second, 'second', tolerance);
    const states = Array.isArray(req.states) ? req.states.map((s: unknown, k: number) => readState(s, `states[${k}]`, tolerance).matrix) : [];
    states.forEach((s, k) => {
      if (s.rows !== inputDimension(first)) throw new RhoError('dimension-mismatch', `states[${k}] is ${s.rows}x${s.rows} but the expectations act on dimension ${inputDimension(first)}.`, `states[${k}]`);
    });
    const commutingTolerance = req.commutingTolerance === undefined ? undefined : readNumber(req.commutingTolerance, 'commutingTolerance');
    const r = commutingSquare(first, second, states, { steps: req.steps, tolerance: commutingTolerance });
    const lb = Math.log(base) / Math.LN2; // the divergences are in bits; convert
    const notes: string[] = [];
    for (const [k, d] of r.defects.entries()) {
      const worst = Math.max(d.idempotence, d.unital, d.tracePreserving, d.selfAdjoint);
      if (worst > 1e-8) notes.push(`${k === 0 ? 'first' : 'second'} is not a trace-preserving conditional expectation (largest defect ${worst.toExponential(2)}; see defects): the Friedrichs statement does not apply to it.`);
    }
    return {
      value: r.commuting,
      commutatorNorm: r.commutatorNorm,
      friedrichsCosine: r.friedrichsCosine,
      convergence: r.convergence,
      convergenceStatement: '‖(E₁E₂)^k − E₁₂‖ = c^{2k−1} for HS-orthogonal projections (Kayalar & Weinert 1988; recalled); "predicted" is that value',
      intersection: { dimension: r.intersection.dimension, ...writeBothForms(r.intersection.channel, r.intersection.choi) },
      defects: { first: r.defects[0], second: r.defects[1] },
      states: r.states.map((s) => ({
        toFirst: writeNumber(s.toFirst / lb),
        toSecond: writeNumber(s.toSecond / lb),
        toIntersection: writeNumber(s.toIntersection / lb),
        ratio: s.ratio,
      })),
      quasiFactorizationEstimate: r.quasiFactorizationEstimate,
      quasiFactorizationNote: 'The largest ratio D(ρ‖E₁₂ρ)/(D(ρ‖E₁ρ) + D(ρ‖E₂ρ)) over the states given: a lower estimate of the best constant, not a bound.',
      caveat: 'Numerical evidence, not a proof: commuting and the dimension of the intersection are decisions at the stated tolerance.',
      notes,
    };
  },
});
