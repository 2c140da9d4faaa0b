/**
 * GuessingCalculator: guessing probability and guesswork of X from an ensemble {p_x, ρ_x}: the optimal
 * success probability with the optimal measurement (an SDP, with its certificate), and the least
 * expected number of guesses (to a moment) with the optimal strategy (guessing orders and their
 * weights) and certificate.
 *
 * Inputs: `calc.inputs = { states: [StateValue, ...], probabilities: [p_x, ...] }`. Settings: { moment }.
 * Deliberately not here: numerics. Cost: two SDPs per change.
 */
import type { Answer } from '../worker/types.js';
import { el, field, formatNumber, setChildren } from './dom.js';
import { Calculator, certificateBadge, numberControl, resultCard, type CalculatorOptions, type NamedRequest } from './calculator.js';
import type { StateValue } from './state-editor.js';

export interface GuessingInputs {
  states: StateValue[];
  probabilities: number[];
}

export interface GuessingSettings {
  moment: number;
}

export class GuessingCalculator extends Calculator<GuessingInputs, GuessingSettings> {
  private momentInput: HTMLInputElement;

  constructor(host: HTMLElement, options: CalculatorOptions<GuessingInputs, GuessingSettings>) {
    super(host, options, { moment: 1 }, 'guessing', 'Guessing');
    this.momentInput = numberControl({ min: 0.1, step: 0.5 }, (v) => this.setSetting('moment', v));
    this.controls.append(field('Moment of the number of guesses', this.momentInput));
    this.start();
  }

  protected syncControls(): void {
    this.momentInput.value = String(this.settings.moment);
  }

  protected requests(inputs: Partial<GuessingInputs>, s: GuessingSettings): NamedRequest[] | string {
    if (!inputs.states?.length || !inputs.probabilities?.length) return 'Give the ensemble: states ρ_x and their probabilities p_x.';
    const ensemble = { probabilities: inputs.probabilities, states: inputs.states };
    return [
      { name: 'guessing-probability', request: { op: 'guessing-probability', ...ensemble }, long: true },
      { name: 'guesswork', request: { op: 'guesswork', ...ensemble, moment: s.moment }, long: true },
    ];
  }

  protected render(answers: { req: NamedRequest; answer: Answer }[]): void {
    const [pg, gw] = answers.map((x) => x.answer);
    setChildren(this.output, [
      resultCard('Guessing probability', pg, (a) => [formatNumber(a.value, 8)], (a) => [
        'max over POVMs of Σ_x p_x Tr M_x ρ_x',
        a.bounds ? `certified between ${formatNumber(a.bounds.lower, 10)} and ${formatNumber(a.bounds.upper, 10)}` : '',
      ].filter(Boolean), (a) => [
        certificateBadge(a.certificate),
        Array.isArray(a.measurement) ? el('div', { class: 'rs-note' }, [`Optimal measurement: ${a.measurement.length} POVM elements, one per guess x.`]) : null,
      ]),
      resultCard('Guesswork', gw, (a) => [formatNumber(a.value, 8)], (a) => [
        `expected (number of guesses)^${a.moment ?? this.settings.moment}`, a.method === 'sdp' ? 'with quantum side information (an SDP over guessing orders)' : 'by decreasing probability',
      ], (a) => [
        certificateBadge(a.certificate),
        Array.isArray(a.strategy) ? el('table', { class: 'rs-table', 'aria-label': 'Optimal strategy' }, [
          el('caption', {}, ['Guessing orders used by the optimal strategy']),
          el('thead', {}, [el('tr', {}, [el('th', {}, ['order of guesses']), el('th', {}, ['probability'])])]),
          el('tbody', {}, a.strategy.map((st: { order: number[]; probability: number }) =>
            el('tr', {}, [el('td', {}, [st.order.join(' → ')]), el('td', { class: 'rs-number' }, [formatNumber(st.probability, 6)])]))),
        ]) : null,
      ]),
    ]);
  }
}
