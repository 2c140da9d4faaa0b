/**
 * The framework-free DOM components (docs/surfaces.md, "UI components"): editors for states and
 * channels, calculators for divergences, recoverability, guessing and the one-shot quantities. Each
 * takes an `EngineLike` (src/worker/client.ts `EngineClient` in a page) and shows only numbers that come
 * from the engine's answers. Styles: style/rhosigma.css (class names prefixed rs-).
 */
export { StateEditor, STATE_PRESETS, MAX_EDITOR_SIDE, type StateValue, type StateEditorOptions } from './state-editor.js';
export { ChannelEditor, CHANNEL_PRESETS, type ChannelValue, type ChannelEditorOptions } from './channel-editor.js';
export { Calculator, type CalculatorOptions, type ResultEvent, type NamedRequest } from './calculator.js';
export { DivergenceCalculator, FAMILIES, type DivergenceInputs, type DivergenceSettings } from './divergence-calculator.js';
export { RecoverabilityCalculator, type RecoverabilityInputs, type RecoverabilitySettings } from './recoverability-calculator.js';
export { GuessingCalculator, type GuessingInputs, type GuessingSettings } from './guessing-calculator.js';
export { OneShotCalculator, ONE_SHOT, type OneShotInputs, type OneShotSettings } from './one-shot-calculator.js';
export { MatrixGrid } from './matrix-grid.js';
export { SweepPanel, plotAxes, type SweepPanelState, type SweepPlot, type SweepLine } from './sweep-panel.js';
export { parsePastedMatrix, toEntry, type Entry } from './matrix-text.js';
export type { EngineLike, Answer, ComputeOptions, Progress } from '../worker/types.js';
