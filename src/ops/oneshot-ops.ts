/**
 * Ops for the one-shot entropic quantities solved by rhosigma's SDP solver (src/oneshot):
 *  - the `hypothesis-testing` family of the `divergence` op (registered through entropy-ops.ts's
 *    `extraDivergenceFamilies`; `epsilon` required, in [0, 1], the range of the divergence schema),
 *  - `smooth-max-divergence` (rho, sigma, epsilon),
 *  - `conditional-min-entropy`, `conditional-max-entropy` (rho with dims, a, b),
 *  - `max-information` (rho with dims, a, b).
 *
 * Every answer carries `certificate` in the one shape of src/sdp/support.ts (SdpCertificate: the problem
 * in words, primal and dual points, their objectives, the gap, the certified bracket `bounds` and its
 * `accuracy`), which kernel-bridge/rhosigma/certificates.py re-checks with numpy alone, and `note`
 * whenever the solver's status is not 'optimal' or the value needs another caveat (tiny β, a support
 * decision near its threshold). A bracket too wide is a RhoError 'solver-failed' carrying it.
 *
 * Size limits (RhoError 'too-large'): the Schur complement of these SDPs is dense in the number of
 * constraints, so each op caps the dimension where one request would take minutes and gigabytes.
 *
 * Deliberately not here: numerics (src/oneshot). Cost: that of the SDPs.
 */
