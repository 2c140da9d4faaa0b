/**
 * Quantum channels as Kraus operators: the conversions between Kraus, Choi and Stinespring forms,
 * the checks of complete positivity, trace preservation and unitality (each reporting the size of the
 * violation), application to chosen subsystems of a larger state, and the constructions composition,
 * tensor product, adjoint map and complementary channel.
 *
 * Conventions.
 * - Choi matrix (PROTOCOL.md): J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input factor first, unnormalised
 *   (Tr J = d_in for a trace-preserving map). With Kraus operators K_k, J = Σ_k |K_k⟩⟩⟨⟨K_k| where
 *   |K⟩⟩ = Σ_i |i⟩ ⊗ K|i⟩, i.e. |K⟩⟩[i·d_out + a] = K[a][i].
 * - Stinespring isometry V: A → B ⊗ E with the environment last: V|ψ⟩ = Σ_k K_k|ψ⟩ ⊗ |k⟩_E, so
 *   V[(b·r + k), i] = K_k[b][i] with r the number of Kraus operators. The complementary channel is
 *   N^c(ρ) = Tr_B VρV*, with Kraus operators L_b = Σ_k |k⟩⟨b|K_k (one per output basis vector b).
 * - Norms of defects are operator norms (largest singular value).
 *
 * Numerical caveat: Choi → Kraus keeps the eigenvectors of J whose eigenvalues exceed
 * tolerance · λ_max; the dropped eigenvalues are reported, since a tolerance-dependent rank decision
 * can mislead (a "minimal" Kraus count is only minimal at that tolerance).
 *
 * Deliberately not here: preset channels (presets.ts), parsing of plain data (ops/codec.ts).
 * Cost: Kraus → Choi O(r (d_in d_out)²); Choi → Kraus one eigendecomposition of size d_in d_out;
 * applying r Kraus operators of size d_out × d_in to a state with rest dimension R costs
 * O(r · d_out d_in R² (d_in + d_out)) plus two O(D²) permutations: I ⊗ K is never formed.
 */
