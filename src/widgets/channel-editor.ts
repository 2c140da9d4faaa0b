/**
 * ChannelEditorModel / ChannelEditorView: the channel editor of src/ui (Kraus operators, a Choi matrix or
 * a preset with its parameters on sliders; complete positivity, trace preservation and unitality with the
 * size of any violation, from the op channel-check) as a Jupyter widget. The model holds the channel in
 * the protocol's form (schema.ts: `kraus` or `choi`, `input_dims`, `output_dims`); the view writes every
 * edit into the model and `touch()`es it, re-renders from `change:` events (Python's edits), and keeps the
 * editor's check in `check`, `valid` and `error`.
 *
 * Deliberately not here: any numerics (the worker's). Cost: that of the UI component.
 */
import { DOMWidgetModel, DOMWidgetView } from '@jupyter-widgets/base';
import { ChannelEditor, type ChannelValue } from '../ui/channel-editor.js';
import { defaultsOf, referenceSerializers } from './base.js';
import { pageEngine } from './engine.js';
import { rowsOf } from './matrix-form.js';

export class ChannelEditorModel extends DOMWidgetModel {
  override defaults() {
    return defaultsOf('ChannelEditorModel', super.defaults());
  }
  static override serializers = referenceSerializers('ChannelEditorModel');
}

/** The model's fields as the component's value (the protocol's channel form). */
export function channelValueOf(model: DOMWidgetModel): ChannelValue {
  const from = model.get('input_dims') as number[];
  const to = model.get('output_dims') as number[];
  const choi = model.get('choi');
  if (choi !== null && choi !== undefined) return { choi: rowsOf(choi) ?? [], from, to };
  const kraus = (model.get('kraus') as unknown[] | null) ?? [];
  return { kraus: kraus.map((k) => rowsOf(k) ?? []), from, to };
}

export class ChannelEditorView extends DOMWidgetView {
  private editor: ChannelEditor | null = null;
  private writing = false;
  private unsubscribe: (() => void)[] = [];

  override render(): void {
    this.el.classList.add('rs-widget', 'rs-channel-editor-widget');
    const title = String(this.model.get('title') ?? '');
    this.editor = new ChannelEditor(this.el, { engine: pageEngine(), value: channelValueOf(this.model), label: title || 'Channel' });
    this.unsubscribe.push(
      this.editor.on('change', (v) => {
        this.writing = true;
        try {
          const dims = { input_dims: v.from ?? this.model.get('input_dims'), output_dims: v.to ?? this.model.get('output_dims') };
          if ('choi' in v) this.model.set({ choi: v.choi, kraus: null, ...dims });
          else this.model.set({ kraus: v.kraus, choi: null, ...dims });
          this.touch();
        } finally {
          this.writing = false;
        }
      }),
      this.editor.on('check', (answer) => {
        const a = answer as { ok: boolean; error?: { code?: string } };
        if (a.ok === false && a.error?.code === 'cancelled') return;
        this.model.set({ check: answer, valid: a.ok === true, error: a.ok ? null : a.error ?? null });
        this.touch();
      }),
    );
    this.listenTo(this.model, 'change:kraus change:choi change:input_dims change:output_dims', () => {
      if (!this.writing && this.editor) this.editor.value = channelValueOf(this.model);
    });
  }

  override remove(): void {
    for (const u of this.unsubscribe) u();
    this.editor?.dispose();
    this.editor = null;
    super.remove();
  }
}
