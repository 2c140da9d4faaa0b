/**
 * Named channels from the textbooks, each as Kraus operators with its parameters checked
 * (RhoError 'invalid-argument' naming the parameter).
 *
 * Conventions (each stated again at the function):
 * - depolarizing(d, p): ρ ↦ (1 − p)ρ + p Tr(ρ) I/d; completely positive for 0 ≤ p ≤ d²/(d² − 1).
 *   Kraus operators from the d² Weyl (clock-and-shift) operators W_ab = X^a Z^b, which form a unitary
 *   1-design: (1/d²) Σ_ab W_ab ρ W_ab* = Tr(ρ) I/d.
 * - dephasing(d, p): ρ ↦ (1 − p)ρ + p Δ(ρ) with Δ the complete dephasing (diagonal part) in the
 *   computational basis, 0 ≤ p ≤ 1. For a qubit this is the phase flip ρ ↦ (1 − p/2)ρ + (p/2) ZρZ.
 * - amplitudeDamping(γ): K_0 = |0⟩⟨0| + √(1−γ)|1⟩⟨1|, K_1 = √γ |0⟩⟨1| (decay |1⟩ → |0⟩ with probability γ).
 * - generalizedAmplitudeDamping(γ, N): amplitude damping towards the thermal qubit diag(1 − N, N);
 *   N ∈ [0, 1] is the excited population of the environment (N = 0 is amplitude damping). Kraus
 *   operators √(1−N)·{K_0, K_1} and √N·{√(1−γ)|0⟩⟨0| + |1⟩⟨1|, √γ|1⟩⟨0|}.
 * - erasure(d, p): output dimension d + 1, the last level |d⟩ is the erasure flag: ρ ↦ (1−p)ρ ⊕ p|d⟩⟨d|.
 * - conditional expectation onto ⊕_k (M_{n_k} ⊗ I_{m_k}): see conditionalExpectation.
 * - group twirl: X ↦ (1/|G|) Σ_g U_g X U_g*; group closure is not checked (the map is a mixed-unitary
 *   channel for any list of unitaries; it is the projection onto the commutant only for a group).
 *
 * Every preset checks the size of what it would build against the engine's limits (src/limits.ts:
 * at most 1024 Kraus operators, sides of at most 1024, 4 194 304 Kraus entries) before allocating
 * anything, with 'too-large' naming the parameter, so that a preset never builds what the engine
 * would refuse as input.
 *
 * Deliberately not here: conversions and application (channels.ts), plain-data parsing (ops/).
 * Cost: each preset is O(r · d_in d_out) to build for r Kraus operators, plus the checks of user-given
 * matrices (unitarity O(d³) each, POVM/projector checks one eigendecomposition each).
 */
