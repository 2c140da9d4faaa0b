/**
 * StateEditor: a density matrix (or a ket) typed into a grid of numbers and expressions, with its
 * subsystem dimensions and labels, the engine's presets with their parameters on sliders, paste of a
 * matrix copied as text, and live checks: every edit sends `state-check` (latest wins), whose answer is
 * shown as three verdicts (Hermitian, positive semidefinite, unit trace), the spectrum with its negative
 * eigenvalues picked out, and marks on the offending entries. Repairs (`repair-state`) run only when
 * their button is pressed, and say what they changed.
 *
 * Contract (docs/surfaces.md, "UI components"): `new StateEditor(host, { engine, value? })`, `value`
 * (get/set; the protocol's state form, entries as numbers or expression strings), `on('change' | 'check',
 * cb)` returning an unsubscribe, `dispose()`.
 *
 * Deliberately not here: numerics. The spectrum, the verdicts, the presets' matrices and the repairs
 * all come from answers; a ket becomes a density matrix through the engine's `state-preset`.
 * Cost: one small request per edit (a state-check), more only on a preset or a repair.
 */
import type { Answer, EngineLike } from '../worker/types.js';
import { Emitter, el, errorBox, field, formatNumber, parseIntegerList, setChildren, uniqueId } from './dom.js';
import { MatrixGrid } from './matrix-grid.js';
import { asStateValue, rowsOfAnswerMatrix, type Entry, type StateValue } from './matrix-text.js';
import { basisNames } from './names.js';

export type { StateValue };

export interface StateEditorOptions {
  engine: EngineLike;
  value?: StateValue;
  /** Offer the presets row (default true). */
  presets?: boolean;
  /** Accessible name of the editor (default "State"). */
  label?: string;
}

type Events = { change: StateValue; check: Answer };

/** Largest side the editor builds a grid for (bigger states travel as data, not as typed grids). */
export const MAX_EDITOR_SIDE = 64;

interface PresetParam { name: string; label: string; min: number; max: number; step: number; value: number; integer?: boolean }
interface PresetSpec { name: string; label: string; params: PresetParam[]; usesDims?: boolean }

/** The engine's state presets the editor offers, with slider ranges from the op's documented ranges. */
export const STATE_PRESETS: PresetSpec[] = [
  { name: 'maximally-mixed', label: 'Maximally mixed (of the dims)', params: [], usesDims: true },
  { name: 'maximally-entangled', label: 'Maximally entangled pair', params: [{ name: 'd', label: 'd', min: 2, max: 4, step: 1, value: 2, integer: true }] },
  {
    name: 'werner', label: 'Werner state',
    params: [{ name: 'd', label: 'd', min: 2, max: 4, step: 1, value: 2, integer: true }, { name: 'p', label: 'antisymmetric weight p', min: 0, max: 1, step: 0.01, value: 0.25 }],
  },
  {
    name: 'isotropic', label: 'Isotropic state',
    params: [{ name: 'd', label: 'd', min: 2, max: 4, step: 1, value: 2, integer: true }, { name: 'fidelity', label: 'fidelity with the entangled pair', min: 0, max: 1, step: 0.01, value: 0.8 }],
  },
  { name: 'ghz', label: 'GHZ state', params: [{ name: 'n', label: 'parties n', min: 2, max: 5, step: 1, value: 3, integer: true }] },
  { name: 'w', label: 'W state', params: [{ name: 'n', label: 'parties n', min: 2, max: 5, step: 1, value: 3, integer: true }] },
  {
    name: 'bloch', label: 'Qubit from a Bloch vector',
    params: ['x', 'y', 'z'].map((c, k) => ({ name: c, label: c, min: -1, max: 1, step: 0.01, value: k === 2 ? 0.5 : 0 })),
  },
];

function side(v: StateValue): number {
  return 'ket' in v ? v.ket.length : v.matrix.length;
}

export class StateEditor {
  readonly element: HTMLElement;
  private events = new Emitter<Events>();
  private engine: EngineLike;
  private id = uniqueId('rs-state');
  private form: 'matrix' | 'ket';
  private dims: number[];
  private labels: string[] | undefined;
  private grid: MatrixGrid;
  private formSelect: HTMLSelectElement;
  private dimsInput: HTMLInputElement;
  private labelsInput: HTMLInputElement;
  private message: HTMLElement;
  private checks: HTMLElement;
  private spectrum: HTMLElement;
  private repairs: Record<'hermitian' | 'clip' | 'normalize', HTMLButtonElement>;
  private repairNote: HTMLElement;
  private presetSelect: HTMLSelectElement | null = null;
  private presetParams: HTMLElement | null = null;
  private lastCheck: Answer | null = null;
  private checkSeq = 0;
  private disposed = false;
  /** Resolves when the newest check has been shown (for tests and benchmarks). */
  checked: Promise<Answer | null> = Promise.resolve(null);

