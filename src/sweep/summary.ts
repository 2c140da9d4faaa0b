/**
 * What a sweep output says, in brief: how many points, failures (by error code) and violations; the
 * smallest and largest value and gap with the point they occur at; each violation (the first 20 in full)
 * with the command that prints its reproducing requests.
 *
 * Evidence, not proof: a gap above zero at every sampled point says the inequality held there, not that it
 * holds; a gap within the tolerance of zero is reported as holding (the tolerance is the spec's).
 * Deliberately not here: reading files (src/sweep/file.ts), plots (src/sweep/plot.ts).
 * Cost: one pass over the lines.
 */
import type { ParsedFile } from './file.js';

export interface Extreme {
  at: number;
  refined?: number;
  parameters: Record<string, unknown>;
  value: number;
}

export interface Summary {
  title?: string;
  specHash: string;
  seed: number;
  engine: string;
  mode: string;
  complete: boolean;
  points: number;
  total: number;
  refined: number;
  failures: { count: number; byCode: Record<string, number> };
  violations: { count: number; first: { index: number; refined?: number; parameters: unknown; left: unknown; right: unknown; gap: unknown }[] };
  value?: { min: Extreme; max: Extreme };
  gap?: { min: Extreme; max: Extreme };
  stoppedAt?: number;
}

function num(v: unknown): number | undefined {
  if (typeof v === 'number') return v;
  if (v === 'Infinity') return Infinity;
  if (v === '-Infinity') return -Infinity;
  return undefined;
}

export function summarize(file: ParsedFile): Summary {
  const h = file.header;
  const s: Summary = {
    title: typeof h.spec.title === 'string' ? h.spec.title : undefined,
    specHash: h.specHash,
    seed: h.seed,
    engine: h.engine.version,
    mode: h.mode,
    complete: false,
    points: 0,
    total: h.points,
    refined: 0,
    failures: { count: 0, byCode: {} },
    violations: { count: 0, first: [] },
  };
  const track = (key: 'value' | 'gap', x: number | undefined, v: Record<string, any>) => {
    if (x === undefined) return;
    const e: Extreme = { at: v.index, parameters: v.parameters, value: x };
    if (v.refined !== undefined) e.refined = v.refined;
    const cur = s[key];
    if (!cur) s[key] = { min: e, max: e };
    else {
      if (x < cur.min.value) cur.min = e;
      if (x > cur.max.value) cur.max = e;
    }
  };
  for (const { value: v } of file.lines) {
    if (v.end) {
      s.complete = true;
      s.stoppedAt = v.end.stoppedAt;
      continue;
    }
    if (v.refined !== undefined) s.refined++;
    else s.points++;
    if (v.failed) {
      s.failures.count++;
      const code = String(v.failed.error?.code ?? 'unknown');
      s.failures.byCode[code] = (s.failures.byCode[code] ?? 0) + 1;
      continue;
    }
    track('value', num(v.value), v);
    track('gap', num(v.gap), v);
    if (v.violated === true) {
      s.violations.count++;
      if (s.violations.first.length < 20) {
        const e: Summary['violations']['first'][number] = { index: v.index, parameters: v.parameters, left: v.left, right: v.right, gap: v.gap };
        if (v.refined !== undefined) e.refined = v.refined;
        s.violations.first.push(e);
      }
    }
  }
  return s;
}

const fmt = (x: unknown) => (typeof x === 'number' ? x.toPrecision(6) : String(x));
const params = (p: unknown) => JSON.stringify(p);

export function formatSummary(s: Summary, file = 'FILE'): string {
  const out: string[] = [];
  out.push(`${s.title ? `${s.title}\n` : ''}sweep ${s.specHash.slice(0, 19)}…, seed ${s.seed}, engine ${s.engine}, mode ${s.mode}`);
  out.push(`points: ${s.points} of ${s.total}${s.refined ? `, refined: ${s.refined}` : ''}${s.complete ? '' : ' (not finished: run the spec again on this file to resume)'}${s.stoppedAt !== undefined ? `; stopped at the first violation, point ${s.stoppedAt}` : ''}`);
  const codes = Object.entries(s.failures.byCode).map(([c, n]) => `${c} ×${n}`).join(', ');
  out.push(`failures: ${s.failures.count}${codes ? ` (${codes})` : ''}`);
  for (const key of ['value', 'gap'] as const) {
    const e = s[key];
    if (!e) continue;
    const where = (x: Extreme) => `${x.refined !== undefined ? `refinement ${x.refined} of ` : ''}point ${x.at} ${params(x.parameters)}`;
    out.push(`${key}: min ${fmt(e.min.value)} at ${where(e.min)}; max ${fmt(e.max.value)} at ${where(e.max)}`);
  }
  if (s.gap) {
    out.push(`violations: ${s.violations.count}${s.violations.count === 0 ? ' (the inequality held at every point evaluated, within the tolerance: numerical evidence, not a proof)' : ''}`);
    for (const v of s.violations.first) {
      const which = v.refined !== undefined ? `--refined ${v.refined}` : `--index ${v.index}`;
      out.push(`  point ${v.index}${v.refined !== undefined ? ` (refinement ${v.refined})` : ''} ${params(v.parameters)}: left ${fmt(v.left)}, right ${fmt(v.right)}, gap ${fmt(v.gap)}; reproduce: rhosigma sweep replay ${file} ${which} | rhosigma compute`);
    }
    if (s.violations.count > s.violations.first.length) out.push(`  … and ${s.violations.count - s.violations.first.length} more (--json lists the first 20; the file has them all)`);
  }
  return `${out.join('\n')}\n`;
}
