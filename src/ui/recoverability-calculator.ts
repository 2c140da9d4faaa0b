/**
 * RecoverabilityCalculator: for a tripartite state ρ_ABC and groups A, B, C of its subsystems, the
 * conditional mutual information I(A;C|B), the fidelity of the Petz recovery map R_{B→BC} (with the
 * recovered state's map), and the fidelity of recovery F(A;C|B), an SDP over recovery channels, with
 * its optimal channel (Choi matrix) and certificate. Fidelity is squared, F = ‖√ρ√σ‖₁², with the root.
 *
 * Inputs: `calc.inputs = { rho }`. Settings: { a, b, c (systems: indices or labels), base }.
 * Deliberately not here: numerics. Cost: two entropic requests and one SDP per change.
 */
import type { Answer } from '../worker/types.js';
import { el, field, formatNumber, setChildren } from './dom.js';
import { baseText, Calculator, certificateBadge, matrixTable, resultCard, selectControl, type CalculatorOptions, type NamedRequest } from './calculator.js';
import type { StateValue } from './state-editor.js';
import { parseSystems, systemsText } from './systems.js';

export interface RecoverabilityInputs {
  rho: StateValue;
}

export interface RecoverabilitySettings {
  a: (number | string)[];
  b: (number | string)[];
  c: (number | string)[];
  base: 2 | 'e';
}

const FIDELITY = 'fidelity squared, F = ‖√ρ√σ‖₁² (root alongside)';

export class RecoverabilityCalculator extends Calculator<RecoverabilityInputs, RecoverabilitySettings> {
  private inputsText: Record<'a' | 'b' | 'c', HTMLInputElement>;
  private baseSelect: HTMLSelectElement;

  constructor(host: HTMLElement, options: CalculatorOptions<RecoverabilityInputs, RecoverabilitySettings>) {
    super(host, options, { a: [0], b: [1], c: [2], base: 2 }, 'recoverability', 'Recoverability');
    const text = (key: 'a' | 'b' | 'c') => {
      const input = el('input', { class: 'rs-input rs-input--short', type: 'text', spellcheck: 'false' });
      input.addEventListener('change', () => this.setSetting(key, parseSystems(input.value)));
      return input;
    };
    this.inputsText = { a: text('a'), b: text('b'), c: text('c') };
    this.baseSelect = selectControl([['2', 'bits (log₂)'], ['e', 'nats (ln)']], (v) => this.setSetting('base', v === 'e' ? 'e' : 2));
    this.controls.append(field('A', this.inputsText.a), field('B (conditioning)', this.inputsText.b), field('C', this.inputsText.c), field('Units', this.baseSelect));
    this.start();
  }

  protected syncControls(): void {
    for (const k of ['a', 'b', 'c'] as const) this.inputsText[k].value = systemsText(this.settings[k]);
    this.baseSelect.value = String(this.settings.base);
  }

  protected requests(inputs: Partial<RecoverabilityInputs>, s: RecoverabilitySettings): NamedRequest[] | string {
    if (!inputs.rho) return 'Give a tripartite state ρ_ABC (connect a state editor).';
    const groups = { rho: inputs.rho, a: s.a, b: s.b, c: s.c };
    return [
      { name: 'conditional-mutual-information', request: { op: 'conditional-mutual-information', ...groups, base: s.base } },
      { name: 'petz-recovery', request: { op: 'petz-recovery', ...groups } },
      { name: 'fidelity-of-recovery', request: { op: 'fidelity-of-recovery', ...groups }, long: true },
    ];
  }

  protected render(answers: { req: NamedRequest; answer: Answer }[]): void {
    const [cmi, petz, fr] = answers.map((x) => x.answer);
    const s = this.settings;
    setChildren(this.output, [
      resultCard('Conditional mutual information I(A;C|B)', cmi, (a) => [formatNumber(a.value, 8)], (a) => [baseText(a, s.base), 'zero exactly for quantum Markov chains A − B − C']),
      resultCard('Petz recovery: F(ρ_ABC, R_{B→BC}(ρ_AB))', petz, (a) => [formatNumber(a.value, 8)], (a) => [FIDELITY, `root ${formatNumber(a.root, 8)}`, a.t ? `rotated map, t = ${a.t}` : 'R(X) = ρ_BC^{1/2}(ρ_B^{−1/2} X ρ_B^{−1/2} ⊗ 1_C)ρ_BC^{1/2}'],
        (a) => [a.map?.kraus ? el('div', { class: 'rs-note' }, [`The map has ${a.map.kraus.length} Kraus operators from [${a.map.from}] to [${a.map.to}].`]) : null]),
      resultCard('Fidelity of recovery F(A;C|B)', fr, (a) => [formatNumber(a.value, 8)], (a) => [FIDELITY, `root ${formatNumber(a.root, 8)}`, 'max over channels R: B → BC (an SDP)'],
        (a) => [
          certificateBadge(a.certificate),
          a.channel?.choi ? el('details', { class: 'rs-details' }, [
            el('summary', {}, [`Optimal recovery channel (Choi matrix, input first; from [${a.channel.from}] to [${a.channel.to}])`]),
            matrixTable(a.channel.choi, 'Choi matrix of the optimal recovery channel'),
          ]) : null,
        ]),
    ]);
  }
}
