/**
 * Sharing a calculator: its inputs as a link (in the URL fragment, which never leaves the reader's
 * browser), its request as plain JSON for `rhosigma compute`, and a Python snippet that recreates the
 * computation with the `rhosigma` package (kernel-bridge/rhosigma/functions.py).
 *
 * Link format (ours): `#rhosigma.KEY=DATA`, several joined by `&`; KEY names the calculator on the page
 * (its element's id, else its position), DATA is `z` + base64url of the deflate-raw compressed UTF-8
 * JSON of `{"calculator", "inputs"}`, or `j` + base64url of the JSON where CompressionStream is missing.
 * A link is read back through the same checks as a configuration (config.ts): a link is untrusted input.
 *
 * What it does not do: shorten links through any service, or send anything anywhere. Cost: linear in
 * the inputs (deflate is the browser's own).
 */
import { checkConfig, ConfigError, type EmbedConfig } from './config.js';

const PREFIX = 'rhosigma.';

/** Standard base64url without padding, of bytes (hand-written: btoa works on binary strings only). */
function toBase64Url(bytes: Uint8Array): string {
  let bin = '';
  for (let k = 0; k < bytes.length; k += 0x8000) bin += String.fromCharCode(...bytes.subarray(k, k + 0x8000));
  return btoa(bin).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
}

function fromBase64Url(text: string): Uint8Array {
  if (!/^[A-Za-z0-9_-]*$/.test(text)) throw new ConfigError('link', 'the shared link is damaged (unexpected characters)');
  const bin = atob(text.replace(/-/g, '+').replace(/_/g, '/') + '='.repeat((4 - (text.length % 4)) % 4));
  const out = new Uint8Array(bin.length);
  for (let k = 0; k < bin.length; k++) out[k] = bin.charCodeAt(k);
  return out;
}

type Streams = { CompressionStream?: new (f: string) => TransformStream; DecompressionStream?: new (f: string) => TransformStream };

async function through(bytes: Uint8Array, stream: TransformStream, limit: number): Promise<Uint8Array> {
  const out = new Response(new Response(bytes as unknown as ArrayBuffer).body!.pipeThrough(stream));
  const reader = out.body!.getReader();
  const parts: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.length;
    if (total > limit) {
      await reader.cancel();
      throw new ConfigError('link', 'the shared link expands to more than its limit');
    }
    parts.push(value);
  }
  const joined = new Uint8Array(total);
  let at = 0;
  for (const p of parts) {
    joined.set(p, at);
    at += p.length;
  }
  return joined;
}

/** Most a link may expand to (a 64×64 complex state written as JSON is far below it). */
const MAX_LINK_JSON = 4_000_000;

/** The DATA part of a link for these inputs. */
export async function encodeShared(calculator: string, inputs: unknown): Promise<string> {
  const bytes = new TextEncoder().encode(JSON.stringify({ calculator, inputs }));
  const CS = (globalThis as Streams).CompressionStream;
  if (!CS) return `j${toBase64Url(bytes)}`;
  return `z${toBase64Url(await through(bytes, new CS('deflate-raw'), Number.POSITIVE_INFINITY))}`;
}

/** Reads DATA back into a checked configuration (the same checks as a configuration block). */
export async function decodeShared(data: string): Promise<EmbedConfig> {
  const kind = data[0];
  let bytes = fromBase64Url(data.slice(1));
  if (kind === 'z') {
    const DS = (globalThis as Streams).DecompressionStream;
    if (!DS) throw new ConfigError('link', 'this browser cannot read compressed links');
    try {
      bytes = await through(bytes, new DS('deflate-raw'), MAX_LINK_JSON);
    } catch (err) {
      if (err instanceof ConfigError) throw err;
      throw new ConfigError('link', 'the shared link is damaged (it does not decompress)');
    }
  } else if (kind !== 'j') throw new ConfigError('link', 'the shared link is not one this page writes');
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new ConfigError('link', 'the shared link is damaged (not UTF-8)');
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch {
    throw new ConfigError('link', 'the shared link is damaged (not JSON)');
  }
  return checkConfig(parsed);
}

