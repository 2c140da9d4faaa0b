/**
 * Diamond-norm distance ½‖N − M‖_⋄ of two channels with the same input and output spaces, by
 * Watrous's semidefinite program (J. Watrous, "Semidefinite programs for completely bounded norms",
 * Theory of Computing 5, 217 (2009), and "Simpler semidefinite programs for completely bounded
 * norms", Chicago J. Theor. Comput. Sci. 2013, art. 8, Sec. 4 — the form for a difference of
 * channels):
 *
 *   ½‖N − M‖_⋄ = max { ⟨J, W⟩ : 0 ⪯ W ⪯ σ ⊗ 1_out, σ ⪰ 0, Tr σ = 1 }                    (primal)
 *              = min { ‖Tr_out Z‖_∞ : Z ⪰ 0, Z ⪰ J }                                      (dual)
 *
 * with J = J(N) − J(M) the Choi matrix of the difference in this project's convention
 * (J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input factor first; Watrous puts the output first, which only
 * reorders the factors). Why it holds: the maximum over inputs is reached on pure states
 * |ψ⟩ = (√σ ⊗ 1)|Ω⟩, Ω = Σ_i |i⟩|i⟩, whose output is (√σ ⊗ 1) J (√σ ⊗ 1); its trace norm is
 * 2 max_{0⪯P⪯1} ⟨P, ·⟩ because the output is traceless — this needs N and M trace preserving,
 * which is checked.
 *
 * The optimal input: σ is the reference's reduced state, so the channel input sees σᵀ, and the
 * purification |ψ⟩ = Σ_i |i⟩ ⊗ √σ|i⟩ (channel input first, reference second) is returned. Two
 * checkable bounds: `lower` is ½‖((N − M) ⊗ id)(ψ)‖₁ recomputed from ψ by applying the Kraus
 * operators (the definition of the diamond norm, nothing from the SDP but ψ); `upper` is
 * ‖Tr_out Z′‖_∞ for the dual point Z rebuilt from the solver's multipliers and shifted by ε·1 to
 * repair any eigenvalue of Z or Z − J below zero (weak duality). Floating-point evidence, not proofs.
 *
 * Deliberately not here: completely bounded norms of general Hermiticity-preserving maps (the SDP
 * above is specific to trace-annihilating differences), channels given only by a Choi matrix
 * (callers convert; codec.readChannel does), and energy-constrained or other variants.
 *
 * Cost: n = d_in·d_out; three Hermitian blocks (n, d_in, n) and n² + 1 constraints; the Schur
 * complement is (n² + 1)² per iteration, so about O(n⁶): fine for n ≤ 16, slow beyond ~n = 36.
 */
