/**
 * The JSON Schema of an embed's configuration: the JSON block inside a `<rhosigma-calculator>` element
 * (docs/embed.md). It names the calculator, its initial inputs in the protocol's plain-data forms (states,
 * subsystems, numbers as docs/protocol.md writes them) and which controls to show.
 *
 * What it is for: scripts/write-embed-schema.ts compiles it, with the protocol's value schemas filled in
 * from the op registry, into ajv's standalone validator `config-validator.generated.ts` (no schema is
 * compiled in the browser, so no `new Function`), and into schema/embed.schema.json for readers.
 * The references `#/$defs/NAME` are the protocol's value forms (state, systems, base, ...), put in by
 * the generator; this file imports nothing, so the embed never pulls the engine in.
 *
 * What it does not do: check the numbers (Hermiticity, trace, sizes): the engine does that when the
 * calculator asks, and its error is shown in the calculator. Cost: none (a constant).
 */

/** The calculators an embed can show, by the name a configuration gives. */
export const CALCULATORS = ['divergence', 'recoverability', 'guessing', 'one-shot'] as const;
export type CalculatorName = (typeof CALCULATORS)[number];

/** The controls a configuration can show (default: all of them). */
export const CONTROLS = ['editors', 'settings', 'share'] as const;
export type ControlName = (typeof CONTROLS)[number];

/** The quantities each calculator computes, as op names of the protocol. */
export const QUANTITIES = {
  recoverability: ['conditional-mutual-information', 'petz-recovery', 'fidelity-of-recovery'],
  guessing: ['guessing-probability', 'guesswork'],
  'one-shot': ['smooth-max-divergence', 'conditional-min-entropy', 'conditional-max-entropy', 'max-information'],
} as const;

/** Plain-language words for a field, used in messages ("inputs.rho: ..."). */
const text = (maxLength: number) => ({ type: 'string', maxLength });

const common = {
  version: { description: 'Version of the configuration format; 1.', const: 1 },
  title: { description: 'A heading shown above the calculator (plain text).', ...text(200) },
  description: { description: 'A sentence shown under the heading (plain text).', ...text(2000) },
  controls: {
    description: 'Which controls to show: "editors" (the input editors), "settings" (the calculator\'s own choices), "share" (copy as link, request, Python). Default: all.',
    type: 'array',
    items: { enum: [...CONTROLS] },
  },
  theme: { description: 'Colour scheme: "auto" (the reader\'s preference, the default), "light" or "dark".', enum: ['auto', 'light', 'dark'] },
} as const;

function calculator(name: CalculatorName, inputs: Record<string, unknown>, required: string[]) {
  return {
    type: 'object',
    properties: {
      calculator: { const: name },
      ...common,
      inputs: { type: 'object', properties: inputs, required, additionalProperties: false },
    },
    required: ['calculator', 'inputs'],
    additionalProperties: false,
  };
}

const alpha = { description: 'The order α of a Rényi family.', type: 'number', exclusiveMinimum: 0, maximum: 1e6 };

/**
 * The schema. `$defs` is completed by the generator with the protocol's value schemas: state, systems,
 * base. `discriminator`-free on purpose: the dispatch on "calculator" is an if/then chain so that an
 * error names the field inside the calculator that was meant.
 */
export const CONFIG_SCHEMA = {
  $schema: 'https://json-schema.org/draft/2020-12/schema',
  $id: 'rhosigma-embed-config',
  title: 'rhosigma embed configuration, version 1',
  description: 'The JSON block inside a <rhosigma-calculator> element (docs/embed.md).',
  type: 'object',
  properties: { calculator: { enum: [...CALCULATORS] } },
  required: ['calculator'],
  allOf: [
    {
      if: { properties: { calculator: { const: 'divergence' } } },
      then: calculator('divergence', {
        rho: { $ref: '#/$defs/state', description: 'The state ρ.' },
        sigma: { $ref: '#/$defs/state', description: 'The operator σ (positive semidefinite, any trace).' },
        family: {
          description: 'The divergence family shown first.',
          enum: ['umegaki', 'petz', 'sandwiched', 'alpha-z', 'geometric', 'max', 'min', 'measured'],
        },
        alpha,
        z: { description: 'The parameter z of the α-z family.', type: 'number', exclusiveMinimum: 0, maximum: 1e6 },
        base: { $ref: '#/$defs/base' },
      }, ['rho', 'sigma']),
    },
    {
      if: { properties: { calculator: { const: 'recoverability' } } },
      then: calculator('recoverability', {
        rho: { $ref: '#/$defs/state', description: 'A tripartite state ρ_ABC (with dims).' },
        a: { $ref: '#/$defs/systems' },
        b: { $ref: '#/$defs/systems' },
        c: { $ref: '#/$defs/systems' },
        quantity: { description: 'The headline quantity (the one shared as a request); all three are shown.', enum: [...QUANTITIES.recoverability] },
        base: { $ref: '#/$defs/base' },
      }, ['rho', 'a', 'b', 'c']),
    },
    {
      if: { properties: { calculator: { const: 'guessing' } } },
      then: calculator('guessing', {
        probabilities: { description: 'The prior p_x.', type: 'array', minItems: 1, maxItems: 1024, items: { type: 'number', minimum: 0, maximum: 1 } },
        states: { description: 'The states ρ_x of the side information, one per x.', type: 'array', minItems: 1, maxItems: 1024, items: { $ref: '#/$defs/state' } },
        quantity: { description: 'The headline quantity (the one shared as a request); both are shown.', enum: [...QUANTITIES.guessing] },
        moment: { description: 'The moment of the guesswork.', type: 'number', exclusiveMinimum: 0, maximum: 64 },
      }, ['probabilities']),
    },
    {
      if: { properties: { calculator: { const: 'one-shot' } } },
      then: calculator('one-shot', {
        quantity: { description: 'The one-shot quantity.', enum: [...QUANTITIES['one-shot']] },
        rho: { $ref: '#/$defs/state', description: 'The state ρ (bipartite for the conditional entropies and the max-information).' },
        sigma: { $ref: '#/$defs/state', description: 'The operator σ of the smooth max-divergence.' },
        a: { $ref: '#/$defs/systems' },
        b: { $ref: '#/$defs/systems' },
        epsilon: { description: 'The smoothing ε.', type: 'number', minimum: 0, exclusiveMaximum: 1 },
        base: { $ref: '#/$defs/base' },
      }, ['quantity', 'rho']),
    },
  ],
} as const;
