/**
 * The Petz recovery map of a tripartite state and its rotated versions.
 *
 * For ρ_BC and the partial trace Tr_C, the Petz recovery map B → BC is
 *
 *   R(X) = ρ_BC^{1/2} (ρ_B^{−1/2} X ρ_B^{−1/2} ⊗ 1_C) ρ_BC^{1/2}
 *
 * (Petz 1986/1988; in this form e.g. Hayden, Jozsa, Petz & Winter, Commun. Math. Phys. 246, 359
 * (2004)), and the rotated Petz maps (Junge, Renner, Sutter, Wilde & Winter, Ann. Henri Poincaré 19,
 * 2955 (2018), Eq. (1.3) with σ = ρ_BC and N = Tr_C)
 *
 *   R^t(X) = ρ_BC^{(1+it)/2} (ρ_B^{−(1+it)/2} X ρ_B^{−(1−it)/2} ⊗ 1_C) ρ_BC^{(1−it)/2},
 *
 * i.e. R conjugated by the unitaries ρ_BC^{it/2} and ρ_B^{−it/2} (on the supports); R^0 = R.
 * Inverse powers act on supports only (pseudo-inverse): eigenvalues at or below tol·λ_max count as
 * zero, a tolerance-dependent decision whose inputs (ranks, smallest kept eigenvalue) are returned.
 * With ρ_B rank-deficient, R is trace preserving only on supp ρ_B; `complete: true` (the default)
 * adds Kraus operators X ↦ Tr(Q X) ρ_BC on the kernel projector Q of ρ_B, making it a channel that
 * acts the same on every operator supported on supp ρ_B (hence on ρ_AB).
 *
 * Kraus form: K_c = ρ_BC^{(1+it)/2} (ρ_B^{−(1+it)/2} ⊗ |c⟩), c = 1..d_C, since X ⊗ 1_C =
 * Σ_c (1 ⊗ |c⟩) X (1 ⊗ ⟨c|).
 *
 * Deliberately not here: the fidelity of recovery (an optimisation over all channels;
 * fidelity-of-recovery.ts), the twirled/averaged universal map as one channel.
 * Cost: two Hermitian eigendecompositions (d_B, d_B d_C), d_C Kraus operators of size d_B d_C × d_B,
 * and applying them to ρ_AB: O(d_C · d_A² d_B² · d_B d_C) for the recovered state; one fidelity
 * O((d_A d_B d_C)³).
 */
import {
  CMatrix, eigh, hermitianPart, zeros, trace, type EighResult,
} from '../linalg/index.js';
import { zeroThreshold, DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import type { Channel, State } from '../quantum/types.js';
import { applyChannel } from '../quantum/channels.js';
import { fidelity } from '../quantities/fidelity.js';
import { tripartite, type Tripartite } from './tripartite.js';

/** V diag(f) V* for a complex function f = fr + i·fi of the eigenvalues. */
export function complexSpectral(vectors: CMatrix, fr: ArrayLike<number>, fi: ArrayLike<number>): CMatrix {
  const n = vectors.rows;
  const m = vectors.cols;
  const out = zeros(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let sr = 0;
      let si = 0;
      for (let k = 0; k < m; k++) {
        // V_ik f_k conj(V_jk)
        const ar = vectors.re[i * m + k];
        const ai = vectors.im[i * m + k];
        const br = vectors.re[j * m + k];
        const bi = -vectors.im[j * m + k];
        const pr = ar * br - ai * bi;
        const pi = ar * bi + ai * br;
        sr += fr[k] * pr - fi[k] * pi;
        si += fr[k] * pi + fi[k] * pr;
      }
      out.re[i * n + j] = sr;
      out.im[i * n + j] = si;
    }
  }
  return out;
}

/**
 * ρ^{p(1+it)} on the support (eigenvalues above tol·λ_max), 0 on the kernel: λ^p (cos(pt ln λ) +
 * i sin(pt ln λ)) per eigenvalue. Returns the matrix, the rank and the smallest kept eigenvalue.
 */
