/**
 * DivergenceCalculatorModel / DivergenceCalculatorView: D(ρ‖σ) of a chosen family (the op divergence)
 * between two state editors held by reference (`rho`, `sigma`); α and z where the family takes them.
 *
 * Deliberately not here: numerics (the worker's). Cost: one divergence request per change.
 */
import { CalculatorModel, CalculatorView, editorState, type MountedCalculator } from './calculator.js';
import { DivergenceCalculator } from '../ui/divergence-calculator.js';
import type { EngineLike } from '../worker/types.js';
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

/** The view: src/ui's DivergenceCalculator (formula, every family side by side, the curve over α). */
export class DivergenceCalculatorView extends CalculatorView {
  protected mount(host: HTMLElement, engine: EngineLike, inputs: Record<string, unknown>, value: Record<string, unknown>) {
    return new DivergenceCalculator(host, { engine, inputs: inputs as never, value: value as never, label: 'Divergence D(ρ‖σ)' }) as unknown as MountedCalculator;
  }
  protected inputsOf(f: Fields) {
    return { rho: editorState(f.rho), sigma: editorState(f.sigma) };
  }
  protected settingsOf(f: Fields) {
    return { family: f.family, alpha: f.alpha, z: f.z, base: f.base };
  }
}
