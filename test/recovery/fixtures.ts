/** Tripartite test states: products, Markov chains built from the structure theorem, random states. */
import {
  CMatrix, adjoint, identity, kron, mul, zeros, marginal,
} from '../../src/linalg/index.js';
import { vonNeumannEntropy } from '../../src/quantities/entropy.js';
import { randomDensity, randomUnitary } from '../helpers/random.js';
import type { Channel } from '../../src/quantum/types.js';

/** Columns from..from+count−1 of a matrix. */
function columns(u: CMatrix, from: number, count: number): CMatrix {
  const out = zeros(u.rows, count);
  for (let i = 0; i < u.rows; i++) {
    for (let j = 0; j < count; j++) {
      out.re[i * count + j] = u.re[i * u.cols + from + j];
      out.im[i * count + j] = u.im[i * u.cols + from + j];
    }
  }
  return out;
}

/**
 * A quantum Markov chain A − B − C in the form of the structure theorem (Hayden, Jozsa, Petz &
 * Winter, Commun. Math. Phys. 246, 359 (2004), Thm 6): H_B = ⊕_j H_{b_j^L} ⊗ H_{b_j^R} (embedded by
 * the columns of a random unitary on B) and ρ_ABC = ⊕_j q_j ρ_{A b_j^L} ⊗ ρ_{b_j^R C}.
 * `blocks` lists [dim b_j^L, dim b_j^R]; d_B is the sum of their products. Order A ⊗ B ⊗ C.
 */
export function markovChain(dA: number, dC: number, blocks: readonly [number, number][], r: () => number): { rho: CMatrix; dB: number; weights: number[]; unitary: CMatrix } {
  const dB = blocks.reduce((s, [l, rr]) => s + l * rr, 0);
  const u = randomUnitary(dB, r);
  const n = dA * dB * dC;
  let rho = zeros(n, n);
  let offset = 0;
  const q = blocks.map(() => 0.2 + r());
  const total = q.reduce((s, x) => s + x, 0);
  blocks.forEach(([dl, dr], j) => {
    const left = randomDensity(dA * dl, r);
    const right = randomDensity(dr * dC, r);
    const v = columns(u, offset, dl * dr);
    offset += dl * dr;
    const emb = kron(identity(dA), kron(v, identity(dC)));
    const block = mul(mul(emb, kron(left, right)), adjoint(emb));
    for (let k = 0; k < n * n; k++) {
      rho.re[k] += (q[j] / total) * block.re[k];
      rho.im[k] += (q[j] / total) * block.im[k];
    }
  });
  rho = { ...rho };
  return { rho, dB, weights: q.map((x) => x / total), unitary: u };
}

/** I(A;C|B) = H(AB) + H(BC) − H(B) − H(ABC) in bits, from von Neumann entropies of the marginals. */
export function cmi(rho: CMatrix, dims: number[], a: number[], b: number[], c: number[]): number {
  const h = (keep: number[]) => (keep.length === 0 ? 0 : vonNeumannEntropy(marginal(rho, dims, keep)));
  return h([...a, ...b]) + h([...b, ...c]) - h(b) - h([...a, ...b, ...c]);
}

/** A channel C^dIn → C^dOut from the first dOut·k rows of a random unitary (a Stinespring isometry). */
export function randomChannel(dIn: number, dOut: number, k: number, r: () => number): Channel {
  if (dOut * k < dIn) throw new Error('the isometry needs dOut·k ≥ dIn');
  const u = randomUnitary(dOut * k, r);
  const kraus: CMatrix[] = [];
  for (let e = 0; e < k; e++) {
    const K = zeros(dOut, dIn);
    for (let a = 0; a < dOut; a++) {
      for (let i = 0; i < dIn; i++) {
        K.re[a * dIn + i] = u.re[(a * k + e) * u.cols + i];
        K.im[a * dIn + i] = u.im[(a * k + e) * u.cols + i];
      }
    }
    kraus.push(K);
  }
  return { kraus, fromDims: [dIn], toDims: [dOut] };
}

