/**
 * The test page of the UI components (test/browser/ui.test.ts, bench/browser-ui.ts): two state editors
 * (ρ and σ, two qubits), a channel editor, and the four calculators wired to them through one real
 * EngineClient (the engine's web worker, bundled by webpack beside this page). Everything is exposed on
 * `window.rs` for the test to drive and read. The scenario (a lightly correlated two-qubit ρ against the
 * maximally mixed σ) is our own.
 */
import { EngineClient } from '../../../src/worker/client.js';
import { SharedRequests } from '../../../src/widgets/engine.js';
import {
  ChannelEditor, DivergenceCalculator, GuessingCalculator, OneShotCalculator, RecoverabilityCalculator, StateEditor,
} from '../../../src/ui/index.js';

const engine = new EngineClient();
const box = (id: string) => document.getElementById(id)!;

const rho = new StateEditor(box('rho'), {
  engine, label: 'ρ',
  value: { matrix: [[0.4, 0, 0, 0.1], [0, 0.2, 0, 0], [0, 0, 0.2, 0], [0.1, 0, 0, 0.2]], dims: [2, 2], labels: ['A', 'B'] },
});
const sigma = new StateEditor(box('sigma'), {
  engine, label: 'σ', presets: false,
  value: { matrix: [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]], dims: [2, 2] },
});
const channel = new ChannelEditor(box('channel'), { engine, label: 'Channel' });
const divergence = new DivergenceCalculator(box('divergence'), { engine, inputs: { rho: rho.value, sigma: sigma.value } });
const oneShot = new OneShotCalculator(box('oneshot'), { engine, inputs: { rho: rho.value, sigma: sigma.value } });
const tri = [0.3, 0.1, 0.1, 0.05, 0.05, 0.1, 0.1, 0.2];
const recoverability = new RecoverabilityCalculator(box('recoverability'), {
  engine,
  inputs: { rho: { matrix: tri.map((x, i) => tri.map((_, j) => (i === j ? x : 0))), dims: [2, 2, 2] } },
});
const guessing = new GuessingCalculator(box('guessing'), {
  engine,
  inputs: { probabilities: [0.5, 0.5], states: [{ matrix: [[1, 0], [0, 0]] }, { matrix: [[0.5, 0.5], [0.5, 0.5]] }] },
});
/** The bench can leave the one-shot calculator (an SDP per edit) out of the edits, to time the divergences alone. */
const wiring = { oneShot: true };
rho.on('change', (v) => {
  divergence.inputs = { rho: v };
  if (wiring.oneShot) oneShot.inputs = { rho: v };
});
sigma.on('change', (v) => {
  divergence.inputs = { sigma: v };
  oneShot.inputs = { sigma: v };
});

(window as unknown as { rs: unknown }).rs = { EngineClient, SharedRequests, wiring, engine, rho, sigma, channel, divergence, oneShot, recoverability, guessing };
document.body.dataset.ready = 'true';
