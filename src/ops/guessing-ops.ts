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
import { guessingProbability } from '../oneshot/guessing.js';
import { diamondDistance } from '../oneshot/diamond.js';
import { fidelitySdp } from '../oneshot/fidelity-sdp.js';
import { defineOp } from './registry.js';
import { readChannel, readState, readSupportTolerance, schemas, supportToleranceProperty, writeCertificate, writeMatrix } from './codec.js';
import { channelShape, dense, sdp, sideOf } from './cost.js';

const MAX_STATES = 256;

/** Adds the solver's warning, when there is one, to an op answer. */
function withWarning(out: { value: number } & Record<string, unknown>, warning: string | undefined): { value: number } & Record<string, unknown> {
  if (warning) out.warning = warning;
  return out;
}

/**
 * The answer of an SDP op with checkable bounds: the value, the op's own fields, then bounds,
 * certificate and diagnostics (and the warning, if any).
 */
function boundedAnswer(
  r: { value: number; bounds: unknown; certificate: Parameters<typeof writeCertificate>[0]; diagnostics: unknown; warning?: string },
  fields: Record<string, unknown>,
): { value: number } & Record<string, unknown> {
  return withWarning(
    { value: r.value, ...fields, bounds: r.bounds, certificate: writeCertificate(r.certificate), diagnostics: r.diagnostics },
    r.warning,
  );
}

defineOp({
  name: 'guessing-probability',
  summary:
    'Optimal probability of guessing x from the state ρ_x drawn with probability p_x: max over POVMs of Σ_x p_x Tr M_x ρ_x, with the optimal measurement, the dual operator Y ⪰ p_x ρ_x and the SDP certificate; value and bracket clipped to [max_x p_x, 1], the excess in certificate.clipped.',
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
  cost: (req) => {
    const d = sideOf(req.states[0]);
    const count = req.states.length;
    return sdp({ blocks: Array.from({ length: count }, () => ({ size: d, hermitian: true })), constraints: d * d }, dense(d, 2 * count));
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
    return boundedAnswer(g, { measurement: g.measurement.map(writeMatrix), dual: writeMatrix(g.dual) });
  },
});

defineOp({
  name: 'diamond-distance',
  summary:
    "Diamond-norm distance ½‖N − M‖_⋄ of two channels with the same input and output spaces, by Watrous's SDP; with an optimal input (its reduced state and a purification), checkable bounds and the certificate; value and bracket clipped to [0, 1], the excess in certificate.clipped.",
  args: {
    type: 'object',
    properties: {
      a: { ...schemas.channel, description: 'The first channel (trace preserving within "tolerance").' },
      b: { ...schemas.channel, description: 'The second channel, same input and output dimensions.' },
    },
    required: ['a', 'b'],
  },
  cost: (req) => {
    const { din, dout } = channelShape(req.a);
    const n = din * dout;
    return sdp({ blocks: [{ size: n, hermitian: true }, { size: din, hermitian: true }, { size: n, hermitian: true }], constraints: n * n + 1 }, dense(n, 4));
  },
  run(req, { tolerance }) {
    const a = readChannel(req.a, 'a', tolerance);
    const b = readChannel(req.b, 'b', tolerance);
    // Trace preservation is checked at 1e-9 or the request's tolerance, whichever is looser, since Kraus
    // operators typed with a dozen digits rarely sum to the identity better than that.
    const d = diamondDistance(a, b, { tolerance: Math.max(tolerance, 1e-9) });
    return boundedAnswer(d, {
      input: writeMatrix(d.input),
      // |ψ⟩ = Σ_i |i⟩ ⊗ √σ|i⟩ on (channel input) ⊗ (reference), as a column.
      purification: writeMatrix(d.purification),
    });
  },
});

defineOp({
  name: 'fidelity-sdp',
  summary:
    "Fidelity F(ρ,σ) (squared, with the root) computed by Watrous's SDP √F = max Re Tr X s.t. [[ρ, X], [X*, σ]] ⪰ 0, with the optimal X and the certificate; the op `fidelity` gives the closed form.",
  args: {
    type: 'object',
    properties: {
      rho: { ...schemas.state, description: 'A density matrix.' },
      sigma: { ...schemas.state, description: 'A density matrix of the same size.' },
      supportTolerance: supportToleranceProperty(
        'Relative tolerance below which an eigenvalue counts as zero when the SDP is restricted to the supports (default 1e-12).',
      ),
    },
    required: ['rho', 'sigma'],
  },
  cost: (req) => {
    const n = sideOf(req.rho);
    return sdp({ blocks: [{ size: 2 * n, hermitian: true }], constraints: 2 * n * n }, dense(n, 4));
  },
  run(req, { tolerance }) {
    const rho = readState(req.rho, 'rho', tolerance).matrix;
    const sigma = readState(req.sigma, 'sigma', tolerance).matrix;
    if (rho.rows !== sigma.rows) {
      throw new RhoError('dimension-mismatch', `The two states have different sizes (${rho.rows} and ${sigma.rows}).`, 'sigma');
    }
    const tol = readSupportTolerance(req);
    const f = fidelitySdp(rho, sigma, { tol });
    return withWarning(
      {
        value: f.value,
        root: f.root,
        offDiagonal: writeMatrix(f.offDiagonal),
        // Objectives of the certificate are those of the root fidelity √F.
        certificate: writeCertificate(f.certificate),
        rankRho: f.rankRho,
        rankSigma: f.rankSigma,
      },
      f.warning,
    );
  },
});
