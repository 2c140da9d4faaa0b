/**
 * The page's engine (docs/surfaces.md: one worker per page, shared by every component on it): the
 * `EngineClient` of src/worker, made on first use. The engine runs in that web worker, never on the
 * page's main thread.
 *
 * Deliberately not here: any numerics. Cost: the worker's start (about 100 ms) on first use.
 */
import { EngineClient } from '../worker/client.js';
import type { EngineLike } from '../worker/types.js';

let client: EngineLike | null = null;

export function pageEngine(): EngineLike {
  client ??= new EngineClient();
  return client;
}

/** Tests and embedding pages may hand in their own engine (the same contract). */
export function setPageEngine(engine: EngineLike): void {
  client = engine;
}
