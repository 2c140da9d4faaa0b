/**
 * Requests as JSON text: parsing that refuses what JSON.parse would silently accept, for every surface
 * that receives text (the command, the engine behind the kernel bridge, a page that takes typed input).
 *
 * - Duplicate keys: JSON.parse keeps the last of `{"op": "entropy", "op": "spectrum"}`, so a validator
 *   upstream that kept the first would see another request than the engine runs. `findDuplicateKeys`
 *   reports each duplicate with its place ("[2].op"). The common case pays a look at the quotes and
 *   braces only (found by indexOf), with a set of keys per open object; only when it finds a repeated
 *   key does the exact scan (a small tokenizer of our own, below) run, for the places. No JSON library reports duplicate
 *   keys with their places, and this check runs on every request, so it is written here.
 * - Invalid UTF-8: decoding with replacement turns bad bytes into U+FFFD silently; `decodeUtf8` refuses.
 *
 * Deliberately not here: reading streams or files (src/cli), validation of the request (handle).
 * Cost: O(length of the text) in native searches plus O(strings + braces) of our own; the UTF-8 check
 * about a millisecond per few megabytes.
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

/** Positions of one character in the text, by indexOf (a native search). */
function positions(text: string, ch: string): number[] {
  const out: number[] = [];
  for (let i = text.indexOf(ch); i >= 0; i = text.indexOf(ch, i + 1)) out.push(i);
  return out;
}

/**
 * Whether some object of a valid JSON text repeats a key. Only the quotes and braces are looked at,
 * each found with indexOf: the keys of each open object (a string followed by ":") go into a set;
 * braces inside strings are skipped. Numbers, the bulk of a matrix given as rows, are never read
 * character by character (a regular expression over the text, or a walk over the parsed value's
 * numbers, cost 5–10 ms on a 256 × 256 complex matrix; this costs a few hundredths of that).
 */
function hasDuplicateKeys(text: string): boolean {
  const opens = positions(text, '{');
  const closes = positions(text, '}');
  const len = text.length;
  const stack: Set<string>[] = [];
  let a = 0;
  let b = 0;
  let quote = text.indexOf('"');
  for (;;) {
    const nextOpen = a < opens.length ? opens[a] : len;
    const nextClose = b < closes.length ? closes[b] : len;
    const nextQuote = quote >= 0 ? quote : len;
    if (nextQuote < nextOpen && nextQuote < nextClose) {
      let close = text.indexOf('"', nextQuote + 1);
      while (close >= 0 && escaped(text, close)) close = text.indexOf('"', close + 1);
      if (close < 0) return false;
      let k = close + 1;
      let c = text.charCodeAt(k);
      while (k < len && (c === 32 || c === 10 || c === 13 || c === 9)) c = text.charCodeAt(++k);
      const top = stack[stack.length - 1];
      if (c === 58 && top) {
        const raw = text.slice(nextQuote, close + 1);
        const key = raw.includes('\\') ? (JSON.parse(raw) as string) : raw.slice(1, -1);
        if (top.has(key)) return true;
        top.add(key);
      }
      while (a < opens.length && opens[a] < close) a++;
      while (b < closes.length && closes[b] < close) b++;
      quote = text.indexOf('"', k);
    } else if (nextOpen < nextClose) {
      stack.push(new Set());
      a++;
    } else if (nextClose < len) {
      stack.pop();
      b++;
    } else return false;
  }
}

/**
 * Every duplicated key of a valid JSON text; an empty list when there is none (the usual case,
 * decided by the quick look above; only then does the exact scan below run, for the places).
 */
export function findDuplicateKeys(text: string): DuplicateKey[] {
  return hasDuplicateKeys(text) ? scanDuplicates(text) : [];
}

function place(path: string, key: string): string {
  return /^[A-Za-z_$][\w$]*$/.test(key) ? (path === '' ? key : `${path}.${key}`) : `${path}[${JSON.stringify(key)}]`;
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
