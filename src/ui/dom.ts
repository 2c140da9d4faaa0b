/**
 * Small DOM helpers shared by the components: element construction with text content only (no HTML
 * is ever built from strings, so nothing from a configuration or an answer can become markup), the
 * event emitter behind `on(event, cb)`, and the formatting of numbers that answers carry.
 *
 * Deliberately not here: any numerics. `formatNumber` only writes a number of an answer as text; it
 * never computes one. Cost: negligible.
 */

export type Listener<T> = (value: T) => void;

/** `on(event, cb)` returning an unsubscribe function (docs/surfaces.md, "UI components"). */
export class Emitter<Events extends Record<string, unknown>> {
  private listeners = new Map<keyof Events, Set<Listener<any>>>();

  on<K extends keyof Events>(event: K, cb: Listener<Events[K]>): () => void {
    let set = this.listeners.get(event);
    if (!set) this.listeners.set(event, (set = new Set()));
    set.add(cb);
    return () => set!.delete(cb);
  }

  emit<K extends keyof Events>(event: K, value: Events[K]): void {
    for (const cb of [...(this.listeners.get(event) ?? [])]) cb(value);
  }

  clear(): void {
    this.listeners.clear();
  }
}

type Attrs = Record<string, string | number | boolean | undefined | null>;

/** An element with attributes (`class`, `aria-*`, `data-*`, ...) and children (nodes or text). */
export function el<K extends keyof HTMLElementTagNameMap>(tag: K, attrs: Attrs = {}, children: (Node | string | null | undefined)[] = []): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === null || v === false) continue;
    e.setAttribute(k, v === true ? '' : String(v));
  }
  for (const c of children) if (c !== null && c !== undefined) e.append(c);
  return e;
}

/** Replaces the children of `parent`. */
export function setChildren(parent: Element, children: (Node | string | null | undefined)[]): void {
  parent.replaceChildren(...children.filter((c): c is Node | string => c !== null && c !== undefined));
}

/** A number of an answer (a number, "Infinity", "-Infinity") as text, with `digits` significant digits. */
export function formatNumber(x: unknown, digits = 6): string {
  if (x === 'Infinity') return '∞';
  if (x === '-Infinity') return '−∞';
  if (typeof x !== 'number') return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  const s = a >= 1e-4 && a < 1e6 ? String(Number(x.toPrecision(digits))) : x.toExponential(digits - 1);
  return s.replace('-', '−');
}

let counter = 0;
/** A page-unique id prefix for labels and `key`s of latest-wins requests. */
export function uniqueId(prefix: string): string {
  counter += 1;
  return `${prefix}-${counter}`;
}

/** An answer's error as an in-place message: code, sentence and the path it points at. */
export function errorBox(error: { code: string; message: string; path?: string }): HTMLElement {
  return el('div', { class: 'rs-error', role: 'alert' }, [
    el('span', { class: 'rs-error__code' }, [error.code]),
    ' ',
    el('span', { class: 'rs-error__message' }, [error.message]),
    error.path ? el('span', { class: 'rs-error__path' }, [` (at ${error.path})`]) : null,
  ]);
}

/** A labelled control row. */
export function field(label: string, control: HTMLElement, hint?: string): HTMLElement {
  const id = control.id || uniqueId('rs-field');
  control.id = id;
  return el('div', { class: 'rs-field' }, [
    el('label', { class: 'rs-field__label', for: id }, [label]),
    control,
    hint ? el('span', { class: 'rs-field__hint' }, [hint]) : null,
  ]);
}

/** A list of integers typed as "2, 2" (dims) or indices; null when not such a list. */
export function parseIntegerList(text: string): number[] | null {
  const parts = text.split(/[\s,;×x*]+/).filter((p) => p.length > 0);
  if (parts.length === 0) return null;
  const out = parts.map((p) => (/^\d+$/.test(p) ? Number(p) : NaN));
  return out.every((n) => Number.isInteger(n)) ? out : null;
}
