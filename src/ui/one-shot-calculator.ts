/**
 * OneShotCalculator: the one-shot quantities, each an SDP with its certificate: conditional min- and
 * max-entropy H_min(A|B), H_max(A|B) of ρ_AB, the smooth max-relative entropy D_max^ε(ρ‖σ), the
 * hypothesis-testing relative entropy D_H^ε(ρ‖σ), and the max-information I_max(A:B).
 *
 * Inputs: `calc.inputs = { rho, sigma }` (σ only where the quantity has one). Settings: { quantity,
 * epsilon, a, b, base }. Deliberately not here: numerics. Cost: one SDP per change.
 */
import type { Answer } from '../worker/types.js';
import { el, field, formatNumber, setChildren } from './dom.js';
import { baseText, Calculator, certificateBadge, numberControl, resultCard, selectControl, type CalculatorOptions, type NamedRequest } from './calculator.js';
import type { StateValue } from './state-editor.js';
import { parseSystems, systemsText } from './systems.js';

export interface OneShotInputs {
  rho: StateValue;
  sigma: StateValue;
}

export interface OneShotSettings {
  quantity: 'conditional-min-entropy' | 'conditional-max-entropy' | 'smooth-max-divergence' | 'hypothesis-testing' | 'max-information';
  epsilon: number;
  a: (number | string)[];
  b: (number | string)[];
  base: 2 | 'e';
}

export const ONE_SHOT: { name: OneShotSettings['quantity']; label: string; sigma: boolean; epsilon: boolean; groups: boolean; convention: string }[] = [
  { name: 'conditional-min-entropy', label: 'Conditional min-entropy H_min(A|B)', sigma: false, epsilon: false, groups: true, convention: '−log min{Tr σ_B : 1_A ⊗ σ_B ⪰ ρ_AB}' },
  { name: 'conditional-max-entropy', label: 'Conditional max-entropy H_max(A|B)', sigma: false, epsilon: false, groups: true, convention: 'log max_σ F(ρ_AB, 1_A ⊗ σ_B), F squared' },
  { name: 'smooth-max-divergence', label: 'Smooth max-relative entropy D_max^ε(ρ‖σ)', sigma: true, epsilon: true, groups: false, convention: 'smoothing ball in purified distance, subnormalised states' },
  { name: 'hypothesis-testing', label: 'Hypothesis-testing relative entropy D_H^ε(ρ‖σ)', sigma: true, epsilon: true, groups: false, convention: '−log min{Tr σQ : 0 ≤ Q ≤ 1, Tr ρQ ≥ 1 − ε}' },
  { name: 'max-information', label: 'Max-information I_max(A:B)', sigma: false, epsilon: false, groups: true, convention: 'min over σ_B of D_max(ρ_AB ‖ ρ_A ⊗ σ_B)' },
];

export class OneShotCalculator extends Calculator<OneShotInputs, OneShotSettings> {
  private quantitySelect: HTMLSelectElement;
  private epsilonInput: HTMLInputElement;
  private aInput: HTMLInputElement;
  private bInput: HTMLInputElement;
  private baseSelect: HTMLSelectElement;

  constructor(host: HTMLElement, options: CalculatorOptions<OneShotInputs, OneShotSettings>) {
    super(host, options, { quantity: 'conditional-min-entropy', epsilon: 0.05, a: [0], b: [1], base: 2 }, 'one-shot', 'One-shot quantities');
    this.quantitySelect = selectControl(ONE_SHOT.map((q) => [q.name, q.label]), (v) => this.setSetting('quantity', v as OneShotSettings['quantity']));
    this.epsilonInput = numberControl({ min: 0, max: 1, step: 0.01 }, (v) => this.setSetting('epsilon', v));
    const text = (key: 'a' | 'b') => {
      const input = el('input', { class: 'rs-input rs-input--short', type: 'text', spellcheck: 'false' });
      input.addEventListener('change', () => this.setSetting(key, parseSystems(input.value)));
      return input;
    };
    this.aInput = text('a');
    this.bInput = text('b');
    this.baseSelect = selectControl([['2', 'bits (log₂)'], ['e', 'nats (ln)']], (v) => this.setSetting('base', v === 'e' ? 'e' : 2));
    this.controls.append(field('Quantity', this.quantitySelect), field('ε', this.epsilonInput), field('A', this.aInput), field('B', this.bInput), field('Units', this.baseSelect));
    this.start();
  }

  protected syncControls(): void {
    const s = this.settings;
    const q = ONE_SHOT.find((x) => x.name === s.quantity);
    this.quantitySelect.value = s.quantity;
    this.epsilonInput.value = String(s.epsilon);
    this.epsilonInput.disabled = !q?.epsilon;
    this.aInput.value = systemsText(s.a);
    this.bInput.value = systemsText(s.b);
    this.aInput.disabled = this.bInput.disabled = !q?.groups;
    this.baseSelect.value = String(s.base);
  }

  protected requests(inputs: Partial<OneShotInputs>, s: OneShotSettings): NamedRequest[] | string {
    const q = ONE_SHOT.find((x) => x.name === s.quantity);
    if (!q) return `Unknown quantity ${s.quantity}.`;
    if (!inputs.rho) return 'Give ρ (connect a state editor).';
    if (q.sigma && !inputs.sigma) return 'This quantity needs σ as well.';
    let request: Record<string, unknown>;
    if (q.name === 'hypothesis-testing') request = { op: 'divergence', family: 'hypothesis-testing', rho: inputs.rho, sigma: inputs.sigma, epsilon: s.epsilon, base: s.base };
    else if (q.sigma) request = { op: q.name, rho: inputs.rho, sigma: inputs.sigma, epsilon: s.epsilon, base: s.base };
    else request = { op: q.name, rho: inputs.rho, a: s.a, b: s.b, base: s.base };
    return [{ name: q.name, request, long: true }];
  }

  protected render(answers: { req: NamedRequest; answer: Answer }[]): void {
    const s = this.settings;
    const q = ONE_SHOT.find((x) => x.name === s.quantity)!;
    setChildren(this.output, answers.map(({ answer }) =>
      resultCard(q.label, answer, (a) => [formatNumber(a.value, 8)], (a) => [baseText(a, s.base), q.convention, q.epsilon ? `ε = ${a.epsilon ?? s.epsilon}` : ''].filter(Boolean),
        (a) => [certificateBadge(a.certificate), a.certificate ? null : el('div', { class: 'rs-note' }, ['Computed without an SDP certificate (closed form or bisection); see the answer for its diagnostics.'])])));
  }
}