import {
  CMatrix, zeros, identity, mul, adjoint, sub, add, scale, maxAbs, kron, isFinite,
} from '../linalg/cmatrix.js';
import { eigh } from '../linalg/eigh.js';
import { offsets, product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import type { Channel } from './types.js';
import { checkDensityMatrix, checkHermitian, checkPositive, DEFAULT_TOLERANCE } from './validate.js';
import { checkDimList, checkInteger, checkNumber, checkSystemList } from './arguments.js';
import { checkKrausFamily } from '../limits.js';

/** The Weyl operator W_ab = X^a Z^b on C^d: W_ab|j⟩ = ω^{bj} |j + a mod d⟩, ω = e^{2πi/d}. */
export function weylOperator(d: number, a: number, b: number): CMatrix {
  const W = zeros(d, d);
  for (let j = 0; j < d; j++) {
    const phase = (2 * Math.PI * ((b * j) % d)) / d;
    const row = (j + a) % d;
    W.re[row * d + j] = Math.cos(phase);
    W.im[row * d + j] = Math.sin(phase);
  }
  return W;
}

/** Depolarizing channel ρ ↦ (1 − p)ρ + p Tr(ρ) I/d, 0 ≤ p ≤ d²/(d² − 1) (the CP range). */
export function depolarizing(d: number, p: number): Channel {
  checkInteger(d, 'd');
  const pmax = d === 1 ? 1 : (d * d) / (d * d - 1);
  checkNumber(p, 'p', { min: 0, max: pmax });
  checkKrausFamily(p > 0 ? d * d : 1, d, d, 'd');
  const kraus: CMatrix[] = [];
  const w0 = Math.max(0, 1 - p + p / (d * d));
  if (w0 > 0) kraus.push(scale(identity(d), Math.sqrt(w0)));
  if (p > 0) {
    const w = Math.sqrt(p / (d * d));
    for (let a = 0; a < d; a++) for (let b = 0; b < d; b++) if (a !== 0 || b !== 0) kraus.push(scale(weylOperator(d, a, b), w));
  }
  if (kraus.length === 0) kraus.push(scale(identity(d), 0));
  return { kraus, fromDims: [d], toDims: [d] };
}

/** Dephasing ρ ↦ (1 − p)ρ + p·diag(ρ) in the computational basis, 0 ≤ p ≤ 1. */
export function dephasing(d: number, p: number): Channel {
  checkInteger(d, 'd');
  checkNumber(p, 'p', { min: 0, max: 1 });
  checkKrausFamily((p < 1 ? 1 : 0) + (p > 0 ? d : 0), d, d, 'd');
  const kraus: CMatrix[] = [];
  if (p < 1) kraus.push(scale(identity(d), Math.sqrt(1 - p)));
  if (p > 0) {
    for (let i = 0; i < d; i++) {
      const P = zeros(d, d);
      P.re[i * d + i] = Math.sqrt(p);
      kraus.push(P);
    }
  }
  return { kraus, fromDims: [d], toDims: [d] };
}

/** Qubit amplitude damping with decay probability γ ∈ [0, 1]. */
export function amplitudeDamping(gamma: number): Channel {
  checkNumber(gamma, 'gamma', { min: 0, max: 1 });
  const K0 = zeros(2, 2);
  K0.re[0] = 1;
  K0.re[3] = Math.sqrt(1 - gamma);
  const K1 = zeros(2, 2);
  K1.re[1] = Math.sqrt(gamma);
  return { kraus: [K0, K1], fromDims: [2], toDims: [2] };
}

/** Generalized amplitude damping: decay γ ∈ [0, 1] towards diag(1 − N, N), N ∈ [0, 1] (see header). */
export function generalizedAmplitudeDamping(gamma: number, N: number): Channel {
  checkNumber(gamma, 'gamma', { min: 0, max: 1 });
  checkNumber(N, 'N', { min: 0, max: 1 });
  const a = Math.sqrt(1 - N);
  const b = Math.sqrt(N);
  const K0 = zeros(2, 2);
  K0.re[0] = a;
  K0.re[3] = a * Math.sqrt(1 - gamma);
  const K1 = zeros(2, 2);
  K1.re[1] = a * Math.sqrt(gamma);
  const K2 = zeros(2, 2);
  K2.re[0] = b * Math.sqrt(1 - gamma);
  K2.re[3] = b;
  const K3 = zeros(2, 2);
  K3.re[2] = b * Math.sqrt(gamma);
  return { kraus: [K0, K1, K2, K3], fromDims: [2], toDims: [2] };
}

/** Erasure channel C^d → C^{d+1}: ρ ↦ (1 − p)ρ ⊕ p|d⟩⟨d| (the flag is the last level). */
export function erasure(d: number, p: number): Channel {
  checkInteger(d, 'd');
  checkNumber(p, 'p', { min: 0, max: 1 });
  checkKrausFamily(d + 1, d + 1, d, 'd');
  const kraus: CMatrix[] = [];
  const K0 = zeros(d + 1, d);
  for (let i = 0; i < d; i++) K0.re[i * d + i] = Math.sqrt(1 - p);
  kraus.push(K0);
  for (let i = 0; i < d; i++) {
    const K = zeros(d + 1, d);
    K.re[d * d + i] = Math.sqrt(p);
    kraus.push(K);
  }
  return { kraus, fromDims: [d], toDims: [d + 1] };
}

/** Largest entry of |U*U − I|: zero for a unitary. */
export function unitarityDefect(u: CMatrix): number {
  if (u.rows !== u.cols) return Infinity;
  return maxAbs(sub(mul(adjoint(u), u), identity(u.rows)));
}

function checkUnitary(u: CMatrix, tolerance: number, path: string): void {
  if (u.rows !== u.cols) throw new RhoError('dimension-mismatch', `A unitary must be square; this one is ${u.rows}x${u.cols}.`, path);
  if (!isFinite(u)) throw new RhoError('invalid-argument', 'The matrix has a NaN or infinite entry.', path);
  const defect = unitarityDefect(u);
  if (defect > tolerance) {
    throw new RhoError('invalid-argument', `The matrix is not unitary: U*U differs from I by ${defect.toExponential(3)} in some entry.`, path, { defect });
  }
}

/** ρ ↦ UρU* for a unitary U (checked: max |U*U − I| ≤ tolerance). */
export function unitaryChannel(u: CMatrix, dims?: readonly number[], tolerance = DEFAULT_TOLERANCE): Channel {
  checkUnitary(u, tolerance, 'unitary');
  const d = dims ? checkDimList(dims, 'dims') : [u.rows];
  if (product(d) !== u.rows) throw new RhoError('dimension-mismatch', `The dims [${d.join(', ')}] do not multiply to ${u.rows}.`, 'dims');
  return { kraus: [u], fromDims: [...d], toDims: [...d] };
}

/**
 * The partial trace over `traceOut` as a channel from ⊗_k C^{dims[k]} to the kept subsystems (in order).
 * Kraus operators I_kept ⊗ ⟨t|_traced, one per basis vector t of the traced subsystems.
 */
export function partialTraceChannel(dims: readonly number[], traceOut: readonly number[]): Channel {
  const d = checkDimList(dims, 'dims');
  checkSystemList(traceOut, d.length, 'traceOut');
  if (traceOut.length === d.length) {
    throw new RhoError('invalid-argument', 'Tracing out every subsystem leaves nothing; keep at least one.', 'traceOut');
  }
  const out = new Set(traceOut);
  const keep = d.map((_, k) => k).filter((k) => !out.has(k));
  const traced = product(traceOut.map((k) => d[k]));
  checkKrausFamily(traced, product(d) / traced, product(d), 'dims');
  const offK = offsets(d, keep);
  const offT = offsets(d, [...traceOut].sort((a, b) => a - b));
  const D = product(d);
  const dk = offK.length;
  const kraus: CMatrix[] = [];
  for (let t = 0; t < offT.length; t++) {
    const K = zeros(dk, D);
    for (let i = 0; i < dk; i++) K.re[i * D + offK[i] + offT[t]] = 1;
    kraus.push(K);
  }
  return { kraus, fromDims: [...d], toDims: keep.map((k) => d[k]) };
}

/** Throws unless the list is a POVM: each element PSD, all the same size, summing to I within tolerance. */
export function checkPovm(elements: readonly CMatrix[], tolerance = DEFAULT_TOLERANCE, path = 'povm'): void {
  if (elements.length === 0) throw new RhoError('invalid-argument', 'A POVM needs at least one element.', path);
  const n = elements[0].rows;
  let sum = zeros(n, n);
  elements.forEach((m, k) => {
    if (m.rows !== n || m.cols !== n) {
      throw new RhoError('dimension-mismatch', `POVM element ${k} is ${m.rows}x${m.cols}; element 0 is ${n}x${n}.`, `${path}[${k}]`);
    }
    checkPositive(m, tolerance, `${path}[${k}]`);
    sum = add(sum, m);
  });
  const defect = maxAbs(sub(sum, identity(n)));
  if (defect > tolerance * Math.max(1, elements.length)) {
    throw new RhoError('invalid-argument', `The POVM elements do not sum to the identity (largest entry of the difference ${defect.toExponential(3)}).`, path, { defect });
  }
}

/** Positive square-root factors √λ |v⟩ of a PSD matrix (eigenvalues ≤ tol·λ_max dropped). */
function psdFactors(m: CMatrix, tolerance: number): { re: Float64Array; im: Float64Array }[] {
  const { values, vectors } = eigh(m, { vectors: true });
  const n = m.rows;
  const top = Math.max(0, values[n - 1]);
  const out: { re: Float64Array; im: Float64Array }[] = [];
  for (let k = n - 1; k >= 0; k--) {
    if (values[k] <= tolerance * top || values[k] <= 0) continue;
    const s = Math.sqrt(values[k]);
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      re[i] = s * vectors!.re[i * n + k];
      im[i] = s * vectors!.im[i * n + k];
    }
    out.push({ re, im });
  }
  return out;
}

