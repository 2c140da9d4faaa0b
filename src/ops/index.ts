/**
 * The ops layer as a library: `handle` (one request in, one answer out), the registry's listing, and the
 * codec between plain data and engine objects. Importing this module registers every op.
 */
import './all.js';

export {
  handle, handleAsync, requestSchema, COMMON_FIELDS, DEFAULT_BASE, DEFAULT_DEADLINE_MS, MAX_DEADLINE_MS, type Answer, type ErrorInfo, type HandleOptions,
} from './handle.js';
export { listOps, getOp, defineOp, type OpDefinition, type OpContext, type OpResult } from './registry.js';
export * as codec from './codec.js';
export { readExpression, MAX_EXPRESSION_LENGTH, loadExpressionReader } from './expressions.js';
export { warmUp, warmUpRequests, type WarmUpOptions, type WarmUpReport } from './warm-up.js';
