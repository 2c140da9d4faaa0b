/**
 * What every calculator shares: inputs set from editors (`calc.inputs = { rho, sigma }`), its own
 * settings (`value`: family, α, base, ...), one or more protocol requests built from both, sent through
 * the engine with latest-wins keys, and result cards that show each answer's value with its conventions
 * (logarithm base, fidelity convention) and, for an SDP, its certificate status. An invalid input shows
 * the engine's error in place of the number; nothing is computed in the page.
 *
 * Events: `change` (the person changed a setting; the new `value`), `result` ({ name, request, answer },
 * once per answer). A long solve (and each certificate's re-check) is asked with `long: true`, so the
 * engine client runs it on its long lane, beside other calculators' quick requests; it shows its progress
 * and a Stop button, which aborts it (the long lane's worker is restarted; docs/surfaces.md).
 *
 * Deliberately not here: numerics, and knowledge of any one quantity (the subclasses).
 * Cost: the requests' (in the worker); rendering is a few elements per answer.
 */
import type { Answer, EngineLike, Progress } from '../worker/types.js';
import { Emitter, el, errorBox, formatNumber, setChildren, uniqueId } from './dom.js';

export interface CalculatorOptions<I, V> {
  engine: EngineLike;
  inputs?: Partial<I>;
  value?: Partial<V>;
  label?: string;
}

export interface NamedRequest {
  name: string;
  request: Record<string, unknown>;
  /** An SDP or optimisation that may run long: shows progress and the Stop button. */
  long?: boolean;
}

export interface ResultEvent {
  name: string;
  request: Record<string, unknown>;
  answer: Answer;
}

type Events<V> = { change: V; result: ResultEvent };

export abstract class Calculator<I extends object, V extends object> {
  readonly element: HTMLElement;
  protected readonly engine: EngineLike;
  protected readonly id: string;
  protected readonly events = new Emitter<Events<V>>();
  protected readonly controls: HTMLElement;
  protected readonly output: HTMLElement;
  private readonly status: HTMLElement;
  private readonly stopButton: HTMLButtonElement;
  private _inputs: Partial<I>;
  protected settings: V;
  private seq = 0;
  private abort: AbortController | null = null;
  private disposed = false;
  private latest = new Map<string, ResultEvent>();
  /** Resolves when the newest round of requests has been shown (for tests and benchmarks). */
  computed: Promise<void> = Promise.resolve();
  /** Resolves when the newest round's SDP answers have been re-checked (verify-answer) and the verdicts shown. */
  verified: Promise<void> = Promise.resolve();

  constructor(protected readonly host: HTMLElement, options: CalculatorOptions<I, V>, defaults: V, kind: string, title: string) {
    this.engine = options.engine;
    this.id = uniqueId(`rs-${kind}`);
    this._inputs = { ...(options.inputs ?? {}) };
    this.settings = { ...defaults, ...(options.value ?? {}) };
    this.controls = el('div', { class: 'rs-toolbar' });
    this.output = el('div', { class: 'rs-results', 'aria-live': 'polite' });
    this.status = el('span', { class: 'rs-status', role: 'status' });
    this.stopButton = el('button', { class: 'rs-button rs-button--stop', type: 'button', hidden: true }, ['Stop']);
    this.stopButton.addEventListener('click', () => this.abort?.abort());
    this.element = el('section', { class: `rs-component rs-calculator rs-${kind}`, 'aria-label': options.label ?? title }, [
      el('header', { class: 'rs-component__title' }, [options.label ?? title]),
      this.controls,
      el('div', { class: 'rs-progress' }, [this.status, this.stopButton]),
      this.output,
    ]);
    host.append(this.element);
  }

  /** Subclasses call this at the end of their constructor, once their controls exist. */
  protected start(): void {
    this.syncControls();
    this.recompute();
  }

  on<K extends keyof Events<V>>(event: K, cb: (v: Events<V>[K]) => void): () => void {
    return this.events.on(event, cb);
  }

  get inputs(): Partial<I> {
    return { ...this._inputs };
  }

  /** New inputs (from editors); recomputes. Fields left out keep their values. */
  set inputs(next: Partial<I>) {
    this._inputs = { ...this._inputs, ...next };
    this.recompute();
  }

  get value(): V {
    return { ...this.settings };
  }

  set value(v: V) {
    this.settings = { ...this.settings, ...v };
    this.syncControls();
    this.recompute();
  }

  /** New inputs and settings at once (one round of requests instead of two); fields left out keep their values. */
  update(next: { inputs?: Partial<I>; value?: Partial<V> }): void {
    if (next.inputs) this._inputs = { ...this._inputs, ...next.inputs };
    if (next.value) {
      this.settings = { ...this.settings, ...next.value };
      this.syncControls();
    }
    this.recompute();
  }

  /** The newest answers by name ({ request, answer }). */
  get results(): Record<string, ResultEvent> {
    return Object.fromEntries(this.latest);
  }

  dispose(): void {
    this.disposed = true;
    this.abort?.abort();
    this.events.clear();
    this.element.remove();
  }

