/**
 * Large numeric matrices read straight from a request's bytes, for the surfaces that receive JSON
 * text as bytes (the command's `compute`, whole input and --lines, and `serve`, which the Python
 * bridge's long-lived engine reads; src/cli/main.ts).
 *
 * `liftMatrices(bytes)` finds, in one pass of the WebAssembly reader (src/ops/wasm/json-numbers.as),
 * every array of rows of JSON numbers outside strings with at least PRE_READ_ENTRIES entries, rows of
 * one length and sides within MAX_DIMENSION, and converts its numbers to float64 correctly rounded
 * (the same doubles as JSON.parse: Clinger's fast path, else Eisel–Lemire; a number either of them
 * cannot decide leaves its whole matrix to JSON.parse). It returns the bytes with each such matrix
 * replaced by a placeholder string, and `restore`, which puts the matrices back into JSON.parse's
 * value of those bytes: each as rows of numbers (ordinary arrays, equal to what JSON.parse would have
 * built) whose typed array is recorded with the codec (rememberLiftedRows), exactly as the size walk
 * records the matrices it reads (src/ops/sizes.ts), so validation, the codec's readers and every
 * answer, ok or error, are the same as without this module.
 *
 * Why equal: a matrix's text holds no quote, brace or key, so replacing it by a string token leaves
 * the structure, the duplicate keys (json-text.ts, run on the shorter text) and UTF-8 validity of the
 * rest unchanged; JSON.parse still judges the whole rest. Anything unexpected sends the caller back to
 * the ordinary path on the original bytes: no matrix found, JSON.parse failing on the shorter text (so
 * that parse errors keep their positions), a placeholder not found exactly once as a value (a key, a
 * duplicate key that dropped it, a user's string equal to one), nesting deeper than MAX_DEPTH.
 *
 * Hand-written because a general JSON library, in JavaScript or WebAssembly, still builds the
 * JavaScript arrays and numbers that this avoids (V8's JSON.parse is already the fastest of those).
 * Deliberately not here: decoding or parsing the rest (the caller's JSON.parse), browsers' paths
 * (workers receive structured clones, not text). Cost: a copy of the bytes into the reader's memory
 * and one pass over them (about 5 bytes of memory per byte of text, kept for the next request up to
 * KEEP_MEMORY_BYTES; texts above MAX_LIFT_BYTES are left to the ordinary path); per matrix a Float64Array and its rows as
 * arrays (bench/RESULTS.md, "spectrum transport").
 */
import { JSON_NUMBERS_WASM_BASE64 } from './wasm/json-numbers.wasm.js';
import { MAX_DIMENSION, rememberLiftedRows } from './codec.js';
import { PRE_READ_ENTRIES } from './sizes.js';

/** Texts shorter than this hold no matrix worth lifting (PRE_READ_ENTRIES numbers need twice as many bytes). */
const MIN_LIFT_BYTES = 2 * PRE_READ_ENTRIES;
/** Texts longer than this are left to the ordinary path (the reader's memory is about five times the text). */
export const MAX_LIFT_BYTES = 1 << 25;
/** The reader's memory is kept for the next text only up to this size (enough for lines of about 12 MB). */
const KEEP_MEMORY_BYTES = 64 << 20;
/** At most this many matrices are lifted from one text; the rest are left to JSON.parse. */
const MAX_RUNS = 4096;
/** Deepest nesting of the rest that `restore` walks; deeper texts take the ordinary path. */
const MAX_DEPTH = 128;

const MARKER = 'rhosigma lifted matrix ';

interface Reader {
  dataEnd(): number;
  scan(input: number, len: number, out: number, runs: number, maxRuns: number, minEntries: number, maxSide: number): number;
}
interface WasmMemory {
  readonly buffer: ArrayBuffer;
  grow(pages: number): number;
}
interface WasmApi {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: Record<string, unknown> };
  Memory: new (desc: { initial: number }) => WasmMemory;
}

let enabled: boolean | null = null;
let loaded: { reader: Reader; memory: WasmMemory } | null | undefined;

/**
 * Turns the lifting on or off (on by default; off, `liftMatrices` always returns undefined), for tests.
 * The environment variable RHOSIGMA_LIFT_MATRICES=0 (read once, at first use, where a `process` object
 * exists) turns it off too, for benchmarks (bench/transport.ts times the command both ways).
 */
export function setMatrixLiftEnabled(on: boolean): void {
  enabled = on;
}

function envEnabled(): boolean {
  const v = (globalThis as { process?: { env?: Record<string, string | undefined> } }).process?.env?.RHOSIGMA_LIFT_MATRICES;
  return !(v === '0' || v === 'false' || v === 'off');
}

let compiled: object | null | undefined;

function load(): { reader: Reader; memory: WasmMemory } | null {
  if (loaded !== undefined) return loaded;
  loaded = null;
  const api = (globalThis as { WebAssembly?: WasmApi }).WebAssembly;
  if (!api || compiled === null) return null;
  try {
    if (compiled === undefined) {
      const bin = atob(JSON_NUMBERS_WASM_BASE64);
      const bytes = new Uint8Array(bin.length);
      for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
      compiled = new api.Module(bytes);
    }
    const memory = new api.Memory({ initial: 1 });
    const inst = new api.Instance(compiled, { env: { memory } });
    loaded = { reader: inst.exports as unknown as Reader, memory };
  } catch {
    compiled = null;
    loaded = null;
  }
  return loaded;
}

/** A request's bytes with its large numeric matrices taken out, and the way to put them back. */
export interface LiftedRequest {
  /** The bytes with each lifted matrix replaced by a placeholder string. */
  bytes: Uint8Array;
  /**
   * JSON.parse's value of `bytes` with the matrices put back (in place), or undefined when the
   * placeholders do not stand exactly once each at a value's place (the caller then parses the
   * original bytes).
   */
  restore(value: unknown): { value: unknown } | undefined;
}

