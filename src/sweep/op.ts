/**
 * The op `sweep-points`: evaluates some points (or refinements) of a sweep spec and answers their lines as
 * plain data, so that any client of the protocol can run a sweep: the Python package's `rhosigma.sweep`
 * sends chunks of indices to its long-lived engine (`rhosigma serve`), one engine per Dask worker.
 * A point's line is the one `rhosigma sweep` writes for it (src/sweep/jobs.ts), parsed.
 *
 * Registered here, in the sweep layer, rather than in src/ops: the sweep layer sits above the ops and calls
 * `handle` for every request of a point; the command (src/cli/sweep.ts) and the schema script import this
 * module. Deliberately not here: files, threads, ordering (the caller chooses the indices).
 * Cost: the points' evaluations; reading the spec once per distinct spec (the last few are kept).
 */
import { RhoError } from '../errors.js';
import { defineOp } from '../ops/registry.js';
import { engineVersion } from './file.js';
import { runJob, type Job } from './jobs.js';
import { readSpec, type Spec } from './spec.js';

/** Most points (or refinements) one request may evaluate. */
export const MAX_POINTS_PER_REQUEST = 10000;

const cache = new Map<string, Spec>();

function specFrom(value: unknown): Spec {
  const key = JSON.stringify(value);
  let spec = cache.get(key);
  if (!spec) {
    try {
      spec = readSpec(value);
    } catch (err) {
      if (err instanceof RhoError) throw new RhoError(err.code, err.message, err.path ? `spec.${err.path}` : 'spec', err.detail);
      throw err;
    }
    if (cache.size >= 8) cache.delete(cache.keys().next().value as string);
    cache.set(key, spec);
  }
  return spec;
}

defineOp({
  name: 'sweep-points',
  summary:
    'Evaluate points of a sweep spec (docs/sweeps.md) by index, or refine points for the search mode ("refine": [[index, rank], ...]); value: their lines as `rhosigma sweep` writes them, plus the spec\'s hash, its number of points and the engine version.',
  args: {
    type: 'object',
    properties: {
      spec: { type: 'object', description: 'A sweep spec, version 1 (schema/sweep.schema.json).' },
      indices: {
        type: 'array',
        maxItems: MAX_POINTS_PER_REQUEST,
        items: { type: 'integer', minimum: 0 },
        description: 'The points to evaluate.',
      },
      refine: {
        type: 'array',
        maxItems: MAX_POINTS_PER_REQUEST,
        items: { type: 'array', minItems: 2, maxItems: 2, items: { type: 'integer', minimum: 0 } },
        description: 'Points to refine (search mode), each as [index, rank]; rank is the place among the best points.',
      },
    },
    required: ['spec'],
  },
  run(req) {
    const spec = specFrom(req.spec);
    const jobs: Job[] = [];
    for (const [k, i] of ((req.indices ?? []) as number[]).entries()) {
      if (i >= spec.total) throw new RhoError('invalid-argument', `The sweep has ${spec.total} points; there is no point ${i}.`, `indices[${k}]`);
      jobs.push({ kind: 'point', index: i });
    }
    if (req.refine !== undefined && spec.mode !== 'search') {
      throw new RhoError('invalid-argument', 'Refinements belong to the search mode; this spec\'s mode is not "search".', 'refine');
    }
    for (const [k, [i, rank]] of ((req.refine ?? []) as number[][]).entries()) {
      if (i >= spec.total) throw new RhoError('invalid-argument', `The sweep has ${spec.total} points; there is no point ${i}.`, `refine[${k}][0]`);
      jobs.push({ kind: 'refine', index: i, rank });
    }
    if (jobs.length > MAX_POINTS_PER_REQUEST) {
      throw new RhoError('too-large', `At most ${MAX_POINTS_PER_REQUEST} points per request.`, 'indices', { limit: MAX_POINTS_PER_REQUEST });
    }
    const lines = jobs.map((j) => JSON.parse(runJob(spec, j).line) as unknown);
    return { value: lines, specHash: spec.hash, points: spec.total, mode: spec.mode, engine: { version: engineVersion() } };
  },
});
