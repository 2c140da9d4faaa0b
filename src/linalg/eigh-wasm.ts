/**
 * Loader and workspace for the eigensolver's WebAssembly SIMD kernels (src/linalg/wasm/).
 *
 * What it is for (besides `kernelSquareFacts`, the codec's pass over a square matrix in the same
 * kernels, below): instantiating the kernels synchronously at first use (`new WebAssembly.Module`
 * and `new WebAssembly.Instance` on bytes committed as base64, so it works in Node and in a web
 * worker with no build step and no fetch), and handing eigh.ts a workspace of Float64Array/
 * Int32Array views into the kernels' memory, grown as needed.
 *
 * The SIMD path is used when WebAssembly with 128-bit SIMD is available and it is not switched
 * off, either by the environment variable RHOSIGMA_EIGH_WASM=0 (read once, at first use, where a
 * `process` object exists) or by `setEighWasmEnabled(false)`. Otherwise eigh.ts runs its pure
 * TypeScript loops, which compute the same decomposition (not bit for bit: the SIMD loops sum in
 * a different order) to the same accuracy.
 *
 * What it does not do: share the memory between threads, or shrink it (it keeps the largest size
 * asked for, about 9n² + 34n doubles for the largest n seen: 4.8 MB at n = 256).
 * Cost: decoding and compiling about 12 kB of WebAssembly once, well under a millisecond.
 */
import { EIGH_KERNELS_WASM_BASE64 } from './wasm/eigh-kernels.wasm.js';
import { float64, int32 } from './small-arrays.js';

/** The kernels' exports; every pointer argument is a byte address in the kernels' memory. */
export interface EighKernels {
  applyReflectorPairs(
    mRe: number, mIm: number, n: number, vRe: number, vIm: number, betas: number,
    pa: number, pbk: number, bb: number, cRe: number, cIm: number, np: number,
  ): void;
  gemmNT(
    u: number, qt: number, out: number, rows: number, ku: number, m: number,
    r0: number, r1: number, q0: number, q1: number,
  ): void;
  tridiagonalize(
    are: number, aim: number, n: number, inv: number, d: number, eRe: number, eIm: number, vRe: number, vIm: number,
    betas: number, work: number,
  ): void;
  squareFacts(re: number, im: number, n: number, limit: number, out: number): number;
  largestEntry(re: number, im: number, count: number): number;
  tridiagonalValues(d: number, e: number, n: number): number;
  phaseRows(zt: number, dRe: number, dIm: number, mRe: number, mIm: number, n: number): void;
  transposePair(mRe: number, mIm: number, n: number, tRe: number, tIm: number): void;
  copyRows(src: number, perm: number, dst: number, dstStride: number, m: number): void;
  secularRoots(d: number, z: number, k: number, rho: number, zz: number, del: number, org: number, tau: number): void;
  secularVectors(
    d: number, z: number, k: number, rho: number, org: number, tau: number, cols: number, u: number,
    zhat: number, dq: number, zq: number,
  ): void;
  gemmRows(
    u: number, ku: number, rows: number, ptrs: number, q0: number, q1: number, out: number, m: number,
    r0: number, r1: number,
  ): void;
}

/** The parts of the WebAssembly API used here (the project's TypeScript lib has no DOM types). */
interface WasmMemory {
  readonly buffer: ArrayBuffer;
  grow(pages: number): number;
}
interface WasmApi {
  validate(bytes: Uint8Array): boolean;
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: Record<string, unknown> };
  Memory: new (desc: { initial: number }) => WasmMemory;
}

interface Loaded {
  kernels: EighKernels;
  memory: WasmMemory;
}

let enabled: boolean | null = null;
let loaded: Loaded | null | undefined;
let loadError = '';

function envEnabled(): boolean {
  const proc = (globalThis as { process?: { env?: Record<string, string | undefined> } }).process;
  const v = proc?.env?.RHOSIGMA_EIGH_WASM;
  return !(v === '0' || v === 'false' || v === 'off');
}

/** Turns the WebAssembly SIMD path of eigh on or off (on by default where it is available). */
export function setEighWasmEnabled(on: boolean): void {
  enabled = on;
}

