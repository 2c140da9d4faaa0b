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
/** A calculator of src/ui: inputs from editors (`inputs`), its own settings (`value`). */
export interface CalculatorComponent extends Component {
  inputs: Record<string, unknown>;
}
export type ComponentClass<C extends Component = Component> = new (host: HTMLElement, options: Record<string, unknown>) => C;

export interface UiKit {
  StateEditor: ComponentClass;
  calculators: Record<CalculatorName, ComponentClass<CalculatorComponent>>;
}

let kit: UiKit | null = null;
export function setUiKit(k: UiKit): void {
  kit = k;
}

/** What a calculator's `result` event carries. */
export interface NamedResult extends ResultEvent {
  name?: string;
}

/** What the element holds of a mounted calculator. */
export interface Mounted {
  /** The current inputs, in the configuration's form (what a shared link carries). */
  inputs(): Record<string, unknown>;
  /** The name of the result that answers the calculator's main question (its value is what is shared). */
  headline(): string;
  onResult(cb: (e: NamedResult) => void): () => void;
  dispose(): void;
}

/**
 * How a configuration's inputs split between the calculator's `inputs` (states, from editors) and its
 * `value` (its own settings), per calculator; `states` of the guessing calculator is a list of states.
 */
const SPLIT: Record<CalculatorName, { inputs: string[]; settings: string[] }> = {
  divergence: { inputs: ['rho', 'sigma'], settings: ['family', 'alpha', 'z', 'base'] },
  recoverability: { inputs: ['rho'], settings: ['a', 'b', 'c', 'base'] },
  guessing: { inputs: ['states', 'probabilities'], settings: ['moment'] },
  'one-shot': { inputs: ['rho', 'sigma'], settings: ['quantity', 'epsilon', 'a', 'b', 'base'] },
};

/** Labels of the state editors, for screen readers and sight alike. */
const LABELS: Record<string, string> = {
  rho: 'ρ, the state',
  sigma: 'σ, the positive operator',
};

/** One entry of {re, im} rows as an expression string the editors and the engine read ("0.5+0.25*i"). */
function complexEntry(re: unknown, im: unknown): unknown {
  if (typeof im !== 'number' || im === 0) return re;
  return `${re}${im < 0 ? '-' : '+'}${Math.abs(im)}*i`;
}

function complexRows(m: { re: unknown[][]; im?: unknown[][] }): unknown[][] {
  return m.re.map((row, i) => row.map((x, j) => complexEntry(x, m.im?.[i]?.[j])));
}

/**
 * A state in the editors' form ({matrix: rows} or {ket: list}, entries numbers or expression strings),
 * or null when it is in a form they do not edit (packed matrices): then it goes to the calculator as it is.
 * The protocol's other forms are rewritten, not recomputed: a bare matrix M is {matrix: M}, {re, im} rows
 * become expression strings.
 */
export function editableState(state: unknown): unknown {
  const isRows = (m: unknown): m is unknown[][] => Array.isArray(m) && m.every((r) => Array.isArray(r));
  const isReIm = (m: unknown): m is { re: unknown[][]; im?: unknown[][] } => m !== null && typeof m === 'object' && isRows((m as { re?: unknown }).re);
  if (isRows(state)) return { matrix: state };
  if (isReIm(state)) return { matrix: complexRows(state) };
  if (state === null || typeof state !== 'object') return null;
  const s = state as Record<string, unknown>;
  if ('matrix' in s) {
    if (isRows(s.matrix)) return s;
    if (isReIm(s.matrix)) return { ...s, matrix: complexRows(s.matrix) };
    return null;
  }
  if ('ket' in s) {
    if (Array.isArray(s.ket)) return s;
    const k = s.ket as { re?: unknown[]; im?: unknown[] };
    if (Array.isArray(k.re)) return { ...s, ket: k.re.map((x, j) => complexEntry(x, k.im?.[j])) };
  }
  return null;
}

function pick(from: Record<string, unknown>, keys: string[]): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const k of keys) if (from[k] !== undefined) out[k] = from[k];
  return out;
}

function region(host: HTMLElement, className: string, label?: string): HTMLElement {
  const div = document.createElement('div');
  div.className = className;
  if (label) {
    div.setAttribute('role', 'group');
    div.setAttribute('aria-label', label);
  }
  host.append(div);
  return div;
}

/** Mounts the editors and the calculator of a configuration into host. */
export function mountCalculator(host: HTMLElement, config: EmbedConfig, controls: Set<ControlName>, engine: EngineLike): Mounted {
  if (!kit) throw new Error('the user-interface components are not loaded');
  const all = { ...(config.inputs as unknown as Record<string, unknown>) };
  const split = SPLIT[config.calculator];
  const inputs = pick(all, split.inputs);
  // The components take states in the editors' form; the same state, rewritten (editableState).
  for (const f of ['rho', 'sigma']) if (inputs[f] !== undefined) inputs[f] = editableState(inputs[f]) ?? inputs[f];
  if (Array.isArray(inputs.states)) inputs.states = inputs.states.map((st) => editableState(st) ?? st);
  const parts: Component[] = [];
  const unsubscribe: (() => void)[] = [];
  host.classList.toggle('rs-embed-no-settings', !controls.has('settings'));

  const editors = controls.has('editors') ? region(host, 'rs-embed-editors', 'Inputs') : null;
  const calculatorHost = region(host, 'rs-embed-calculator');
  const calculator = new kit.calculators[config.calculator](calculatorHost, {
    engine,
    inputs,
    value: pick(all, split.settings),
    label: config.title,
  });
  parts.push(calculator);

  if (editors) {
    const edit = (label: string, given: unknown, set: (v: unknown) => void) => {
      const value = editableState(given);
      if (value === null) return;
      const slot = region(editors, 'rs-embed-editor');
      const editor = new kit!.StateEditor(slot, { engine, value, label, presets: controls.has('settings') });
      parts.push(editor);
      unsubscribe.push(editor.on('change', set));
    };
    for (const field of ['rho', 'sigma']) {
      if (inputs[field] === undefined) continue;
      edit(LABELS[field], inputs[field], (v) => {
        inputs[field] = v;
        calculator.inputs = { [field]: v };
      });
    }
    if (Array.isArray(inputs.states)) {
      const states = [...inputs.states];
      states.forEach((st, k) =>
        edit(`ρ_${k}, the state for x = ${k}`, st, (v) => {
          states[k] = v;
          inputs.states = [...states];
          calculator.inputs = { states: [...states] };
        }),
      );
    }
  }

  return {
    inputs: () => ({ ...all, ...inputs, ...pick(calculator.value as Record<string, unknown>, split.settings) }),
    headline: () => {
      if (config.calculator === 'divergence') return 'divergence';
      if (config.calculator === 'one-shot') return String((calculator.value as { quantity?: unknown }).quantity ?? all.quantity);
      return String(all.quantity ?? (config.calculator === 'guessing' ? 'guessing-probability' : 'conditional-mutual-information'));
    },
    onResult: (cb) => calculator.on('result', cb),
    dispose: () => {
      for (const u of unsubscribe) u();
      for (const p of parts) p.dispose();
      host.replaceChildren();
    },
  };
}