/**
 * Measure-and-prepare (entanglement-breaking) channel ρ ↦ Σ_x Tr(M_x ρ) σ_x for a POVM {M_x} and
 * density matrices {σ_x}. Kraus operators √(μ_i s_j) |s_j⟩⟨m_i| from the spectral decompositions
 * M_x = Σ_i μ_i |m_i⟩⟨m_i| and σ_x = Σ_j s_j |s_j⟩⟨s_j| (eigenvalues ≤ tolerance · largest dropped).
 */
export function measurePrepare(
  povm: readonly CMatrix[], states: readonly CMatrix[], tolerance = DEFAULT_TOLERANCE,
  fromDims?: readonly number[], toDims?: readonly number[],
): Channel {
  checkPovm(povm, tolerance, 'povm');
  if (states.length !== povm.length) {
    throw new RhoError('dimension-mismatch', `There are ${povm.length} POVM elements but ${states.length} states to prepare.`, 'states');
  }
  const dIn = povm[0].rows;
  const dOut = states[0].rows;
  states.forEach((s, k) => {
    if (s.rows !== dOut) throw new RhoError('dimension-mismatch', `State ${k} is ${s.rows}x${s.cols}; state 0 is ${dOut}x${dOut}.`, `states[${k}]`);
    checkDensityMatrix(s, tolerance, `states[${k}]`);
  });
  const inD = fromDims ? checkDimList(fromDims, 'fromDims') : [dIn];
  const outD = toDims ? checkDimList(toDims, 'toDims') : [dOut];
  if (product(inD) !== dIn) throw new RhoError('dimension-mismatch', `fromDims multiply to ${product(inD)}, the POVM acts on dimension ${dIn}.`, 'fromDims');
  if (product(outD) !== dOut) throw new RhoError('dimension-mismatch', `toDims multiply to ${product(outD)}, the states have dimension ${dOut}.`, 'toDims');
  const factors = povm.map((M, x) => ({ ms: psdFactors(M, tolerance), ss: psdFactors(states[x], tolerance) }));
  checkKrausFamily(factors.reduce((s, f) => s + f.ms.length * f.ss.length, 0), dOut, dIn, 'povm');
  const kraus: CMatrix[] = [];
  factors.forEach(({ ms, ss }) => {
    for (const m of ms) {
      for (const s of ss) {
        // |s⟩⟨m| with the square-root weights already inside both vectors.
        const K = zeros(dOut, dIn);
        for (let a = 0; a < dOut; a++) {
          for (let i = 0; i < dIn; i++) {
            K.re[a * dIn + i] = s.re[a] * m.re[i] + s.im[a] * m.im[i];
            K.im[a * dIn + i] = s.im[a] * m.re[i] - s.re[a] * m.im[i];
          }
        }
        kraus.push(K);
      }
    }
  });
  if (kraus.length === 0) kraus.push(zeros(dOut, dIn));
  return { kraus, fromDims: inD, toDims: outD };
}

