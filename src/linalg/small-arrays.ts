/**
 * Zero-filled Float64Arrays and Int32Arrays for the many small temporaries of the linear algebra (a 4×4
 * matrix, an eigensolver's work vectors): arrays of at most SMALL_BYTES are views into a shared slab
 * (an ArrayBuffer of SLAB_BYTES, used once, front to back, never reused), larger ones are allocated as usual.
 *
 * Why: V8 gives every `new Float64Array(n)` above 64 bytes a backing store of its own (an allocation
 * outside the heap, tracked and swept by the garbage collector): about 0.6–0.9 µs each, against about
 * 0.08 µs for a view into an existing buffer (measured in Node 20; bench/RESULTS.md, "Sweeps"). A sweep
 * point on two-qubit states makes a hundred or more such arrays, a sixth of its time. Views share nothing
 * but the slab: each covers its own bytes, which start zero (a slab is new memory and no byte is handed out
 * twice), so the arrays behave exactly as fresh ones and no result changes.
 *
 * Deliberately not here: reuse or freeing (the garbage collector frees a slab when no view of it is left).
 * The cost of that: one small array that lives long keeps its whole slab (SLAB_BYTES) alive, and a structured
 * clone (postMessage) of such an array copies the slab; nothing in the engine keeps many small arrays for
 * long or posts them (answers are plain data). Cost: O(1) per array.
 */

/** Arrays of at most this many bytes are views into a slab (16 doubles: a 4×4 matrix is 128 bytes). */
export const SMALL_BYTES = 1024;
const SLAB_BYTES = 32768;

let slab = new ArrayBuffer(SLAB_BYTES);
let offset = 0;

function take(bytes: number): number {
  // 16-byte alignment (the widest element is 8 bytes; 16 keeps views friendly to SIMD copies).
  const size = (bytes + 15) & ~15;
  if (offset + size > SLAB_BYTES) {
    slab = new ArrayBuffer(SLAB_BYTES);
    offset = 0;
  }
  const at = offset;
  offset += size;
  return at;
}

/** A zero-filled Float64Array of length n. */
export function float64(n: number): Float64Array {
  const bytes = 8 * n;
  if (bytes === 0 || bytes > SMALL_BYTES) return new Float64Array(n);
  const at = take(bytes);
  return new Float64Array(slab, at, n);
}

/** A zero-filled Int32Array of length n. */
export function int32(n: number): Int32Array {
  const bytes = 4 * n;
  if (bytes === 0 || bytes > SMALL_BYTES) return new Int32Array(n);
  const at = take(bytes);
  return new Int32Array(slab, at, n);
}
