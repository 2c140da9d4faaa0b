/**
 * GuessingCalculatorModel / GuessingCalculatorView: guessing probability (an SDP with its certificate)
 * or guesswork of an ensemble: prior `probabilities` and states held by reference (`states`).
 *
 * Deliberately not here: numerics (the worker's). Cost: one request per change.
 */
import { CalculatorModel, CalculatorView, type Control } from './calculator.js';
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

export class GuessingCalculatorView extends CalculatorView {
  protected readonly title = 'Guessing with quantum side information';
  protected readonly controls: Control[] = [
    { field: 'quantity', label: 'quantity', choices: ['guessing-probability', 'guesswork'] },
    { field: 'moment', label: 'moment', when: (f) => f.quantity === 'guesswork' },
  ];
}
