/**
 * Entries as the person types them, and matrices pasted as text, turned into the protocol's matrix
 * rows: an entry that is a plain decimal literal travels as a number, anything else as an expression
 * string for the engine's restricted reader (src/ops/expressions.ts), which decides what it means.
 *
 * Paste understands what people copy: numpy's printed arrays (`array([[1.+0.j, 0.5-0.1j], ...])`,
 * `[[1 0]\n [0 1]]`), spreadsheets (tab-separated rows), CSV, MATLAB-style `[1 2; 3 4]`. numpy's
 * complex suffix `j` becomes the reader's `*i` (the reader wants multiplication written out). Hand-written because no library reads this mix of
 * formats; the rules are small and tested (test/ui/matrix-text.test.ts).
 *
 * Deliberately not here: evaluation. Nothing is computed; "1/2" stays the string "1/2".
 * Cost: linear in the text.
 */

export type Entry = number | string;

/** A state as the components hold it: rows (or a ket) of entries, with subsystem dims and labels. */
export type StateValue =
  | { matrix: Entry[][]; dims?: number[]; labels?: string[] }
  | { ket: Entry[]; dims?: number[]; labels?: string[] };

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** An entry as typed → the protocol's entry: a number for a plain decimal literal, else the trimmed text. */
export function toEntry(text: string): Entry {
  const t = text.trim();
  if (DECIMAL.test(t)) return Number(t);
  // numpy writes "0." and "1.+0.j": a bare trailing point is dropped (the reader would see ".*").
  return t.replace(/(\d)\.(?!\d)/g, '$1').replace(/(\d)j\b/g, '$1*i').replace(/\bj\b/g, 'i');
}

/** A protocol entry as text for a cell. */
export function entryText(e: unknown): string {
  if (typeof e === 'number') return String(e);
  if (typeof e === 'string') return e;
  return '';
}

/** A {re, im} matrix or plain rows of an answer → rows of entries (complex entries as "a+bi" text). */
export function rowsOfAnswerMatrix(m: unknown): Entry[][] {
  if (Array.isArray(m)) return m.map((row) => (row as unknown[]).map((x) => (typeof x === 'number' || typeof x === 'string' ? x : String(x))));
  const o = m as { re?: number[][]; im?: number[][] };
  if (!o || !Array.isArray(o.re)) return [];
  return o.re.map((row, i) => row.map((re, j) => {
    const im = o.im?.[i]?.[j] ?? 0;
    if (im === 0) return re;
    const sign = im < 0 || Object.is(im, -0) ? '-' : '+';
    return `${re}${sign}${Math.abs(im)}*i`;
  }));
}

/**
 * A matrix pasted as text → rows of entry texts, or an error saying which row is off. A single line of
 * numbers is one row (so a ket pasted as one line still reads; the caller decides its orientation).
 */
export function parsePastedMatrix(text: string): { rows: string[][] } | { error: string } {
  let t = text.trim();
  if (t.length === 0) return { error: 'Nothing to paste.' };
  // numpy's array( ... , dtype=...) wrapper, and Python's/MATLAB's brackets.
  t = t.replace(/^array\(/, '').replace(/,\s*dtype=[\w.]+\s*\)\s*$/, '').replace(/\)\s*$/, '');
  const lines: string[] = [];
  if (/;/.test(t) && !/\n/.test(t)) {
    lines.push(...t.replace(/^\[|\]$/g, '').split(';'));
  } else if (/\]\s*,?\s*\[/.test(t)) {
    // [[a, b], [c, d]] on one line or several.
    lines.push(...t.replace(/^\s*\[\s*\[/, '').replace(/\]\s*\]\s*$/, '').split(/\]\s*,?\s*\[/));
  } else {
    lines.push(...t.split(/\r?\n/));
  }
  const rows = lines
    .map((line) => line.replace(/[[\]]/g, ' ').trim())
    .filter((line) => line.length > 0)
    .map((line) => {
      const sep = line.includes('\t') ? /\t/ : line.includes(',') ? /,/ : /\s+/;
      const tokens = line.split(sep).map((s) => s.trim()).filter((s) => s.length > 0);
      // numpy's str() pads complex entries inside: "0.  -0.25j" is one entry. A signed token ending in j
      // joins a previous token that has no imaginary part yet.
      const merged: string[] = [];
      for (const t of tokens) {
        const prev = merged[merged.length - 1];
        if (prev !== undefined && /^[+-]\d*\.?\d*(e[+-]?\d+)?j$/i.test(t) && !/j$/i.test(prev) && sep.source === '\\s+') merged[merged.length - 1] = prev + t;
        else merged.push(t);
      }
      return merged.map((s) => String(toEntry(s)));
    });
  if (rows.length === 0) return { error: 'No entries found in the pasted text.' };
  const width = rows[0].length;
  const bad = rows.findIndex((r) => r.length !== width);
  if (bad >= 0) return { error: `Row ${bad + 1} of the pasted text has ${rows[bad].length} entries, row 1 has ${width}.` };
  return { rows };
}

/**
 * The state forms a caller may hand in, as the editor's StateValue: `{matrix}` or `{ket}` with rows of
 * entries, also `{re, im}` matrices and kets (an answer's form), and a bare matrix (rows) or a bare
 * vector (a ket). Anything else is refused with a TypeError that says what is accepted.
 */
export function asStateValue(v: unknown): StateValue {
  const rows = (m: unknown): Entry[][] | null => (Array.isArray(m) && m.every(Array.isArray) ? (m as Entry[][]) : m && typeof m === 'object' && Array.isArray((m as { re?: unknown }).re) ? rowsOfAnswerMatrix(m) : null);
  const vector = (k: unknown): Entry[] | null => {
    if (Array.isArray(k) && !k.some(Array.isArray)) return k as Entry[];
    const o = k as { re?: unknown; im?: unknown } | null;
    if (o && typeof o === 'object' && Array.isArray(o.re) && !o.re.some(Array.isArray)) return rowsOfAnswerMatrix({ re: [o.re], im: Array.isArray(o.im) ? [o.im] : undefined })[0];
    return null;
  };
  if (Array.isArray(v)) {
    const m = rows(v);
    if (m) return { matrix: m };
    const k = vector(v);
    if (k) return { ket: k };
  } else if (v && typeof v === 'object') {
    const o = v as { matrix?: unknown; ket?: unknown; dims?: number[]; labels?: string[] };
    const extra = { ...(Array.isArray(o.dims) ? { dims: o.dims } : {}), ...(Array.isArray(o.labels) ? { labels: o.labels } : {}) };
    if (o.ket !== undefined && o.ket !== null) {
      const k = vector(o.ket);
      if (k) return { ket: k, ...extra };
    } else {
      const m = rows(o.matrix);
      if (m) return { matrix: m, ...extra };
    }
  }
  throw new TypeError('StateEditor: a state is {matrix: rows} or {ket: entries} (with optional dims and labels), a {re, im} matrix, or bare rows.');
}
