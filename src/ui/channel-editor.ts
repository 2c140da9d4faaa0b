/**
 * ChannelEditor: a channel as a list of Kraus operators, as a Choi matrix (input factor first), or as one
 * of the engine's presets with its parameters on sliders; live checks through `channel-check`: complete
 * positivity (smallest Choi eigenvalue), trace preservation and unitality, each with the size of its
 * violation.
 *
 * Contract (docs/surfaces.md): `new ChannelEditor(host, { engine, value? })`, `value` (the protocol's
 * channel form: { kraus, from, to } or { choi, from, to }), `on('change' | 'check', cb)`, `dispose()`.
 * Deliberately not here: numerics (a preset's Kraus operators come from `channel-preset`).
 * Cost: one channel-check per edit.
 */
import type { Answer, EngineLike } from '../worker/types.js';
import { Emitter, el, errorBox, field, formatNumber, parseIntegerList, setChildren, uniqueId } from './dom.js';
import { MatrixGrid } from './matrix-grid.js';
import { rowsOfAnswerMatrix, type Entry } from './matrix-text.js';

export type ChannelValue =
  | { kraus: Entry[][][]; from?: number[]; to?: number[] }
  | { choi: Entry[][]; from?: number[]; to?: number[] };

export interface ChannelEditorOptions {
  engine: EngineLike;
  value?: ChannelValue;
  label?: string;
}

type Events = { change: ChannelValue; check: Answer };

interface Param { name: string; label: string; min: number; max: number; step: number; value: number }
export const CHANNEL_PRESETS: { name: string; label: string; params: Param[] }[] = [
  { name: 'amplitude-damping', label: 'Amplitude damping (qubit)', params: [{ name: 'gamma', label: 'γ', min: 0, max: 1, step: 0.01, value: 0.3 }] },
  { name: 'generalized-amplitude-damping', label: 'Generalized amplitude damping', params: [{ name: 'gamma', label: 'γ', min: 0, max: 1, step: 0.01, value: 0.3 }, { name: 'N', label: 'N', min: 0, max: 1, step: 0.01, value: 0.1 }] },
  { name: 'depolarizing', label: 'Depolarizing', params: [{ name: 'd', label: 'd', min: 2, max: 4, step: 1, value: 2 }, { name: 'p', label: 'p', min: 0, max: 1, step: 0.01, value: 0.2 }] },
  { name: 'dephasing', label: 'Dephasing', params: [{ name: 'd', label: 'd', min: 2, max: 4, step: 1, value: 2 }, { name: 'p', label: 'p', min: 0, max: 1, step: 0.01, value: 0.5 }] },
  { name: 'erasure', label: 'Erasure', params: [{ name: 'd', label: 'd', min: 2, max: 4, step: 1, value: 2 }, { name: 'p', label: 'p', min: 0, max: 1, step: 0.01, value: 0.2 }] },
];

export class ChannelEditor {
  readonly element: HTMLElement;
  private events = new Emitter<Events>();
  private engine: EngineLike;
  private id = uniqueId('rs-channel');
  private form: 'kraus' | 'choi';
  private from: number[];
  private to: number[];
  private grids: MatrixGrid[] = [];
  private gridsBox: HTMLElement;
  private formSelect: HTMLSelectElement;
  private fromInput: HTMLInputElement;
  private toInput: HTMLInputElement;
  private presetSelect: HTMLSelectElement;
  private params: HTMLElement;
  private message: HTMLElement;
  private checks: HTMLElement;
  private disposed = false;
  private seq = 0;
  checked: Promise<Answer | null> = Promise.resolve(null);

