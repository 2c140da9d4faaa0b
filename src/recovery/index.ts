/**
 * recovery: Markov recoverability of tripartite states — the Petz recovery map and its rotated
 * versions (petz.ts), the fidelity of recovery as an SDP (fidelity-of-recovery.ts), and the
 * bookkeeping of the groups A, B, C (tripartite.ts). One export line per module.
 */
export * from './tripartite.js';
export * from './petz.js';
export * from './fidelity-of-recovery.js';
export * from './petz-map.js';
export * from './data-processing.js';
export * from './markov-structure.js';
export * from './commuting-square.js';
