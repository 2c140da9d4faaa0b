/**
 * The MIME renderer extension for answers (`application/vnd.rhosigma.answer+json`, docs/surfaces.md):
 * JupyterLab renders the answer card (answer-card.ts) in cell outputs; other front ends show the
 * `text/plain` that the Python package puts beside it (rhosigma.display).
 *
 * Deliberately not here: the widgets (index.ts). Cost: one card per output.
 */
import type { IRenderMime } from '@jupyterlab/rendermime-interfaces';
import { Widget } from '@lumino/widgets';
import { renderAnswerCard, type AnswerData } from '../widgets/answer-card.js';

export const ANSWER_MIME = 'application/vnd.rhosigma.answer+json';

class AnswerRenderer extends Widget implements IRenderMime.IRenderer {
  constructor() {
    super();
    this.addClass('rs-answer-output');
  }
  async renderModel(model: IRenderMime.IMimeModel): Promise<void> {
    renderAnswerCard(this.node, model.data[ANSWER_MIME] as unknown as AnswerData);
  }
}

export const rendererFactory: IRenderMime.IRendererFactory = {
  safe: true,
  mimeTypes: [ANSWER_MIME],
  createRenderer: () => new AnswerRenderer(),
};

const extension: IRenderMime.IExtension = {
  id: 'rhosigma:answer-renderer',
  description: 'Renders rhosigma answers (value, conventions, certificate) in cell outputs.',
  rendererFactory,
  rank: 0,
  dataType: 'json',
};

export default extension;
