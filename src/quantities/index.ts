/** quantities: entropies, divergences and metrics of states (one export line per module). */
export * from './entropy.js';
export * from './divergences.js';
export * from './measured-relative-entropy.js';
