/**
 * Requests as JSON text: parsing that refuses what JSON.parse would silently accept, for every surface
 * that receives text (the command, the engine behind the kernel bridge, a page that takes typed input).
 *
 * - Duplicate keys: JSON.parse keeps the last of `{"op": "entropy", "op": "spectrum"}`, so a validator
 *   upstream that kept the first would see another request than the engine runs. `findDuplicateKeys`
 *   reports each duplicate with its place ("[2].op"). The common case pays one scan for quotes (indexOf)
 *   that counts the keys in the text and one walk that counts the keys parsed; only when the two differ
 *   does the exact scan (a small tokenizer of our own, below) run. No JSON library reports duplicate
 *   keys with their places, and this check runs on every request, so it is written here.
 * - Invalid UTF-8: decoding with replacement turns bad bytes into U+FFFD silently; `decodeUtf8` refuses.
 *
 * Deliberately not here: reading streams or files (src/cli), validation of the request (handle).
 * Cost: O(length of the text), about a millisecond per few megabytes for both checks together.
 */

/** A duplicated key: where (the object's place plus the key, "[2].op") and which key. */
export interface DuplicateKey {
  path: string;
  key: string;
}

const fatalDecoder = new TextDecoder('utf-8', { fatal: true });

/** The text of UTF-8 bytes, or undefined when they are not valid UTF-8 (a leading byte-order mark is dropped). */
export function decodeUtf8(bytes: Uint8Array): string | undefined {
  try {
    return fatalDecoder.decode(bytes);
  } catch {
    return undefined;
  }
}

/** Whether the character at `at` is escaped: preceded by an odd number of backslashes. */
function escaped(text: string, at: number): boolean {
  let k = at - 1;
  while (k >= 0 && text.charCodeAt(k) === 92) k--;
  return (at - 1 - k) % 2 === 1;
}

/**
 * Number of object keys written in a valid JSON text: strings followed by optional whitespace and ":".
 * The quotes are found with indexOf (a native search, several times faster than a regular expression
 * over the number-heavy text of matrices given as rows, whose characters are otherwise each looked at).
 */
function keysInText(text: string): number {
  let n = 0;
  const len = text.length;
  let open = text.indexOf('"');
  while (open >= 0) {
    let close = text.indexOf('"', open + 1);
    while (close >= 0 && escaped(text, close)) close = text.indexOf('"', close + 1);
    if (close < 0) break;
    let k = close + 1;
    let c = text.charCodeAt(k);
    while (k < len && (c === 32 || c === 10 || c === 13 || c === 9)) c = text.charCodeAt(++k);
    if (c === 58) n++;
    open = text.indexOf('"', k);
  }
  return n;
}

/** Number of object keys in a parsed value. */
function keysInValue(v: unknown): number {
  if (typeof v !== 'object' || v === null) return 0;
  let n = 0;
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) {
      const x = v[i];
      if (typeof x === 'object' && x !== null) n += keysInValue(x);
    }
    return n;
  }
  for (const key in v) {
    n++;
    const x = (v as Record<string, unknown>)[key];
    if (typeof x === 'object' && x !== null) n += keysInValue(x);
  }
  return n;
}

function place(path: string, key: string): string {
  return /^[A-Za-z_$][\w$]*$/.test(key) ? (path === '' ? key : `${path}.${key}`) : `${path}[${JSON.stringify(key)}]`;
}

/**
 * Every duplicated key of a valid JSON text whose parsed value is `parsed` (JSON.parse(text)); an empty
 * list when there is none (the usual case, decided by counting).
 */
export function findDuplicateKeys(text: string, parsed: unknown): DuplicateKey[] {
  if (keysInText(text) === keysInValue(parsed)) return [];
  return scanDuplicates(text);
}

/** The exact scan: a tokenizer of strings and punctuation that tracks the keys of each open object. */
function scanDuplicates(text: string): DuplicateKey[] {
  type Frame = { kind: 'object'; path: string; keys: Set<string>; key?: string } | { kind: 'array'; path: string; index: number };
  const out: DuplicateKey[] = [];
  const stack: Frame[] = [];
  let expectKey = false;
  const childPath = (): string => {
    const top = stack[stack.length - 1];
    if (!top) return '';
    return top.kind === 'array' ? `${top.path}[${top.index}]` : place(top.path, top.key ?? '');
  };
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '"') {
      let j = i + 1;
      while (j < text.length && text[j] !== '"') j += text[j] === '\\' ? 2 : 1;
      const top = stack[stack.length - 1];
      if (expectKey && top && top.kind === 'object') {
        const key = JSON.parse(text.slice(i, j + 1)) as string;
        if (top.keys.has(key)) out.push({ path: place(top.path, key), key });
        top.keys.add(key);
        top.key = key;
        expectKey = false;
      }
      i = j;
    } else if (c === '{') {
      stack.push({ kind: 'object', path: childPath(), keys: new Set() });
      expectKey = true;
    } else if (c === '[') {
      stack.push({ kind: 'array', path: childPath(), index: 0 });
    } else if (c === '}' || c === ']') {
      stack.pop();
    } else if (c === ',') {
      const top = stack[stack.length - 1];
      if (top?.kind === 'array') top.index++;
      else if (top?.kind === 'object') expectKey = true;
    }
  }
  return out;
}