  constructor(private host: HTMLElement, options: StateEditorOptions) {
    this.engine = options.engine;
    const value = asStateValue(options.value ?? { matrix: [[0.5, 0], [0, 0.5]], dims: [2] });
    this.form = 'ket' in value ? 'ket' : 'matrix';
    this.dims = value.dims ?? [side(value)];
    this.labels = value.labels;
    const label = options.label ?? 'State';

    this.formSelect = el('select', { class: 'rs-select' }, [
      el('option', { value: 'matrix' }, ['density matrix']),
      el('option', { value: 'ket' }, ['ket (pure state)']),
    ]);
    this.formSelect.value = this.form;
    this.formSelect.addEventListener('change', () => void this.switchForm(this.formSelect.value as 'matrix' | 'ket'));
    this.dimsInput = el('input', { class: 'rs-input rs-input--short', type: 'text', spellcheck: 'false', value: this.dims.join(', ') });
    this.dimsInput.addEventListener('change', () => this.applyDims());
    this.labelsInput = el('input', { class: 'rs-input rs-input--short', type: 'text', spellcheck: 'false', value: (this.labels ?? []).join(', '), placeholder: 'A, B' });
    this.labelsInput.addEventListener('change', () => this.applyLabels());

    this.grid = new MatrixGrid({
      label: `${label}: ${this.form === 'ket' ? 'amplitudes' : 'density matrix'}`,
      onEdit: () => this.edited(),
      onPaste: (rows, r, c) => this.pasted(rows, r, c),
      onPasteError: (m) => this.say(m, true),
    });
    this.message = el('div', { class: 'rs-message', 'aria-live': 'polite' });
    this.checks = el('ul', { class: 'rs-checks', 'aria-label': 'Checks' });
    this.spectrum = el('div', { class: 'rs-spectrum', 'aria-label': 'Spectrum' });
    const button = (text: string, action: 'hermitian' | 'clip' | 'normalize') => {
      const b = el('button', { class: 'rs-button', type: 'button', disabled: true }, [text]);
      b.addEventListener('click', () => void this.repair(action));
      return b;
    };
    this.repairs = { hermitian: button('Make Hermitian', 'hermitian'), clip: button('Clip negative eigenvalues', 'clip'), normalize: button('Normalize trace', 'normalize') };
    this.repairNote = el('div', { class: 'rs-note', 'aria-live': 'polite' });

    const toolbar = el('div', { class: 'rs-toolbar' }, [
      field('Form', this.formSelect),
      field('Subsystem dims', this.dimsInput),
      field('Labels', this.labelsInput),
    ]);
    if (options.presets !== false) toolbar.append(this.buildPresets());

    this.element = el('section', { class: 'rs-component rs-state-editor', 'aria-label': label }, [
      el('header', { class: 'rs-component__title' }, [label]),
      toolbar,
      this.grid.element,
      this.message,
      el('div', { class: 'rs-panel rs-state-editor__checks' }, [
        this.checks,
        this.spectrum,
        el('div', { class: 'rs-actions', role: 'group', 'aria-label': 'Repairs' }, Object.values(this.repairs)),
        this.repairNote,
      ]),
    ]);
    host.append(this.element);
    this.show(value);
    this.runCheck();
  }

  on<K extends keyof Events>(event: K, cb: (v: Events[K]) => void): () => void {
    return this.events.on(event, cb);
  }

  get value(): StateValue {
    const out: StateValue = this.form === 'ket' ? { ket: this.grid.entries.map((r) => r[0]), dims: [...this.dims] } : { matrix: this.grid.entries, dims: [...this.dims] };
    if (this.labels) out.labels = [...this.labels];
    return out;
  }

  set value(given: StateValue) {
    const v = asStateValue(given);
    this.form = 'ket' in v ? 'ket' : 'matrix';
    this.formSelect.value = this.form;
    this.dims = v.dims ?? [side(v)];
    this.labels = v.labels;
    this.dimsInput.value = this.dims.join(', ');
    this.labelsInput.value = (this.labels ?? []).join(', ');
    this.show(v);
    this.runCheck();
  }

