/**
 * RecoverabilityCalculatorModel / RecoverabilityCalculatorView: how well the Markov chain A–B–C of a
 * tripartite state (an editor held as `rho`) is recovered: conditional mutual information I(A;C|B), the
 * Petz recovery map's fidelity, or the fidelity of recovery (an SDP, with its certificate).
 *
 * Deliberately not here: numerics (the worker's). Cost: one request per change.
 */
import { CalculatorModel, CalculatorView, editorState, type MountedCalculator } from './calculator.js';
import { RecoverabilityCalculator } from '../ui/recoverability-calculator.js';
import type { EngineLike } from '../worker/types.js';
import { defaultsOf, referenceSerializers } from './base.js';
import { recoverabilityRequest, type Fields } from './requests.js';
import { stateFieldsOf } from './references.js';

export class RecoverabilityCalculatorModel extends CalculatorModel {
  protected get modelName() {
    return 'RecoverabilityCalculatorModel' as const;
  }
  override defaults() {
    return defaultsOf('RecoverabilityCalculatorModel', super.defaults());
  }
  static override serializers = referenceSerializers('RecoverabilityCalculatorModel');
  protected buildRequest(f: Fields) {
    const rho = stateFieldsOf(f.rho);
    return rho ? recoverabilityRequest(f, rho) : null;
  }
}

/** The view: src/ui's RecoverabilityCalculator (all three quantities; Python's `result` is `quantity`'s). */
export class RecoverabilityCalculatorView extends CalculatorView {
  protected mount(host: HTMLElement, engine: EngineLike, inputs: Record<string, unknown>, value: Record<string, unknown>) {
    return new RecoverabilityCalculator(host, { engine, inputs: inputs as never, value: value as never, label: 'Recoverability of A–B–C' }) as unknown as MountedCalculator;
  }
  protected inputsOf(f: Fields) {
    return { rho: editorState(f.rho) };
  }
  protected settingsOf(f: Fields) {
    return { a: f.a, b: f.b, c: f.c, base: f.base };
  }
}
