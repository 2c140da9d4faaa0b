/**
 * Fidelity as a semidefinite program (Watrous, "Simpler semidefinite programs for completely
 * bounded norms", Chicago J. Theor. Comput. Sci. 2013, Sec. 3; also Watrous, The Theory of Quantum
 * Information (2018), Thm 3.17):
 *
 *   √F(ρ, σ) = ‖√ρ √σ‖₁ = max { Re Tr X : [[ρ, X], [X*, σ]] ⪰ 0 }
 *            = min { ½(⟨ρ, Y₀⟩ + ⟨σ, Y₁⟩) : [[Y₀, −1], [−1, Y₁]] ⪰ 0 }.
 *
 * Used by the tests to check the closed form of src/quantities/fidelity.ts, and as the building block
 * of the fidelity of recovery (src/recovery/fidelity-of-recovery.ts), where σ is a variable.
 *
 * Method: the block matrix is restricted to the supports first. With ρ = V Λ V*, σ = W M W* on their
 * supports (eigenvalues above tol·λ_max), every feasible X has the form V X′ W* and the constraint
 * becomes [[Λ, X′], [X′*, M]] ⪰ 0 with objective Re Tr(X′ W*V). This keeps a strictly feasible point
 * when ρ or σ is rank-deficient (the unreduced problem has none, and interior-point methods then
 * lose accuracy). The support decision depends on `tol`; ranks are returned.
 *
 * Deliberately not here: the closed form (quantities/fidelity.ts); fidelities of channels.
 * Cost: one Hermitian block of size r + s and r² + s² constraints; O((r² + s²)³) per iteration for
 * the Schur complement, so meant for small matrices (tests, the recovery SDP), not as the default
 * way to compute a fidelity.
 */
