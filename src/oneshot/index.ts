/**
 * oneshot: one-shot entropic quantities computed by semidefinite programs, each with its optimiser
 * and the solver's certificate (one export line per module).
 */
export * from '../sdp/support.js';
export * from './hypothesis-testing.js';
export * from './conditional-min-max.js';
export * from './smooth-max.js';
export * from './max-information.js';
export * from './guessing.js';
export * from './diamond.js';
export * from './fidelity-sdp.js';
