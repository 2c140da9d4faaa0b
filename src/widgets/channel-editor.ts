/**
 * ChannelEditorModel / ChannelEditorView: a channel (Kraus operators, a Choi matrix or a preset; schema.ts)
 * as a Jupyter widget. The view shows the channel's form and sizes and the engine's channel-check
 * (complete positivity, trace preservation, unitality with the size of each violation), asked of the
 * page's worker on every change.
 *
 * Deliberately not here: any numerics. Not yet: the interactive editor of src/ui (ChannelEditor) — this
 * view shows the channel and its checks until it is wired in. Cost: one channel-check per change.
 */
import { DOMWidgetModel, DOMWidgetView } from '@jupyter-widgets/base';
import { renderAnswerCard, type AnswerData } from './answer-card.js';
import { defaultsOf, referenceSerializers } from './base.js';
import { pageEngine } from './engine.js';

export class ChannelEditorModel extends DOMWidgetModel {
  override defaults() {
    return defaultsOf('ChannelEditorModel', super.defaults());
  }
  static override serializers = referenceSerializers('ChannelEditorModel');
}

/** The protocol channel of the model's fields (docs/protocol.md, "channel"). */
export function channelOf(model: DOMWidgetModel): Record<string, unknown> {
  const from = model.get('input_dims');
  const to = model.get('output_dims');
  const choi = model.get('choi');
  if (choi !== null && choi !== undefined) return { choi, from, to };
  return { kraus: model.get('kraus'), from, to };
}

export class ChannelEditorView extends DOMWidgetView {
  private seq = 0;

  override render(): void {
    this.el.classList.add('rs-widget', 'rs-channel-editor-widget');
    this.refresh();
    this.listenTo(this.model, 'change:kraus change:choi change:input_dims change:output_dims change:title', () => this.refresh());
  }

  private refresh(): void {
    const seq = ++this.seq;
    const summary = document.createElement('div');
    summary.className = 'rs-channel-summary';
    const kraus = this.model.get('kraus') as unknown[] | null;
    const title = String(this.model.get('title') ?? '') || 'Channel';
    summary.textContent = `${title}: ${kraus ? `${kraus.length} Kraus operator(s)` : 'Choi matrix'}, from [${this.model.get('input_dims')}] to [${this.model.get('output_dims')}]`;
    const card = document.createElement('div');
    this.el.replaceChildren(summary, card);
    void pageEngine()
      .compute({ op: 'channel-check', channel: channelOf(this.model) }, { key: `channel-check:${this.model.model_id}` })
      .then((answer) => {
        if (seq !== this.seq) return;
        renderAnswerCard(card, answer as unknown as AnswerData);
        const a = answer as { ok: boolean; error?: unknown };
        this.model.set({ check: answer, valid: a.ok === true, error: a.ok ? null : a.error ?? null });
        this.touch();
      });
  }
}