import {
  CMatrix, zeros, identity, mul, adjoint, kron, sub, add, scale, isFinite, frobeniusNorm,
} from '../linalg/cmatrix.js';
import { eigh, eigvalsh } from '../linalg/eigh.js';
import { operatorNorm } from '../linalg/norms.js';
import { partialTrace, reorderSubsystems, product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import type { Channel, State } from './types.js';
import { checkHermitian, checkDims, DEFAULT_TOLERANCE } from './validate.js';
import { checkDimList, checkSystemList } from './arguments.js';

/** Throws unless the channel is well formed: dims valid, ≥ 1 Kraus operator, each d_out × d_in and finite. */
export function checkChannelShape(channel: Channel, path = 'channel'): void {
  const inDims = checkDimList(channel.fromDims, `${path}.from`);
  const outDims = checkDimList(channel.toDims, `${path}.to`);
  const dIn = product(inDims);
  const dOut = product(outDims);
  if (!Array.isArray(channel.kraus) || channel.kraus.length === 0) {
    throw new RhoError('invalid-argument', 'A channel needs at least one Kraus operator.', `${path}.kraus`);
  }
  channel.kraus.forEach((k, idx) => {
    if (k.rows !== dOut || k.cols !== dIn) {
      throw new RhoError(
        'dimension-mismatch',
        `Kraus operator ${idx} is ${k.rows}x${k.cols}; with input dims [${inDims.join(', ')}] and output dims [${outDims.join(', ')}] it must be ${dOut}x${dIn}.`,
        `${path}.kraus[${idx}]`,
      );
    }
    if (!isFinite(k)) throw new RhoError('invalid-argument', `Kraus operator ${idx} has a NaN or infinite entry.`, `${path}.kraus[${idx}]`);
  });
}

export function inputDimension(channel: Channel): number {
  return product(channel.fromDims);
}

export function outputDimension(channel: Channel): number {
  return product(channel.toDims);
}

// ---------------------------------------------------------------------------------------------
// Kraus ↔ Choi

/** The Choi matrix J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|) (input first, unnormalised). */
export function krausToChoi(channel: Channel): CMatrix {
  checkChannelShape(channel);
  const dIn = inputDimension(channel);
  const dOut = outputDimension(channel);
  const n = dIn * dOut;
  const J = zeros(n, n);
  const vr = new Float64Array(n);
  const vi = new Float64Array(n);
  for (const K of channel.kraus) {
    for (let i = 0; i < dIn; i++) {
      for (let a = 0; a < dOut; a++) {
        vr[i * dOut + a] = K.re[a * dIn + i];
        vi[i * dOut + a] = K.im[a * dIn + i];
      }
    }
    for (let p = 0; p < n; p++) {
      const xr = vr[p];
      const xi = vi[p];
      if (xr === 0 && xi === 0) continue;
      const row = p * n;
      for (let q = 0; q < n; q++) {
        // v_p conj(v_q)
        J.re[row + q] += xr * vr[q] + xi * vi[q];
        J.im[row + q] += xi * vr[q] - xr * vi[q];
      }
    }
  }
  return J;
}

export interface ChoiToKrausResult {
  channel: Channel;
  /** All eigenvalues of J, ascending. */
  eigenvalues: number[];
  /** The eigenvalues dropped as zero (|λ| ≤ tolerance · λ_max), and the threshold used. */
  dropped: number[];
  threshold: number;
}

/**
 * Kraus operators from a Choi matrix by its eigendecomposition J = Σ λ_k |v_k⟩⟩⟨⟨v_k|:
 * K_k = √λ_k · unvec(v_k), keeping only λ_k > tolerance · λ_max (a minimal Kraus family at that
 * tolerance, largest weight first). A Choi matrix with an eigenvalue below −tolerance · λ_max is
 * refused with 'not-completely-positive' and that eigenvalue; a non-Hermitian one with 'not-hermitian'.
 */
export function choiToKrausDetailed(
  choi: CMatrix, fromDims: readonly number[], toDims: readonly number[], tolerance = DEFAULT_TOLERANCE,
): ChoiToKrausResult {
  const inDims = checkDimList(fromDims, 'fromDims');
  const outDims = checkDimList(toDims, 'toDims');
  const dIn = product(inDims);
  const dOut = product(outDims);
  checkHermitian(choi, tolerance, 'choi');
  checkDims(choi, [dIn, dOut], 'choi');
  const { values, vectors } = eigh(choi, { vectors: true });
  const n = dIn * dOut;
  const top = Math.max(Math.abs(values[0]), Math.abs(values[n - 1]));
  const threshold = tolerance * top;
  if (values[0] < -threshold) {
    throw new RhoError(
      'not-completely-positive',
      `The Choi matrix is not positive semidefinite (smallest eigenvalue ${values[0].toExponential(6)}), so the map is not completely positive.`,
      'choi',
      { eigenvalue: values[0] },
    );
  }
  const kraus: CMatrix[] = [];
  const dropped: number[] = [];
  const V = vectors!;
  for (let k = n - 1; k >= 0; k--) {
    const lam = values[k];
    if (lam <= threshold) {
      dropped.push(lam);
      continue;
    }
    const s = Math.sqrt(lam);
    const K = zeros(dOut, dIn);
    for (let i = 0; i < dIn; i++) {
      for (let a = 0; a < dOut; a++) {
        const p = i * dOut + a;
        K.re[a * dIn + i] = s * V.re[p * n + k];
        K.im[a * dIn + i] = s * V.im[p * n + k];
      }
    }
    kraus.push(K);
  }
  if (kraus.length === 0) kraus.push(zeros(dOut, dIn)); // the zero map
  return {
    channel: { kraus, fromDims: [...inDims], toDims: [...outDims] },
    eigenvalues: Array.from(values),
    dropped: dropped.reverse(),
    threshold,
  };
}

export function choiToKraus(
  choi: CMatrix, fromDims: readonly number[], toDims: readonly number[], tolerance = DEFAULT_TOLERANCE,
): Channel {
  return choiToKrausDetailed(choi, fromDims, toDims, tolerance).channel;
}

/** The same map with a minimal number of Kraus operators (through the Choi matrix; see choiToKraus). */
export function compressKraus(channel: Channel, tolerance = DEFAULT_TOLERANCE): Channel {
  return choiToKraus(krausToChoi(channel), channel.fromDims, channel.toDims, tolerance);
}

// ---------------------------------------------------------------------------------------------
// Stinespring

export interface Stinespring {
  /** V: A → B ⊗ E, of shape (d_out · environmentDim) × d_in, environment last. */
  isometry: CMatrix;
  fromDims: number[];
  toDims: number[];
  environmentDim: number;
}

/** V = Σ_k K_k ⊗ |k⟩_E (environment last). V is an isometry exactly when the channel is trace preserving. */
export function krausToStinespring(channel: Channel): Stinespring {
  checkChannelShape(channel);
  const dIn = inputDimension(channel);
  const dOut = outputDimension(channel);
  const r = channel.kraus.length;
  const V = zeros(dOut * r, dIn);
  channel.kraus.forEach((K, k) => {
    for (let b = 0; b < dOut; b++) {
      for (let i = 0; i < dIn; i++) {
        V.re[(b * r + k) * dIn + i] = K.re[b * dIn + i];
        V.im[(b * r + k) * dIn + i] = K.im[b * dIn + i];
      }
    }
  });
  return { isometry: V, fromDims: [...channel.fromDims], toDims: [...channel.toDims], environmentDim: r };
}

/** Kraus operators K_k = (I_B ⊗ ⟨k|_E) V of a Stinespring operator (environment last). */
export function stinespringToKraus(
  isometry: CMatrix, fromDims: readonly number[], toDims: readonly number[], environmentDim: number,
): Channel {
  const inDims = checkDimList(fromDims, 'fromDims');
  const outDims = checkDimList(toDims, 'toDims');
  const dIn = product(inDims);
  const dOut = product(outDims);
  const r = environmentDim;
  if (!Number.isInteger(r) || r < 1) throw new RhoError('invalid-argument', 'The environment dimension must be a positive integer.', 'environmentDim');
  if (isometry.rows !== dOut * r || isometry.cols !== dIn) {
    throw new RhoError(
      'dimension-mismatch',
      `The Stinespring operator is ${isometry.rows}x${isometry.cols}; it must be ${dOut * r}x${dIn} (output ${dOut} times environment ${r}, by input ${dIn}).`,
      'isometry',
    );
  }
  const kraus: CMatrix[] = [];
  for (let k = 0; k < r; k++) {
    const K = zeros(dOut, dIn);
    for (let b = 0; b < dOut; b++) {
      for (let i = 0; i < dIn; i++) {
        K.re[b * dIn + i] = isometry.re[(b * r + k) * dIn + i];
        K.im[b * dIn + i] = isometry.im[(b * r + k) * dIn + i];
      }
    }
    kraus.push(K);
  }
  return { kraus, fromDims: [...inDims], toDims: [...outDims] };
}

// ---------------------------------------------------------------------------------------------
// Checks

export interface ChannelDiagnostics {
  /** Smallest eigenvalue of the Choi matrix (≥ 0 up to rounding for any Kraus form). */
  minChoiEigenvalue: number;
  /** Largest |eigenvalue| of the Choi matrix, the scale the CP decision is relative to. */
  choiNorm: number;
  /** ‖Σ K*K − I_in‖ (operator norm); null when the map was given by its Choi matrix only. */
  traceDefectKraus: number | null;
  /** ‖Tr_B J − I_in‖ (operator norm). */
  traceDefectChoi: number;
  /** ‖N(I_in) − I_out‖ = ‖Σ K K* − I_out‖ (operator norm). */
  unitalDefect: number;
  completelyPositive: boolean;
  tracePreserving: boolean;
  unital: boolean;
  tolerance: number;
}

/**
 * CP, TP and unitality of a map given by its Choi matrix, with the size of each violation.
 * Decisions: CP when λ_min(J) ≥ −tolerance · max(1, ‖J‖); TP and unital when the defect ≤ tolerance.
 * These are numerical judgements at the stated tolerance, not proofs.
 */
export function choiDiagnostics(
  choi: CMatrix, fromDims: readonly number[], toDims: readonly number[], tolerance = DEFAULT_TOLERANCE,
): ChannelDiagnostics {
  const dIn = product(checkDimList(fromDims, 'fromDims'));
  const dOut = product(checkDimList(toDims, 'toDims'));
  checkHermitian(choi, tolerance, 'choi');
  checkDims(choi, [dIn, dOut], 'choi');
  const values = eigvalsh(choi);
  const minChoiEigenvalue = values[0];
  const choiNorm = Math.max(Math.abs(values[0]), Math.abs(values[values.length - 1]));
  const traceDefectChoi = operatorNorm(sub(partialTrace(choi, [dIn, dOut], [1]), identity(dIn)));
  const unitalDefect = operatorNorm(sub(partialTrace(choi, [dIn, dOut], [0]), identity(dOut)));
  return {
    minChoiEigenvalue,
    choiNorm,
    traceDefectKraus: null,
    traceDefectChoi,
    unitalDefect,
    completelyPositive: minChoiEigenvalue >= -tolerance * Math.max(1, choiNorm),
    tracePreserving: traceDefectChoi <= tolerance,
    unital: unitalDefect <= tolerance,
    tolerance,
  };
}

/** As choiDiagnostics, from Kraus operators, adding ‖Σ K*K − I‖ and computing ‖Σ K K* − I‖ directly. */
export function channelDiagnostics(channel: Channel, tolerance = DEFAULT_TOLERANCE): ChannelDiagnostics {
  const J = krausToChoi(channel);
  const fromChoi = choiDiagnostics(J, channel.fromDims, channel.toDims, tolerance);
  const traceDefectKraus = operatorNorm(sub(krausSum(channel, 'KstarK'), identity(inputDimension(channel))));
  const unitalDefect = operatorNorm(sub(krausSum(channel, 'KKstar'), identity(outputDimension(channel))));
  return {
    ...fromChoi,
    traceDefectKraus,
    unitalDefect,
    tracePreserving: Math.max(traceDefectKraus, fromChoi.traceDefectChoi) <= tolerance,
    unital: unitalDefect <= tolerance,
  };
}

/** Σ K*K (which = I for a trace-preserving map) or Σ K K* (= N(I)). */
export function krausSum(channel: Channel, which: 'KstarK' | 'KKstar'): CMatrix {
  let acc: CMatrix | null = null;
  for (const K of channel.kraus) {
    const t = which === 'KstarK' ? mul(adjoint(K), K) : mul(K, adjoint(K));
    acc = acc ? add(acc, t) : t;
  }
  return acc!;
}

// ---------------------------------------------------------------------------------------------
// Application

/** N(X) for an operator X on the whole input space (Σ K X K*). */
export function applyKraus(channel: Channel, x: CMatrix): CMatrix {
  let acc: CMatrix | null = null;
  for (const K of channel.kraus) {
    const t = mul(mul(K, x), adjoint(K));
    acc = acc ? add(acc, t) : t;
  }
  return acc!;
}

function reshaped(m: CMatrix, rows: number, cols: number): CMatrix {
  return { rows, cols, re: m.re, im: m.im };
}

/**
 * (N_on ⊗ id_rest)(ρ): the channel acts on the listed subsystems (default: all), in the order listed,
 * which must match the channel's input: either one listed subsystem per input factor with equal
 * dimensions, or any list whose dimensions multiply to the input dimension.
 *
 * Where the outputs go: when the channel has as many output factors as listed subsystems, output
 * factor k replaces subsystem on[k] in place (labels kept); otherwise the acted-on subsystems are
 * removed and the output factors are inserted, in order, where the first (lowest-indexed) acted-on
 * subsystem was (labels then dropped, since the new factors have none).
 *
 * Method: permute the acted-on subsystems to the front, apply Σ_k (K_k ⊗ I_R) ρ (K_k ⊗ I_R)* with two
 * matrix products per Kraus operator on reshaped storage (never forming K ⊗ I), permute back.
 */
export function applyChannel(channel: Channel, state: State, on?: readonly number[]): State {
  checkChannelShape(channel);
  const dims = state.dims;
  checkDims(state.matrix, dims, 'rho.dims');
  const n = dims.length;
  const acted = on === undefined ? dims.map((_, k) => k) : checkSystemList(on, n, 'on');
  const actedDims = acted.map((s) => dims[s]);
  const dIn = inputDimension(channel);
  const dOut = outputDimension(channel);
  const sameFactors = acted.length === channel.fromDims.length;
  if (
    (sameFactors && actedDims.some((d, k) => d !== channel.fromDims[k])) ||
    (!sameFactors && product(actedDims) !== dIn)
  ) {
    throw new RhoError(
      'dimension-mismatch',
      `The channel takes input dims [${channel.fromDims.join(', ')}], but the subsystems [${acted.join(', ')}] have dims [${actedDims.join(', ')}].`,
      'on',
    );
  }
  const actedSet = new Set(acted);
  const rest = dims.map((_, k) => k).filter((k) => !actedSet.has(k));
  const restDims = rest.map((s) => dims[s]);
  const R = product(restDims);
  const N = dIn * R;

  const perm1 = [...acted, ...rest];
  const isIdentity = perm1.every((p, k) => p === k);
  const front = isIdentity ? state.matrix : reorderSubsystems(state.matrix, dims, perm1);

  // W = Σ_k (K ⊗ I_R) [(K ⊗ I_R) ρ]*; the result is W* = Σ_k (K ⊗ I) ρ (K ⊗ I)*.
  const flat = reshaped(front, dIn, R * N);
  let acc: CMatrix | null = null;
  for (const K of channel.kraus) {
    const U = mul(K, flat); // (K ⊗ I_R) ρ as dOut × (R N), i.e. (dOut R) × N
    const Ustar = adjoint(reshaped(U, dOut * R, N)); // N × (dOut R) = (dIn R) × (dOut R)
    const W = mul(K, reshaped(Ustar, dIn, R * dOut * R)); // (dOut R) × (dOut R)
    if (acc === null) acc = W;
    else for (let t = 0; t < acc.re.length; t++) { acc.re[t] += W.re[t]; acc.im[t] += W.im[t]; }
  }
  const out = adjoint(reshaped(acc!, dOut * R, dOut * R));

  // Current layout: [outputs..., rest...]. Build the final layout.
  const outFactors = channel.toDims.length;
  const inPlace = outFactors === acted.length;
  const currentDims = [...channel.toDims, ...restDims];
  const finalTokens: number[] = []; // indices into the current layout
  const firstActed = Math.min(...acted);
  let restIdx = 0;
  for (let pos = 0; pos < n; pos++) {
    if (actedSet.has(pos)) {
      if (inPlace) finalTokens.push(acted.indexOf(pos));
      else if (pos === firstActed) for (let k = 0; k < outFactors; k++) finalTokens.push(k);
    } else {
      finalTokens.push(outFactors + restIdx++);
    }
  }
  const finalDims = finalTokens.map((t) => currentDims[t]);
  const identityFinal = finalTokens.every((t, k) => t === k);
  const matrix = identityFinal ? out : reorderSubsystems(out, currentDims, finalTokens);
  if (inPlace && state.labels) return { matrix, dims: finalDims, labels: [...state.labels] };
  return { matrix, dims: finalDims };
}

// ---------------------------------------------------------------------------------------------
// Constructions

/**
 * outer ∘ inner (apply `inner` first). Kraus operators {A_a B_b}; when there are more of them than
 * d_in · d_out they are reduced to a minimal family through the Choi matrix (at `tolerance`).
 */
export function composeChannels(outer: Channel, inner: Channel, tolerance = DEFAULT_TOLERANCE): Channel {
  checkChannelShape(outer, 'outer');
  checkChannelShape(inner, 'inner');
  if (outputDimension(inner) !== inputDimension(outer)) {
    throw new RhoError(
      'dimension-mismatch',
      `The first channel outputs dims [${inner.toDims.join(', ')}] but the next one takes [${outer.fromDims.join(', ')}].`,
      'channels',
    );
  }
  const kraus: CMatrix[] = [];
  for (const A of outer.kraus) for (const B of inner.kraus) kraus.push(mul(A, B));
  const composed: Channel = { kraus, fromDims: [...inner.fromDims], toDims: [...outer.toDims] };
  return kraus.length > inputDimension(composed) * outputDimension(composed) ? compressKraus(composed, tolerance) : composed;
}

/** Apply channels in the order listed (the first one first). */
export function composeSequence(channels: readonly Channel[], tolerance = DEFAULT_TOLERANCE): Channel {
  if (channels.length === 0) throw new RhoError('invalid-argument', 'At least one channel is needed.', 'channels');
  let acc = channels[0];
  checkChannelShape(acc, 'channels[0]');
  for (let k = 1; k < channels.length; k++) {
    try {
      acc = composeChannels(channels[k], acc, tolerance);
    } catch (e) {
      if (e instanceof RhoError && e.code === 'dimension-mismatch') {
        throw new RhoError('dimension-mismatch', `Channel ${k} takes dims [${channels[k].fromDims.join(', ')}], but channel ${k - 1} outputs [${channels[k - 1].toDims.join(', ')}].`, `channels[${k}]`);
      }
      throw e;
    }
  }
  return acc;
}

/** N_1 ⊗ N_2 ⊗ …: Kraus operators the Kronecker products, dims concatenated. */
export function tensorChannels(...channels: Channel[]): Channel {
  if (channels.length === 0) throw new RhoError('invalid-argument', 'At least one channel is needed.', 'channels');
  channels.forEach((c, k) => checkChannelShape(c, `channels[${k}]`));
  let kraus = channels[0].kraus;
  for (let k = 1; k < channels.length; k++) {
    const next: CMatrix[] = [];
    for (const A of kraus) for (const B of channels[k].kraus) next.push(kron(A, B));
    kraus = next;
  }
  return {
    kraus,
    fromDims: channels.flatMap((c) => c.fromDims),
    toDims: channels.flatMap((c) => c.toDims),
  };
}

/**
 * The adjoint map N* (Heisenberg picture) with Kraus operators K_k*: Tr(N*(Y) X) = Tr(Y N(X)).
 * Unital exactly when N is trace preserving.
 */
export function adjointChannel(channel: Channel): Channel {
  checkChannelShape(channel);
  return { kraus: channel.kraus.map(adjoint), fromDims: [...channel.toDims], toDims: [...channel.fromDims] };
}

/**
 * The complementary channel N^c(ρ) = Tr_B VρV* from the Stinespring isometry (environment dimension =
 * number of Kraus operators given; pass a compressed channel for the smallest environment).
 * Kraus operators L_b[k][i] = K_k[b][i], one per output basis vector b.
 */
export function complementaryChannel(channel: Channel): Channel {
  checkChannelShape(channel);
  const dIn = inputDimension(channel);
  const dOut = outputDimension(channel);
  const r = channel.kraus.length;
  const kraus: CMatrix[] = [];
  for (let b = 0; b < dOut; b++) {
    const L = zeros(r, dIn);
    channel.kraus.forEach((K, k) => {
      for (let i = 0; i < dIn; i++) {
        L.re[k * dIn + i] = K.re[b * dIn + i];
        L.im[k * dIn + i] = K.im[b * dIn + i];
      }
    });
    kraus.push(L);
  }
  return { kraus, fromDims: [...channel.fromDims], toDims: [r] };
}

/** The identity channel on the given dims. */
export function identityChannel(dims: readonly number[]): Channel {
  const d = checkDimList(dims, 'dims');
  return { kraus: [identity(product(d))], fromDims: [...d], toDims: [...d] };
}

/** Σ_k ‖K_k‖_F², i.e. Tr J (= d_in for a trace-preserving map); handy in diagnostics. */
export function choiTrace(channel: Channel): number {
  return channel.kraus.reduce((s, K) => s + frobeniusNorm(K) ** 2, 0);
}

/** c · N as Kraus operators √c K (c ≥ 0). */
export function scaleChannel(channel: Channel, c: number): Channel {
  if (!(c >= 0) || !Number.isFinite(c)) throw new RhoError('invalid-argument', 'A channel can only be scaled by a finite non-negative number.', 'scale');
  return { ...channel, kraus: channel.kraus.map((K) => scale(K, Math.sqrt(c))) };
}
