/**
 * Running a sweep into its output file: header, the points of this shard in index order, the refinements of
 * the search mode, the end line; resuming a file that an interrupted run left (Ctrl-C, a kill, a crash).
 *
 * Resume: the file's header must equal this run's (same spec hash, seed, engine version, shard), a torn
 * last line is cut off, and the run continues after the last whole line. Lines are written only in order
 * and only whole, so nothing is lost or duplicated whatever the moment of the kill. A finished file (its
 * end line present) is left as it is.
 *
 * Modes: "evaluate" writes every point; "first-violation" stops after the first point (in index order) whose
 * gap is below −tolerance, so the file is the same whatever the workers; "search" then refines the points
 * with the smallest gaps (src/sweep/search.ts) and writes one line per refinement. With --shard k/N the
 * search stops after its points (a shard cannot know the global best): merging the shards and running the
 * spec on the merged file does the refinement.
 *
 * Deliberately not here: evaluating (src/sweep/jobs.ts), threads (src/sweep/pool.ts), the command line.
 * Cost: the points' evaluations; lines are written in chunks (at most every 0.2 s) and synced every second.
 */
import { closeSync, existsSync, fdatasyncSync, ftruncateSync, openSync, statSync, writeSync } from 'node:fs';
import { RhoError } from '../errors.js';
import { makeHeader, readSweepFile, shardSize, type EndLine, type Shard } from './file.js';
import type { JobResult } from './jobs.js';
import { runInOrder } from './pool.js';
import type { Spec } from './spec.js';

export interface RunOptions {
  output: string;
  /** Worker threads; 0 runs in the calling thread. */
  workers: number;
  shard?: Shard;
  /** Called with (done, total) after each line, and once at the start. */
  onProgress?: (done: number, total: number) => void;
  /** True when the run should stop (Ctrl-C): lines already computed in order are still written. */
  stopping?: () => boolean;
}

export interface RunResult {
  /** The file has its end line. */
  complete: boolean;
  /** Point lines in the file (this shard's). */
  points: number;
  failures: number;
  violations: number;
  refined: number;
  stoppedAt?: number;
  /** Lines that were already in the file when the run started (resumed), and lines written now. */
  resumed: number;
  written: number;
  interrupted: boolean;
  seconds: number;
}

/** Candidates for refinement: the points with the smallest finite gaps (ties: smaller index first). */
export function refinementCandidates(gaps: Map<number, number>, count: number): number[] {
  return [...gaps.entries()]
    .filter(([, g]) => Number.isFinite(g))
    .sort((a, b) => a[1] - b[1] || a[0] - b[0])
    .slice(0, count)
    .map(([i]) => i);
}

function describeMismatch(had: Record<string, any>, want: Record<string, any>, output: string): string {
  const parts: string[] = [];
  if (had.specHash !== want.specHash) parts.push(`it was written for another spec (${had.specHash} ≠ ${want.specHash})`);
  if (had.seed !== want.seed) parts.push(`another seed (${had.seed})`);
  if (JSON.stringify(had.shard) !== JSON.stringify(want.shard)) parts.push(`another shard (${had.shard ? `${had.shard.index}/${had.shard.count}` : 'none'})`);
  if (had.engine?.version !== want.engine.version) parts.push(`another engine version (${had.engine?.version}; this is ${want.engine.version}), whose numbers may differ`);
  if (parts.length === 0) parts.push('its header differs from this run\'s');
  return `${output} holds another sweep: ${parts.join(', ')}. Choose another output file, or delete this one to start afresh.`;
}

