/**
 * GuessingCalculatorModel / GuessingCalculatorView: guessing probability (an SDP with its certificate)
 * or guesswork of an ensemble: prior `probabilities` and states held by reference (`states`).
 *
 * Deliberately not here: numerics (the worker's). Cost: one request per change.
 */
import { CalculatorModel, CalculatorView, editorState, type MountedCalculator } from './calculator.js';
import { GuessingCalculator } from '../ui/guessing-calculator.js';
import type { EngineLike } from '../worker/types.js';
import { defaultsOf, referenceSerializers } from './base.js';
import { guessingRequest, type Fields } from './requests.js';
import { stateFieldsOf } from './references.js';

export class GuessingCalculatorModel extends CalculatorModel {
  protected get modelName() {
    return 'GuessingCalculatorModel' as const;
  }
  override defaults() {
    return defaultsOf('GuessingCalculatorModel', super.defaults());
  }
  static override serializers = referenceSerializers('GuessingCalculatorModel');
  protected buildRequest(f: Fields) {
    const refs = Array.isArray(f.states) ? f.states : [];
    const states = refs.map((r) => stateFieldsOf(r));
    if (!states.length || states.some((s) => s === null)) return null;
    return guessingRequest(f, states as Fields[]);
  }
}

/** The view: src/ui's GuessingCalculator (guessing probability and guesswork; Python's `result` is `quantity`'s). */
export class GuessingCalculatorView extends CalculatorView {
  protected mount(host: HTMLElement, engine: EngineLike, inputs: Record<string, unknown>, value: Record<string, unknown>) {
    return new GuessingCalculator(host, { engine, inputs: inputs as never, value: value as never, label: 'Guessing with quantum side information' }) as unknown as MountedCalculator;
  }
  protected inputsOf(f: Fields) {
    const refs = Array.isArray(f.states) ? f.states : [];
    const states = refs.map((r) => editorState(r));
    return states.length && states.every(Boolean) ? { states, probabilities: f.probabilities } : { states: undefined, probabilities: f.probabilities };
  }
  protected settingsOf(f: Fields) {
    return { moment: f.moment };
  }
}
