/**
 * DivergenceCalculatorModel / DivergenceCalculatorView: D(ρ‖σ) of a chosen family (the op divergence)
 * between two state editors held by reference (`rho`, `sigma`); α and z where the family takes them.
 *
 * Deliberately not here: numerics (the worker's). Cost: one divergence request per change.
 */
import { CalculatorModel, CalculatorView, type Control } from './calculator.js';
import { defaultsOf, referenceSerializers } from './base.js';
import { divergenceRequest, type Fields } from './requests.js';
import { stateFieldsOf } from './references.js';

export const DIVERGENCE_FAMILIES = ['umegaki', 'petz', 'sandwiched', 'alpha-z', 'geometric', 'max', 'min', 'measured'];

export class DivergenceCalculatorModel extends CalculatorModel {
  protected get modelName() {
    return 'DivergenceCalculatorModel' as const;
  }
  override defaults() {
    return defaultsOf('DivergenceCalculatorModel', super.defaults());
  }
  static override serializers = referenceSerializers('DivergenceCalculatorModel');
  protected buildRequest(f: Fields) {
    const rho = stateFieldsOf(f.rho);
    const sigma = stateFieldsOf(f.sigma);
    return rho && sigma ? divergenceRequest(f, rho, sigma) : null;
  }
}

export class DivergenceCalculatorView extends CalculatorView {
  protected readonly title = 'Divergence D(ρ‖σ)';
  protected readonly controls: Control[] = [
    { field: 'family', label: 'family', choices: DIVERGENCE_FAMILIES },
    { field: 'alpha', label: 'α', when: (f) => ['petz', 'sandwiched', 'alpha-z', 'geometric'].includes(String(f.family)) },
    { field: 'z', label: 'z', when: (f) => f.family === 'alpha-z' },
    { field: 'base', label: 'log base' },
  ];
}
