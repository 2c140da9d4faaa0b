/**
 * The workbench's scenarios: one configuration per calculator, each a small situation of our own
 * invention (demo data, not test data: tests check answers against the engine and outside references).
 *
 * What it does not do: compute anything (the numbers here are inputs, written out by hand).
 * Cost: none.
 */
import type { EmbedConfig } from './config.js';

/** 0.85·|Φ⁺⟩⟨Φ⁺| + 0.15·I/4: a Bell pair from a source with 15 % white noise. */
const NOISY_PAIR = {
  matrix: [
    [0.4625, 0, 0, 0.425],
    [0, 0.0375, 0, 0],
    [0, 0, 0.0375, 0],
    [0.425, 0, 0, 0.4625],
  ],
  dims: [2, 2],
  labels: ['A', 'B'],
};

/** 0.7·|GHZ⟩⟨GHZ| + 0.3·I/8 on three qubits: a relay A → B → C whose middle qubit holds a copy. */
function relay(): { matrix: number[][]; dims: number[]; labels: string[] } {
  const m: number[][] = Array.from({ length: 8 }, (_, i) => Array.from({ length: 8 }, (_, j) => (i === j ? 0.0375 : 0)));
  m[0][0] = m[7][7] = 0.3875;
  m[0][7] = m[7][0] = 0.35;
  return { matrix: m, dims: [2, 2, 2], labels: ['A', 'B', 'C'] };
}

export interface Scenario {
  /** The element id on the workbench page (and so the key of its shared links). */
  id: string;
  config: EmbedConfig;
}

export const SCENARIOS: Scenario[] = [
  {
    id: 'noisy-pair',
    config: {
      version: 1,
      calculator: 'divergence',
      title: 'How far is a noisy Bell pair from white noise?',
      description: 'A source meant to emit |Φ⁺⟩ mixes in 15 % white noise. Compare its output ρ with the maximally mixed σ = I/4; edit either matrix or change the family and α.',
      inputs: { rho: NOISY_PAIR, sigma: { matrix: [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]], dims: [2, 2] }, family: 'petz', alpha: 0.5 },
    },
  },
  {
    id: 'relay',
    config: {
      version: 1,
      calculator: 'recoverability',
      title: 'Can the relay station rebuild what it forwarded?',
      description: 'Three qubits A, B, C share a GHZ state with 30 % noise. How well can a map acting on B alone recover C, measured by the conditional mutual information and the Petz recovery map?',
      inputs: { rho: relay(), a: [0], b: [1], c: [2], quantity: 'petz-recovery' },
    },
  },
  {
    id: 'three-sources',
    config: {
      version: 1,
      calculator: 'guessing',
      title: 'Which of three sources fired?',
      description: 'Source x ∈ {0, 1, 2} fires with probabilities 0.5, 0.3, 0.2 and leaves a qubit: |0⟩, |+⟩ or the maximally mixed state. The best measurement guesses x with the probability shown.',
      inputs: {
        probabilities: [0.5, 0.3, 0.2],
        states: [{ ket: [1, 0] }, { ket: ['1/sqrt(2)', '1/sqrt(2)'] }, { matrix: [[0.5, 0], [0, 0.5]] }],
        quantity: 'guessing-probability',
      },
    },
  },
  {
    id: 'tilted-key',
    config: {
      version: 1,
      calculator: 'one-shot',
      title: 'How much of a key bit leaks through a tilted qubit?',
      description: 'A uniform key bit A is copied onto a qubit B held by an eavesdropper: |0⟩ for 0, cos(π/8)|0⟩ + sin(π/8)|1⟩ for 1. The conditional min-entropy H_min(A|B) bounds the extractable key.',
      inputs: {
        quantity: 'conditional-min-entropy',
        rho: {
          matrix: [
            ['1/2', 0, 0, 0],
            [0, 0, 0, 0],
            [0, 0, 'cos(pi/8)^2/2', 'cos(pi/8)*sin(pi/8)/2'],
            [0, 0, 'cos(pi/8)*sin(pi/8)/2', 'sin(pi/8)^2/2'],
          ],
          dims: [2, 2],
          labels: ['A', 'B'],
        },
        a: [0],
        b: [1],
      },
    },
  },
];