export function complexPower(eig: EighResult, p: number, t: number, tol: number): { matrix: CMatrix; rank: number; smallest: number } {
  const { values, vectors } = eig;
  const thr = zeroThreshold(values, tol);
  const fr = new Float64Array(values.length);
  const fi = new Float64Array(values.length);
  let rank = 0;
  let smallest = Infinity;
  values.forEach((v, k) => {
    if (v > thr && v > 0) {
      rank++;
      smallest = Math.min(smallest, v);
      const mag = Math.pow(v, p);
      const ph = p * t * Math.log(v);
      fr[k] = mag * Math.cos(ph);
      fi[k] = mag * Math.sin(ph);
    }
  });
  return { matrix: complexSpectral(vectors!, fr, fi), rank, smallest: rank > 0 ? smallest : 0 };
}

export interface PetzMapOptions {
  /** Rotation parameter t of R^t (default 0: the Petz map itself). */
  t?: number;
  /** Relative tolerance below which an eigenvalue of ρ_B or ρ_BC counts as zero (default 1e-12). */
  tol?: number;
  /** Add Kraus operators on the kernel of ρ_B so that the map is trace preserving (default true). */
  complete?: boolean;
}

export interface PetzMap {
  /** The map B → BC as a channel (fromDims [d_B], toDims [d_B, d_C]). */
  channel: Channel;
  diagnostics: {
    /** Ranks of ρ_B and ρ_BC used. */
    rankB: number;
    rankBC: number;
    /** Smallest eigenvalue of ρ_B kept on its support (the inverse square root scales errors by its −1/2 power). */
    smallestKeptB: number;
    /** Dimension of the kernel of ρ_B that the completion acts on (0 when ρ_B has full rank). */
    kernelDimension: number;
    supportTolerance: number;
  };
}

/**
 * The (rotated) Petz recovery map R^t_{B→BC} of ρ_BC (on d_B ⊗ d_C) for the partial trace over C,
 * as a channel in Kraus form.
 */
export function petzRecoveryMap(rhoBC: CMatrix, dB: number, dC: number, options: PetzMapOptions = {}): PetzMap {
  const t = options.t ?? 0;
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const complete = options.complete ?? true;
  const bc = hermitianPart(rhoBC);
  const rhoB = reduceLast(bc, dB, dC);
  const eigB = eigh(rhoB, { vectors: true });
  const eigBC = eigh(bc, { vectors: true });
  const left = complexPower(eigBC, 0.5, t, tol); // ρ_BC^{(1+it)/2}
  const inner = complexPower(eigB, -0.5, t, tol); // ρ_B^{−(1+it)/2}
  const n = dB * dC;
  const kraus: CMatrix[] = [];
  for (let c = 0; c < dC; c++) {
    // (ρ_B^{−(1+it)/2} ⊗ |c⟩): rows (b, c'), nonzero for c' = c.
    const lifted = zeros(n, dB);
    for (let b = 0; b < dB; b++) {
      for (let j = 0; j < dB; j++) {
        lifted.re[(b * dC + c) * dB + j] = inner.matrix.re[b * dB + j];
        lifted.im[(b * dC + c) * dB + j] = inner.matrix.im[b * dB + j];
      }
    }
    kraus.push(mulDense(left.matrix, lifted));
  }
  const kernelDimension = dB - inner.rank;
  if (complete && kernelDimension > 0) {
    // X ↦ Tr(Q X) ρ_BC: Kraus √μ_j |w_j⟩⟨e_k| over eigenpairs (μ_j, w_j) of ρ_BC and kernel vectors e_k of ρ_B.
    const thrB = zeroThreshold(eigB.values, tol);
    const thrBC = zeroThreshold(eigBC.values, tol);
    const VB = eigB.vectors!;
    const VBC = eigBC.vectors!;
    eigBC.values.forEach((mu, j) => {
      if (!(mu > thrBC && mu > 0)) return;
      const s = Math.sqrt(mu);
      eigB.values.forEach((lam, k) => {
        if (lam > thrB && lam > 0) return;
        const K = zeros(n, dB);
        for (let r = 0; r < n; r++) {
          for (let q = 0; q < dB; q++) {
            // √μ w_j(r) conj(e_k(q))
            const wr = VBC.re[r * n + j];
            const wi = VBC.im[r * n + j];
            const er = VB.re[q * dB + k];
            const ei = -VB.im[q * dB + k];
            K.re[r * dB + q] = s * (wr * er - wi * ei);
            K.im[r * dB + q] = s * (wr * ei + wi * er);
          }
        }
        kraus.push(K);
      });
    });
  }
  return {
    channel: { kraus, fromDims: [dB], toDims: [dB, dC] },
    diagnostics: {
      rankB: inner.rank,
      rankBC: left.rank,
      smallestKeptB: inner.smallest,
      kernelDimension,
      supportTolerance: tol,
    },
  };
}