export async function runSweep(spec: Spec, options: RunOptions): Promise<RunResult> {
  const t0 = performance.now();
  const shard = options.shard ?? { index: 0, count: 1 };
  if (!(Number.isInteger(shard.count) && shard.count >= 1 && Number.isInteger(shard.index) && shard.index >= 0 && shard.index < shard.count)) {
    throw new RhoError('invalid-argument', `A shard is k/N with 0 ≤ k < N, not ${shard.index}/${shard.count}.`);
  }
  const header = makeHeader(spec, shard);
  const headerText = JSON.stringify(header);
  const n = shardSize(spec.total, shard);
  const indexAt = (position: number) => shard.index + position * shard.count;
  const searchHere = spec.mode === 'search' && shard.count === 1;

  let points = 0, failures = 0, violations = 0, refined = 0, resumed = 0, written = 0;
  let stoppedAt: number | undefined;
  let complete = false;
  const gaps = new Map<number, number>();
  const tally = (v: Record<string, any>) => {
    if (v.failed) failures++;
    if (v.violated === true) violations++;
  };

  // Resume what an earlier run left.
  if (existsSync(options.output) && statSync(options.output).size > 0) {
    const file = readSweepFile(options.output);
    if (JSON.stringify(file.header) !== headerText) throw new RhoError('invalid-argument', describeMismatch(file.header, header, options.output));
    if (file.torn) {
      const fd = openSync(options.output, 'r+');
      ftruncateSync(fd, file.validBytes);
      closeSync(fd);
    }
    for (const [k, { value: v }] of file.lines.entries()) {
      const where = `line ${k + 2} of ${options.output}`;
      if (complete) throw new RhoError('invalid-argument', `${where} follows the end line: the file is damaged.`);
      if (v.end) {
        complete = true;
        stoppedAt = v.end.stoppedAt;
      } else if (v.refined !== undefined) {
        if (v.refined !== refined || points !== n && stoppedAt === undefined) throw new RhoError('invalid-argument', `${where} is out of order: the file is damaged.`);
        refined++;
        tally(v);
      } else {
        if (v.index !== indexAt(points) || refined > 0) throw new RhoError('invalid-argument', `${where} is point ${v.index}, expected ${indexAt(points)}: the file is damaged.`);
        points++;
        tally(v);
        if (typeof v.gap === 'number' && !v.failed) gaps.set(v.index, v.gap);
        else if (v.gap === '-Infinity') gaps.set(v.index, -Infinity);
        if (spec.mode === 'first-violation' && v.violated === true) stoppedAt = v.index;
      }
      resumed++;
    }
  } else {
    const fd = openSync(options.output, 'w');
    writeSync(fd, `${headerText}\n`);
    closeSync(fd);
  }

  const result = (interrupted: boolean): RunResult => ({
    complete, points, failures, violations, refined, stoppedAt, resumed, written, interrupted, seconds: (performance.now() - t0) / 1000,
  });
  if (complete) return result(false);

  const fd = openSync(options.output, 'a');
  let buffer: string[] = [];
  let bufferedBytes = 0;
  let lastSync = performance.now();
  const flush = (sync = false) => {
    if (buffer.length) {
      writeSync(fd, buffer.join(''));
      buffer = [];
      bufferedBytes = 0;
    }
    if (sync || performance.now() - lastSync > 1000) {
      fdatasyncSync(fd);
      lastSync = performance.now();
    }
  };
  const timer = setInterval(() => flush(), 200);
  const emit = (text: string) => {
    buffer.push(`${text}\n`);
    bufferedBytes += text.length + 1;
    written++;
    if (bufferedBytes > 1 << 20) flush();
  };
  const candidatesTotal = () => (searchHere ? Math.min(spec.search.refine, refinementCandidates(gaps, spec.search.refine).length) : 0);
  const totalWork = () => n + (searchHere ? spec.search.refine : 0);
  let interrupted = false;
  try {
    options.onProgress?.(points + refined, totalWork());
    if (points < n && stoppedAt === undefined) {
      const start = points;
      const run = await runInOrder(
        spec,
        n - start,
        (p) => ({ kind: 'point', index: indexAt(start + p) }),
        (r: JobResult) => {
          emit(r.line);
          points++;
          if (r.failed) failures++;
          if (r.violated) violations++;
          if (r.gap !== undefined && !r.failed) gaps.set(r.index, r.gap);
          options.onProgress?.(points + refined, totalWork());
          if (spec.mode === 'first-violation' && r.violated) {
            stoppedAt = r.index;
            return false;
          }
          return true;
        },
        { workers: options.workers, stopping: options.stopping },
      );
      if (run.stopped && stoppedAt === undefined) interrupted = true;
    }
    if (!interrupted && searchHere) {
      const candidates = refinementCandidates(gaps, spec.search.refine);
      const start = refined;
      if (start < candidates.length) {
        const run = await runInOrder(
          spec,
          candidates.length - start,
          (p) => ({ kind: 'refine', index: candidates[start + p], rank: start + p }),
          (r: JobResult) => {
            emit(r.line);
            refined++;
            if (r.failed) failures++;
            if (r.violated) violations++;
            options.onProgress?.(points + (spec.search.refine - candidatesTotal()) + refined, totalWork());
            return true;
          },
          { workers: Math.min(options.workers, candidates.length - start), stopping: options.stopping },
        );
        if (run.stopped) interrupted = true;
      }
    }
    if (!interrupted) {
      const end: EndLine = { end: { points, failures, violations } };
      if (stoppedAt !== undefined) end.end.stoppedAt = stoppedAt;
      if (searchHere) end.end.refined = refined;
      emit(JSON.stringify(end));
      complete = true;
    }
  } finally {
    clearInterval(timer);
    flush(true);
    closeSync(fd);
  }
  return result(interrupted);
}
