/**
 * StateEditorModel / StateEditorView: the state editor of src/ui as a Jupyter widget. The model holds
 * the state in the protocol's form (schema.ts: `matrix` or `ket`, `dims`, `labels`); the view wraps
 * `StateEditor` (grid of numbers and expressions, presets, paste, live checks, repairs as actions),
 * writes every edit into the model and `touch()`es it, and re-renders from `change:` events (Python's
 * edits). The editor's live check (the op state-check, answered by the page's worker) is kept in
 * `check`, `valid` and `error`, so Python sees what the front end sees.
 *
 * Deliberately not here: any numerics (the worker's), computing for calculators (calculator.ts).
 * Cost: that of the UI component.
 */
import { DOMWidgetModel, DOMWidgetView } from '@jupyter-widgets/base';
import { StateEditor, type StateValue } from '../ui/state-editor.js';
import { defaultsOf, referenceSerializers } from './base.js';
import { pageEngine } from './engine.js';
import { rowsOf, vectorOf } from './matrix-form.js';

export class StateEditorModel extends DOMWidgetModel {
  override defaults() {
    return defaultsOf('StateEditorModel', super.defaults());
  }
  static override serializers = referenceSerializers('StateEditorModel');
}

/** The model's fields as the component's value. */
export function stateValueOf(model: DOMWidgetModel): StateValue {
  const dims = model.get('dims') as number[] | null;
  const labels = model.get('labels') as string[] | null;
  const extra = { ...(dims ? { dims } : {}), ...(labels && labels.length ? { labels } : {}) };
  const ket = model.get('ket');
  if (ket !== null && ket !== undefined) return { ket: vectorOf(ket) ?? [], ...extra };
  return { matrix: rowsOf(model.get('matrix')) ?? [], ...extra };
}

export class StateEditorView extends DOMWidgetView {
  private editor: StateEditor | null = null;
  private writing = false;
  private unsubscribe: (() => void)[] = [];

  override render(): void {
    this.el.classList.add('rs-widget', 'rs-state-editor-widget');
    const title = String(this.model.get('title') ?? '');
    this.editor = new StateEditor(this.el, { engine: pageEngine(), value: stateValueOf(this.model), label: title || 'State' });
    this.unsubscribe.push(
      this.editor.on('change', (v) => {
        this.writing = true;
        try {
          if ('ket' in v) this.model.set({ ket: v.ket, matrix: null, dims: v.dims ?? [v.ket.length], labels: v.labels ?? null });
          else this.model.set({ matrix: v.matrix, ket: null, dims: v.dims ?? [v.matrix.length], labels: v.labels ?? null });
          this.touch();
        } finally {
          this.writing = false;
        }
      }),
      this.editor.on('check', (answer) => {
        const a = answer as { ok: boolean; value?: unknown; error?: unknown };
        if (a.ok === false && (a.error as { code?: string } | undefined)?.code === 'cancelled') return;
        this.model.set({ check: answer, valid: a.ok === true && a.value === true, error: a.ok ? null : a.error ?? null });
        this.touch();
      }),
    );
    this.listenTo(this.model, 'change:matrix change:ket change:dims change:labels', () => {
      if (!this.writing && this.editor) this.editor.value = stateValueOf(this.model);
    });
  }

  override remove(): void {
    for (const u of this.unsubscribe) u();
    this.editor?.dispose();
    this.editor = null;
    super.remove();
  }
}
