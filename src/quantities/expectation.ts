/**
 * Relative entropy to a conditional expectation, D(ρ‖E(ρ)), the quantity behind relative entropies
 * of asymmetry, coherence and "distance to a subalgebra".
 *
 * E(ρ) may be given as a matrix, as a channel (applied with its Kraus operators), or as the
 * trace-preserving conditional expectation onto the block-diagonal algebra ⊕_k M_{n_k} ⊗ I_{m_k}
 * on ⊕_k C^{n_k} ⊗ C^{m_k} (blocks consecutive, the multiplicity factor second inside a block):
 *   E(X) = ⊕_k Tr_{m_k}(P_k X P_k) ⊗ I_{m_k}/m_k.
 * With all multiplicities 1 that is the pinching onto the blocks; with all block sizes 1 the
 * pinching in the computational basis (the dephasing that defines the relative entropy of
 * coherence).
 *
 * The value is the Umegaki relative entropy D(ρ‖σ) = Tr ρ (log ρ − log σ) with σ = E(ρ), from
 * divergences.ts (umegakiRelativeEntropy: +Infinity with a reason when ρ leaks out of supp σ, the
 * leakage Tr ρ(1 − Π_σ) decided against the support tolerance). The entropies of the gap come from
 * entropy.ts (vonNeumannEntropy), with the same support tolerance.
 *
 * For a trace-preserving conditional expectation onto a subalgebra, log E(ρ) lies in the algebra,
 * so Tr ρ log E(ρ) = Tr E(ρ) log E(ρ) and D(ρ‖E(ρ)) = H(E(ρ)) − H(ρ) (e.g. Petz, Quantum Information
 * Theory and Quantum Statistics, 2008; for pinchings common practice). The entropy gap is
 * returned beside the value as `entropyGap`: for a channel that is not such a conditional
 * expectation the two differ, which the result shows (and `idempotenceDefect` = ‖E(E(ρ)) − E(ρ)‖₁
 * measures one symptom).
 *
 * Deliberately not here: input validation (ops layer), the minimisation over the algebra's
 * states (it equals D(ρ‖E(ρ)) for conditional expectations, but that is not checked for channels).
 *
 * Cost: applying E (O(K n³) for K Kraus operators; O(n²·m) for blocks), two eigendecompositions and
 * one product of eigenvector matrices, O(n³).
 */
import { CMatrix, adjoint, mul, sub, zeros } from '../linalg/cmatrix.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { traceNorm } from '../linalg/norms.js';
import { umegakiRelativeEntropy } from './divergences.js';
import { vonNeumannEntropy } from './entropy.js';
import { RhoError } from '../errors.js';
import type { Channel } from '../quantum/types.js';

export interface ExpectationOptions {
  /** Logarithm base (default 2). */
  base?: number;
  /** Relative tolerance for supports, and for the leakage Tr ρ(1 − Π_σ) (default 1e-12). */
  tol?: number;
}

export interface ExpectationDivergenceResult {
  /** D(ρ‖E(ρ)) in the requested base; Infinity with a reason when supp ρ ⊄ supp E(ρ). */
  value: number;
  reason?: string;
  /** E(ρ). */
  expectation: CMatrix;
  /** H(E(ρ)) − H(ρ) (von Neumann, same base). Equal to `value` for conditional expectations. */
  entropyGap: number;
  /** Tr ρ (1 − Π_{E(ρ)}), the weight of ρ outside the support of E(ρ). */
  leakage: number;
  /** ‖E(E(ρ)) − E(ρ)‖₁ when E was given as a channel or by blocks (0 up to rounding for a conditional expectation). */
  idempotenceDefect?: number;
  /** Notes from the divergence computation (e.g. a leakage below the tolerance treated as zero). */
  notes?: string[];
}

/** D(ρ‖σ) (Umegaki) with σ = E(ρ) given, plus the entropy gap H(σ) − H(ρ). */
export function divergenceToExpectation(rho: CMatrix, expectation: CMatrix, options: ExpectationOptions = {}): ExpectationDivergenceResult {
  if (rho.rows !== expectation.rows || rho.cols !== expectation.cols) {
    throw new RhoError('dimension-mismatch', `E(rho) is ${expectation.rows}x${expectation.cols} but rho is ${rho.rows}x${rho.cols}.`, 'expectation');
  }
  const base = options.base ?? 2;
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const d = umegakiRelativeEntropy(rho, expectation, { base, tol });
  const gap = vonNeumannEntropy(expectation, { base, tol }) - vonNeumannEntropy(rho, { base, tol });
  const result: ExpectationDivergenceResult = {
    // A rounding-level negative (ρ already in the algebra) becomes 0: D ≥ 0 (Klein's inequality).
    value: d.value < 0 && d.value > -1e-12 ? 0 : d.value,
    expectation,
    entropyGap: gap,
    leakage: d.leakage,
  };
  if (d.reason) result.reason = d.reason;
  if (d.notes && d.notes.length) result.notes = d.notes;
  return result;
}

