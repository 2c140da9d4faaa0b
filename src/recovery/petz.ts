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
 * The map itself is the general Petz map of petz-map.ts for σ = ρ_BC and N = Tr_C.
 * Deliberately not here: the fidelity of recovery (an optimisation over all channels;
 * fidelity-of-recovery.ts), the averaged universal map (petz-map.ts).
 * Cost: two Hermitian eigendecompositions (d_B, d_B d_C), d_C Kraus operators of size d_B d_C × d_B,
 * and applying them to ρ_AB: O(d_C · d_A² d_B² · d_B d_C) for the recovered state; one fidelity
 * O((d_A d_B d_C)³).
 */
import { CMatrix, hermitianPart, partialTrace, trace } from '../linalg/index.js';
import { DEFAULT_SUPPORT_TOLERANCE } from '../linalg/functions.js';
import { partialTraceChannel } from '../quantum/presets.js';
import { rotatedPetzMap } from './petz-map.js';
import type { Channel, State } from '../quantum/types.js';
import { applyChannel } from '../quantum/channels.js';
import { fidelity } from '../quantities/fidelity.js';
import { tripartite, type Tripartite } from './tripartite.js';

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
  // The general map of petz-map.ts with σ = ρ_BC and N = Tr_C (Kraus 1_B ⊗ ⟨c|): its Kraus operators
  // are exactly ρ_BC^{(1+it)/2} (ρ_B^{−(1+it)/2} ⊗ |c⟩), and its completion the one described above.
  const tol = options.tol ?? DEFAULT_SUPPORT_TOLERANCE;
  const r = rotatedPetzMap(rhoBC, partialTraceChannel([dB, dC], [1]), options.t ?? 0, { tol, complete: options.complete ?? true });
  return {
    channel: r.channel,
    diagnostics: {
      rankB: r.diagnostics.rankImage,
      rankBC: r.diagnostics.rankSigma,
      smallestKeptB: r.diagnostics.smallestKeptImage,
      kernelDimension: r.diagnostics.kernelDimension,
      supportTolerance: tol,
    },
  };
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
  const rhoBC = hermitianPart(partialTrace(parts.rho, [dA, dB * dC], [0]));
  const rhoAB = hermitianPart(partialTrace(parts.rho, [dA * dB, dC], [1]));
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