const align8 = (x: number): number => (x + 7) & ~7;

/**
 * Whether some "[" of the bytes is followed, after JSON whitespace, by another "[" (strings not
 * excepted): without one there is no array of rows to find, and the reader is not run (the packed form's
 * base64 has no "["). Native searches (indexOf) only.
 */
function mayHoldRows(bytes: Uint8Array): boolean {
  for (let i = bytes.indexOf(91); i >= 0; i = bytes.indexOf(91, i + 1)) {
    let k = i + 1;
    while (k < bytes.length && (bytes[k] === 32 || bytes[k] === 10 || bytes[k] === 13 || bytes[k] === 9)) k++;
    if (bytes[k] === 91) return true;
  }
  return false;
}

/**
 * The request's large numeric matrices lifted out of its bytes, or undefined when there is none (or
 * the lifting is off, WebAssembly is missing, or the text is outside [MIN_LIFT_BYTES, MAX_LIFT_BYTES]).
 */
export function liftMatrices(bytes: Uint8Array): LiftedRequest | undefined {
  const len = bytes.length;
  enabled ??= envEnabled();
  if (!enabled || len < MIN_LIFT_BYTES || len > MAX_LIFT_BYTES) return undefined;
  if (!mayHoldRows(bytes)) return undefined;
  const l = load();
  if (!l) return undefined;
  const { reader, memory } = l;
  const input = align8(reader.dataEnd());
  const out = align8(input + len);
  const runs = align8(out + 8 * ((len >> 1) + 2));
  const need = runs + 16 * MAX_RUNS;
  if (need > memory.buffer.byteLength) {
    try {
      memory.grow(Math.ceil((need - memory.buffer.byteLength) / 65536));
    } catch {
      return undefined; // no memory for the reader: the ordinary path, which may still fit
    }
  }
  new Uint8Array(memory.buffer, input, len).set(bytes);
  const found = reader.scan(input, len, out, runs, MAX_RUNS, PRE_READ_ENTRIES, MAX_DIMENSION);
  if (found === 0) return undefined;

  const table = new Int32Array(memory.buffer, runs, 4 * found);
  const numbers = new Float64Array(memory.buffer, out);
  const values: Float64Array[] = [];
  const shapes: [number, number][] = [];
  const markers: Uint8Array[] = [];
  let total = len;
  let offset = 0;
  for (let k = 0; k < found; k++) {
    const rows = table[4 * k + 2];
    const cols = table[4 * k + 3];
    values.push(numbers.slice(offset, offset + rows * cols));
    shapes.push([rows, cols]);
    offset += rows * cols;
    const marker = new TextEncoder().encode(`"${MARKER}${k}"`);
    markers.push(marker);
    total += marker.length - (table[4 * k + 1] - table[4 * k]);
  }
  const reduced = new Uint8Array(total);
  let at = 0;
  let from = 0;
  for (let k = 0; k < found; k++) {
    const start = table[4 * k];
    reduced.set(bytes.subarray(from, start), at);
    at += start - from;
    reduced.set(markers[k], at);
    at += markers[k].length;
    from = table[4 * k + 1];
  }
  reduced.set(bytes.subarray(from), at);

  const restore = (value: unknown): { value: unknown } | undefined => {
    const used = new Uint8Array(found);
    let count = 0;
    /** The matrix a placeholder stands for, -1 for an ordinary value, -2 for a placeholder out of place. */
    const which = (v: unknown): number => {
      if (typeof v !== 'string' || !v.startsWith(MARKER)) return -1;
      const k = Number(v.slice(MARKER.length));
      if (!Number.isInteger(k) || k < 0 || k >= found || used[k] || v !== `${MARKER}${k}`) return -2;
      used[k] = 1;
      count++;
      return k;
    };
    const put = (k: number): unknown[] => {
      const [rows, cols] = shapes[k];
      const f = values[k];
      const out = new Array<unknown>(rows);
      for (let i = 0; i < rows; i++) {
        // Filled to its length at once: no holes remain (ten times faster than push, or Array.from).
        const row = new Array<number>(cols);
        const base = i * cols;
        for (let j = 0; j < cols; j++) row[j] = f[base + j];
        out[i] = row;
      }
      rememberLiftedRows(out, f);
      return out;
    };
    const walk = (v: unknown, depth: number): boolean => {
      if (typeof v !== 'object' || v === null) return true;
      if (depth > MAX_DEPTH) return false;
      if (Array.isArray(v)) {
        for (let i = 0; i < v.length; i++) {
          const x = v[i];
          const k = which(x);
          if (k === -2) return false;
          if (k >= 0) v[i] = put(k);
          else if (!walk(x, depth + 1)) return false;
        }
        return true;
      }
      const obj = v as Record<string, unknown>;
      for (const key of Object.keys(obj)) {
        const x = obj[key];
        const k = which(x);
        if (k === -2 || (k >= 0 && key === '__proto__')) return false;
        if (k >= 0) obj[key] = put(k);
        else if (!walk(x, depth + 1)) return false;
      }
      return true;
    };
    const top = which(value);
    if (top === -2) return undefined;
    if (top >= 0) return count === found ? { value: put(top) } : undefined;
    return walk(value, 0) && count === found ? { value } : undefined;
  };
  // A memory grown for a very long text is let go (a fresh one is made for the next text), so that a
  // long-lived engine (serve) does not keep five times its largest request for good.
  if (memory.buffer.byteLength > KEEP_MEMORY_BYTES) loaded = undefined;
  return { bytes: reduced, restore };
}
