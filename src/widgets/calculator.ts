/**
 * What the calculators share (docs/surfaces.md): a model that holds its inputs by widget reference
 * (`rho`, `sigma`, `states`), builds its protocol request (requests.ts, the same rules as Python's) on
 * every change of its own fields or of an editor it uses, has the page's worker answer it (latest wins,
 * keyed by the model), and sets `request`, `result` (the protocol answer), `status` and `error` the
 * moment the answer arrives, then `save_changes()` so the kernel has it at once. A model computes
 * whether or not a view shows it; it tells the kernel that a front end is attached (a custom message),
 * so that Python does not compute the same request headless.
 *
 * The view mounts the src/ui calculator of the same quantity (see CalculatorView below).
 *
 * Deliberately not here: any numerics (the worker's) and the request rules (requests.ts).
 * Cost: one request per change, in the worker.
 */
import { DOMWidgetModel, DOMWidgetView, type WidgetModel } from '@jupyter-widgets/base';
import { answerText, type AnswerData } from './answer-card.js';
import { pageEngine } from './engine.js';
import { MODELS, type ModelName } from './schema.js';
import { mayRunLong, stateOf, type Fields, type Request } from './requests.js';
import { stateFieldsOf } from './references.js';
import type { EngineLike } from '../worker/types.js';

const OUTPUT_FIELDS = new Set(['request', 'result', 'status', 'error', 'computed_by']);
const EDITOR_FIELDS = 'change:matrix change:ket change:dims change:labels change:kraus change:choi change:input_dims change:output_dims';

/** What listens (a model or a view: Backbone's listenTo / stopListening). */
interface Listener {
  listenTo(other: WidgetModel, events: string, cb: () => void): unknown;
  stopListening(other: WidgetModel): unknown;
}

/**
 * Listens (again, after a reference changed) to the editors `model` holds in its reference `fields`:
 * stops listening to `previous`, calls `onEdit` on any edit of the new ones, and returns them.
 */
function watchEditors(who: Listener, model: WidgetModel, fields: readonly string[], previous: WidgetModel[], onEdit: () => void): WidgetModel[] {
  for (const m of previous) who.stopListening(m);
  const watched: WidgetModel[] = [];
  for (const field of fields) {
    const v = model.get(field);
    for (const m of Array.isArray(v) ? v : [v]) {
      if (m && typeof m === 'object' && 'on' in m) {
        watched.push(m as WidgetModel);
        who.listenTo(m as WidgetModel, EDITOR_FIELDS, onEdit);
      }
    }
  }
  return watched;
}

/** `fn` run once at the end of the current task however often the returned function is called in it. */
function oncePerTask(fn: () => void): () => void {
  let pending = false;
  return () => {
    if (pending) return;
    pending = true;
    queueMicrotask(() => {
      pending = false;
      fn();
    });
  };
}

export function fieldsOf(model: WidgetModel): Fields {
  return { ...(model.attributes as Fields) };
}

export abstract class CalculatorModel extends DOMWidgetModel {
  // Backbone calls initialize() from its constructor, before subclass field initializers run: so the
  // model's name is a getter and the fields below are declared (no initializer) and set in initialize().
  protected abstract get modelName(): ModelName;
  /** The request for the current inputs, or null when an input is missing. */
  protected abstract buildRequest(f: Fields): Request | null;

  /** Whether the newest request is on its way (the view's "computing…"; not synced, see compute()). */
  declare computing: boolean;
  private declare seq: number;
  private declare watched: WidgetModel[];
  /** Coalesces the changes of one task (Python sets several fields at once) into one request. */
  private declare schedule: () => void;

  override initialize(attributes: Parameters<DOMWidgetModel['initialize']>[0], options: Parameters<DOMWidgetModel['initialize']>[1]): void {
    super.initialize(attributes, options);
    this.seq = 0;
    this.computing = false;
    this.watched = [];
    this.schedule = oncePerTask(() => this.compute(false));
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
    this.watched = watchEditors(this, this, MODELS[this.modelName].references, this.watched, () => this.schedule());
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
      this.seq++;
      this.computing = false;
      this.set({ status: 'idle' });
      this.trigger('rs:computing');
      return;
    }
    const seq = ++this.seq;
    // "Computing" is the page's own state, not a synced field: a status set here and then overwritten by
    // a kernel update (Python's headless answer, under ipywidgets' state lock) stays in ipywidgets'
    // buffered diff, is sent with the next save_changes and echoed back, leaving "computing" for good.
    this.computing = true;
    this.trigger('rs:computing');
    void pageEngine()
      .compute(request, { key: `calculator:${this.model_id}`, long: mayRunLong(request) })
      .then((answer) => {
        if (seq !== this.seq) return; // a newer request is on its way
        this.computing = false;
        const a = answer as { ok: boolean; error?: unknown };
        this.set({ request, result: answer, status: a.ok ? 'done' : 'error', error: a.ok ? null : a.error ?? null, computed_by: 'browser' });
        this.save_changes();
        this.trigger('rs:computing');
      });
  }

}