  constructor(host: HTMLElement, options: ChannelEditorOptions) {
    this.engine = options.engine;
    const value = options.value ?? { kraus: [[[1, 0], [0, 1]]], from: [2], to: [2] };
    const label = options.label ?? 'Channel';
    this.form = 'choi' in value ? 'choi' : 'kraus';
    this.from = value.from ?? [('kraus' in value ? value.kraus[0][0].length : 1)];
    this.to = value.to ?? [('kraus' in value ? value.kraus[0].length : 1)];
    this.formSelect = el('select', { class: 'rs-select' }, [el('option', { value: 'kraus' }, ['Kraus operators']), el('option', { value: 'choi' }, ['Choi matrix'])]);
    this.formSelect.addEventListener('change', () => this.switchForm(this.formSelect.value as 'kraus' | 'choi'));
    this.fromInput = el('input', { class: 'rs-input rs-input--short', type: 'text', spellcheck: 'false' });
    this.toInput = el('input', { class: 'rs-input rs-input--short', type: 'text', spellcheck: 'false' });
    this.fromInput.addEventListener('change', () => this.applyDims());
    this.toInput.addEventListener('change', () => this.applyDims());
    this.presetSelect = el('select', { class: 'rs-select' }, [el('option', { value: '' }, ['(typed by hand)']), ...CHANNEL_PRESETS.map((p) => el('option', { value: p.name }, [p.label]))]);
    this.params = el('div', { class: 'rs-params' });
    this.presetSelect.addEventListener('change', () => this.buildParams());
    this.gridsBox = el('div', { class: 'rs-channel-editor__operators' });
    this.message = el('div', { class: 'rs-message', 'aria-live': 'polite' });
    this.checks = el('ul', { class: 'rs-checks', 'aria-label': 'Checks' });
    const add = el('button', { class: 'rs-button', type: 'button' }, ['Add a Kraus operator']);
    add.addEventListener('click', () => {
      if (this.form !== 'kraus') return;
      this.grids.push(this.makeGrid(this.grids.length, Array.from({ length: this.dout }, () => new Array(this.din).fill(0))));
      this.layout();
      this.edited();
    });
    const remove = el('button', { class: 'rs-button', type: 'button' }, ['Remove the last']);
    remove.addEventListener('click', () => {
      if (this.form !== 'kraus' || this.grids.length <= 1) return;
      this.grids.pop();
      this.layout();
      this.edited();
    });
    this.element = el('section', { class: 'rs-component rs-channel-editor', 'aria-label': label }, [
      el('header', { class: 'rs-component__title' }, [label]),
      el('div', { class: 'rs-toolbar' }, [field('Form', this.formSelect), field('Input dims', this.fromInput), field('Output dims', this.toInput), field('Preset', this.presetSelect), this.params]),
      this.gridsBox,
      el('div', { class: 'rs-actions' }, [add, remove]),
      this.message,
      el('div', { class: 'rs-panel' }, [this.checks]),
    ]);
    host.append(this.element);
    this.value = value;
  }

  private get din(): number {
    return this.from.reduce((a, b) => a * b, 1);
  }

  private get dout(): number {
    return this.to.reduce((a, b) => a * b, 1);
  }

  on<K extends keyof Events>(event: K, cb: (v: Events[K]) => void): () => void {
    return this.events.on(event, cb);
  }

  get value(): ChannelValue {
    if (this.form === 'choi') return { choi: this.grids[0].entries, from: [...this.from], to: [...this.to] };
    return { kraus: this.grids.map((g) => g.entries), from: [...this.from], to: [...this.to] };
  }

  set value(v: ChannelValue) {
    this.form = 'choi' in v ? 'choi' : 'kraus';
    this.formSelect.value = this.form;
    if (v.from) this.from = [...v.from];
    if (v.to) this.to = [...v.to];
    this.fromInput.value = this.from.join(', ');
    this.toInput.value = this.to.join(', ');
    const mats = 'choi' in v ? [v.choi] : v.kraus;
    this.grids = mats.map((m, k) => this.makeGrid(k, m));
    this.layout();
    this.runCheck();
  }

  dispose(): void {
    this.disposed = true;
    this.events.clear();
    this.element.remove();
  }

  private makeGrid(k: number, entries: Entry[][]): MatrixGrid {
    return new MatrixGrid({
      label: this.form === 'choi' ? 'Choi matrix' : `Kraus operator ${k + 1}`,
      onEdit: () => this.edited(),
      onPaste: (rows, r, c) => {
        const g = this.grids[k];
        const e = g.entries;
        rows.forEach((row, i) => row.forEach((x, j) => {
          if (e[r + i]?.[c + j] !== undefined) e[r + i][c + j] = x;
        }));
        g.entries = e;
        this.edited();
      },
      onPasteError: (m) => setChildren(this.message, [m]),
    }, entries);
  }

  private layout(): void {
    setChildren(this.gridsBox, this.grids.map((g, k) => el('figure', { class: 'rs-operator' }, [
      el('figcaption', {}, [this.form === 'choi' ? 'J = Σᵢⱼ |i⟩⟨j| ⊗ N(|i⟩⟨j|)' : `K${'₀₁₂₃₄₅₆₇₈₉'[k % 10] ?? k}`]), g.element,
    ])));
  }

