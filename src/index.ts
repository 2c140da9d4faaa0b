/** rhosigma as a library: the engine's layers. */
export * as linalg from './linalg/index.js';
