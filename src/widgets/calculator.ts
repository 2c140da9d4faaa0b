/**
 * What the calculators share (docs/surfaces.md): a model that holds its inputs by widget reference
 * (`rho`, `sigma`, `states`), builds its protocol request (requests.ts, the same rules as Python's) on
 * every change of its own fields or of an editor it uses, has the page's worker answer it (latest wins,
 * keyed by the model), and sets `request`, `result` (the protocol answer), `status` and `error` the
 * moment the answer arrives, then `save_changes()` so the kernel has it at once. A model computes
 * whether or not a view shows it; it tells the kernel that a front end is attached (a custom message),
 * so that Python does not compute the same request headless.
 *
 * The view shows the calculator's parameters as controls, the answer card (value, conventions,
 * certificate status) and the error of a refused request.
 *
 * Deliberately not here: any numerics (the worker's) and the request rules (requests.ts).
 * Cost: one request per change, in the worker.
 */
import { DOMWidgetModel, DOMWidgetView, type WidgetModel } from '@jupyter-widgets/base';
import { renderAnswerCard, type AnswerData } from './answer-card.js';
import { pageEngine } from './engine.js';
import { MODELS, type ModelName } from './schema.js';
import type { Fields, Request } from './requests.js';

const OUTPUT_FIELDS = new Set(['request', 'result', 'status', 'error', 'computed_by']);
const EDITOR_FIELDS = 'change:matrix change:ket change:dims change:labels change:kraus change:choi change:input_dims change:output_dims';

export function fieldsOf(model: WidgetModel): Fields {
  return { ...(model.attributes as Fields) };
}

export abstract class CalculatorModel extends DOMWidgetModel {
  // Backbone calls initialize() from its constructor, before subclass field initializers run: so the
  // model's name is a getter and the fields below are declared (no initializer) and set in initialize().
  protected abstract get modelName(): ModelName;
  /** The request for the current inputs, or null when an input is missing. */
  protected abstract buildRequest(f: Fields): Request | null;

  private declare seq: number;
  private declare watched: WidgetModel[];
  private declare pending: boolean;

  override initialize(attributes: Parameters<DOMWidgetModel['initialize']>[0], options: Parameters<DOMWidgetModel['initialize']>[1]): void {
    super.initialize(attributes, options);
    this.seq = 0;
    this.watched = [];
    this.pending = false;
    this.on('change', () => {
      const changed = Object.keys(this.changedAttributes() || {});
      if (changed.some((k) => !OUTPUT_FIELDS.has(k))) {
        this.rewire();
        this.schedule();
      }
    });
    this.on('msg:custom', (content: { event?: string }) => {
      if (content?.event === 'compute') this.compute(true);
    });
    this.send({ event: 'attached' }, {});
    this.rewire();
    this.schedule();
  }

  /** Listen to the editors the calculator refers to (again after a reference changes). */
  private rewire(): void {
    for (const m of this.watched) this.stopListening(m);
    this.watched = [];
    for (const field of MODELS[this.modelName].references) {
      const v = this.get(field);
      for (const m of Array.isArray(v) ? v : [v]) {
        if (m && typeof m === 'object' && 'on' in m) {
          this.watched.push(m as WidgetModel);
          this.listenTo(m as WidgetModel, EDITOR_FIELDS, () => this.schedule());
        }
      }
    }
  }

  /** Coalesces the changes of one task (Python sets several fields at once) into one request. */
  private schedule(): void {
    if (this.pending) return;
    this.pending = true;
    queueMicrotask(() => {
      this.pending = false;
      this.compute(false);
    });
  }

  compute(force: boolean): void {
    if (!force && this.get('auto') === false) return;
    let request: Request | null;
    try {
      request = this.buildRequest(fieldsOf(this));
    } catch (e) {
      request = null;
    }
    if (!request) {
      this.set({ status: 'idle' });
      return;
    }
    const seq = ++this.seq;
    this.set({ status: 'computing' });
    void pageEngine()
      .compute(request, { key: `calculator:${this.model_id}` })
      .then((answer) => {
        if (seq !== this.seq) return; // a newer request is on its way
        const a = answer as { ok: boolean; error?: unknown };
        this.set({ request, result: answer, status: a.ok ? 'done' : 'error', error: a.ok ? null : a.error ?? null, computed_by: 'browser' });
        this.save_changes();
      });
  }

}

/** A control of the view: a select of choices or a number input, bound to one field. */
export interface Control {
  field: string;
  label: string;
  choices?: string[];
  /** Shown only when this returns true for the current fields. */
  when?: (f: Fields) => boolean;
}

export abstract class CalculatorView extends DOMWidgetView {
  protected abstract readonly title: string;
  protected abstract readonly controls: Control[];
  private card!: HTMLElement;
  private statusLine!: HTMLElement;
  private form!: HTMLElement;

  override render(): void {
    this.el.classList.add('rs-widget', 'rs-calculator-widget');
    const head = document.createElement('div');
    head.className = 'rs-calculator-title';
    head.textContent = this.title;
    this.form = document.createElement('div');
    this.form.className = 'rs-calculator-controls';
    this.statusLine = document.createElement('div');
    this.statusLine.className = 'rs-calculator-status';
    this.statusLine.setAttribute('aria-live', 'polite');
    this.card = document.createElement('div');
    this.card.className = 'rs-calculator-result';
    this.el.replaceChildren(head, this.form, this.statusLine, this.card);
    this.renderControls();
    this.showResult();
    this.listenTo(this.model, 'change:result change:status change:error', () => this.showResult());
    this.listenTo(this.model, 'change', () => {
      const changed = Object.keys(this.model.changedAttributes() || {});
      if (changed.some((k) => this.controls.some((c) => c.field === k))) this.renderControls();
    });
  }

  private renderControls(): void {
    const f = fieldsOf(this.model);
    const nodes: HTMLElement[] = [];
    for (const c of this.controls) {
      if (c.when && !c.when(f)) continue;
      const label = document.createElement('label');
      label.className = 'rs-calculator-control';
      label.append(document.createTextNode(c.label + ' '));
      let input: HTMLInputElement | HTMLSelectElement;
      if (c.choices) {
        const sel = document.createElement('select');
        for (const choice of c.choices) {
          const o = document.createElement('option');
          o.value = o.textContent = choice;
          sel.append(o);
        }
        sel.value = String(f[c.field]);
        sel.addEventListener('change', () => {
          this.model.set(c.field, sel.value);
          this.touch();
        });
        input = sel;
      } else {
        const num = document.createElement('input');
        num.type = 'text';
        num.inputMode = 'decimal';
        num.size = 6;
        num.value = String(f[c.field]);
        num.addEventListener('change', () => {
          const text = num.value.trim();
          const v = text === 'e' ? 'e' : Number(text);
          if (v === 'e' || Number.isFinite(v)) {
            num.removeAttribute('aria-invalid');
            this.model.set(c.field, v);
            this.touch();
          } else {
            num.setAttribute('aria-invalid', 'true');
          }
        });
        input = num;
      }
      input.dataset.field = c.field;
      label.append(input);
      nodes.push(label);
    }
    this.form.replaceChildren(...nodes);
  }

  private showResult(): void {
    const status = String(this.model.get('status'));
    this.el.dataset.status = status;
    this.statusLine.textContent = status === 'computing' ? 'computing…' : '';
    const result = this.model.get('result') as AnswerData | null;
    if (result) renderAnswerCard(this.card, result);
    else this.card.replaceChildren();
  }
}
