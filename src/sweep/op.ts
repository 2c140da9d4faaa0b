/**
 * The op `sweep-points`: evaluates some points (or refinements) of a sweep spec and answers their lines as
 * plain data, so that any client of the protocol can run a sweep: the Python package's `rhosigma.sweep`
 * sends chunks of indices to its long-lived engine (`rhosigma serve`), one engine per Dask worker.
 * A point's line is the one `rhosigma sweep` writes for it (src/sweep/jobs.ts), parsed.
 *
 * Registered here, in the sweep layer, rather than in src/ops: the sweep layer sits above the ops and calls
 * `handle` for every request of a point; the command (src/cli/sweep.ts) and the schema script import this
 * module. Deliberately not here: files, threads, ordering (the caller chooses the indices).
 * Deadline: every request of a point is bounded by its own limits and deadline, and by this request's.
 * Between points the op looks at its deadline: when it has passed, the answer holds the lines done so far
 * with "complete": false (a point that failed only because this request's deadline passed is left out),
 * and the client asks again for the rest. A client that wants each point bounded as `rhosigma sweep`
 * bounds it gives this request a long "deadline" and sends a few hundred points at a time.
 * Cost: the points' evaluations; reading the spec once per distinct spec (the last few are kept).
 */
import { RhoError } from '../errors.js';
import { deadlinePassed } from '../deadline.js';
import { plain } from '../ops/cost.js';
import { defineOp } from '../ops/registry.js';
import { engineVersion } from './engine-version.js';
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
  // Each request of a point is checked against the limits by its own handle call; this estimate only
  // bounds the number of points (a sweep point is at least a few small requests).
  cost: (req) => {
    const n = (Array.isArray(req.indices) ? req.indices.length : 0) + (Array.isArray(req.refine) ? req.refine.length : 0);
    return plain(n * 1e5, 1e5 * Math.max(1, n), `${n} points of a sweep (each of their requests is bounded by its own limits)`);
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
    const lines: unknown[] = [];
    let complete = true;
    for (const job of jobs) {
      if (deadlinePassed()) {
        complete = false;
        break;
      }
      const line = JSON.parse(runJob(spec, job).line) as { failed?: { error?: { code?: string } } };
      if (line.failed?.error?.code === 'deadline-exceeded' && deadlinePassed()) {
        complete = false; // this request's deadline, not the point's own: the client asks again
        break;
      }
      lines.push(line);
    }
    return { value: lines, complete, specHash: spec.hash, points: spec.total, mode: spec.mode, engine: { version: engineVersion() } };
  },
});
