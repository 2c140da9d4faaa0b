/** Seeded random matrices for tests (mulberry32; deterministic across runs). */
import { CMatrix, zeros, mul, adjoint, scale, trace } from '../../src/linalg/index.js';

export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal by Box–Muller. */
export function gaussian(r: () => number): number {
  const u = Math.max(r(), 1e-300);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * r());
}

export function randomComplex(rows: number, cols: number, r: () => number): CMatrix {
  const m = zeros(rows, cols);
  for (let k = 0; k < rows * cols; k++) {
    m.re[k] = gaussian(r);
    m.im[k] = gaussian(r);
  }
  return m;
}

export function randomHermitian(n: number, r: () => number): CMatrix {
  const g = randomComplex(n, n, r);
  const h = zeros(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      h.re[i * n + j] = 0.5 * (g.re[i * n + j] + g.re[j * n + i]);
      h.im[i * n + j] = 0.5 * (g.im[i * n + j] - g.im[j * n + i]);
    }
  }
  return h;
}

/** A random density matrix of the given rank (Ginibre construction G G* / Tr). */
export function randomDensity(n: number, r: () => number, rank = n): CMatrix {
  const g = randomComplex(n, rank, r);
  const p = mul(g, adjoint(g));
  return scale(p, 1 / trace(p).re);
}
