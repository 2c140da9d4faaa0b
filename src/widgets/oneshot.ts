/**
 * OneShotCalculatorModel / OneShotCalculatorView: the one-shot SDP quantities (hypothesis-testing and
 * smooth max-divergence of `rho` against `sigma` at ε; conditional min/max-entropy and max-information of
 * `rho` for the groups `a`, `b`), each with its certificate.
 *
 * Deliberately not here: numerics (the worker's). Cost: one SDP request per change.
 */
import { CalculatorModel, CalculatorView, type Control } from './calculator.js';
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

export class OneShotCalculatorView extends CalculatorView {
  protected readonly title = 'One-shot quantity';
  protected readonly controls: Control[] = [
    { field: 'quantity', label: 'quantity', choices: [...PAIRWISE, 'conditional-min-entropy', 'conditional-max-entropy', 'max-information'] },
    { field: 'epsilon', label: 'ε', when: (f) => PAIRWISE.includes(String(f.quantity)) },
    { field: 'base', label: 'log base' },
  ];
}
