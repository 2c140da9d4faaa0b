/**
 * Protocol matrices (docs/protocol.md, "Matrices") as the grid's rows of entries: rows as they are,
 * `{re, im}` and the packed form (`{shape, packed: "float64-le", re, im?}`, base64 little-endian float64,
 * which Python sends for large matrices) as numbers, or as "a+b*i" expression strings where an entry is
 * complex (the engine's reader reads them back exactly: JavaScript prints the shortest round-trip digits).
 *
 * Deliberately not here: arithmetic on the values (decoding is transport, not numerics). Cost: one pass.
 */
export type Entry = number | string;

function decode(b64: string): Float64Array {
  const bin = atob(b64.replace(/-/g, '+').replace(/_/g, '/'));
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  const view = new DataView(bytes.buffer);
  const out = new Float64Array(bytes.length / 8);
  for (let i = 0; i < out.length; i++) out[i] = view.getFloat64(8 * i, true);
  return out;
}

function entry(re: number, im: number): Entry {
  if (im === 0) return re;
  const sign = im < 0 || Object.is(im, -0) ? '-' : '+';
  return `${re}${sign}${Math.abs(im)}*i`;
}

/** Rows of entries of any protocol matrix form; null when `m` is not one. */
export function rowsOf(m: unknown): Entry[][] | null {
  if (Array.isArray(m)) return m as Entry[][];
  if (!m || typeof m !== 'object') return null;
  const o = m as Record<string, unknown>;
  if (o.packed === 'float64-le' && Array.isArray(o.shape) && typeof o.re === 'string') {
    const [r, c] = o.shape as number[];
    const re = decode(o.re);
    const im = typeof o.im === 'string' ? decode(o.im) : null;
    return Array.from({ length: r }, (_, i) => Array.from({ length: c }, (_, j) => entry(re[i * c + j], im ? im[i * c + j] : 0)));
  }
  if (Array.isArray(o.re)) {
    const re = o.re as number[][];
    const im = (o.im as number[][] | undefined) ?? null;
    return re.map((row, i) => row.map((x, j) => entry(x, im ? im[i][j] : 0)));
  }
  return null;
}

/** A vector of entries of a protocol ket form (list, `{re, im}` or packed with one dimension). */
export function vectorOf(v: unknown): Entry[] | null {
  if (Array.isArray(v)) return v as Entry[];
  if (!v || typeof v !== 'object') return null;
  const o = v as Record<string, unknown>;
  if (o.packed === 'float64-le' && typeof o.re === 'string') {
    const re = decode(o.re);
    const im = typeof o.im === 'string' ? decode(o.im) : null;
    return Array.from(re, (x, i) => entry(x, im ? im[i] : 0));
  }
  if (Array.isArray(o.re)) {
    const im = (o.im as number[] | undefined) ?? null;
    return (o.re as number[]).map((x, i) => entry(x, im ? im[i] : 0));
  }
  return null;
}
