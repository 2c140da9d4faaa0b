/**
 * Seeded random matrices, states and distributions for tests (mulberry32; deterministic across runs).
 * Every draw consumes the generator in a fixed order, so a test's seed pins its instances.
 */
import { CMatrix, zeros, mul, adjoint, scale, trace, eigh, diagonal } from '../../src/linalg/index.js';

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

/** A unit vector as an n×1 matrix (normalised complex Gaussian: uniform on the sphere). */
export function randomKet(n: number, r: () => number): CMatrix {
  const v = randomComplex(n, 1, r);
  let s = 0;
  for (let i = 0; i < n; i++) s += v.re[i] ** 2 + v.im[i] ** 2;
  return scale(v, 1 / Math.sqrt(s));
}

/**
 * A Haar-random unitary: Gram–Schmidt on the columns of a complex Gaussian matrix (QR of a Ginibre
 * matrix with R's diagonal positive, which is what Gram–Schmidt gives; Mezzadri, Notices AMS 54, 592
 * (2007) — reference recalled from memory).
 */
export function randomUnitary(d: number, r: () => number): CMatrix {
  const g = randomComplex(d, d, r);
  const q = zeros(d, d);
  for (let j = 0; j < d; j++) {
    const vr = new Float64Array(d);
    const vi = new Float64Array(d);
    for (let i = 0; i < d; i++) {
      vr[i] = g.re[i * d + j];
      vi[i] = g.im[i * d + j];
    }
    for (let k = 0; k < j; k++) {
      let pr = 0;
      let pi = 0;
      for (let i = 0; i < d; i++) {
        pr += q.re[i * d + k] * vr[i] + q.im[i * d + k] * vi[i];
        pi += q.re[i * d + k] * vi[i] - q.im[i * d + k] * vr[i];
      }
      for (let i = 0; i < d; i++) {
        vr[i] -= pr * q.re[i * d + k] - pi * q.im[i * d + k];
        vi[i] -= pr * q.im[i * d + k] + pi * q.re[i * d + k];
      }
    }
    let n = 0;
    for (let i = 0; i < d; i++) n += vr[i] ** 2 + vi[i] ** 2;
    n = Math.sqrt(n);
    for (let i = 0; i < d; i++) {
      q.re[i * d + j] = vr[i] / n;
      q.im[i * d + j] = vi[i] / n;
    }
  }
  return q;
}

/**
 * A random unitary as the eigenbasis of a random Hermitian matrix (not Haar-distributed; enough for
 * a basis in general position). Kept beside randomUnitary because the tests using it were seeded
 * with its draws.
 */
export function eigenbasisUnitary(n: number, r: () => number): CMatrix {
  return eigh(randomHermitian(n, r)).vectors!;
}

/** U diag(p) U*: the operator with eigenvalues p in the basis given by the columns of U. */
export function inBasis(u: CMatrix, p: readonly number[]): CMatrix {
  return mul(mul(u, diagonal(p)), adjoint(u));
}

/** A random probability vector: entries 0.05 + uniform, normalised; the indices in `zeroAt` are 0. */
export function randomProbabilities(n: number, r: () => number, zeroAt: readonly number[] = []): number[] {
  const p = Array.from({ length: n }, (_, i) => (zeroAt.includes(i) ? 0 : 0.05 + r()));
  const s = p.reduce((a, b) => a + b, 0);
  return p.map((x) => x / s);
}
