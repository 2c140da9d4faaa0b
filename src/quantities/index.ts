/** quantities: entropies, divergences and metrics of states (one export line per module). */
export * from './entropy.js';
export * from './divergences.js';
export * from './measured.js';
export * from './fidelity.js';
export * from './distances.js';
export * from './chernoff.js';
export * from './metrics.js';
export * from './fisher.js';
export * from './expectation.js';
export * from './conditional.js';
export { alphaZRegion, alphaZBand, type AlphaZRegion } from './alpha-z-region.js';
