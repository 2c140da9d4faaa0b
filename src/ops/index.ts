/**
 * The ops layer as a library: `handle` (one request in, one answer out), the registry's listing, and the
 * codec between plain data and engine objects. Importing this module registers every op.
 */
import './all.js';

export { handle, requestSchema, COMMON_FIELDS, DEFAULT_BASE, type Answer, type ErrorInfo } from './handle.js';
export { listOps, getOp, defineOp, type OpDefinition, type OpContext, type OpResult } from './registry.js';
export * as codec from './codec.js';
export { readExpression, MAX_EXPRESSION_LENGTH } from './expressions.js';