/** A src/ui calculator as the view uses it (the methods every one of them has). */
export interface MountedCalculator {
  readonly element: HTMLElement;
  on(event: 'change', cb: (v: Record<string, unknown>) => void): () => void;
  update(next: { inputs?: Record<string, unknown>; value?: Record<string, unknown> }): void;
  dispose(): void;
}

/**
 * The view: the src/ui calculator of the same quantity (its controls, result cards with conventions
 * and certificate badges, the typeset formula and the curve over α where it has them), mounted on the
 * page's shared engine, with its inputs taken from the editors the model holds by reference and its
 * settings from the model's fields. A setting changed in the view is written to the model (so Python
 * sees it and the model computes the kernel's `result`); a field set from Python is shown in the view.
 * Below the calculator, one line says what Python's `result` holds and who computed it.
 *
 * The model and the view ask the same request for the headline quantity; the shared engine
 * (engine.ts, SharedRequests) sends it to the worker once.
 */
export abstract class CalculatorView extends DOMWidgetView {
  /** Makes the src/ui calculator in `host`. */
  protected abstract mount(host: HTMLElement, engine: EngineLike, inputs: Record<string, unknown>, value: Record<string, unknown>): MountedCalculator;
  /** The calculator's inputs from the model's fields (editors resolved to their protocol states). */
  protected abstract inputsOf(f: Fields): Record<string, unknown>;
  /** The calculator's settings from the model's fields. */
  protected abstract settingsOf(f: Fields): Record<string, unknown>;

  private calc: MountedCalculator | null = null;
  private kernelLine!: HTMLElement;
  private watched: WidgetModel[] = [];
  private writing = false;
  private unsubscribe: (() => void)[] = [];

  override render(): void {
    this.el.classList.add('rs-widget', 'rs-calculator-widget');
    const host = document.createElement('div');
    this.kernelLine = document.createElement('div');
    this.kernelLine.className = 'rs-kernel-line';
    this.kernelLine.setAttribute('aria-live', 'polite');
    this.el.replaceChildren(host, this.kernelLine);
    const f = fieldsOf(this.model);
    this.calc = this.mount(host, pageEngine(), this.inputsOf(f), this.settingsOf(f));
    this.unsubscribe.push(
      this.calc.on('change', (v) => {
        // Only the model's own fields (a view setting such as "draw the curve" stays in the view).
        const own = Object.fromEntries(Object.entries(v).filter(([k]) => k in MODELS[this.modelName].defaults && !this.references.includes(k)));
        this.writing = true;
        try {
          this.model.set(own);
          this.touch();
        } finally {
          this.writing = false;
        }
      }),
    );
    this.rewire();
    this.showKernel();
    this.listenTo(this.model, 'change:result change:status change:error change:computed_by rs:computing', () => this.showKernel());
    this.listenTo(this.model, 'change', () => {
      const changed = Object.keys(this.model.changedAttributes() || {});
      if (changed.some((k) => this.references.includes(k))) this.rewire();
      if (!this.writing && changed.some((k) => !OUTPUT_FIELDS.has(k))) this.schedule();
    });
  }

  private get references(): readonly string[] {
    return MODELS[this.modelName].references;
  }

  /** The model's name (the view's model is one of MODELS). */
  private get modelName(): ModelName {
    return String(this.model.get('_model_name')) as ModelName;
  }

  private rewire(): void {
    this.watched = watchEditors(this, this.model, this.references, this.watched, () => this.schedule());
  }

  /** One update of the calculator per task (Python sets several fields at once). */
  private schedule = oncePerTask(() => {
    const f = fieldsOf(this.model);
    this.calc?.update({ inputs: this.inputsOf(f), value: this.settingsOf(f) });
  });

  private showKernel(): void {
    const computing = (this.model as unknown as { computing?: boolean }).computing === true;
    const status = computing ? 'computing' : String(this.model.get('status'));
    this.el.dataset.status = status;
    const result = this.model.get('result') as AnswerData | null;
    const by = this.model.get('computed_by');
    if (computing) this.kernelLine.textContent = "Python's result: computing…";
    else if (result) this.kernelLine.textContent = `Python's result${by ? ` (computed in the ${by})` : ''}: ${answerText(result)}`;
    else this.kernelLine.textContent = "Python's result: none yet (an input is missing).";
  }

  override remove(): void {
    for (const u of this.unsubscribe) u();
    this.unsubscribe = [];
    this.calc?.dispose();
    this.calc = null;
    super.remove();
  }
}

/** The protocol state of an editor held by reference, or undefined while it is unset. */
export function editorState(ref: unknown): Record<string, unknown> | undefined {
  const f = stateFieldsOf(ref as never);
  return f ? (stateOf(f) as Record<string, unknown>) : undefined;
}