  /** The newest state-check answer shown (null before the first). */
  get check(): Answer | null {
    return this.lastCheck;
  }

  /** Focuses the cell (row, col) of the grid. */
  focusCell(row: number, col: number): void {
    this.grid.focusCell(row, col);
  }

  dispose(): void {
    this.disposed = true;
    this.events.clear();
    this.element.remove();
  }

  // -------------------------------------------------------------------------------------------------

  private show(v: StateValue): void {
    const rows = 'ket' in v ? v.ket.map((x) => [x]) : v.matrix;
    const names = basisNames(this.dims, rows.length);
    this.grid.setNames(names, 'ket' in v ? ['amplitude'] : names);
    this.grid.entries = rows;
  }

  private say(text: string, isError = false): void {
    setChildren(this.message, text ? [el('span', { class: isError ? 'rs-message--error' : '' }, [text])] : []);
  }

  private edited(): void {
    this.say('');
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private pasted(rows: string[][], r: number, c: number): void {
    let grid = rows;
    if (this.form === 'ket' && rows.length === 1 && rows[0].length > 1) grid = rows[0].map((x) => [x]);
    const whole = r === 0 && c === 0;
    if (whole && (grid.length !== this.grid.rows || grid[0].length !== this.grid.cols)) {
      const n = grid.length;
      const square = this.form === 'ket' ? grid[0].length === 1 : grid[0].length === n;
      if (!square) {
        this.say(`The pasted matrix is ${n}×${grid[0].length}; a ${this.form === 'ket' ? 'ket is one column' : 'density matrix is square'}.`, true);
        return;
      }
      if (n > MAX_EDITOR_SIDE) {
        this.say(`The pasted matrix has side ${n}; the editor takes up to ${MAX_EDITOR_SIDE}.`, true);
        return;
      }
      this.dims = [n];
      this.dimsInput.value = String(n);
      this.labels = undefined;
      this.labelsInput.value = '';
      this.show(this.form === 'ket' ? { ket: grid.map((x) => x[0]) } : { matrix: grid });
      this.say(`Pasted a ${n}×${grid[0].length} matrix; set the subsystem dims if it is composite.`);
    } else {
      const entries = this.grid.entries;
      let outside = false;
      grid.forEach((row, i) => row.forEach((x, j) => {
        if (entries[r + i]?.[c + j] === undefined) outside = true;
        else entries[r + i][c + j] = x;
      }));
      this.grid.entries = entries;
      this.say(outside ? 'Part of the pasted matrix fell outside the grid and was left out.' : `Pasted ${grid.length}×${grid[0].length} entries.`, outside);
    }
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private applyDims(): void {
    const dims = parseIntegerList(this.dimsInput.value);
    if (!dims || dims.some((d) => d < 1)) {
      this.say(`"${this.dimsInput.value}" is not a list of positive integers such as "2, 2"; the dims stay ${this.dims.join(', ')}.`, true);
      return;
    }
    const n = dims.reduce((a, b) => a * b, 1);
    if (n > MAX_EDITOR_SIDE) {
      this.say(`The dims [${dims.join(', ')}] give side ${n}; the editor takes up to ${MAX_EDITOR_SIDE}.`, true);
      return;
    }
    this.dims = dims;
    if (this.labels && this.labels.length !== dims.length) {
      this.labels = undefined;
      this.labelsInput.value = '';
    }
    if (n !== this.grid.rows) {
      this.grid.resize(n, this.form === 'ket' ? 1 : n);
      this.say(`The grid is now ${n}×${this.form === 'ket' ? 1 : n}; new entries are 0.`);
    } else {
      this.say('');
    }
    const names = basisNames(dims, n);
    this.grid.setNames(names, this.form === 'ket' ? ['amplitude'] : names);
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private applyLabels(): void {
    const text = this.labelsInput.value.trim();
    if (text === '') this.labels = undefined;
    else {
      const labels = text.split(/[\s,;]+/).filter((s) => s.length > 0);
      if (labels.length !== this.dims.length) {
        this.say(`There are ${labels.length} labels for ${this.dims.length} subsystems; the labels stay as they were.`, true);
        return;
      }
      this.labels = labels;
    }
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private async switchForm(form: 'matrix' | 'ket'): Promise<void> {
    if (form === this.form) return;
    if (form === 'ket') {
      // The first column is a place to start; the person types the amplitudes.
      this.form = 'ket';
      const col = this.grid.entries.map((r) => r[0]);
      this.show({ ket: col.map((_, k) => (k === 0 ? 1 : 0)), dims: this.dims });
      this.say('Type the amplitudes of the ket; it must have norm 1.');
    } else {
      const ket = this.grid.entries.map((r) => r[0]);
      const a = await this.engine.compute({ op: 'state-preset', name: 'ket', ket, dims: this.dims });
      if (this.disposed) return;
      if (!a.ok) {
        this.formSelect.value = 'ket';
        setChildren(this.message, [errorBox(a.error)]);
        return;
      }
      this.form = 'matrix';
      const state = (a as Record<string, any>).state;
      this.show({ matrix: rowsOfAnswerMatrix(state.matrix), dims: this.dims });
      this.say('The density matrix of the ket.');
    }
    this.grid.element.querySelector('table')?.setAttribute('aria-label', form === 'ket' ? 'amplitudes' : 'density matrix');
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private buildPresets(): HTMLElement {
    const select = el('select', { class: 'rs-select' }, [
      el('option', { value: '' }, ['(typed by hand)']),
      ...STATE_PRESETS.map((p) => el('option', { value: p.name }, [p.label])),
    ]);
    const params = el('div', { class: 'rs-params' });
    this.presetSelect = select;
    this.presetParams = params;
    select.addEventListener('change', () => {
      const spec = STATE_PRESETS.find((p) => p.name === select.value);
      setChildren(params, []);
      if (!spec) return;
      for (const p of spec.params) {
        const slider = el('input', { class: 'rs-slider', type: 'range', min: p.min, max: p.max, step: p.step, value: p.value, 'data-param': p.name });
        const shown = el('output', { class: 'rs-slider__value' }, [String(p.value)]);
        slider.addEventListener('input', () => {
          shown.textContent = slider.value;
          void this.loadPreset();
        });
        params.append(el('div', { class: 'rs-field' }, [el('label', { class: 'rs-field__label' }, [p.label, slider]), shown]));
      }
      void this.loadPreset();
    });
    return el('div', { class: 'rs-presets' }, [field('Preset', select), params]);
  }

  private async loadPreset(): Promise<void> {
    const spec = STATE_PRESETS.find((p) => p.name === this.presetSelect?.value);
    if (!spec || !this.presetParams) return;
    const request: Record<string, unknown> = { op: 'state-preset', name: spec.name };
    const values: Record<string, number> = {};
    for (const s of this.presetParams.querySelectorAll<HTMLInputElement>('input[data-param]')) values[s.dataset.param!] = Number(s.value);
    if (spec.name === 'bloch') request.bloch = [values.x, values.y, values.z];
    else for (const p of spec.params) request[p.name] = values[p.name];
    if (spec.usesDims) request.dims = this.dims;
    const a = await this.engine.compute(request, { key: `${this.id}:preset` });
    if (this.disposed || (!a.ok && a.error.code === 'cancelled')) return;
    if (!a.ok) {
      setChildren(this.message, [errorBox(a.error)]);
      return;
    }
    const state = (a as Record<string, any>).state as { matrix: unknown; dims: number[] };
    this.form = 'matrix';
    this.formSelect.value = 'matrix';
    this.dims = state.dims;
    this.dimsInput.value = state.dims.join(', ');
    if (this.labels && this.labels.length !== state.dims.length) {
      this.labels = undefined;
      this.labelsInput.value = '';
    }
    this.show({ matrix: rowsOfAnswerMatrix(state.matrix), dims: state.dims });
    this.say('');
    this.events.emit('change', this.value);
    this.runCheck();
  }

  private runCheck(): void {
    const seq = ++this.checkSeq;
    const request = { op: 'state-check', state: this.value };
    this.checked = this.engine.compute(request, { key: `${this.id}:check` }).then((a) => {
      if (this.disposed || seq !== this.checkSeq) return a;
      if (!a.ok && a.error.code === 'cancelled') return a;
      this.lastCheck = a;
      this.render(a);
      this.events.emit('check', a);
      return a;
    });
  }

  private render(a: Answer): void {
    for (const b of Object.values(this.repairs)) b.disabled = true;
    if (!a.ok) {
      // The entry the engine could not read is marked; the other entries are kept as typed.
      const m = /(?:matrix|ket)\[(\d+)\](?:\[(\d+)\])?/.exec(a.error.path ?? '');
      this.grid.mark(m ? [{ row: Number(m[1]), col: m[2] === undefined ? 0 : Number(m[2]), kind: 'error', why: a.error.message }] : []);
      setChildren(this.checks, [el('li', {}, [errorBox(a.error)])]);
      setChildren(this.spectrum, []);
      return;
    }
    const r = a as Record<string, any>;
    const verdict = (ok: boolean, name: string, detail: string) =>
      el('li', { class: `rs-check ${ok ? 'rs-check--ok' : 'rs-check--fail'}` }, [
        el('span', { class: 'rs-check__mark', 'aria-hidden': 'true' }, [ok ? '✓' : '✗']),
        el('span', { class: 'rs-check__name' }, [`${name}${ok ? '' : ': no'}`]),
        el('span', { class: 'rs-check__detail' }, [detail]),
      ]);
    const h = r.hermitian;
    const p = r.positive;
    const t = r.trace;
    const marks: Parameters<MatrixGrid['mark']>[0] = [];
    if (!h.ok && this.form === 'matrix') {
      marks.push({ row: h.row, col: h.column, kind: 'offending', why: `Differs from the conjugate of entry [${h.column}][${h.row}] by ${formatNumber(h.defect)}` });
      if (h.row !== h.column) marks.push({ row: h.column, col: h.row, kind: 'partner', why: `Partner of the entry [${h.row}][${h.column}]` });
    }
    this.grid.mark(marks);
    const items = [
      verdict(h.ok, 'Hermitian', `largest |ρᵢⱼ − conj(ρⱼᵢ)| = ${formatNumber(h.defect)}${h.ok ? '' : ` at [${h.row}][${h.column}]`}`),
      verdict(p.ok, 'Positive semidefinite', `smallest eigenvalue ${formatNumber(p.minEigenvalue)} (λ${sub(p.index)})`),
      verdict(t.ok, 'Unit trace', `Tr ρ = ${formatNumber(t.re, 10)}${t.im ? ` ${t.im < 0 ? '−' : '+'} ${formatNumber(Math.abs(t.im))}i` : ''}`),
    ];
    if (!r.dims.ok) items.push(verdict(false, 'Dims', r.dims.message));
    if (r.labels && !r.labels.ok) items.push(verdict(false, 'Labels', r.labels.message));
    setChildren(this.checks, items);
    const negatives = new Set<number>(p.negativeIndices);
    setChildren(this.spectrum, [
      el('span', { class: 'rs-spectrum__title' }, ['Spectrum']),
      ...r.spectrum.map((x: number, k: number) =>
        el('span', {
          class: `rs-eigenvalue${negatives.has(k) ? ' rs-eigenvalue--negative' : ''}${k === p.index && !p.ok ? ' rs-eigenvalue--worst' : ''}`,
          title: `λ${sub(k)} = ${x}`, 'data-index': k,
        }, [formatNumber(x, 4)])),
    ]);
    if (this.form === 'matrix') {
      this.repairs.hermitian.disabled = h.ok;
      this.repairs.clip.disabled = p.ok || !h.ok;
      this.repairs.normalize.disabled = t.ok;
    }
  }

  private async repair(action: 'hermitian' | 'clip' | 'normalize'): Promise<void> {
    const a = await this.engine.compute({ op: 'repair-state', state: this.value, actions: [action] });
    if (this.disposed) return;
    if (!a.ok) {
      setChildren(this.repairNote, [errorBox(a.error)]);
      return;
    }
    const r = a as Record<string, any>;
    const c = r.changes[0];
    const notes: Record<string, string> = {
      hermitian: `Replaced ρ by (ρ + ρ*)/2: the entries moved by ${formatNumber(c.frobeniusChange)} in Frobenius norm.`,
      clip: `Set ${c.clippedCount} negative eigenvalue${c.clippedCount === 1 ? '' : 's'} to zero (weight ${formatNumber(c.removedWeight)} removed).`,
      normalize: `Divided by the trace ${formatNumber(c.traceBefore, 10)}.`,
    };
    this.repairNote.textContent = notes[action];
    this.show({ matrix: rowsOfAnswerMatrix(r.state.matrix), dims: this.dims });
    this.events.emit('change', this.value);
    this.runCheck();
  }
}

/** A subscript index for eigenvalue names. */
function sub(k: number): string {
  return String(k).replace(/\d/g, (d) => '₀₁₂₃₄₅₆₇₈₉'[Number(d)]);
}
