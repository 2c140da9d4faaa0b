/** Small helpers shared by the quantities tests: channels from Kraus operators, direct sums, closeness (random states: test/helpers/random.ts). */
import { CMatrix, diagonal, mul, adjoint, eigh, zeros, add, trace, scale, identity, sub, frobeniusNorm } from '../../src/linalg/index.js';
import { randomComplex } from '../helpers/random.js';

/**
 * A random channel from `k` Kraus operators (d_out × d_in), made trace preserving by
 * K_i ← K_i S^{-1/2} with S = Σ K_i* K_i. Returns the action X ↦ Σ K_i X K_i*, built here from the Kraus operators.
 */
export function randomChannel(dIn: number, dOut: number, k: number, r: () => number): (x: CMatrix) => CMatrix {
  // At least ⌈dIn/dOut⌉ operators, so that Σ K*K is invertible.
  const raw = Array.from({ length: Math.max(k, Math.ceil(dIn / dOut)) }, () => randomComplex(dOut, dIn, r));
  let S = zeros(dIn, dIn);
  for (const K of raw) S = add(S, mul(adjoint(K), K));
  const e = eigh(S);
  const inv = mul(mul(e.vectors!, diagonal(Array.from(e.values, (v) => 1 / Math.sqrt(v)))), adjoint(e.vectors!));
  const kraus = raw.map((K) => mul(K, inv));
  // Sanity: Σ K* K = 1.
  let T = zeros(dIn, dIn);
  for (const K of kraus) T = add(T, mul(adjoint(K), K));
  if (frobeniusNorm(sub(T, identity(dIn))) > 1e-10) throw new Error('random channel is not trace preserving');
  return (x) => {
    let out = zeros(dOut, dOut);
    for (const K of kraus) out = add(out, mul(mul(K, x), adjoint(K)));
    return out;
  };
}

export function normalise(m: CMatrix): CMatrix {
  return scale(m, 1 / trace(m).re);
}

export const close = (a: number, b: number, tol: number, what: string): void => {
  if (!(Math.abs(a - b) <= tol * Math.max(1, Math.abs(b)))) throw new Error(`${what}: ${a} vs ${b} (tolerance ${tol})`);
};

/** Direct sum m ⊕ [c] (one extra row and column): a subnormalised state completed to a normalised one. */
export function extend(m: CMatrix, c: number): CMatrix {
  const n = m.rows;
  const out = zeros(n + 1, n + 1);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      out.re[i * (n + 1) + j] = m.re[i * n + j];
      out.im[i * (n + 1) + j] = m.im[i * n + j];
    }
  }
  out.re[(n + 1) * (n + 1) - 1] = c;
  return out;
}
