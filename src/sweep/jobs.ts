/**
 * One unit of sweep work and the line it writes: a point (its evaluation) or a refinement (the search mode's
 * local refinement of one of the best points). Run the same way in the main thread, in a worker thread and
 * in the `sweep-points` op, so a line never depends on where it was computed.
 *
 * Refined line: {"refined": rank, "index", "parameters", "sample", "evaluations", "start", "left", "right",
 * "gap", "violated", "reproduce"} (or "failed" when the point's evaluation fails), "start" the gap before.
 *
 * Deliberately not here: scheduling, files (src/sweep/runner.ts). Cost: that of the evaluation.
 */
import { evaluatePoint, pointLine } from './point.js';
import { refinePoint } from './search.js';
import type { Json, Spec } from './spec.js';

export type Job = { kind: 'point'; index: number } | { kind: 'refine'; index: number; rank: number };

/** A finished job: its line and what the runner tallies. */
export interface JobResult {
  line: string;
  index: number;
  gap?: number;
  violated: boolean;
  failed: boolean;
}

function num(x: number): Json {
  return x === Infinity ? 'Infinity' : x === -Infinity ? '-Infinity' : x;
}

export function runJob(spec: Spec, job: Job): JobResult {
  if (job.kind === 'point') {
    const o = evaluatePoint(spec, job.index);
    return { line: pointLine(o), index: job.index, gap: o.gap, violated: o.violated === true, failed: o.failed !== undefined };
  }
  const { start, best, evaluations } = refinePoint(spec, job.index);
  const line: Record<string, Json> = { refined: job.rank, index: job.index, parameters: best.parameters, sample: best.sample };
  if (best.failed) {
    line.failed = best.failed as unknown as Json;
  } else {
    line.evaluations = evaluations;
    line.start = num(start.gap!);
    line.left = num(best.left!);
    line.right = num(best.right!);
    line.gap = num(best.gap!);
    line.violated = best.violated!;
    line.reproduce = best.requests as unknown as Json;
  }
  return { line: JSON.stringify(line), index: job.index, gap: best.gap, violated: best.violated === true, failed: best.failed !== undefined };
}