import {
  CMatrix, eigh, hermitianPart, identity, scale, sub, traceNorm, transpose, zeros, partialTrace,
} from '../linalg/index.js';
import { sqrtm } from '../linalg/functions.js';
import { product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import type { Channel } from '../quantum/types.js';
import { krausSum, krausToChoi } from '../quantum/channels.js';
import { solveSdp, matrixCoordinates, coordinateEntry, type Constraint, type Entry, type SdpOptions, type SdpProblem } from '../sdp/index.js';
import {
  ACCEPT_INACCURATE_LOOSE, certify, eigenvalueAllowance, frobenius, maxEigenvalueUpper, multiplierMatrix, psdShift, type SdpCertificate,
} from '../sdp/support.js';

export interface DiamondResult {
  /** ½‖N − M‖_⋄ from the solver's primal objective. */
  value: number;
  /** The channel input's state σᵀ of an optimal input (d_in × d_in density matrix). */
  input: CMatrix;
  /** An optimal input purified: |ψ⟩ = Σ_i |i⟩ ⊗ √σ|i⟩, channel input first, reference (d_in) second. */
  purification: CMatrix;
  certificate: SdpCertificate;
  /** `lower` achieved by `purification` (recomputed by the definition), `upper` from the repaired dual point (= certificate.bounds). */
  bounds: { lower: number; upper: number };
  diagnostics: {
    /** ‖Σ K*K − 1‖ (operator norm) of each channel: the trace-preservation defect accepted. */
    traceDefects: [number, number];
    /** Shift ε that made the dual point feasible (0 when it already was). */
    dualViolation: number;
  };
  warning?: string;
}

export interface DiamondOptions {
  /** Accepted defect ‖Σ K*K − 1‖ for each channel (default 1e-9). */
  tolerance?: number;
  sdp?: SdpOptions;
}

function traceDefect(c: Channel): number {
  const d = product(c.fromDims);
  const e = eigh(hermitianPart(sub(krausSum(c, 'KstarK'), identity(d))), { vectors: false }).values;
  return Math.max(Math.abs(e[0]), Math.abs(e[e.length - 1]));
}

/**
 * Watrous's primal (see the header) as handed to the solver, for the Hermitian Choi difference J
 * (n×n, n = d_in·d_out, input factor first): minimize −⟨J, W⟩ over blocks 0 W (n), 1 σ (d_in),
 * 2 T = σ ⊗ 1 − W (n), with the rows W + T − σ ⊗ 1 = 0 (one per real coordinate, in
 * matrixCoordinates order; the dual point Z is read back from their multipliers) and Tr σ = 1.
 * Exported for the benchmark, which times the solve of exactly this problem.
 */
export function diamondProblem(J: CMatrix, din: number, dout: number): SdpProblem {
  const n = din * dout;
  const constraints: Constraint[] = [];
  for (const c of matrixCoordinates(n, true)) {
    const e = coordinateEntry(c.i, c.j, c.part);
    const terms: Constraint['terms'][number][] = [{ block: 0, entries: [e] }, { block: 2, entries: [e] }];
    const oi = c.i % dout;
    const oj = c.j % dout;
    if (oi === oj) {
      const s = coordinateEntry(Math.floor(c.i / dout), Math.floor(c.j / dout), c.part);
      const neg: Entry = s.length === 3 ? [s[0], s[1], -s[2]] : [s[0], s[1], -(s[2] as number), -(s[3] as number)];
      terms.push({ block: 1, entries: [neg] });
    }
    constraints.push({ terms, equals: 0 });
  }
  const traceEntries: Entry[] = [];
  for (let i = 0; i < din; i++) traceEntries.push([i, i, 1]);
  constraints.push({ terms: [{ block: 1, entries: traceEntries }], equals: 1, label: 'Tr σ = 1' });
  return {
    cones: [{ kind: 'hermitian', size: n }, { kind: 'hermitian', size: din }, { kind: 'hermitian', size: n }],
    objective: [{ block: 0, matrix: scale(J, -1) }],
    constraints,
  };
}

/** ½‖N − M‖_⋄ with the optimal input and the certificate (see the header for the SDP). */
export function diamondDistance(a: Channel, b: Channel, options: DiamondOptions = {}): DiamondResult {
  const tol = options.tolerance ?? 1e-9;
  const din = product(a.fromDims);
  const dout = product(a.toDims);
  if (product(b.fromDims) !== din || product(b.toDims) !== dout) {
    throw new RhoError(
      'dimension-mismatch',
      `The channels map C^${din} → C^${dout} and C^${product(b.fromDims)} → C^${product(b.toDims)}; the diamond distance needs the same input and output spaces.`,
      'b',
    );
  }
  const defects: [number, number] = [traceDefect(a), traceDefect(b)];
  defects.forEach((t, k) => {
    if (t > tol) {
      throw new RhoError(
        'not-trace-preserving',
        `Channel ${k === 0 ? 'a' : 'b'} is not trace preserving (‖Σ K*K − 1‖ = ${t.toExponential(3)} > ${tol}); the diamond-distance SDP used here holds for differences of channels only.`,
        k === 0 ? 'a' : 'b',
        { defect: t },
      );
    }
  });
  const n = din * dout;
  const J = hermitianPart(sub(krausToChoi(a), krausToChoi(b)));

  const answer = solveSdp(diamondProblem(J, din, dout), options.sdp);

  // The optimal input: σ normalised to unit trace (it has unit trace up to the residual).
  let sigma = hermitianPart(answer.x[1] as CMatrix);
  let tr = 0;
  for (let i = 0; i < din; i++) tr += sigma.re[i * din + i];
  sigma = scale(sigma, 1 / tr);
  const root = sqrtm(sigma);
  const psi = zeros(din * din, 1);
  for (let i = 0; i < din; i++) {
    for (let r = 0; r < din; r++) {
      psi.re[i * din + r] = root.re[r * din + i];
      psi.im[i * din + r] = root.im[r * din + i];
    }
  }
  const outputs = zeros(n, n);
  addOutputOnFirst(outputs, a, psi, din, din, 1);
  addOutputOnFirst(outputs, b, psi, din, din, -1);
  const achieved = 0.5 * traceNorm(outputs);
  const lower = achieved - 0.5 * n * eigenvalueAllowance(n, frobenius(outputs));

  // The dual point: S_T = −Zc, S_W = −J − Zc with Zc = Σ_c y_c A_c; Z = −Zc, shifted by ε·1 so that
  // Z ⪰ 0 and Z ⪰ J hold; the upper bound is ‖Tr_out Z‖_∞.
  const Z = scale(multiplierMatrix(answer.y, 0, n), -1);
  const dualViolation = Math.max(psdShift(Z), psdShift(Z, J));
  const zr = scale(Z, 1);
  for (let i = 0; i < n; i++) zr.re[i * n + i] += dualViolation;
  const reduced = partialTrace(zr, [din, dout], [1]);
  const upper = maxEigenvalueUpper(reduced);
  const c = certify({
    what: 'the diamond distance', solve: answer,
    problem:
      'maximize ⟨J, W⟩ s.t. 0 ⪯ W ⪯ σ ⊗ I_out, σ ⪰ 0, Tr σ = 1 (J = J(N) − J(M), input factor first); primal point: the optimal input purified, ' +
      '|ψ⟩ = Σ_i |i⟩ ⊗ √σ|i⟩, whose value ½‖((N − M) ⊗ id)(ψψ*)‖₁ is recomputed; dual: minimize ‖Tr_out Z‖_∞ s.t. Z ⪰ 0, Z ⪰ J',
    sense: 'maximize',
    primal: { purification: psi }, primalObjective: achieved,
    dual: { Z }, dualObjective: maxEigenvalueUpper(partialTrace(Z, [din, dout], [1])),
    bounds: { lower, upper },
    estimate: -answer.primalObjective,
    range: [0, 1],
    limit: ACCEPT_INACCURATE_LOOSE,
  });

  const result: DiamondResult = {
    value: c.value,
    input: hermitianPart(transpose(sigma)),
    purification: psi,
    certificate: c.certificate,
    bounds: c.certificate.bounds,
    diagnostics: { traceDefects: defects, dualViolation },
  };
  if (c.note) result.warning = c.note;
  return result;
}

/**
 * out += sign · (N ⊗ id_R)(|ψ⟩⟨ψ|) for a column ψ on C^din ⊗ C^dref, as Σ_k v_k v_k† with
 * v_k = (K_k ⊗ 1)ψ, (v_k)_(o,r) = Σ_i (K_k)_oi ψ_(i,r): the definition through the Kraus operators,
 * without forming K ⊗ 1 or |ψ⟩⟨ψ|. out is (d_out·dref)², output factor first.
 */
function addOutputOnFirst(out: CMatrix, c: Channel, psi: CMatrix, din: number, dref: number, sign: number): void {
  const m = out.rows;
  const vr = new Float64Array(m);
  const vi = new Float64Array(m);
  for (const K of c.kraus) {
    const dout = K.rows;
    for (let o = 0; o < dout; o++) {
      for (let r = 0; r < dref; r++) {
        let sr = 0;
        let si = 0;
        for (let i = 0; i < din; i++) {
          const kr = K.re[o * din + i];
          const ki = K.im[o * din + i];
          const pr = psi.re[i * dref + r];
          const pi = psi.im[i * dref + r];
          sr += kr * pr - ki * pi;
          si += kr * pi + ki * pr;
        }
        vr[o * dref + r] = sr;
        vi[o * dref + r] = si;
      }
    }
    for (let p = 0; p < m; p++) {
      for (let q = 0; q < m; q++) {
        // v_p conj(v_q)
        out.re[p * m + q] += sign * (vr[p] * vr[q] + vi[p] * vi[q]);
        out.im[p * m + q] += sign * (vi[p] * vr[q] - vr[p] * vi[q]);
      }
    }
  }
}
