/**
 * Ops for Markov recoverability of tripartite states: `petz-recovery` and `fidelity-of-recovery`
 * (names and fields fixed by PROTOCOL.md: `rho` with `dims`, and `a`, `b`, `c` arrays of subsystem
 * indices or labels).
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
  readNumber, readState, readSupportTolerance, readSystems, schemas, supportToleranceProperty, writeCertificate, writeMatrix, writeState,
  writeChannel,
} from './codec.js';
import { dense, groupDimension, sdp, sideOf } from './cost.js';
import { petzRecovery } from '../recovery/petz.js';
import { fidelityOfRecovery } from '../recovery/fidelity-of-recovery.js';
import { toOriginalOrder, checkTripartiteGroups } from '../recovery/tripartite.js';
import type { State } from '../quantum/types.js';

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
    'Fidelity of recovery F(A;C|B) = max over channels R: B → BC of F(ρ_ABC, (id_A ⊗ R)(ρ_AB)) (squared, with the root), by an SDP over the Choi matrix of R; plus the optimal channel, the fidelity it achieves (closed form) and the certificate.',
  args: { type: 'object', properties: { ...groupArgs }, required: ['rho', 'a', 'b', 'c'] },
  cost: (req) => {
    const [dA, dB, dC] = [req.a, req.b, req.c].map((g) => groupDimension(req.rho, g));
    const n = dA * dB * dC;
    return sdp({ blocks: [{ size: 2 * n, hermitian: true }, { size: dB * dB * dC, hermitian: true }], constraints: 2 * n * n + dB * dB }, dense(sideOf(req.rho), 6));
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
