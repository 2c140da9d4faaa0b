/**
 * Wiring one embed's configuration to the src/ui components: the editors of its inputs (states) and the
 * calculator, on the contract of docs/surfaces.md ("UI components": `new X(host, options)`, `value`,
 * `on(event, cb)`, `dispose()`, events `change` and `result`, an EngineLike in the options).
 *
 * The components are handed in as a kit (`setUiKit`, called by the entry main.ts), so that this module
 * depends on the contract only. An edit in an editor sets the calculator's value; the calculator asks the
 * engine and emits `result`, which the element keeps for sharing.
 *
 * What it does not do: compute, or build any DOM of the components (they do). Cost: that of the components.
 */
import type { CalculatorName, ControlName } from './config-schema.js';
import type { EmbedConfig } from './config.js';
import type { EngineLike, ResultEvent } from './engine.js';

/** A component of src/ui as the surfaces contract describes it. */
export interface Component {
  value: unknown;
  on(event: string, callback: (payload: any) => void): () => void;
  dispose(): void;
}
export type ComponentClass = new (host: HTMLElement, options: Record<string, unknown>) => Component;

export interface UiKit {
  StateEditor: ComponentClass;
  calculators: Record<CalculatorName, ComponentClass>;
}

let kit: UiKit | null = null;
export function setUiKit(k: UiKit): void {
  kit = k;
}

/** What the element holds of a mounted calculator. */
export interface Mounted {
  inputs(): Record<string, unknown>;
  onResult(cb: (e: ResultEvent) => void): () => void;
  dispose(): void;
}

/** The inputs of each calculator edited as states, with the label their editor shows. */
const STATE_INPUTS: Record<CalculatorName, { field: string; label: string }[]> = {
  divergence: [{ field: 'rho', label: 'ρ (state)' }, { field: 'sigma', label: 'σ (positive operator)' }],
  recoverability: [{ field: 'rho', label: 'ρ_ABC (tripartite state)' }],
  guessing: [],
  'one-shot': [{ field: 'rho', label: 'ρ (state)' }, { field: 'sigma', label: 'σ (positive operator)' }],
};

function region(host: HTMLElement, className: string): HTMLElement {
  const div = document.createElement('div');
  div.className = className;
  host.append(div);
  return div;
}

/** Mounts the editors and the calculator of a configuration into host. */
export function mountCalculator(host: HTMLElement, config: EmbedConfig, controls: Set<ControlName>, engine: EngineLike): Mounted {
  if (!kit) throw new Error('the user-interface components are not loaded');
  const inputs: Record<string, unknown> = { ...(config.inputs as unknown as Record<string, unknown>) };
  const parts: Component[] = [];
  const unsubscribe: (() => void)[] = [];
  host.classList.toggle('rs-embed-no-settings', !controls.has('settings'));

  const calculatorHost = document.createElement('div');
  calculatorHost.className = 'rs-embed-calculator';
  const calculator = new kit.calculators[config.calculator](calculatorHost, {
    engine,
    value: inputs,
    controls: controls.has('settings'),
  });
  parts.push(calculator);

  if (controls.has('editors')) {
    const editors = region(host, 'rs-embed-editors');
    for (const { field, label } of STATE_INPUTS[config.calculator]) {
      if (inputs[field] === undefined) continue;
      const slot = region(editors, 'rs-embed-editor');
      const editor = new kit.StateEditor(slot, { engine, value: inputs[field], label });
      parts.push(editor);
      unsubscribe.push(
        editor.on('change', (value: unknown) => {
          inputs[field] = value;
          calculator.value = { ...(calculator.value as Record<string, unknown>), [field]: value };
        }),
      );
    }
  }
  host.append(calculatorHost);
  unsubscribe.push(
    calculator.on('change', (value: Record<string, unknown>) => {
      Object.assign(inputs, value);
    }),
  );

  return {
    inputs: () => ({ ...inputs, ...(calculator.value as Record<string, unknown>) }),
    onResult: (cb) => calculator.on('result', cb),
    dispose: () => {
      for (const u of unsubscribe) u();
      for (const p of parts) p.dispose();
      host.replaceChildren();
    },
  };
}
