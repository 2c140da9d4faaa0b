/**
 * RecoverabilityCalculatorModel / RecoverabilityCalculatorView: how well the Markov chain A–B–C of a
 * tripartite state (an editor held as `rho`) is recovered: conditional mutual information I(A;C|B), the
 * Petz recovery map's fidelity, or the fidelity of recovery (an SDP, with its certificate).
 *
 * Deliberately not here: numerics (the worker's). Cost: one request per change.
 */
import { CalculatorModel, CalculatorView, type Control } from './calculator.js';
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

export class RecoverabilityCalculatorView extends CalculatorView {
  protected readonly title = 'Recoverability of A–B–C';
  protected readonly controls: Control[] = [
    { field: 'quantity', label: 'quantity', choices: ['conditional-mutual-information', 'petz-recovery', 'fidelity-of-recovery'] },
    { field: 'base', label: 'log base', when: (f) => f.quantity === 'conditional-mutual-information' },
  ];
}