  /** A setting changed through a control. */
  protected setSetting<K extends keyof V>(key: K, v: V[K]): void {
    this.settings = { ...this.settings, [key]: v };
    this.events.emit('change', this.value);
    this.recompute();
  }

  /** Copy the settings into the controls. */
  protected abstract syncControls(): void;

  /** The requests for the current inputs and settings; a string says what input is missing. */
  protected abstract requests(inputs: Partial<I>, settings: V): NamedRequest[] | string;

  /** Show the answers (in the order of `requests`). */
  protected abstract render(answers: { req: NamedRequest; answer: Answer }[]): void;

  /** Each SDP answer shown is re-checked by the engine's verify-answer; the verdict joins its badge. */
  private recheck(answers: { req: NamedRequest; answer: Answer }[], seq: number): void {
    const checks: Promise<void>[] = [];
    for (const { req, answer } of answers) {
      const cert = answer.ok ? (answer as Record<string, any>).certificate : undefined;
      const box = cert && typeof cert === 'object' ? badges.get(cert) : undefined;
      if (!box) continue;
      const slot = box.querySelector<HTMLElement>('.rs-verdict')!;
      slot.textContent = ' · re-checking…';
      checks.push(this.engine.compute({ op: 'verify-answer', request: req.request, answer }, { key: `${this.id}:verify:${req.name}`, priority: 'background', long: true }).then((v) => {
        if (this.disposed || seq !== this.seq) return;
        if (!v.ok && v.error.code === 'cancelled') return;
        const { text, ok } = verdictText(v);
        slot.textContent = ` · ${text}`;
        slot.dataset.verdict = ok ? 'certified' : 'not-certified';
      }));
    }
    this.verified = Promise.all(checks).then(() => undefined);
  }

  protected recompute(): void {
    if (this.disposed) return;
    const seq = ++this.seq;
    const built = this.requests(this._inputs, this.settings);
    if (typeof built === 'string') {
      setChildren(this.output, [el('p', { class: 'rs-note' }, [built])]);
      this.computed = Promise.resolve();
      return;
    }
    const long = built.some((r) => r.long);
    // Superseded requests still queued are dropped by their key; one already running finishes and its
    // answer is ignored. It is not stopped: stopping means restarting its lane's worker, whose cold start
    // (load and compile) costs the other solves on that lane more than a small solve does. The Stop
    // button stops the current round on purpose.
    const abort = new AbortController();
    this.abort = abort;
    this.stopButton.hidden = !long;
    this.status.textContent = long ? 'Computing…' : '';
    const onProgress = (p: Progress) => {
      if (seq !== this.seq) return;
      const it = typeof p.iteration === 'number' ? `, iteration ${p.iteration}` : typeof p.iterations === 'number' ? `, step ${p.iterations}` : '';
      const gap = typeof p.relativeGap === 'number' ? `, relative gap ${formatNumber(p.relativeGap, 2)}` : '';
      this.status.textContent = `Computing ${p.what}: ${(p.elapsedMs / 1000).toFixed(1)} s${it}${gap}`;
    };
    const round = built.map((req) =>
      this.engine.compute(req.request, { key: `${this.id}:${req.name}`, signal: abort.signal, long: req.long, onProgress: req.long ? onProgress : undefined })
        .then((answer) => ({ req, answer })));
    this.computed = Promise.all(round).then((answers) => {
      if (this.disposed || seq !== this.seq) return;
      this.stopButton.hidden = true;
      const stopped = answers.some((a) => !a.answer.ok && a.answer.error.code === 'cancelled');
      this.status.textContent = stopped && abort.signal.aborted ? 'Stopped.' : '';
      this.render(answers);
      this.recheck(answers, seq);
      for (const { req, answer } of answers) {
        const ev = { name: req.name, request: req.request, answer };
        this.latest.set(req.name, ev);
        this.events.emit('result', ev);
      }
    });
  }
}

// ---------------------------------------------------------------------------------------------------
// Pieces of result cards

/** The badge shown for each certificate object (so that its re-check can be added when it arrives). */
const badges = new WeakMap<object, HTMLElement>();

/**
 * What the engine's `verify-answer` said of an SDP answer: re-checked from the answer's own points
 * (both points' feasibility, both bounds recomputed; docs/protocol.md), shown beside the certificate.
 */
export function verdictText(v: Answer): { text: string; ok: boolean } {
  if (!v.ok) return { text: `re-check failed to run (${v.error.code})`, ok: false };
  const a = v as Record<string, any>;
  if (a.checkable === false) return { text: `not re-checkable: ${a.reason ?? 'the answer carries no points'}`, ok: false };
  if (a.value === true) {
    const acc = a.accuracy && typeof a.accuracy === 'object' ? a.accuracy : null;
    const within = acc && typeof acc.absolute === 'number' ? ` (recomputed bracket ${formatNumber(acc.absolute, 2)} wide)` : '';
    return { text: `re-checked from its points: certified${within}`, ok: true };
  }
  const failed = Array.isArray(a.checks) ? a.checks.filter((c: { ok: boolean }) => !c.ok).map((c: { check: string }) => c.check) : [];
  return { text: `re-checked from its points: NOT certified${failed.length ? ` (${failed.join(', ')})` : ''}`, ok: false };
}