/** The entries `KEY → DATA` of a fragment (`#rhosigma.a=...&rhosigma.b=...`); other parts are left alone. */
export function sharedEntries(hash: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const part of hash.replace(/^#/, '').split('&')) {
    if (!part.startsWith(PREFIX)) continue;
    const eq = part.indexOf('=');
    if (eq < 0) continue;
    out.set(decodeURIComponent(part.slice(PREFIX.length, eq)), part.slice(eq + 1));
  }
  return out;
}

/** A link to `pageUrl` (its own fragment dropped) that reopens the calculator KEY with DATA. */
export function linkTo(pageUrl: string, key: string, data: string): string {
  const base = pageUrl.replace(/#.*$/, '');
  return `${base}#${PREFIX}${encodeURIComponent(key)}=${data}`;
}

/** The request as a person pastes it into `rhosigma compute` (id left out: it means nothing there). */
export function requestText(request: Record<string, unknown>): string {
  const { id: _id, ...rest } = request;
  return `${JSON.stringify(rest, null, 2)}\n`;
}

/** Friendly functions of the Python package (kernel-bridge/rhosigma/functions.py) by op name. */
const PYTHON_FUNCTIONS = new Set([
  'bures-distance', 'chernoff-exponent', 'conditional-entropy', 'conditional-max-entropy', 'conditional-min-entropy',
  'conditional-mutual-information', 'conditional-renyi-entropy', 'divergence', 'entropy', 'expectation-divergence',
  'fidelity', 'fidelity-of-recovery', 'fidelity-sdp', 'guessing-probability', 'guesswork', 'max-information',
  'mutual-information', 'petz-recovery', 'purified-distance', 'smooth-max-divergence', 'trace-distance',
]);

/** The package's keyword for a protocol field (the inverse of functions.py's `_field`). */
function keyword(field: string): string {
  if (field === 'from') return 'from_dims';
  if (field === 'to') return 'to_dims';
  return field.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
}

/** A Python literal for plain JSON data (JSON's string escapes are Python's too). */
export function pythonLiteral(value: unknown, indent = ''): string {
  if (value === null) return 'None';
  if (value === true) return 'True';
  if (value === false) return 'False';
  if (typeof value === 'number') return Number.isFinite(value) ? JSON.stringify(value) : JSON.stringify(String(value));
  if (typeof value === 'string') return JSON.stringify(value);
  const inner = `${indent}    `;
  if (Array.isArray(value)) {
    const flat = value.every((x) => x === null || typeof x !== 'object');
    if (flat) return `[${value.map((x) => pythonLiteral(x)).join(', ')}]`;
    return `[\n${value.map((x) => `${inner}${pythonLiteral(x, inner)},`).join('\n')}\n${indent}]`;
  }
  if (typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>);
    return `{\n${entries.map(([k, v]) => `${inner}${JSON.stringify(k)}: ${pythonLiteral(v, inner)},`).join('\n')}\n${indent}}`;
  }
  throw new Error(`pythonLiteral: not plain data (${typeof value})`);
}

/**
 * A Python snippet that computes the same request with the rhosigma package: the op's friendly function
 * where the package has one, else `rhosigma.call(op, ...)`; the value printed.
 */
export function pythonSnippet(request: Record<string, unknown>): string {
  const { op, id: _id, ...fields } = request;
  const name = String(op);
  const lines = ['import rhosigma', ''];
  const args: string[] = [];
  for (const [field, v] of Object.entries(fields)) {
    const isBig = v !== null && typeof v === 'object';
    if (isBig) {
      lines.push(`${keyword(field)} = ${pythonLiteral(v)}`);
      args.push(`${keyword(field)}=${keyword(field)}`);
    } else args.push(`${keyword(field)}=${pythonLiteral(v)}`);
  }
  if (lines.length > 2) lines.push('');
  const call = PYTHON_FUNCTIONS.has(name) ? `rhosigma.${name.replace(/-/g, '_')}(` : `rhosigma.call(${JSON.stringify(name)}, `;
  lines.push(`value = ${call}${args.join(', ')})`, 'print(value)', '');
  return lines.join('\n');
}
