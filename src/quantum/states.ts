/**
 * Constructors of quantum states (density matrices with subsystem dimensions) and the structural
 * operations on them: tensor product, reduced state, reordering of subsystems.
 *
 * Families and their conventions:
 * - Werner state on C^d ⊗ C^d (Werner, Phys. Rev. A 40, 4277 (1989)), parametrised here by the weight
 *   p = Tr(ρ P_anti) of the antisymmetric subspace: ρ = p·P_anti/dim(anti) + (1−p)·P_sym/dim(sym), with
 *   P_sym/anti = (I ± F)/2 and F the swap. Werner's own parameter is the expectation of the swap,
 *   Tr(ρF) = 1 − 2p. For d = 2 the antisymmetric subspace is the singlet, so p is the singlet fidelity.
 * - Isotropic state (Horodecki & Horodecki, Phys. Rev. A 59, 4206 (1999)), parametrised by the fidelity
 *   F = ⟨Φ|ρ|Φ⟩ with the maximally entangled vector |Φ⟩ = d^{-1/2} Σ_i |ii⟩:
 *   ρ = F·|Φ⟩⟨Φ| + (1−F)·(I − |Φ⟩⟨Φ|)/(d² − 1).
 * - Thermal state exp(−βH)/Z, computed from the spectrum of H shifted by its smallest eigenvalue
 *   (largest for β < 0) so that no exponential overflows.
 *
 * Deliberately not here: validation of user-given density matrices (validate.ts), random states
 * (tests have their own seeded generators), channels (channels.ts). Cost: the GHZ/W/maximally
 * entangled constructors are O(D²) in the output dimension D; thermal costs one eigendecomposition.
 */
import {
  CMatrix, zeros, identity, kron, scale, combine, adjoint, mul, diagonal, frobeniusNorm,
} from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { fromSpectrum } from '../linalg/functions.js';
import { marginal, reorderSubsystems, product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import type { State } from './types.js';
import { checkDims, checkHermitian, DEFAULT_TOLERANCE } from './validate.js';
import { checkDimList, checkInteger, checkNumber, checkProbabilities, checkSystemList } from './arguments.js';
import { checkSide } from '../limits.js';

function defaultDims(n: number, dims?: readonly number[]): number[] {
  return dims ? [...dims] : [n];
}

function withDims(matrix: CMatrix, dims: readonly number[] | undefined, labels?: readonly string[]): State {
  const d = defaultDims(matrix.rows, dims);
  checkDims(matrix, d, 'dims');
  if (labels !== undefined && labels.length !== d.length) {
    throw new RhoError('dimension-mismatch', `There are ${labels.length} labels for ${d.length} subsystems.`, 'labels');
  }
  return labels ? { matrix, dims: d, labels: [...labels] } : { matrix, dims: d };
}

/** |ψ⟩⟨ψ| for a ket given as an n×1 (or 1×n) matrix; refuses a ket whose norm is not 1 within tol. */
export function stateFromKet(ket: CMatrix, dims?: readonly number[], tolerance = DEFAULT_TOLERANCE): State {
  if (ket.cols !== 1 && ket.rows !== 1) {
    throw new RhoError('dimension-mismatch', `A ket must be a column or a row; this one is ${ket.rows}x${ket.cols}.`, 'ket');
  }
  const v: CMatrix = ket.cols === 1 ? ket : { rows: ket.cols, cols: 1, re: ket.re, im: ket.im };
  const norm = frobeniusNorm(v);
  if (!Number.isFinite(norm)) throw new RhoError('invalid-argument', 'The ket has a NaN or infinite entry.', 'ket');
  if (Math.abs(norm - 1) > tolerance) {
    throw new RhoError('invalid-argument', `The ket has norm ${norm}, not 1 (tolerance ${tolerance}).`, 'ket', { norm });
  }
  return withDims(mul(v, adjoint(v)), dims);
}

/** The qubit state (I + x X + y Y + z Z)/2 for a Bloch vector with |r| ≤ 1 (+ tol). */
export function blochState(r: readonly number[], tolerance = DEFAULT_TOLERANCE): State {
  if (!Array.isArray(r) || r.length !== 3) {
    throw new RhoError('invalid-argument', 'A Bloch vector has exactly three real components.', 'bloch');
  }
  const [x, y, z] = r.map((c, k) => checkNumber(c, `bloch[${k}]`));
  const len = Math.hypot(x, y, z);
  if (len > 1 + tolerance) {
    throw new RhoError('invalid-argument', `The Bloch vector has length ${len} > 1; it does not describe a state.`, 'bloch', { length: len });
  }
  const m = zeros(2, 2);
  m.re[0] = (1 + z) / 2;
  m.re[3] = (1 - z) / 2;
  m.re[1] = x / 2;
  m.im[1] = -y / 2;
  m.re[2] = x / 2;
  m.im[2] = y / 2;
  return { matrix: m, dims: [2] };
}

/** Σ_k w_k ρ_k for a probability vector w and states of one shape (dims taken from the first). */
export function mixture(weights: readonly number[], states: readonly State[], tolerance = DEFAULT_TOLERANCE): State {
  if (weights.length !== states.length) {
    throw new RhoError('dimension-mismatch', `There are ${weights.length} weights for ${states.length} states.`, 'weights');
  }
  checkProbabilities(weights, 'weights', tolerance);
  const first = states[0];
  states.forEach((s, k) => {
    if (s.dims.length !== first.dims.length || s.dims.some((d, i) => d !== first.dims[i])) {
      throw new RhoError('dimension-mismatch', `State ${k} has dims [${s.dims.join(', ')}], state 0 has [${first.dims.join(', ')}].`, `states[${k}]`);
    }
  });
  return withDims(combine(weights, states.map((s) => s.matrix)), first.dims, first.labels);
}

/** I/D on subsystems of the given dimensions (a number is one subsystem). */
export function maximallyMixed(dims: number | readonly number[]): State {
  const d = typeof dims === 'number' ? [checkInteger(dims, 'd')] : checkDimList(dims, 'dims');
  const n = product(d);
  checkSide(n, typeof dims === 'number' ? 'd' : 'dims');
  return { matrix: scale(identity(n), 1 / n), dims: d };
}

/** The maximally entangled vector d^{-1/2} Σ_i |i⟩|i⟩ as a d²×1 column. */
export function maximallyEntangledKet(d: number): CMatrix {
  checkInteger(d, 'd');
  const v = zeros(d * d, 1);
  for (let i = 0; i < d; i++) v.re[i * d + i] = 1 / Math.sqrt(d);
  return v;
}

/** |Φ⟩⟨Φ| on C^d ⊗ C^d with |Φ⟩ = d^{-1/2} Σ_i |ii⟩. */
export function maximallyEntangled(d: number): State {
  checkSide(checkInteger(d, 'd') ** 2, 'd');
  const v = maximallyEntangledKet(d);
  return { matrix: mul(v, adjoint(v)), dims: [d, d] };
}

/** The swap operator F|i⟩|j⟩ = |j⟩|i⟩ on C^d ⊗ C^d. */
export function swapOperator(d: number): CMatrix {
  const n = d * d;
  const f = zeros(n, n);
  for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) f.re[(i * d + j) * n + (j * d + i)] = 1;
  return f;
}

