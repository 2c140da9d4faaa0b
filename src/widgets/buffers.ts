/**
 * Packed matrices (docs/protocol.md, "packed matrix") over widget comms as binary buffers: the
 * `re`/`im` base64 text of every `{"packed": "float64-le"}` object inside a synced field becomes a
 * DataView on the way out, which @jupyter-widgets/base sends as a binary buffer of the comm message
 * (its `remove_buffers`), and a buffer that arrives (restored by `put_buffers` as a DataView) becomes
 * base64 text again, so every other part of the widget set sees the protocol's plain-data form. The
 * Python twin is `_packed_to_buffers` / `_packed_from_buffers` in kernel-bridge/rhosigma/widgets.py.
 *
 * Hand-written because no library converts between base64 text and bytes for both the browser and
 * Node without a dependency of its own; it is transport, not numerics (the bytes are not read as numbers).
 * Deliberately not here: decoding entries (matrix-form.ts). Cost: one pass over the bytes.
 */
import type { ISerializers } from '@jupyter-widgets/base';

const PARTS = ['re', 'im'] as const;

function isPacked(v: unknown): v is Record<string, unknown> {
  return !!v && typeof v === 'object' && !Array.isArray(v) && (v as Record<string, unknown>).packed === 'float64-le';
}

function bytesOf(b: unknown): Uint8Array | null {
  if (b instanceof DataView) return new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
  if (b instanceof ArrayBuffer) return new Uint8Array(b);
  if (ArrayBuffer.isView(b)) return new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
  return null;
}

/** Standard padded base64 of bytes (chunks keep String.fromCharCode's argument list short). */
export function base64Of(bytes: Uint8Array): string {
  let bin = '';
  for (let i = 0; i < bytes.length; i += 0x8000) bin += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(bin);
}

/** The bytes of base64 text (URL-safe letters read as in the protocol); null when it is not base64. */
export function bytesOfBase64(text: string): Uint8Array | null {
  let bin: string;
  try {
    bin = atob(text.replace(/-/g, '+').replace(/_/g, '/'));
  } catch {
    return null;
  }
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

function mapPacked(v: unknown, part: (x: unknown) => unknown): unknown {
  if (Array.isArray(v)) return v.map((x) => mapPacked(x, part));
  if (!v || typeof v !== 'object' || v instanceof DataView || ArrayBuffer.isView(v) || v instanceof ArrayBuffer) return v;
  const o = v as Record<string, unknown>;
  const out: Record<string, unknown> = {};
  for (const k of Object.keys(o)) out[k] = mapPacked(o[k], part);
  if (isPacked(o)) for (const p of PARTS) if (p in o) out[p] = part(o[p]);
  return out;
}

/** A copy with the packed parts as DataViews (sent as binary buffers). Text that is not base64 stays text. */
export function packedToBuffers(v: unknown): unknown {
  return mapPacked(v, (x) => {
    if (typeof x !== 'string') return x;
    const bytes = bytesOfBase64(x);
    return bytes ? new DataView(bytes.buffer) : x;
  });
}

/** A copy with binary packed parts (DataView, ArrayBuffer, typed array) as base64 text. */
export function packedFromBuffers(v: unknown): unknown {
  return mapPacked(v, (x) => {
    const bytes = bytesOf(x);
    return bytes ? base64Of(bytes) : x;
  });
}

/** Serializers that send the packed matrices inside `fields` as binary buffers, both ways. */
export function packedSerializers(fields: readonly string[]): ISerializers {
  const out: ISerializers = {};
  for (const f of fields) out[f] = { serialize: (v: unknown) => packedToBuffers(v), deserialize: (v: unknown) => packedFromBuffers(v) } as never;
  return out;
}
