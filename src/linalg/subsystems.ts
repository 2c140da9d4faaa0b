/**
 * Operations on matrices acting on a tensor product of subsystems with dimensions `dims`
 * (the first subsystem is the most significant index, as in the Kronecker product).
 *
 * Partial trace over any set of subsystems, permutation of subsystems, partial transpose.
 * Each works by precomputed index offsets, never by forming permutation matrices:
 * partial trace costs O(d_keep^2 d_traced), permutation and partial transpose O(d^2).
 * Index checks throw RangeError; turning them into protocol errors is the caller's job.
 */
import { CMatrix, zeros } from './cmatrix.js';

export function product(dims: readonly number[]): number {
  return dims.reduce((a, b) => a * b, 1);
}

/** Row-major strides of a multi-index with the given dims. */
export function strides(dims: readonly number[]): number[] {
  const s = new Array<number>(dims.length);
  let acc = 1;
  for (let k = dims.length - 1; k >= 0; k--) {
    s[k] = acc;
    acc *= dims[k];
  }
  return s;
}

function checkLayout(m: CMatrix, dims: readonly number[], what: string): void {
  if (m.rows !== m.cols) throw new RangeError(`${what}: matrix is ${m.rows}x${m.cols}, not square`);
  if (dims.some((d) => !Number.isInteger(d) || d < 1)) throw new RangeError(`${what}: dims must be positive integers`);
  if (product(dims) !== m.rows) {
    throw new RangeError(`${what}: dims [${dims.join(', ')}] multiply to ${product(dims)}, matrix size is ${m.rows}`);
  }
}

function checkSystems(systems: readonly number[], count: number, what: string): void {
  const seen = new Set<number>();
  for (const s of systems) {
    if (!Number.isInteger(s) || s < 0 || s >= count) throw new RangeError(`${what}: subsystem ${s} out of range 0..${count - 1}`);
    if (seen.has(s)) throw new RangeError(`${what}: subsystem ${s} listed twice`);
    seen.add(s);
  }
}

/**
 * Offsets into the full index for every multi-index over the chosen subsystems (in the order
 * given), with zero digits elsewhere.
 */
export function offsets(dims: readonly number[], systems: readonly number[]): Int32Array {
  const st = strides(dims);
  const size = product(systems.map((s) => dims[s]));
  const out = new Int32Array(size);
  const digits = new Array<number>(systems.length).fill(0);
  for (let idx = 0; idx < size; idx++) {
    let off = 0;
    for (let k = 0; k < systems.length; k++) off += digits[k] * st[systems[k]];
    out[idx] = off;
    for (let k = systems.length - 1; k >= 0; k--) {
      digits[k]++;
      if (digits[k] < dims[systems[k]]) break;
      digits[k] = 0;
    }
  }
  return out;
}

/** Trace out the listed subsystems; the rest keep their order. */
export function partialTrace(m: CMatrix, dims: readonly number[], traceOut: readonly number[]): CMatrix {
  checkLayout(m, dims, 'partialTrace');
  checkSystems(traceOut, dims.length, 'partialTrace');
  const out = new Set(traceOut);
  const keep = dims.map((_, k) => k).filter((k) => !out.has(k));
  const offK = offsets(dims, keep);
  const offT = offsets(dims, [...traceOut].sort((a, b) => a - b));
  const n = m.cols;
  const dk = offK.length;
  const r = zeros(dk, dk);
  for (let i = 0; i < dk; i++) {
    for (let j = 0; j < dk; j++) {
      let sr = 0;
      let si = 0;
      const base = offK[i] * n + offK[j];
      for (let t = 0; t < offT.length; t++) {
        const k = base + offT[t] * (n + 1);
        sr += m.re[k];
        si += m.im[k];
      }
      r.re[i * dk + j] = sr;
      r.im[i * dk + j] = si;
    }
  }
  return r;
}

/** Keep only the listed subsystems, in the order listed (trace out the rest, then permute). */
export function marginal(m: CMatrix, dims: readonly number[], keep: readonly number[]): CMatrix {
  checkSystems(keep, dims.length, 'marginal');
  const keepSet = new Set(keep);
  const traced = dims.map((_, k) => k).filter((k) => !keepSet.has(k));
  const reduced = partialTrace(m, dims, traced);
  const sortedKeep = [...keep].sort((a, b) => a - b);
  const perm = keep.map((s) => sortedKeep.indexOf(s));
  if (perm.every((p, k) => p === k)) return reduced;
  return reorderSubsystems(reduced, sortedKeep.map((s) => dims[s]), perm);
}

/**
 * Reorder subsystems: subsystem k of the result is subsystem perm[k] of the input.
 * For a product A ⊗ B ⊗ C and perm [2, 0, 1] the result is C ⊗ A ⊗ B.
 */
export function reorderSubsystems(m: CMatrix, dims: readonly number[], perm: readonly number[]): CMatrix {
  checkLayout(m, dims, 'reorderSubsystems');
  if (perm.length !== dims.length) throw new RangeError('reorderSubsystems: perm must list every subsystem once');
  checkSystems(perm, dims.length, 'reorderSubsystems');
  const map = offsets(dims, perm);
  const n = m.rows;
  const r = zeros(n, n);
  for (let a = 0; a < n; a++) {
    const row = map[a] * n;
    for (let b = 0; b < n; b++) {
      r.re[a * n + b] = m.re[row + map[b]];
      r.im[a * n + b] = m.im[row + map[b]];
    }
  }
  return r;
}

/** Permute the tensor factors of a column vector (n x 1) in the same convention. */
export function permuteVector(v: CMatrix, dims: readonly number[], perm: readonly number[]): CMatrix {
  if (v.cols !== 1 || product(dims) !== v.rows) throw new RangeError('permuteVector: shape does not match dims');
  checkSystems(perm, dims.length, 'permuteVector');
  const map = offsets(dims, perm);
  const r = zeros(v.rows, 1);
  for (let a = 0; a < v.rows; a++) {
    r.re[a] = v.re[map[a]];
    r.im[a] = v.im[map[a]];
  }
  return r;
}

/** Transpose the listed subsystems only. */
export function partialTranspose(m: CMatrix, dims: readonly number[], systems: readonly number[]): CMatrix {
  checkLayout(m, dims, 'partialTranspose');
  checkSystems(systems, dims.length, 'partialTranspose');
  const st = strides(dims);
  const n = m.rows;
  const r = zeros(n, n);
  const sel = systems.map((s) => ({ stride: st[s], dim: dims[s] }));
  for (let a = 0; a < n; a++) {
    for (let b = 0; b < n; b++) {
      let a2 = a;
      let b2 = b;
      for (const { stride, dim } of sel) {
        const da = Math.floor(a / stride) % dim;
        const db = Math.floor(b / stride) % dim;
        a2 += (db - da) * stride;
        b2 += (da - db) * stride;
      }
      r.re[a * n + b] = m.re[a2 * n + b2];
      r.im[a * n + b] = m.im[a2 * n + b2];
    }
  }
  return r;
}
