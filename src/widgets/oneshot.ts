/**
 * OneShotCalculatorModel / OneShotCalculatorView: the one-shot SDP quantities (hypothesis-testing and
 * smooth max-divergence of `rho` against `sigma` at ε; conditional min/max-entropy and max-information of
 * `rho` for the groups `a`, `b`), each with its certificate.
 *
 * Deliberately not here: numerics (the worker's). Cost: one SDP request per change.
 */
import { CalculatorModel, CalculatorView, editorState, type MountedCalculator } from './calculator.js';
import { OneShotCalculator } from '../ui/one-shot-calculator.js';
import type { EngineLike } from '../worker/types.js';
import { defaultsOf, referenceSerializers } from './base.js';
import { oneShotRequest, type Fields } from './requests.js';
import { stateFieldsOf } from './references.js';

const PAIRWISE = ['hypothesis-testing', 'smooth-max-divergence'];

export class OneShotCalculatorModel extends CalculatorModel {
  protected get modelName() {
    return 'OneShotCalculatorModel' as const;
  }
  override defaults() {
    return defaultsOf('OneShotCalculatorModel', super.defaults());
  }
  static override serializers = referenceSerializers('OneShotCalculatorModel');
  protected buildRequest(f: Fields) {
    const rho = stateFieldsOf(f.rho);
    const sigma = stateFieldsOf(f.sigma);
    if (!rho || (PAIRWISE.includes(String(f.quantity)) && !sigma)) return null;
    return oneShotRequest(f, rho, sigma);
  }
}

/** The view: src/ui's OneShotCalculator (the quantity with its convention and certificate). */
export class OneShotCalculatorView extends CalculatorView {
  protected mount(host: HTMLElement, engine: EngineLike, inputs: Record<string, unknown>, value: Record<string, unknown>) {
    return new OneShotCalculator(host, { engine, inputs: inputs as never, value: value as never, label: 'One-shot quantity' }) as unknown as MountedCalculator;
  }
  protected inputsOf(f: Fields) {
    return { rho: editorState(f.rho), sigma: editorState(f.sigma) };
  }
  protected settingsOf(f: Fields) {
    return { quantity: f.quantity, epsilon: f.epsilon, a: f.a, b: f.b, base: f.base };
  }
}
