/**
 * Ops for state discrimination and channel distinguishability, all computed by rhosigma's own SDP
 * solver: `guessing-probability` (PROTOCOL.md), `diamond-distance` and `fidelity-sdp`.
 *
 * Each op reads plain data with the codec (states validated there, channels read from Kraus or Choi
 * form), calls src/oneshot and writes plain data back, always with the solver's certificate
 * (status, primal and dual objectives, gap, residuals) and checkable bounds, since an SDP value is
 * floating-point evidence, not a proof.
 *
 * Deliberately not here: numerics (src/oneshot), guesswork (another op module).
 * Cost: that of the SDPs (see the modules in src/oneshot).
 */
import type { CMatrix } from '../linalg/cmatrix.js';
import { RhoError } from '../errors.js';
import { guessingProbability, type SolverCertificate } from '../oneshot/guessing.js';
import { defineOp } from './registry.js';
import { readState, schemas, writeMatrix } from './codec.js';

const MAX_STATES = 256;

/** The certificate as plain data (numbers only, the status a string). */
export function writeCertificate(c: SolverCertificate): Record<string, unknown> {
  return { ...c };
}

defineOp({
  name: 'guessing-probability',
  summary:
    'Optimal probability of guessing x from the state ρ_x drawn with probability p_x: max over POVMs of Σ_x p_x Tr M_x ρ_x, with the optimal measurement, the dual operator Y ⪰ p_x ρ_x and the SDP certificate.',
  args: {
    type: 'object',
    properties: {
      probabilities: {
        description: 'Prior probabilities p_x, one per state: nonnegative, summing to 1 (within "tolerance").',
        type: 'array',
        minItems: 1,
        maxItems: MAX_STATES,
        items: { type: 'number' },
      },
      states: {
        description: 'The states ρ_x, density matrices of one size.',
        type: 'array',
        minItems: 1,
        maxItems: MAX_STATES,
        items: schemas.state,
      },
    },
    required: ['probabilities', 'states'],
  },
  run(req, { tolerance }) {
    const probabilities = req.probabilities as number[];
    const list = req.states as unknown[];
    if (list.length !== probabilities.length) {
      throw new RhoError(
        'dimension-mismatch',
        `There are ${probabilities.length} probabilities but ${list.length} states; give one probability per state.`,
        'states',
      );
    }
    const states: CMatrix[] = list.map((s, k) => readState(s, `states[${k}]`, tolerance).matrix);
    const g = guessingProbability(probabilities, states, { tolerance });
    const out: Record<string, unknown> = {
      value: g.value,
      measurement: g.measurement.map(writeMatrix),
      dual: writeMatrix(g.dual),
      bounds: g.bounds,
      certificate: writeCertificate(g.certificate),
      diagnostics: g.diagnostics,
    };
    if (g.warning) out.warning = g.warning;
    return out as { value: number } & Record<string, unknown>;
  },
});