/**
 * Pinching ρ ↦ Σ_k P_k ρ P_k for orthogonal projectors summing to I (checked: Hermitian, P_k² = P_k,
 * P_k P_l = 0, Σ P_k = I, each within tolerance).
 */
export function pinchingByProjectors(projectors: readonly CMatrix[], tolerance = DEFAULT_TOLERANCE, dims?: readonly number[]): Channel {
  if (projectors.length === 0) throw new RhoError('invalid-argument', 'Pinching needs at least one projector.', 'projectors');
  const n = projectors[0].rows;
  let sum = zeros(n, n);
  projectors.forEach((P, k) => {
    const path = `projectors[${k}]`;
    if (P.rows !== n || P.cols !== n) throw new RhoError('dimension-mismatch', `Projector ${k} is ${P.rows}x${P.cols}; projector 0 is ${n}x${n}.`, path);
    checkHermitian(P, tolerance, path);
    const idem = maxAbs(sub(mul(P, P), P));
    if (idem > tolerance) throw new RhoError('invalid-argument', `Matrix ${k} is not a projector: P² differs from P by ${idem.toExponential(3)}.`, path, { defect: idem });
    for (let l = 0; l < k; l++) {
      const overlap = maxAbs(mul(projectors[l], P));
      if (overlap > tolerance) throw new RhoError('invalid-argument', `Projectors ${l} and ${k} are not orthogonal (largest entry of their product ${overlap.toExponential(3)}).`, path, { defect: overlap });
    }
    sum = add(sum, P);
  });
  const defect = maxAbs(sub(sum, identity(n)));
  if (defect > tolerance) throw new RhoError('invalid-argument', `The projectors do not sum to the identity (defect ${defect.toExponential(3)}).`, 'projectors', { defect });
  const d = dims ? checkDimList(dims, 'dims') : [n];
  if (product(d) !== n) throw new RhoError('dimension-mismatch', `dims multiply to ${product(d)}, the projectors are ${n}x${n}.`, 'dims');
  return { kraus: projectors.map((P) => ({ rows: n, cols: n, re: P.re.slice(), im: P.im.slice() })), fromDims: [...d], toDims: [...d] };
}