/**
 * Werner state on C^d ⊗ C^d (d ≥ 2) with antisymmetric weight p ∈ [0, 1] (see the module header):
 * ρ = p·2P_anti/(d(d−1)) + (1−p)·2P_sym/(d(d+1)). Invariant under U ⊗ U for every unitary U.
 */
export function wernerState(d: number, p: number): State {
  checkInteger(d, 'd', 2);
  checkNumber(p, 'p', { min: 0, max: 1 });
  checkSide(d * d, 'd');
  const n = d * d;
  const I = identity(n);
  const F = swapOperator(d);
  const anti = scale(combine([0.5, -0.5], [I, F]), 2 / (d * (d - 1)));
  const sym = scale(combine([0.5, 0.5], [I, F]), 2 / (d * (d + 1)));
  return { matrix: combine([p, 1 - p], [anti, sym]), dims: [d, d] };
}

/**
 * Isotropic state on C^d ⊗ C^d (d ≥ 2) with fidelity F = ⟨Φ|ρ|Φ⟩ ∈ [0, 1]:
 * ρ = F·Φ + (1−F)(I − Φ)/(d² − 1). Invariant under U ⊗ Ū for every unitary U.
 */
export function isotropicState(d: number, fidelity: number): State {
  checkInteger(d, 'd', 2);
  checkNumber(fidelity, 'fidelity', { min: 0, max: 1 });
  checkSide(d * d, 'd');
  const n = d * d;
  const phi = maximallyEntangled(d).matrix;
  const rest = scale(combine([1, -1], [identity(n), phi]), 1 / (n - 1));
  return { matrix: combine([fidelity, 1 - fidelity], [phi, rest]), dims: [d, d] };
}

/** GHZ vector d^{-1/2} Σ_k |k⟩^{⊗n} on n qudits (d = 2: qubits). */
export function ghzKet(n: number, d = 2): CMatrix {
  checkInteger(n, 'n', 1);
  checkInteger(d, 'd', 2);
  const D = d ** n;
  if (!Number.isSafeInteger(D) || D > 1 << 16) throw new RhoError('too-large', `A GHZ state on ${n} systems of dimension ${d} is too large (${D}).`, 'n');
  const v = zeros(D, 1);
  // |k k ... k⟩ has index k·(1 + d + d² + ... + d^{n−1}).
  const step = (D - 1) / (d - 1);
  for (let k = 0; k < d; k++) v.re[k * step] = 1 / Math.sqrt(d);
  return v;
}