import type { CMatrix } from '../linalg/cmatrix.js';
import { product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import { hypothesisTestingDivergence } from '../oneshot/hypothesis-testing.js';
import { smoothMaxRelativeEntropy } from '../oneshot/smooth-max.js';
import { conditionalMinEntropy, conditionalMaxEntropy } from '../oneshot/conditional-min-max.js';
import { maxInformation } from '../oneshot/max-information.js';
import type { SdpCertificate } from '../sdp/support.js';
import { defineOp, type OpResult } from './registry.js';
import {
  readNumber, readOperatorState, readState, readSupportTolerance, readSystems, schemas, supportToleranceProperty, writeCertificate,
  writeMatrix, writeNumber,
} from './codec.js';
import { extraDivergenceFamilies } from './entropy-ops.js';
import { dense, groupDimension, sdp, sideOf } from './cost.js';

/** Largest matrix side for D_H (the one-dimensional dual: O(d³) per step). */
export const MAX_HYPOTHESIS_DIMENSION = 1024;
/** Largest matrix side for the smooth max-relative entropy and the conditional max-entropy (~2n² constraints). */
export const MAX_FIDELITY_SDP_DIMENSION = 16;
/** Largest d_A d_B for the conditional min-entropy and the max-information (d_B² constraints, one d_A d_B block). */
export const MAX_MIN_ENTROPY_DIMENSION = 64;

const supportToleranceSchema = supportToleranceProperty(
  'Relative tolerance below which an eigenvalue counts as zero in the support decisions made before the solve (default 1e-12); separate from "tolerance", which validates inputs.',
);

const epsilonSchema = {
  type: 'number',
  exclusiveMinimum: 0,
  exclusiveMaximum: 1,
  description: 'The smoothing or error parameter ε, strictly between 0 and 1.',
};

function readEpsilon(req: Record<string, any>, family?: string): number {
  if (req.epsilon === undefined) {
    throw new RhoError('missing-argument', `${family ? `The ${family} family` : 'This op'} needs "epsilon", a number strictly between 0 and 1.`, 'epsilon');
  }
  return readNumber(req.epsilon, 'epsilon', { min: 0, minExclusive: true, max: 1, maxExclusive: true });
}

function tooLarge(path: string, what: string, size: number, limit: number): RhoError {
  return new RhoError('too-large', `${what} is ${size}, above this op's limit of ${limit} (the SDP grows as its square).`, path, { size, limit });
}

function withNote(out: OpResult, note: string | undefined): OpResult {
  if (note) out.note = note;
  return out;
}

// ---------------------------------------------------------------------------------------------------
// divergence family: hypothesis-testing

extraDivergenceFamilies.set('hypothesis-testing', ({ rho, sigma, request, context, supportTolerance }) => {
  if (request.epsilon === undefined) {
    throw new RhoError('missing-argument', 'The hypothesis-testing family needs "epsilon", a number in [0, 1].', 'epsilon');
  }
  const epsilon = readNumber(request.epsilon, 'epsilon', { min: 0, max: 1 });
  if (rho.rows > MAX_HYPOTHESIS_DIMENSION) throw tooLarge('rho', 'The matrix side', rho.rows, MAX_HYPOTHESIS_DIMENSION);
  const r = hypothesisTestingDivergence(rho, sigma, epsilon, { base: context.base, tol: supportTolerance });
  const out: OpResult = {
    value: writeNumber(r.value),
    family: 'hypothesis-testing',
    epsilon,
    beta: r.beta,
    test: writeMatrix(r.test),
    ...(r.rejection ? { rejection: writeMatrix(r.rejection) } : {}),
    acceptance: r.acceptance,
    method: r.method,
    convention: r.convention,
    certificate: writeCertificate(r.certificate),
    supportTolerance,
  };
  if (r.reason) out.reason = r.reason;
  return withNote(out, r.note);
});

// ---------------------------------------------------------------------------------------------------

defineOp({
  name: 'smooth-max-divergence',
  summary:
    'Smooth max-relative entropy D_max^ε(ρ‖σ): the least D_max(ρ̃‖σ) over subnormalised ρ̃ within purified distance ε of ρ (an SDP), with the optimal ρ̃ and the certificate.',
  args: {
    type: 'object',
    properties: {
      rho: { ...schemas.state, description: 'A density matrix.' },
      sigma: { ...schemas.state, description: 'A positive semidefinite operator of the same size, of any trace.' },
      epsilon: epsilonSchema,
      supportTolerance: supportToleranceSchema,
    },
    required: ['rho', 'sigma', 'epsilon'],
  },
  base: true,
  cost: (req) => {
    const n = sideOf(req.rho);
    return sdp({ blocks: [{ size: 2 * n, hermitian: true }, { size: n, hermitian: true }, { size: n, hermitian: true }, { size: 3, vector: true }], constraints: 3 * n * n + 2 }, dense(n, 4));
  },
  run(req, { tolerance, base }) {
    const rho = readState(req.rho, 'rho', tolerance).matrix;
    const sigma = readOperatorState(req.sigma, 'sigma', tolerance).matrix;
    if (rho.rows !== sigma.rows) {
      throw new RhoError('dimension-mismatch', `rho is ${rho.rows}x${rho.rows} but sigma is ${sigma.rows}x${sigma.rows}.`, 'sigma');
    }
    if (rho.rows > MAX_FIDELITY_SDP_DIMENSION) throw tooLarge('rho', 'The matrix side', rho.rows, MAX_FIDELITY_SDP_DIMENSION);
    const epsilon = readEpsilon(req);
    const tol = readSupportTolerance(req);
    const r = smoothMaxRelativeEntropy(rho, sigma, epsilon, { base, tol });
    const out: OpResult = {
      value: writeNumber(r.value),
      epsilon,
      smoothed: writeMatrix(r.smoothed),
      lambda: writeNumber(r.lambda),
      rootFidelity: r.rootFidelity,
      insideSupport: r.insideSupport,
      certificate: writeCertificate(r.certificate),
      supportTolerance: tol,
    };
    if (r.reason) out.reason = r.reason;
    return withNote(out, r.note);
  },
});

const groupSchema = (what: string) => ({ ...schemas.systems, description: `${what}: subsystem indices (or labels).` });
const multipartite = { ...schemas.state, description: 'A density matrix with "dims" giving its subsystems.' };

function readBipartite(req: Record<string, any>, tolerance: number, bMayBeEmpty: boolean) {
  const state = readState(req.rho, 'rho', tolerance);
  const a = readSystems(req.a, 'a', state.dims.length, { labels: state.labels, allowEmpty: false });
  const b = readSystems(req.b, 'b', state.dims.length, { labels: state.labels, allowEmpty: bMayBeEmpty });
  const overlap = a.find((s) => b.includes(s));
  if (overlap !== undefined) {
    throw new RhoError('invalid-argument', `Subsystem ${overlap} is in both a and b; the groups must be disjoint.`, 'b');
  }
  const dA = product(a.map((s) => state.dims[s]));
  const dB = product(b.map((s) => state.dims[s]));
  return { state, a, b, dA, dB };
}

const bipartiteArgs = (bWhat: string) => ({
  type: 'object' as const,
  properties: { rho: multipartite, a: groupSchema('A'), b: groupSchema(bWhat), supportTolerance: supportToleranceSchema },
  required: ['rho', 'a', 'b'],
});

function sigmaAnswer(value: number, sigma: CMatrix, certificate: SdpCertificate, tol: number, extra: Record<string, unknown>, note?: string): OpResult {
  return withNote({ value: writeNumber(value), sigma: writeMatrix(sigma), ...extra, certificate: writeCertificate(certificate), supportTolerance: tol }, note);
}

defineOp({
  name: 'conditional-min-entropy',
  summary:
    'Conditional min-entropy H_min(A|B) = −log min{Tr σ_B : I_A ⊗ σ_B ⪰ ρ_AB} (an SDP), with the optimal σ_B (Tr σ_B = 2^{−H_min}) and the certificate; value and bracket clipped to [−log d_A, log d_A], the excess in certificate.clipped.',
  args: bipartiteArgs('B (may be empty)'),
  base: true,
  cost: (req) => {
    const [dA, dB] = [groupDimension(req.rho, req.a), groupDimension(req.rho, req.b)];
    return sdp({ blocks: [{ size: dA * dB, hermitian: true }], constraints: dB * dB }, dense(sideOf(req.rho), 4));
  },
  run(req, { tolerance, base }) {
    const { state, a, b, dA, dB } = readBipartite(req, tolerance, true);
    if (dA * dB > MAX_MIN_ENTROPY_DIMENSION) throw tooLarge('a', 'The dimension of AB', dA * dB, MAX_MIN_ENTROPY_DIMENSION);
    const tol = readSupportTolerance(req);
    const r = conditionalMinEntropy(state.matrix, state.dims, a, b, { base, tol });
    return sigmaAnswer(r.value, r.sigma, r.certificate, tol, { dimensions: r.dims }, r.note);
  },
});

defineOp({
  name: 'conditional-max-entropy',
  summary:
    'Conditional max-entropy H_max(A|B) = log max over states σ_B of F(ρ_AB, I_A ⊗ σ_B), F the squared fidelity (an SDP), with the optimal σ_B and the certificate; value and bracket clipped to [−log d_A, log d_A], the excess in certificate.clipped.',
  args: bipartiteArgs('B (may be empty)'),
  base: true,
  cost: (req) => {
    const [dA, dB] = [groupDimension(req.rho, req.a), groupDimension(req.rho, req.b)];
    const n = dA * dB;
    return sdp({ blocks: [{ size: 2 * n, hermitian: true }, { size: dB, hermitian: true }], constraints: 2 * n * n + 1 }, dense(sideOf(req.rho), 4));
  },
  run(req, { tolerance, base }) {
    const { state, a, b, dA, dB } = readBipartite(req, tolerance, true);
    if (dA * dB > MAX_FIDELITY_SDP_DIMENSION) throw tooLarge('a', 'The dimension of AB', dA * dB, MAX_FIDELITY_SDP_DIMENSION);
    const tol = readSupportTolerance(req);
    const r = conditionalMaxEntropy(state.matrix, state.dims, a, b, { base, tol });
    return sigmaAnswer(r.value, r.sigma, r.certificate, tol, { rootFidelity: r.rootFidelity, dimensions: r.dims }, r.note);
  },
});

defineOp({
  name: 'max-information',
  summary:
    'Max-information I_max(A:B) = min over states σ_B of D_max(ρ_AB ‖ ρ_A ⊗ σ_B) (an SDP on the support of ρ_A), with the optimal σ_B and the certificate; value and bracket clipped to [0, 2 log min(d_A, d_B)], the excess in certificate.clipped.',
  args: bipartiteArgs('B'),
  base: true,
  cost: (req) => {
    const [dA, dB] = [groupDimension(req.rho, req.a), groupDimension(req.rho, req.b)];
    return sdp({ blocks: [{ size: dA * dB, hermitian: true }], constraints: dB * dB }, dense(sideOf(req.rho), 4));
  },
  run(req, { tolerance, base }) {
    const { state, a, b, dA, dB } = readBipartite(req, tolerance, false);
    if (dA * dB > MAX_MIN_ENTROPY_DIMENSION) throw tooLarge('a', 'The dimension of AB', dA * dB, MAX_MIN_ENTROPY_DIMENSION);
    const tol = readSupportTolerance(req);
    const r = maxInformation(state.matrix, state.dims, a, b, { base, tol });
    return sigmaAnswer(r.value, r.sigma, r.certificate, tol, { rankA: r.rankA, droppedWeight: r.droppedWeight, dimensions: r.dims }, r.note);
  },
});