import { CMatrix, adjoint, eigh, hermitianPart, mul, zeros, operatorNorm, traceOfProductRe, fromSpectrum } from '../linalg/index.js';
import { zeroThreshold, DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { RhoError } from '../errors.js';
import { solveSdp, coordinateEntry, matrixCoordinates, type BlockTerm, type Constraint, type SdpOptions } from '../sdp/index.js';
import {
  ACCEPT_INACCURATE_LOOSE, certify, multiplierMatrix, realPartEntries, roundingPad, type SdpCertificate,
} from '../sdp/support.js';

/** Support of a PSD matrix: V (n × r, orthonormal columns) and the kept eigenvalues. */
export function supportOf(m: CMatrix, tol: number): { basis: CMatrix; values: number[] } {
  const { values, vectors } = eigh(hermitianPart(m), { vectors: true });
  const thr = zeroThreshold(values, tol);
  const keep: number[] = [];
  values.forEach((v, k) => {
    if (v > thr && v > 0) keep.push(k);
  });
  const n = m.rows;
  const basis = zeros(n, keep.length);
  keep.forEach((k, c) => {
    for (let i = 0; i < n; i++) {
      basis.re[i * keep.length + c] = vectors!.re[i * n + k];
      basis.im[i * keep.length + c] = vectors!.im[i * n + k];
    }
  });
  return { basis, values: keep.map((k) => values[k]) };
}

/** Constraints fixing the diagonal block at `offset` of a block to diag(values). */
export function diagonalBlockConstraints(block: number, offset: number, values: readonly number[], label: string): Constraint[] {
  const out: Constraint[] = [];
  for (const c of matrixCoordinates(values.length, true)) {
    out.push({
      terms: [{ block, entries: [coordinateEntry(offset + c.i, offset + c.j, c.part)] }],
      equals: c.i === c.j && c.part === 're' ? values[c.i] : 0,
      label: `${label} (${c.i}, ${c.j}) ${c.part}`,
    });
  }
  return out;
}

export interface FidelitySdpResult {
  /** F = (√F)² (squared, the project's convention). */
  value: number;
  /** √F = −(the solver's primal objective). */
  root: number;
  /** The optimal X (n × n) with [[ρ, X], [X*, σ]] ⪰ 0; Re Tr X = root. */
  offDiagonal: CMatrix;
  /** Certificate: objectives of the root fidelity √F, bounds of F. */
  certificate: SdpCertificate;
  rankRho: number;
  rankSigma: number;
  warning?: string;
}

/** √F(ρ, σ) by Watrous's SDP (see the header), for positive semidefinite ρ, σ of one size. */
export function fidelitySdp(rho: CMatrix, sigma: CMatrix, options: { tol?: number; sdp?: SdpOptions } = {}): FidelitySdpResult {
  if (rho.rows !== sigma.rows || rho.rows !== rho.cols || sigma.rows !== sigma.cols) {
    throw new RhoError('dimension-mismatch', `The two operators have sizes ${rho.rows}×${rho.cols} and ${sigma.rows}×${sigma.cols}; they must be square and of one size.`, 'sigma');
  }
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const n = rho.rows;
  const a = supportOf(rho, tol);
  const b = supportOf(sigma, tol);
  const r = a.values.length;
  const s = b.values.length;
  if (r === 0 || s === 0) {
    // One of them is zero: the fidelity is 0 and there is nothing to optimise.
    return {
      value: 0,
      root: 0,
      offDiagonal: zeros(n, n),
      certificate: {
        status: 'exact', problem: FIDELITY_PROBLEM, sense: 'maximize', primal: { offDiagonal: zeros(n, n) }, primalObjective: 0,
        dual: { Y: zeros(n, n) }, dualObjective: 0, gap: 0, relativeGap: 0, bounds: { lower: 0, upper: 0 }, accuracy: { absolute: 0, relative: 0 },
        iterations: 0, primalResidual: 0, dualResidual: 0, message: 'ρ or σ is zero on the support decided with the tolerance: F = 0',
      },
      rankRho: r,
      rankSigma: s,
    };
  }
  // Objective: minimise −Re Tr(X′ C), C = W*V (s × r), X′_ij = Z[i, r + j].
  const C = mul(adjoint(b.basis), a.basis);
  const terms: [number, number, number, number][] = [];
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < s; j++) terms.push([i, r + j, -C.re[j * r + i], -C.im[j * r + i]]);
  }
  const objective: BlockTerm[] = [{ block: 0, entries: realPartEntries(terms) }];
  const constraints = [
    ...diagonalBlockConstraints(0, 0, a.values, 'ρ block'),
    ...diagonalBlockConstraints(0, r, b.values, 'σ block'),
  ];
  const answer = solveSdp({ cones: [{ kind: 'hermitian', size: r + s }], objective, constraints }, options.sdp);
  const Z = answer.x[0] as CMatrix;
  const Xp = zeros(r, s);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < s; j++) {
      Xp.re[i * s + j] = Z.re[i * (r + s) + r + j];
      Xp.im[i * s + j] = Z.im[i * (r + s) + r + j];
    }
  }
  // Primal: X′ = Λ^½ K M^½ with ‖K‖ ≤ 1 is feasible; shrink by t = min(1, 1/‖Λ^(−½) X′ M^(−½)‖).
  const K = zeros(r, s);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < s; j++) {
      const f = 1 / Math.sqrt(a.values[i] * b.values[j]);
      K.re[i * s + j] = Xp.re[i * s + j] * f;
      K.im[i * s + j] = Xp.im[i * s + j] * f;
    }
  }
  const t = Math.min(1, 1 / (operatorNorm(K) * (1 + 1e-14)));
  let reTr = 0;
  for (let i = 0; i < r; i++) for (let j = 0; j < s; j++) reTr += Xp.re[i * s + j] * C.re[j * r + i] - Xp.im[i * s + j] * C.im[j * r + i];
  const lowerRoot = Math.max(0, t * reTr - roundingPad(r * s, 1));
  // The primal point is the shrunk X = t·V X′ W* (feasible up to rounding), the one whose Re Tr is t·reTr.
  const offDiagonal = mul(mul(a.basis, scale2(Xp, t)), adjoint(b.basis));
  // Dual: P = −2·(multipliers of the ρ block) in ρ's eigenbasis; √F ≤ √(Tr ΛP · Tr (V*σV) P⁻¹) for P ≻ 0.
  const P = scale2(multiplierMatrix(answer.y, 0, r), -2);
  const { pd, inverse } = positiveDefinite(P);
  const sigmaC = mul(mul(adjoint(a.basis), sigma), a.basis);
  let trLP = 0;
  for (let i = 0; i < r; i++) trLP += a.values[i] * pd.re[i * r + i];
  const trSP = traceOfProductRe(hermitianPart(sigmaC), inverse);
  const upperRoot = Math.sqrt(Math.max(0, trLP) * Math.max(0, trSP)) * (1 + 1e-14) + roundingPad(r * r, 1);
  const Y = mul(mul(a.basis, pd), adjoint(a.basis));
  const c = certify({
    what: 'the fidelity', solve: answer, problem: FIDELITY_PROBLEM, sense: 'maximize',
    primal: { offDiagonal }, primalObjective: t * reTr,
    dual: { Y }, dualObjective: Math.sqrt(Math.max(0, trLP) * Math.max(0, trSP)),
    bounds: { lower: lowerRoot * lowerRoot, upper: upperRoot * upperRoot },
    estimate: answer.primalObjective < 0 ? answer.primalObjective ** 2 : undefined,
    range: [0, 1],
    limit: ACCEPT_INACCURATE_LOOSE,
  });
  const root = Math.sqrt(c.value);
  const out: FidelitySdpResult = {
    value: c.value,
    root,
    offDiagonal,
    certificate: c.certificate,
    rankRho: r,
    rankSigma: s,
  };
  if (c.note) out.warning = c.note;
  return out;
}

export const FIDELITY_PROBLEM =
  '√F = maximize Re Tr X s.t. [[ρ, X], [X*, σ]] ⪰ 0 (Watrous); bounds are of F = (√F)². Dual: √F ≤ √(Tr ρY · Tr σY⁺) for Y ⪰ 0 ' +
  'positive definite on supp ρ (Y⁺ its inverse there; the supports decided with the support tolerance)';

function scale2(m: CMatrix, f: number): CMatrix {
  const out = zeros(m.rows, m.cols);
  for (let k = 0; k < m.re.length; k++) {
    out.re[k] = f * m.re[k];
    out.im[k] = f * m.im[k];
  }
  return out;
}

/**
 * A Hermitian P made positive definite (eigenvalues raised to at least 1e-14 of the largest) and its
 * inverse: any such P is a dual point of the fidelity SDP.
 */
export function positiveDefinite(p: CMatrix): { pd: CMatrix; inverse: CMatrix } {
  const { values, vectors } = eigh(hermitianPart(p), { vectors: true });
  const top = Math.max(...values, 0);
  const floor = top > 0 ? 1e-14 * top : 1;
  const lifted = Array.from(values, (v) => Math.max(v, floor));
  return { pd: fromSpectrum(vectors!, lifted), inverse: fromSpectrum(vectors!, lifted.map((v) => 1 / v)) };
}