/** The logarithm base as the answer states it. */
export function baseText(answer: Record<string, any>, asked: unknown): string {
  const b = answer.base ?? asked ?? 2;
  return b === 'e' || b === Math.E ? 'natural logarithm (nats)' : b === 2 ? 'log base 2 (bits)' : `log base ${b}`;
}

/** The certificate's status line of an SDP answer. */
export function certificateBadge(cert: Record<string, any> | undefined): HTMLElement | null {
  if (!cert) return null;
  const ok = cert.status === 'optimal';
  const gap = cert.relativeGap ?? cert.gap;
  const badge = el('span', { class: `rs-badge ${ok ? 'rs-badge--ok' : 'rs-badge--warn'}`, title: cert.problem ?? '' }, [
    `certificate: ${cert.status}`,
    gap !== undefined ? ` · relative gap ${formatNumber(gap, 2)}` : '',
    cert.iterations !== undefined ? ` · ${cert.iterations} iterations` : '',
  ]);
  const clip = cert.clipped && typeof cert.clipped === 'object' ? cert.clipped : null;
  const clipNote = clip
    ? el('div', { class: 'rs-note rs-clipped' }, [
      `The solver's estimate ${formatNumber(clip.from, 12)} (or its bracket) reached ${formatNumber(clip.excess, 2)} beyond the range `
        + `[${(clip.range ?? []).map((x: number) => formatNumber(x, 6)).join(', ')}] this quantity has by definition (rounding and the solver's residuals); `
        + 'the value and its bracket are clipped to the range.',
    ])
    : null;
  const box = el('span', { class: 'rs-certificate' }, [badge, el('span', { class: 'rs-verdict', 'data-verdict': 'pending' }, []), clipNote]);
  badges.set(cert, box);
  return box;
}

/** One result: a name, the value (or the error in its place), conventions, extras. */
export function resultCard(
  name: string,
  answer: Answer,
  value: (a: Record<string, any>) => (Node | string)[],
  conventions: (a: Record<string, any>) => string[],
  extra?: (a: Record<string, any>) => (Node | string | null)[],
): HTMLElement {
  const card = el('div', { class: 'rs-card', 'data-result': name });
  card.append(el('div', { class: 'rs-card__name' }, [name]));
  if (!answer.ok) {
    card.classList.add('rs-card--error');
    card.append(errorBox(answer.error));
    return card;
  }
  const a = answer as Record<string, any>;
  card.append(el('div', { class: 'rs-card__value', 'data-value': typeof a.value === 'number' ? String(a.value) : String(a.value) }, value(a)));
  const conv = conventions(a);
  if (conv.length) card.append(el('div', { class: 'rs-card__conventions' }, [conv.join(' · ')]));
  if (a.reason) card.append(el('div', { class: 'rs-note' }, [String(a.reason)]));
  // The engine's own caveats (a value at rounding level, a support decision, a solver's warning): shown, never dropped.
  const notes = [...(Array.isArray(a.notes) ? a.notes : []), ...(typeof a.warning === 'string' ? [a.warning] : [])];
  for (const n of notes) card.append(el('div', { class: 'rs-note rs-note--engine' }, [String(n)]));
  for (const x of extra?.(a) ?? []) if (x) card.append(x);
  return card;
}

/** A small read-only matrix of an answer (entries formatted, complex as a ± bi). */
export function matrixTable(m: unknown, label: string): HTMLElement {
  const o = Array.isArray(m) ? { re: m as number[][], im: undefined } : (m as { re: number[][]; im?: number[][] });
  const rows = (o?.re ?? []).map((row, i) =>
    el('tr', {}, row.map((re, j) => {
      const im = o.im?.[i]?.[j] ?? 0;
      return el('td', {}, [im ? `${formatNumber(re, 3)}${im < 0 ? '−' : '+'}${formatNumber(Math.abs(im), 3)}i` : formatNumber(re, 3)]);
    })));
  return el('table', { class: 'rs-matrix', 'aria-label': label }, [el('tbody', {}, rows)]);
}

/** A select control. */
export function selectControl(options: [string, string][], onChange: (v: string) => void): HTMLSelectElement {
  const s = el('select', { class: 'rs-select' }, options.map(([v, t]) => el('option', { value: v }, [t])));
  s.addEventListener('change', () => onChange(s.value));
  return s;
}

/** A number input; calls back with the number, or shows the input as invalid (nothing is sent). */
export function numberControl(attrs: { min?: number; max?: number; step?: number }, onChange: (v: number) => void): HTMLInputElement {
  const input = el('input', { class: 'rs-input rs-input--short', type: 'number', min: attrs.min, max: attrs.max, step: attrs.step ?? 'any' });
  input.addEventListener('input', () => {
    const v = input.valueAsNumber;
    const ok = Number.isFinite(v);
    input.toggleAttribute('aria-invalid', !ok);
    if (ok) onChange(v);
  });
  return input;
}
