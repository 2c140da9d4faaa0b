/**
 * Random states and channels from the standard ensembles, each drawn from a `VariateSource` (a seeded
 * Philox stream, or given coordinates: the normals the draw consumes, which makes every ensemble a smooth
 * parametrization that a local search can move along).
 *
 * - Haar-random pure states: a normalised complex Gaussian vector.
 * - Induced states with ancilla dimension k: ρ = G G†/Tr G G† for a d×k Ginibre matrix G, the partial trace of a
 *   Haar-random pure state on C^d ⊗ C^k; k = d gives the Hilbert–Schmidt measure (Życzkowski and Sommers,
 *   "Induced measures in the space of mixed quantum states", J. Phys. A 34 (2001) 7111). Mean purity
 *   E Tr ρ² = (d + k)/(dk + 1).
 * - Bures states: ρ ∝ (1 + U) G G† (1 + U)† with U Haar and G Ginibre, both d×d (Osipov, Sommers and Życzkowski,
 *   "Random Bures mixed states and the distribution of their purity", J. Phys. A 43 (2010) 055302).
 * - Channels from random Stinespring isometries: V: C^{d_in} → C^{d_out} ⊗ C^{m} Haar-random (environment last),
 *   Kraus operators K_k = (1 ⊗ ⟨k|) V. Trace preserving by construction; m defaults to d_in·d_out.
 * - Random unital channels: mixtures Σ_i p_i U_i · U_i† of n Haar unitaries with weights uniform on the simplex.
 *   These are mixed-unitary channels, a proper subset of the unital channels when d ≥ 3 (every unital qubit
 *   channel is mixed unitary).
 * - Random Markov states from a block structure: for H_B = ⊕_j H_{b_j^L} ⊗ H_{b_j^R}, the state
 *   ρ_ABC = ⊕_j q_j ρ_{A b_j^L} ⊗ ρ_{b_j^R C} with Hilbert–Schmidt blocks and weights q uniform on the simplex;
 *   exactly the states with I(A;C|B) = 0 (Hayden, Jozsa, Petz and Winter, Commun. Math. Phys. 246 (2004) 359,
 *   Theorem 6), optionally with a Haar unitary on B (which keeps I(A;C|B) = 0).
 *
 * Deliberately not here: the generator (src/linalg/philox.ts), reading requests (src/ops/random-ops.ts).
 * Cost: one Ginibre matrix and one product for induced states, a QR of order d (or d_out·m) for the others.
 */
import { adjoint, hermitianPart, identity, kron, mul, scale, trace, zeros, type CMatrix } from '../linalg/cmatrix.js';
import { ginibre, haarIsometry, haarUnitary, simplexPoint } from '../linalg/random.js';
import type { VariateSource } from '../linalg/philox.js';
import type { Channel, State } from './types.js';
import { stinespringToKraus } from './channels.js';

/** A Haar-random unit vector of C^d, as a d×1 matrix. */
export function randomPureKet(d: number, source: VariateSource): CMatrix {
  const g = ginibre(d, 1, source);
  let n2 = 0;
  for (let k = 0; k < d; k++) n2 += g.re[k] * g.re[k] + g.im[k] * g.im[k];
  const s = 1 / Math.sqrt(n2);
  return scale(g, s);
}

/** |ψ⟩⟨ψ| for a ket given as a d×1 matrix. */
export function projectorOf(ket: CMatrix): CMatrix {
  return hermitianPart(mul(ket, adjoint(ket)));
}

/** X X† / Tr X X†, made exactly Hermitian. */
function normalisedGram(x: CMatrix): CMatrix {
  const g = hermitianPart(mul(x, adjoint(x)));
  return scale(g, 1 / trace(g).re);
}

/** A random density matrix of order d from the measure induced by partial trace over an ancilla of dimension k. */
export function randomInducedState(d: number, k: number, source: VariateSource): CMatrix {
  return normalisedGram(ginibre(d, k, source));
}

