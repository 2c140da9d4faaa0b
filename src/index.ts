/**
 * rhosigma as a library. Each layer is a namespace; `ops.handle` is the plain-data door that every
 * surface (command, worker, embed, kernel bridge) uses.
 */
export * as linalg from './linalg/index.js';
export * as quantum from './quantum/index.js';
export * as quantities from './quantities/index.js';
export * as sdp from './sdp/index.js';
export * as oneshot from './oneshot/index.js';
export * as ops from './ops/index.js';
export { RhoError, type ErrorCode } from './errors.js';
export * as recovery from './recovery/index.js';
export * as guessing from './guessing/index.js';
