/**
 * Joining the outputs of `rhosigma sweep SPEC --shard k/N` (k = 0..N−1) into exactly the file one run of the
 * spec writes: the header without "shard", the point lines interleaved by index, the end line counted anew.
 * For "first-violation" the merged file ends at the smallest violating index over all shards, as one run
 * would; for "search" it holds the sampled points and no end line, which is what one run has written when
 * it starts refining: run the spec on the merged file to do the refinement (it resumes there).
 *
 * Every shard must be finished (its end line present), all from the same spec, seed and engine version,
 * each shard once. Deliberately not here: running anything. Cost: reads every shard once, holds them in memory.
 */
import { RhoError } from '../errors.js';
import { readSweepFile, shardSize, type EndLine, type Header, type ParsedFile } from './file.js';

/** The merged file's text. */
export function mergeShards(paths: readonly string[]): string {
  if (paths.length === 0) throw new RhoError('missing-argument', 'Give the shard files to merge.');
  const files = paths.map((p) => ({ path: p, file: readSweepFile(p) }));
  const strip = (h: Header) => {
    const { shard: _s, ...rest } = h;
    return JSON.stringify(rest);
  };
  const first = files[0].file.header;
  const count = first.shard?.count ?? 1;
  const byIndex = new Map<number, { path: string; file: ParsedFile }>();
  for (const f of files) {
    const h = f.file.header;
    if (strip(h) !== strip(first)) {
      throw new RhoError('invalid-argument', `${f.path} is from another sweep than ${files[0].path} (spec, seed, mode or engine version differ).`);
    }
    const c = h.shard?.count ?? 1;
    const k = h.shard?.index ?? 0;
    if (c !== count) throw new RhoError('invalid-argument', `${f.path} is shard ${k}/${c}, but ${files[0].path} is one of ${count}.`);
    if (byIndex.has(k)) throw new RhoError('invalid-argument', `${f.path} and ${byIndex.get(k)!.path} are both shard ${k}/${count}.`);
    if (f.file.torn) throw new RhoError('invalid-argument', `${f.path} ends in a torn line: resume that shard first.`);
    const last = f.file.lines[f.file.lines.length - 1]?.value;
    if (!last?.end) throw new RhoError('invalid-argument', `${f.path} (shard ${k}/${count}) is not finished: run that shard again to resume it.`);
    byIndex.set(k, f);
  }
  const missing = Array.from({ length: count }, (_, k) => k).filter((k) => !byIndex.has(k));
  if (missing.length) throw new RhoError('missing-argument', `Shards ${missing.map((k) => `${k}/${count}`).join(', ')} are missing.`);

  const total = first.points;
  const mode = first.mode;
  // The stopping point of a first-violation run: the smallest index at which any shard stopped.
  let limit = total - 1;
  for (const { file } of byIndex.values()) {
    const end = (file.lines[file.lines.length - 1].value as EndLine).end;
    if (end.stoppedAt !== undefined) limit = Math.min(limit, end.stoppedAt);
  }
  const lines: string[] = [];
  let points = 0, failures = 0, violations = 0;
  for (let i = 0; i <= limit; i++) {
    const k = i % count;
    const { path, file } = byIndex.get(k)!;
    const position = (i - k) / count;
    const row = file.lines[position];
    if (!row || row.value.index !== i) {
      const size = shardSize(total, { index: k, count });
      throw new RhoError('invalid-argument', `${path} lacks point ${i} (it holds ${Math.min(size, file.lines.length - 1)} of its ${size} points).`);
    }
    lines.push(row.text);
    points++;
    if (row.value.failed) failures++;
    if (row.value.violated === true) violations++;
  }
  const { shard: _s, ...header } = first;
  const out = [JSON.stringify(header), ...lines];
  if (mode !== 'search') {
    const end: EndLine = { end: { points, failures, violations } };
    if (limit < total - 1 || (mode === 'first-violation' && violations > 0)) end.end.stoppedAt = limit;
    out.push(JSON.stringify(end));
  }
  return `${out.join('\n')}\n`;
}