/** A Hilbert–Schmidt random density matrix of order d (the induced measure with k = d). */
export function randomHilbertSchmidtState(d: number, source: VariateSource): CMatrix {
  return randomInducedState(d, d, source);
}

/** A Bures random density matrix of order d: (1 + U) G G† (1 + U)† normalised (U Haar, G Ginibre). */
export function randomBuresState(d: number, source: VariateSource): CMatrix {
  const u = haarUnitary(d, source);
  for (let i = 0; i < d; i++) u.re[i * d + i] += 1;
  const g = ginibre(d, d, source);
  return normalisedGram(mul(u, g));
}

/** A channel C^{prod from} → C^{prod to} from a Haar-random Stinespring isometry with environment dimension m. */
export function randomStinespringChannel(fromDims: readonly number[], toDims: readonly number[], m: number, source: VariateSource): Channel {
  const din = fromDims.reduce((a, b) => a * b, 1);
  const dout = toDims.reduce((a, b) => a * b, 1);
  return stinespringToKraus(haarIsometry(dout * m, din, source), fromDims, toDims, m);
}

/** A random mixed-unitary (hence unital) channel: n Haar unitaries with flat Dirichlet weights. */
export function randomUnitalChannel(dims: readonly number[], n: number, source: VariateSource): Channel {
  const d = dims.reduce((a, b) => a * b, 1);
  const p = simplexPoint(n, source);
  const kraus: CMatrix[] = [];
  for (let i = 0; i < n; i++) kraus.push(scale(haarUnitary(d, source), Math.sqrt(p[i])));
  return { kraus, fromDims: [...dims], toDims: [...dims] };
}

/** One block of the Markov structure: H_{b^L} ⊗ H_{b^R} inside H_B. */
export interface MarkovBlock {
  left: number;
  right: number;
}

/**
 * A random quantum Markov chain state on A ⊗ B ⊗ C with H_B = ⊕_j H_{left_j} ⊗ H_{right_j} (dims [a, Σ left·right, c]).
 * With `rotate`, a Haar unitary on B is applied afterwards.
 */
export function randomMarkovState(a: number, blocks: readonly MarkovBlock[], c: number, source: VariateSource, rotate = false): State {
  const dB = blocks.reduce((s, b) => s + b.left * b.right, 0);
  const n = a * dB * c;
  const rho = zeros(n, n);
  const q = simplexPoint(blocks.length, source);
  let offset = 0;
  for (let j = 0; j < blocks.length; j++) {
    const { left: l, right: r } = blocks[j];
    const x = randomHilbertSchmidtState(a * l, source); // on A ⊗ b^L
    const y = randomHilbertSchmidtState(r * c, source); // on b^R ⊗ C
    const xy = kron(x, y); // on A ⊗ b^L ⊗ b^R ⊗ C, index ((α·l + λ)·r + ρ')·c + γ
    const size = a * l * r * c;
    for (let I = 0; I < size; I++) {
      const gamma = I % c, rest = (I - gamma) / c, rr = rest % r, rest2 = (rest - rr) / r, ll = rest2 % l, alpha = (rest2 - ll) / l;
      const row = (alpha * dB + offset + ll * r + rr) * c + gamma;
      for (let J = 0; J < size; J++) {
        const g2 = J % c, s2 = (J - g2) / c, r2 = s2 % r, s3 = (s2 - r2) / r, l2 = s3 % l, a2 = (s3 - l2) / l;
        const col = (a2 * dB + offset + l2 * r + r2) * c + g2;
        rho.re[row * n + col] = q[j] * xy.re[I * size + J];
        rho.im[row * n + col] = q[j] * xy.im[I * size + J];
      }
    }
    offset += l * r;
  }
  let matrix = rho;
  if (rotate) {
    const u = haarUnitary(dB, source);
    const w = kron(kron(identity(a), u), identity(c));
    matrix = hermitianPart(mul(mul(w, rho), adjoint(w)));
  }
  return { matrix, dims: [a, dB, c] };
}