/**
 * Pinching in an orthonormal basis (the columns of the unitary `basis`; the computational basis of
 * dimension `basis` when a number): ρ ↦ Σ_i |u_i⟩⟨u_i| ρ |u_i⟩⟨u_i|.
 */
export function pinchingInBasis(basis: CMatrix | number, tolerance = DEFAULT_TOLERANCE, dims?: readonly number[]): Channel {
  if (typeof basis === 'number') checkKrausFamily(checkInteger(basis, 'd'), basis, basis, 'd');
  const U = typeof basis === 'number' ? identity(basis) : basis;
  checkUnitary(U, tolerance, 'basis');
  const n = U.rows;
  const projectors: CMatrix[] = [];
  for (let i = 0; i < n; i++) {
    const u = zeros(n, 1);
    for (let r = 0; r < n; r++) {
      u.re[r] = U.re[r * n + i];
      u.im[r] = U.im[r * n + i];
    }
    projectors.push(mul(u, adjoint(u)));
  }
  const d = dims ? checkDimList(dims, 'dims') : [n];
  if (product(d) !== n) throw new RhoError('dimension-mismatch', `dims multiply to ${product(d)}, the basis has ${n} vectors.`, 'dims');
  return { kraus: projectors, fromDims: [...d], toDims: [...d] };
}

/**
 * The trace-preserving conditional expectation onto the block-diagonal algebra ⊕_k (M_{n_k} ⊗ I_{m_k})
 * acting on ⊕_k (C^{n_k} ⊗ C^{m_k}) (blocks consecutive, multiplicity factor second within a block),
 * optionally in the basis given by the columns of a unitary `basis` (algebra U(⊕_k M_{n_k} ⊗ I_{m_k})U*):
 *   E(X) = ⊕_k Tr_{m_k}(P_k X P_k) ⊗ I_{m_k}/m_k.
 * This is the standard construction from the structure theorem of finite-dimensional *-algebras
 * (every such algebra is unitarily ⊕_k M_{n_k} ⊗ I_{m_k}), as in Petz, "Quantum Information Theory and
 * Quantum Statistics" (Springer 2008) — recalled from memory, no section number given. E is the
 * Hilbert–Schmidt-orthogonal projection onto the algebra, trace preserving and unital.
 * Kraus operators: m_k^{-1/2} · (I_{n_k} ⊗ |a⟩⟨b|) inside block k, for a, b < m_k (Σ_k m_k² of them);
 * indeed Σ_ab (I ⊗ |a⟩⟨b|) Y (I ⊗ |b⟩⟨a|) = Tr_m(Y) ⊗ I_m.
 */