/** Tr of the last factor of a matrix on d_R ⊗ d_C. */
export function reduceLast(bc: CMatrix, dB: number, dC: number): CMatrix {
  const out = zeros(dB, dB);
  const n = dB * dC;
  for (let i = 0; i < dB; i++) {
    for (let j = 0; j < dB; j++) {
      let sr = 0;
      let si = 0;
      for (let c = 0; c < dC; c++) {
        const k = (i * dC + c) * n + (j * dC + c);
        sr += bc.re[k];
        si += bc.im[k];
      }
      out.re[i * dB + j] = sr;
      out.im[i * dB + j] = si;
    }
  }
  return hermitianPart(out);
}

function mulDense(a: CMatrix, b: CMatrix): CMatrix {
  const out = zeros(a.rows, b.cols);
  for (let i = 0; i < a.rows; i++) {
    for (let k = 0; k < a.cols; k++) {
      const ar = a.re[i * a.cols + k];
      const ai = a.im[i * a.cols + k];
      if (ar === 0 && ai === 0) continue;
      for (let j = 0; j < b.cols; j++) {
        const br = b.re[k * b.cols + j];
        const bi = b.im[k * b.cols + j];
        out.re[i * b.cols + j] += ar * br - ai * bi;
        out.im[i * b.cols + j] += ar * bi + ai * br;
      }
    }
  }
  return out;
}

export interface PetzRecoveryResult {
  /** F(ρ_ABC, (id_A ⊗ R^t)(ρ_AB)), squared fidelity (the project's convention). */
  value: number;
  /** √F. */
  root: number;
  /** The recovered state (id_A ⊗ R^t)(ρ_AB) in the A ⊗ B ⊗ C order. */
  recovered: CMatrix;
  /** The map used. */
  map: PetzMap;
  /** The tripartite bookkeeping (ρ_ABC, dimensions, order of the subsystems). */
  parts: Tripartite;
  diagnostics: PetzMap['diagnostics'] & {
    /** Tr of the recovered state (1 up to rounding). */
    recoveredTrace: number;
    /** Bound on the effect of the fidelity's own support truncation (quantities/fidelity.ts). */
    fidelityTruncationBound: number;
  };
}

/**
 * Petz recovery of ρ on `dims` with groups a, b, c: the fidelity between ρ_ABC and the state
 * recovered from ρ_AB by the (rotated) Petz map of ρ_BC. Equals 1 on quantum Markov chains
 * (Hayden, Jozsa, Petz & Winter 2004).
 */
export function petzRecovery(
  rho: CMatrix,
  dims: readonly number[],
  a: readonly number[],
  b: readonly number[],
  c: readonly number[],
  options: PetzMapOptions = {},
): PetzRecoveryResult {
  const parts = tripartite(rho, dims, a, b, c);
  const { dA, dB, dC } = parts;
  const rhoBC = reduceA(parts.rho, dA, dB * dC);
  const rhoAB = reduceLast(parts.rho, dA * dB, dC);
  const map = petzRecoveryMap(rhoBC, dB, dC, options);
  const state: State = { matrix: rhoAB, dims: [dA, dB] };
  const out = applyChannel(map.channel, state, [1]);
  const recovered = hermitianPart(out.matrix);
  const f = fidelity(parts.rho, recovered, options.tol ?? DEFAULT_SUPPORT_TOLERANCE);
  return {
    value: f.value,
    root: f.root,
    recovered,
    map,
    parts,
    diagnostics: {
      ...map.diagnostics,
      recoveredTrace: trace(recovered).re,
      fidelityTruncationBound: f.truncationBound,
    },
  };
}

/** Tr_A of a matrix on d_A ⊗ d_R. */
export function reduceA(m: CMatrix, dA: number, dR: number): CMatrix {
  const out = zeros(dR, dR);
  const n = dA * dR;
  for (let i = 0; i < dR; i++) {
    for (let j = 0; j < dR; j++) {
      let sr = 0;
      let si = 0;
      for (let x = 0; x < dA; x++) {
        const k = (x * dR + i) * n + (x * dR + j);
        sr += m.re[k];
        si += m.im[k];
      }
      out.re[i * dR + j] = sr;
      out.im[i * dR + j] = si;
    }
  }
  return hermitianPart(out);
}
