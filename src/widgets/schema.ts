/**
 * The widget set's state schema (docs/surfaces.md, "Jupyter widgets"): for every model its name, its
 * view, and the defaults of every synced field, in the snake_case strings Python's traitlets use. Each
 * model's `defaults()` (the files beside this one) is this table plus the module fields; the Python
 * classes (kernel-bridge/rhosigma/widgets.py) declare the same traits, and
 * kernel-bridge/tests/test_widgets_kernel.py compares the comm-open messages of a real kernel with it.
 *
 * Fields, in the protocol's plain forms (docs/protocol.md):
 *  - matrices are protocol matrices: rows of numbers or expression strings, `{re, im}`, or the packed
 *    form `{shape, packed: "float64-le", re, im?}` (what Python sends for 256 entries or more);
 *  - `rho`, `sigma`, `channel`, `states` hold other widgets by reference ("IPY_MODEL_<id>" on the wire);
 *  - `result` is the protocol answer of `request`, set by the front end the moment it arrives (or by
 *    Python's headless engine when no front end is attached); `status` says which: "idle", "done",
 *    "error" (the answer is a refusal, or an editor's input is invalid). A request on its way is shown
 *    by the view ("computing…") but not synced: see CalculatorModel.compute.
 *
 * Deliberately not here: DOM, engine calls (views), and the module name and version (version.ts).
 * Cost: none.
 */

export type FieldValue = null | boolean | number | string | FieldValue[] | { [k: string]: FieldValue };

export interface ModelSpec {
  view: string;
  /** Fields that hold widgets by reference (ipywidgets' widget serialization). */
  references: string[];
  defaults: Record<string, FieldValue>;
}

const calculatorFields = {
  request: null,
  result: null,
  status: 'idle',
  error: null,
  /** When false the calculator computes only on `compute()` (Python) or its button. */
  auto: true,
  /** "browser" (the page's worker) or "kernel" (Python's headless engine): who computed `result`. */
  computed_by: null,
} satisfies Record<string, FieldValue>;

export const MODELS = {
  StateEditorModel: {
    view: 'StateEditorView',
    references: [],
    defaults: {
      /** The density matrix (null when `ket` is given). */
      matrix: [[0.5, 0], [0, 0.5]],
      /** A state vector instead of a matrix (null for a density matrix). */
      ket: null,
      dims: [2],
      labels: null,
      /** A preset ({name, ...parameters}, the op `state-preset`'s request without `op`) or null. */
      preset: null,
      title: '',
      /** Whether the grid's entries make a state (set by the front end from the op state-check). */
      valid: true,
      /** The state-check answer of the current entries (front end), or null. */
      check: null,
      /** An entry that could not be read: {path, message} (front end), or null. */
      error: null,
    },
  },
  ChannelEditorModel: {
    view: 'ChannelEditorView',
    references: [],
    defaults: {
      /** Kraus operators (protocol matrices), or null when the channel is a Choi matrix or a preset. */
      kraus: [[[1, 0], [0, 1]]],
      choi: null,
      preset: null,
      input_dims: [2],
      output_dims: [2],
      title: '',
      valid: true,
      /** The channel-check answer (front end), or null. */
      check: null,
      error: null,
    },
  },
  DivergenceCalculatorModel: {
    view: 'DivergenceCalculatorView',
    references: ['rho', 'sigma'],
    defaults: {
      rho: null,
      sigma: null,
      family: 'umegaki',
      alpha: 0.5,
      z: 1,
      base: 2,
      ...calculatorFields,
    },
  },
  RecoverabilityCalculatorModel: {
    view: 'RecoverabilityCalculatorView',
    references: ['rho'],
    defaults: {
      rho: null,
      /** "conditional-mutual-information", "petz-recovery" or "fidelity-of-recovery". */
      quantity: 'conditional-mutual-information',
      a: [0],
      b: [1],
      c: [2],
      base: 2,
      ...calculatorFields,
    },
  },
  GuessingCalculatorModel: {
    view: 'GuessingCalculatorView',
    references: ['states'],
    defaults: {
      states: [],
      probabilities: [],
      /** "guessing-probability" or "guesswork". */
      quantity: 'guessing-probability',
      moment: 1,
      ...calculatorFields,
    },
  },
  OneShotCalculatorModel: {
    view: 'OneShotCalculatorView',
    references: ['rho', 'sigma'],
    defaults: {
      rho: null,
      sigma: null,
      /** "hypothesis-testing", "smooth-max-divergence", "conditional-min-entropy", "conditional-max-entropy", "max-information". */
      quantity: 'hypothesis-testing',
      epsilon: 0.01,
      a: [0],
      b: [1],
      base: 2,
      ...calculatorFields,
    },
  },
  SweepModel: {
    view: 'SweepView',
    references: [],
    defaults: {
      /** The sweep spec (docs/sweeps.md), plain JSON, or null. */
      spec: null,
      /** The lines of the points done so far, as the op sweep-points answers them (then refinements). */
      rows: [],
      /** Lines done and the sweep's number of points (plus refinements in the search mode, once known). */
      done: 0,
      total: 0,
      /** "idle", "running", "cancelled", "done" or "error". */
      status: 'idle',
      /** The refusal ({code, message, path}) when status is "error", else null. */
      error: null,
      /** The chart: {x: a parameter's name, y: a line's field ("value", "gap", "left", "right")}; null picks from the spec. */
      plot: { x: null, y: null },
      /** When true the front end runs the sweep when the model is made (status "idle") and when `spec` changes. */
      auto: true,
      /** "browser" or "kernel": who computed `rows`. */
      computed_by: null,
    },
  },
} satisfies Record<string, ModelSpec>;

export type ModelName = keyof typeof MODELS;