  private edited(): void {
    this.presetSelect.value = '';
    setChildren(this.params, []);
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private applyDims(): void {
    const from = parseIntegerList(this.fromInput.value);
    const to = parseIntegerList(this.toInput.value);
    if (!from || !to) {
      setChildren(this.message, ['The dims must be lists of positive integers such as "2" or "2, 2".']);
      return;
    }
    this.from = from;
    this.to = to;
    const [r, c] = this.form === 'choi' ? [this.din * this.dout, this.din * this.dout] : [this.dout, this.din];
    for (const g of this.grids) g.resize(r, c);
    setChildren(this.message, []);
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private switchForm(form: 'kraus' | 'choi'): void {
    // Conversion between the forms is the engine's: channel-convert.
    void this.engine.compute({ op: 'channel-convert', channel: this.value, form }).then((a) => {
      if (this.disposed) return;
      if (!a.ok) {
        this.formSelect.value = this.form;
        setChildren(this.message, [errorBox(a.error)]);
        return;
      }
      const r = a as Record<string, any>;
      this.value = form === 'choi' ? { choi: rowsOfAnswerMatrix(r.value), from: r.from, to: r.to } : { kraus: r.value.map(rowsOfAnswerMatrix), from: r.from, to: r.to };
      this.events.emit('change', this.value);
    });
  }

  private buildParams(): void {
    const spec = CHANNEL_PRESETS.find((p) => p.name === this.presetSelect.value);
    setChildren(this.params, []);
    if (!spec) return;
    for (const p of spec.params) {
      const slider = el('input', { class: 'rs-slider', type: 'range', min: p.min, max: p.max, step: p.step, value: p.value, 'data-param': p.name });
      const shown = el('output', { class: 'rs-slider__value' }, [String(p.value)]);
      slider.addEventListener('input', () => {
        shown.textContent = slider.value;
        void this.loadPreset();
      });
      this.params.append(el('div', { class: 'rs-field' }, [el('label', { class: 'rs-field__label' }, [p.label, slider]), shown]));
    }
    void this.loadPreset();
  }

  private async loadPreset(): Promise<void> {
    const name = this.presetSelect.value;
    const request: Record<string, unknown> = { op: 'channel-preset', name };
    for (const s of this.params.querySelectorAll<HTMLInputElement>('input[data-param]')) request[s.dataset.param!] = Number(s.value);
    const a = await this.engine.compute(request, { key: `${this.id}:preset` });
    if (this.disposed || (!a.ok && a.error.code === 'cancelled')) return;
    if (!a.ok) {
      setChildren(this.message, [errorBox(a.error)]);
      return;
    }
    const v = (a as Record<string, any>).value;
    const keep = this.presetSelect.value;
    this.value = { kraus: v.kraus.map(rowsOfAnswerMatrix), from: v.from, to: v.to };
    this.presetSelect.value = keep;
    setChildren(this.message, [String((a as Record<string, any>).convention ?? '')]);
    this.events.emit('change', this.value);
  }

  private runCheck(): void {
    const seq = ++this.seq;
    this.checked = this.engine.compute({ op: 'channel-check', channel: this.value }, { key: `${this.id}:check` }).then((a) => {
      if (this.disposed || seq !== this.seq || (!a.ok && a.error.code === 'cancelled')) return a;
      this.render(a);
      this.events.emit('check', a);
      return a;
    });
  }

  private render(a: Answer): void {
    if (!a.ok) {
      const m = /(?:kraus\[(\d+)\]|choi)\[(\d+)\]\[(\d+)\]/.exec(a.error.path ?? '');
      this.grids.forEach((g, k) => g.mark(m && Number(m[1] ?? 0) === k ? [{ row: Number(m[2]), col: Number(m[3]), kind: 'error', why: a.error.message }] : []));
      setChildren(this.checks, [el('li', {}, [errorBox(a.error)])]);
      return;
    }
    for (const g of this.grids) g.mark([]);
    const r = a as Record<string, any>;
    const item = (ok: boolean, name: string, detail: string) => el('li', { class: `rs-check ${ok ? 'rs-check--ok' : 'rs-check--fail'}` }, [
      el('span', { class: 'rs-check__mark', 'aria-hidden': 'true' }, [ok ? '✓' : '✗']),
      el('span', { class: 'rs-check__name' }, [`${name}${ok ? '' : ': no'}`]),
      el('span', { class: 'rs-check__detail' }, [detail]),
    ]);
    setChildren(this.checks, [
      item(r.completelyPositive, 'Completely positive', `smallest Choi eigenvalue ${formatNumber(r.minChoiEigenvalue)}`),
      item(r.tracePreserving, 'Trace preserving', `‖Σ K*K − I‖ = ${formatNumber(r.traceDefect)}`),
      item(r.unital, 'Unital', `‖N(I) − I‖ = ${formatNumber(r.unitalDefect)}`),
    ]);
  }
}