function decodeBase64(s: string): Uint8Array {
  const bin = atob(s);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

function load(): Loaded | null {
  if (loaded !== undefined) return loaded;
  loaded = null;
  const api = (globalThis as { WebAssembly?: WasmApi }).WebAssembly;
  if (!api) {
    loadError = 'WebAssembly is not available';
    return null;
  }
  try {
    const bytes = decodeBase64(EIGH_KERNELS_WASM_BASE64);
    if (!api.validate(bytes)) {
      loadError = 'WebAssembly SIMD is not supported here';
      return null;
    }
    const memory = new api.Memory({ initial: 1 });
    const inst = new api.Instance(new api.Module(bytes), { env: { memory } });
    loaded = { kernels: inst.exports as unknown as EighKernels, memory };
  } catch (err) {
    loadError = `WebAssembly kernels failed to load: ${(err as Error).message}`;
  }
  return loaded;
}

/** Whether eigh will use the SIMD kernels, and if not, why. */
export function eighWasmStatus(): { active: boolean; reason: string } {
  if (enabled === null) enabled = envEnabled();
  if (!enabled) return { active: false, reason: 'switched off' };
  const l = load();
  return l ? { active: true, reason: '' } : { active: false, reason: loadError };
}

/**
 * Bump allocator of zero-filled typed arrays. With kernels, the arrays are views into the kernels'
 * memory (16-byte aligned) and `at` gives their byte addresses; without, ordinary arrays.
 */
export class Workspace {
  readonly kernels: EighKernels | null;
  private readonly buffer: ArrayBuffer | null;
  private offset = 0;
  private readonly limit: number;

  private constructor(kernels: EighKernels | null, buffer: ArrayBuffer | null) {
    this.kernels = kernels;
    this.buffer = buffer;
    this.limit = buffer ? buffer.byteLength : Infinity;
  }

  /**
   * A workspace for at most `doubles` Float64 and `ints` Int32 entries in total (each array rounded
   * up to 16 bytes), in the kernels' memory when the SIMD path is active and useKernels is set.
   * zero = false skips zero-filling the kernels' memory (a few megabytes at n = 256), for callers
   * that write every entry they read; arrays outside the kernels' memory are always zero.
   */
  static create(doubles: number, ints: number, arrays: number, useKernels = true, zero = true): Workspace {
    if (!useKernels || !eighWasmStatus().active) return new Workspace(null, null);
    const l = loaded!;
    const bytes = 8 * doubles + 4 * ints + 16 * arrays;
    const have = l.memory.buffer.byteLength;
    if (bytes > have) l.memory.grow(Math.ceil((bytes - have) / 65536));
    const buffer = l.memory.buffer;
    if (zero) new Uint8Array(buffer, 0, bytes).fill(0);
    return new Workspace(l.kernels, buffer);
  }

  f64(len: number): Float64Array {
    if (!this.buffer) return float64(len);
    const a = new Float64Array(this.buffer, this.take(8 * len), len);
    return a;
  }

  i32(len: number): Int32Array {
    if (!this.buffer) return int32(len);
    return new Int32Array(this.buffer, this.take(4 * len), len);
  }

  private take(bytes: number): number {
    const at = this.offset;
    this.offset += (bytes + 15) & ~15;
    if (this.offset > this.limit) throw new Error('eigh: workspace too small (internal error)');
    return at;
  }
}

/**
 * The codec's pass over a square matrix (src/ops/codec.ts, squareFacts) in the kernels: the sum of
 * squared magnitudes and the Hermiticity defect's square with its place (row j, column i), or
 * `bad`, the first row-major index of an entry not of magnitude at most `limit`. Null where the
 * kernels are off. The same loops in the same order as the codec's, so the same numbers; compiled
 * code from the first call, where the TypeScript loops run cold in a fresh process.
 */
export function kernelSquareFacts(
  re: Float64Array, im: Float64Array, n: number, limit: number,
): { bad: number; sum: number; worst: number; row: number; col: number } | null {
  const ws = Workspace.create(2 * n * n + 4, 0, 3, true, false); // every entry is written before it is read
  const K = ws.kernels;
  if (!K) return null;
  const a = ws.f64(n * n);
  const b = ws.f64(n * n);
  const out = ws.f64(4);
  a.set(re);
  b.set(im);
  const bad = K.squareFacts(a.byteOffset, b.byteOffset, n, limit, out.byteOffset);
  return { bad, sum: out[0], worst: out[1], row: out[2], col: out[3] };
}