export function conditionalExpectation(
  blocks: readonly number[], multiplicities: readonly number[], basis?: CMatrix, tolerance = DEFAULT_TOLERANCE,
): Channel {
  const n = checkDimList(blocks, 'blocks');
  const m = checkDimList(multiplicities, 'multiplicities');
  if (n.length !== m.length) {
    throw new RhoError('dimension-mismatch', `There are ${n.length} block sizes but ${m.length} multiplicities.`, 'multiplicities');
  }
  const D = n.reduce((s, nk, k) => s + nk * m[k], 0);
  checkKrausFamily(m.reduce((s, mk) => s + mk * mk, 0), D, D, 'blocks');
  if (basis) {
    checkUnitary(basis, tolerance, 'basis');
    if (basis.rows !== D) throw new RhoError('dimension-mismatch', `The basis is ${basis.rows}x${basis.rows}; the blocks need dimension ${D}.`, 'basis');
  }
  const kraus: CMatrix[] = [];
  let offset = 0;
  n.forEach((nk, k) => {
    const mk = m[k];
    const w = 1 / Math.sqrt(mk);
    for (let a = 0; a < mk; a++) {
      for (let b = 0; b < mk; b++) {
        let K = zeros(D, D);
        for (let i = 0; i < nk; i++) K.re[(offset + i * mk + a) * D + (offset + i * mk + b)] = w;
        if (basis) K = mul(mul(basis, K), adjoint(basis));
        kraus.push(K);
      }
    }
    offset += nk * mk;
  });
  return { kraus, fromDims: [D], toDims: [D] };
}

/**
 * Twirl X ↦ (1/|G|) Σ_g U_g X U_g* over a finite group given by its unitaries (each checked; closure
 * under products is not checked). Kraus operators U_g/√|G|.
 */
export function groupTwirl(unitaries: readonly CMatrix[], dims?: readonly number[], tolerance = DEFAULT_TOLERANCE): Channel {
  if (unitaries.length === 0) throw new RhoError('invalid-argument', 'A twirl needs at least one unitary.', 'unitaries');
  const n = unitaries[0].rows;
  unitaries.forEach((U, k) => {
    if (U.rows !== n) throw new RhoError('dimension-mismatch', `Unitary ${k} is ${U.rows}x${U.cols}; unitary 0 is ${n}x${n}.`, `unitaries[${k}]`);
    checkUnitary(U, tolerance, `unitaries[${k}]`);
  });
  const d = dims ? checkDimList(dims, 'dims') : [n];
  if (product(d) !== n) throw new RhoError('dimension-mismatch', `dims multiply to ${product(d)}, the unitaries are ${n}x${n}.`, 'dims');
  const w = 1 / Math.sqrt(unitaries.length);
  return { kraus: unitaries.map((U) => scale(U, w)), fromDims: [...d], toDims: [...d] };
}

/** U ⊗ U for each U (for Werner-type twirls) or U ⊗ Ū (isotropic-type), as a helper for callers. */
export function doubled(unitaries: readonly CMatrix[], conjugateSecond: boolean): CMatrix[] {
  return unitaries.map((U) => {
    if (!conjugateSecond) return kron(U, U);
    const Ubar: CMatrix = { rows: U.rows, cols: U.cols, re: U.re, im: U.im.map((x) => -x) };
    return kron(U, Ubar);
  });
}
