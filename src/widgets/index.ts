/**
 * The widget set (docs/surfaces.md, "Jupyter widgets"): every model and view, the module's name and
 * version. src/lab/index.ts registers this module with the widget manager.
 *
 * Deliberately not here: the JupyterLab plugin (src/lab). Cost: none until a widget is made.
 */
export { MODULE_NAME, MODULE_VERSION } from './version.js';
export { MODELS } from './schema.js';
export { StateEditorModel, StateEditorView } from './state-editor.js';
export { ChannelEditorModel, ChannelEditorView } from './channel-editor.js';
export { DivergenceCalculatorModel, DivergenceCalculatorView } from './divergence.js';
export { RecoverabilityCalculatorModel, RecoverabilityCalculatorView } from './recoverability.js';
export { GuessingCalculatorModel, GuessingCalculatorView } from './guessing.js';
export { OneShotCalculatorModel, OneShotCalculatorView } from './oneshot.js';
export { SweepModel, SweepView } from './sweep.js';
