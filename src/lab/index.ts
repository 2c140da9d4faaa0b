/**
 * The JupyterLab plugin (docs/surfaces.md): registers the widget set (src/widgets) with the widget
 * registry of @jupyter-widgets/base under the module name "rhosigma" and the package's exact version,
 * which satisfies the range "^" + version that the models name (the same as Python's rhosigma._frontend). The widget module is loaded on first use (its own chunk), and the
 * engine's web worker only when a widget first computes. The answer MIME renderer is the package's
 * mimeExtension (mime.ts).
 *
 * Deliberately not here: any widget code or numerics. Cost: one registry entry at start-up.
 */
import type { JupyterFrontEnd, JupyterFrontEndPlugin } from '@jupyterlab/application';
import { IJupyterWidgetRegistry } from '@jupyter-widgets/base';
import { MODULE_NAME, PACKAGE_VERSION } from '../widgets/version.js';

const plugin: JupyterFrontEndPlugin<void> = {
  id: 'rhosigma:widgets',
  description: 'rhosigma widgets: state and channel editors and calculators computed in a web worker.',
  requires: [IJupyterWidgetRegistry],
  autoStart: true,
  activate: (_app: JupyterFrontEnd, registry: IJupyterWidgetRegistry) => {
    registry.registerWidget({
      name: MODULE_NAME,
      version: PACKAGE_VERSION,
      exports: async () => (await import('../widgets/index.js')) as never,
    });
  },
};

export default plugin;
