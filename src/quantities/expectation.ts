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
 * The value is the Umegaki relative entropy D(ρ‖σ) = Tr ρ (log ρ − log σ), computed here from the
 * eigendecompositions of ρ and σ = E(ρ):
 *   D = Σ_i λ_i log λ_i − Σ_ij λ_i |⟨a_i|b_j⟩|² log μ_j   (supports only),
 * +Infinity with a reason when ρ leaks out of supp σ (Tr ρ (1 − Π_σ) above the tolerance). (It is
 * computed locally rather than through the divergence module so that this file only depends on
 * linalg; the two agree, see the tests.)
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
import { eigh } from '../linalg/eigh.js';
import { DEFAULT_SUPPORT_TOLERANCE, zeroThreshold } from '../linalg/functions.js';
import { traceNorm } from '../linalg/norms.js';
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
}

function entropyOf(values: ArrayLike<number>, thr: number, lb: number): number {
  let h = 0;
  for (let i = 0; i < values.length; i++) if (values[i] > thr) h -= values[i] * Math.log(values[i]);
  return h / lb;
}

/** D(ρ‖σ) (Umegaki) with σ = E(ρ) given, plus the entropy gap H(σ) − H(ρ). */
export function divergenceToExpectation(rho: CMatrix, expectation: CMatrix, options: ExpectationOptions = {}): ExpectationDivergenceResult {
  if (rho.rows !== expectation.rows || rho.cols !== expectation.cols) {
    throw new RhoError('dimension-mismatch', `E(rho) is ${expectation.rows}x${expectation.cols} but rho is ${rho.rows}x${rho.cols}.`, 'expectation');
  }
  const base = options.base ?? 2;
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const lb = Math.log(base);
  const n = rho.rows;
  const a = eigh(rho, { vectors: true });
  const b = eigh(expectation, { vectors: true });
  const ta = zeroThreshold(a.values, tol);
  const tb = zeroThreshold(b.values, tol);
  // Overlaps |⟨a_i|b_j⟩|² from A* B.
  const O = mul(adjoint(a.vectors!), b.vectors!);
  let cross = 0; // Σ λ_i |⟨a_i|b_j⟩|² ln μ_j over both supports
  let inside = 0; // Tr ρ Π_σ
  for (let i = 0; i < n; i++) {
    const l = a.values[i];
    if (!(l > ta)) continue;
    for (let j = 0; j < n; j++) {
      const m = b.values[j];
      if (!(m > tb)) continue;
      const w = O.re[i * n + j] ** 2 + O.im[i * n + j] ** 2;
      inside += l * w;
      cross += l * w * Math.log(m);
    }
  }
  let traceRho = 0;
  for (let i = 0; i < n; i++) if (a.values[i] > ta) traceRho += a.values[i];
  const leakage = Math.max(traceRho - inside, 0);
  const hRho = entropyOf(a.values, ta, lb);
  const hSigma = entropyOf(b.values, tb, lb);
  const result: ExpectationDivergenceResult = {
    value: 0,
    expectation,
    entropyGap: hSigma - hRho,
    leakage,
  };
  if (leakage > tol * Math.max(traceRho, Number.MIN_VALUE)) {
    result.value = Infinity;
    result.reason = `supp rho is not contained in supp E(rho): Tr rho(1 - P) = ${leakage.toExponential(3)} exceeds the tolerance ${tol}, with P the support projector of E(rho)`;
    return result;
  }
  // −H(ρ) − Tr ρ log σ, in the base.
  const d = -hRho - cross / lb;
  result.value = d < 0 && d > -1e-12 ? 0 : d;
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