export function ghzState(n: number, d = 2): State {
  checkSide(checkInteger(d, 'd', 2) ** checkInteger(n, 'n', 1), 'n');
  const v = ghzKet(n, d);
  return { matrix: mul(v, adjoint(v)), dims: new Array<number>(n).fill(d) };
}

/** W vector n^{-1/2} (|10…0⟩ + |01…0⟩ + … + |0…01⟩) on n ≥ 2 qubits. */
export function wKet(n: number): CMatrix {
  checkInteger(n, 'n', 2);
  const D = 2 ** n;
  if (D > 1 << 16) throw new RhoError('too-large', `A W state on ${n} qubits is too large (${D}).`, 'n');
  const v = zeros(D, 1);
  for (let k = 0; k < n; k++) v.re[1 << k] = 1 / Math.sqrt(n);
  return v;
}

export function wState(n: number): State {
  checkSide(2 ** checkInteger(n, 'n', 2), 'n');
  const v = wKet(n);
  return { matrix: mul(v, adjoint(v)), dims: new Array<number>(n).fill(2) };
}

/**
 * Gibbs state exp(−βH)/Z of a Hermitian H (any finite β, including β = 0 and β < 0).
 * Computed as V diag(e^{−β(λ_i − λ_ref)}) V* / Σ_i e^{−β(λ_i − λ_ref)} with λ_ref the smallest eigenvalue
 * (the largest when β < 0), so every exponent is ≤ 0 and Z ≥ 1: no overflow for any β.
 * Also returns log Z (natural log) of the unshifted H.
 */
export function thermalStateWithPartition(
  h: CMatrix, beta: number, dims?: readonly number[], tolerance = DEFAULT_TOLERANCE,
): { state: State; logPartition: number } {
  checkHermitian(h, tolerance, 'hamiltonian');
  checkNumber(beta, 'beta');
  const { values, vectors } = eigh(h, { vectors: true });
  const ref = beta >= 0 ? values[0] : values[values.length - 1];
  const w = Array.from(values, (x) => Math.exp(-beta * (x - ref)));
  const z = w.reduce((a, b) => a + b, 0);
  const state = withDims(fromSpectrum(vectors!, w.map((x) => x / z)), dims);
  return { state, logPartition: Math.log(z) - beta * ref };
}

export function thermalState(h: CMatrix, beta: number, dims?: readonly number[], tolerance = DEFAULT_TOLERANCE): State {
  return thermalStateWithPartition(h, beta, dims, tolerance).state;
}

/** ρ_1 ⊗ ρ_2 ⊗ …; dims concatenate; labels kept only when every factor has them. */
export function tensorStates(...states: State[]): State {
  if (states.length === 0) throw new RhoError('invalid-argument', 'A tensor product needs at least one state.', 'states');
  let m = states[0].matrix;
  for (let k = 1; k < states.length; k++) m = kron(m, states[k].matrix);
  const dims = states.flatMap((s) => s.dims);
  const labels = states.every((s) => s.labels) ? states.flatMap((s) => s.labels!) : undefined;
  return labels ? { matrix: m, dims, labels } : { matrix: m, dims };
}

/** The reduced state on the listed subsystems, in the order listed (the others are traced out). */
export function reducedState(state: State, keep: readonly number[]): State {
  checkSystemList(keep, state.dims.length, 'keep');
  const matrix = marginal(state.matrix, state.dims, keep);
  const dims = keep.map((s) => state.dims[s]);
  return state.labels ? { matrix, dims, labels: keep.map((s) => state.labels![s]) } : { matrix, dims };
}

/** Reorder subsystems: subsystem k of the result is subsystem perm[k] of the input (labels follow). */
export function reorderState(state: State, perm: readonly number[]): State {
  if (perm.length !== state.dims.length) {
    throw new RhoError('invalid-argument', `A permutation of ${state.dims.length} subsystems must list each once.`, 'perm');
  }
  checkSystemList(perm, state.dims.length, 'perm');
  const matrix = reorderSubsystems(state.matrix, state.dims, perm);
  const dims = perm.map((s) => state.dims[s]);
  return state.labels ? { matrix, dims, labels: perm.map((s) => state.labels![s]) } : { matrix, dims };
}

/** Give a state new subsystem labels (one per subsystem). */
export function relabelState(state: State, labels: readonly string[]): State {
  if (labels.length !== state.dims.length) {
    throw new RhoError('dimension-mismatch', `There are ${labels.length} labels for ${state.dims.length} subsystems.`, 'labels');
  }
  return { matrix: state.matrix, dims: [...state.dims], labels: [...labels] };
}

/** A classical state Σ_i p_i |i⟩⟨i| (diagonal), for convenience. */
export function diagonalState(p: readonly number[], tolerance = DEFAULT_TOLERANCE): State {
  checkProbabilities(p, 'probabilities', tolerance);
  return { matrix: diagonal(p), dims: [p.length] };
}