/** Σ_k K_k X K_k*. */
function applyKrausOperators(channel: Channel, x: CMatrix): CMatrix {
  if (channel.kraus.length === 0) throw new RhoError('invalid-argument', 'The channel has no Kraus operators.', 'channel');
  let acc: CMatrix | null = null;
  for (const K of channel.kraus) {
    if (K.cols !== x.rows) {
      throw new RhoError('dimension-mismatch', `The channel's Kraus operators act on dimension ${K.cols}, rho has ${x.rows}.`, 'channel');
    }
    const t = mul(mul(K, x), adjoint(K));
    if (acc) for (let k = 0; k < t.re.length; k++) { acc.re[k] += t.re[k]; acc.im[k] += t.im[k]; }
    else acc = t;
  }
  return acc!;
}

/** D(ρ‖E(ρ)) with E a channel given by Kraus operators (square: input and output dimension equal). */
export function divergenceToChannelExpectation(rho: CMatrix, channel: Channel, options: ExpectationOptions = {}): ExpectationDivergenceResult {
  const e = applyKrausOperators(channel, rho);
  if (e.rows !== rho.rows) {
    throw new RhoError('dimension-mismatch', `The channel maps dimension ${rho.rows} to ${e.rows}; a conditional expectation keeps the dimension.`, 'channel');
  }
  const r = divergenceToExpectation(rho, e, options);
  r.idempotenceDefect = traceNorm(sub(applyKrausOperators(channel, e), e));
  return r;
}

/**
 * E(X) = ⊕_k Tr_{m_k}(P_k X P_k) ⊗ I_{m_k}/m_k for blocks of sizes n_k · m_k placed consecutively
 * (multiplicities default to 1: the pinching onto the blocks).
 */
export function blockConditionalExpectation(x: CMatrix, blocks: readonly number[], multiplicities?: readonly number[]): CMatrix {
  const m = multiplicities ?? blocks.map(() => 1);
  if (m.length !== blocks.length) {
    throw new RhoError('dimension-mismatch', `There are ${blocks.length} block sizes but ${m.length} multiplicities.`, 'multiplicities');
  }
  for (const [name, list] of [['blocks', blocks], ['multiplicities', m]] as const) {
    if (list.length === 0 || list.some((v) => !Number.isInteger(v) || v < 1)) {
      throw new RhoError('invalid-argument', `${name} must be a non-empty list of positive integers.`, name);
    }
  }
  const D = blocks.reduce((s, nk, k) => s + nk * m[k], 0);
  if (D !== x.rows || x.rows !== x.cols) {
    throw new RhoError('dimension-mismatch', `The blocks span dimension ${D}, but the matrix is ${x.rows}x${x.cols}.`, 'blocks');
  }
  const out = zeros(D, D);
  let off = 0;
  blocks.forEach((nk, k) => {
    const mk = m[k];
    // Partial trace over the multiplicity factor: T_ij = Σ_a X[(i,a),(j,a)].
    for (let i = 0; i < nk; i++) {
      for (let j = 0; j < nk; j++) {
        let re = 0;
        let im = 0;
        for (let a = 0; a < mk; a++) {
          const idx = (off + i * mk + a) * D + (off + j * mk + a);
          re += x.re[idx];
          im += x.im[idx];
        }
        re /= mk;
        im /= mk;
        for (let a = 0; a < mk; a++) {
          const idx = (off + i * mk + a) * D + (off + j * mk + a);
          out.re[idx] = re;
          out.im[idx] = im;
        }
      }
    }
    off += nk * mk;
  });
  return out;
}

/** D(ρ‖E(ρ)) for the block-diagonal conditional expectation (see blockConditionalExpectation). */
export function divergenceToBlockExpectation(
  rho: CMatrix,
  blocks: readonly number[],
  multiplicities?: readonly number[],
  options: ExpectationOptions = {},
): ExpectationDivergenceResult {
  const e = blockConditionalExpectation(rho, blocks, multiplicities);
  const r = divergenceToExpectation(rho, e, options);
  r.idempotenceDefect = traceNorm(sub(blockConditionalExpectation(e, blocks, multiplicities), e));
  return r;
}
