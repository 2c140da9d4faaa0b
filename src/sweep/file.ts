/**
 * The sweep output file, JSON Lines: a header line, one line per point (in index order within the shard),
 * for the search mode one line per refined point, and an end line (docs/sweeps.md, "The output").
 *
 *   {"rhosigma": "sweep", "format": 1, "specHash", "seed", "engine": {"version"}, "points", "mode",
 *    "shard"?: {"index", "count"}, "spec"}
 *   ...point lines (src/sweep/point.ts)... refined lines (src/sweep/jobs.ts)...
 *   {"end": {"points", "failures", "violations", "stoppedAt"?, "refined"?}}
 *
 * Nothing in a line depends on time, thread or machine, so a run's file is the same byte for byte whatever
 * the workers or sharding. Reading tolerates one torn last line (a kill during a write) and nothing else.
 *
 * Deliberately not here: running (src/sweep/runner.ts). Cost: reading parses every line once.
 */
import { readFileSync } from 'node:fs';
import { RhoError } from '../errors.js';
import type { Json, Spec } from './spec.js';
import { engineVersion } from './engine-version.js';

export { engineVersion };

export const FILE_FORMAT = 1;

export interface Shard {
  index: number;
  count: number;
}

export interface Header {
  rhosigma: 'sweep';
  format: number;
  specHash: string;
  seed: number;
  engine: { version: string };
  points: number;
  mode: Spec['mode'];
  shard?: Shard;
  spec: Record<string, Json>;
}

export function makeHeader(spec: Spec, shard?: Shard): Header {
  const h: Header = {
    rhosigma: 'sweep',
    format: FILE_FORMAT,
    specHash: spec.hash,
    seed: spec.seed,
    engine: { version: engineVersion() },
    points: spec.total,
    mode: spec.mode,
    spec: spec.source,
  };
  if (shard && shard.count > 1) {
    const { spec: s, ...rest } = h;
    return { ...rest, shard, spec: s };
  }
  return h;
}

export interface EndLine {
  end: { points: number; failures: number; violations: number; stoppedAt?: number; refined?: number };
}

/** The positions of a shard: point indices shard.index, shard.index + count, ... below total. */
export function shardSize(total: number, shard: Shard): number {
  return shard.index >= total ? 0 : Math.floor((total - 1 - shard.index) / shard.count) + 1;
}

export interface ParsedFile {
  header: Header;
  /** Each line after the header, parsed, with its text (without newline). */
  lines: { text: string; value: Record<string, any> }[];
  /** Byte length of the whole lines (a torn last line excluded). */
  validBytes: number;
  torn: boolean;
}

/** Reads a sweep file; `what` names it in errors. Throws RhoError on anything but a torn last line. */
export function readSweepFile(path: string, what = path): ParsedFile {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (err) {
    throw new RhoError('invalid-argument', `Cannot read ${what}: ${(err as NodeJS.ErrnoException).code ?? String(err)}.`);
  }
  return parseSweepText(text, what);
}

export function parseSweepText(text: string, what: string): ParsedFile {
  const lastNewline = text.lastIndexOf('\n');
  const torn = lastNewline !== text.length - 1;
  const whole = text.slice(0, lastNewline + 1);
  const rows = whole === '' ? [] : whole.slice(0, -1).split('\n');
  if (rows.length === 0) throw new RhoError('invalid-argument', `${what} has no complete header line: it is not a sweep output (or was cut before its first line).`);
  let header: Header;
  try {
    header = JSON.parse(rows[0]);
  } catch {
    throw new RhoError('invalid-argument', `${what} does not start with a sweep header line; refusing to touch it.`);
  }
  if (header?.rhosigma !== 'sweep' || typeof header.specHash !== 'string') {
    throw new RhoError('invalid-argument', `${what} does not start with a sweep header line; refusing to touch it.`);
  }
  const lines = rows.slice(1).map((t, k) => {
    try {
      return { text: t, value: JSON.parse(t) as Record<string, any> };
    } catch {
      throw new RhoError('invalid-argument', `Line ${k + 2} of ${what} is not JSON: the file is damaged (only a torn last line is expected after a kill).`);
    }
  });
  return { header, lines, validBytes: Buffer.byteLength(whole), torn };
}
