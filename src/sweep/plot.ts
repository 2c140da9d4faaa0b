/**
 * A plot of a sweep output: a Vega-Lite specification built from the file's lines (the project's plotting
 * library, the same the front end uses), compiled to Vega and rendered to SVG in Node (no browser, no canvas).
 *
 * Default axes: x the first parameter (else the point index), y the gap when the spec has an inequality
 * (else the value), colour the second parameter. Failed points are left out and counted in the subtitle;
 * violations are drawn as crosses, and a rule marks gap = 0.
 * vega and vega-lite are loaded by import() in plotSvg, not imported at the top: vega's canvas module awaits
 * at its top level, which Node's require() refuses, and the command's one-file CommonJS bundle turns top
 * imports of a package it leaves outside into require() (`sweep plot` failed there).
 * Deliberately not here: any styling of the front end, any numerics. Cost: linear in the number of points.
 */
import type { TopLevelSpec } from 'vega-lite';
import { RhoError } from '../errors.js';
import type { ParsedFile } from './file.js';

export interface PlotOptions {
  x?: string;
  y?: string;
  color?: string;
}

function num(v: unknown): number | undefined {
  if (typeof v === 'number') return v;
  if (v === 'Infinity' || v === '-Infinity') return undefined; // not drawable; counted as left out
  return undefined;
}

export function plotSpec(file: ParsedFile, options: PlotOptions = {}): TopLevelSpec {
  const spec = file.header.spec as Record<string, any>;
  const names = Object.keys(spec.parameters ?? {});
  const hasInequality = spec.inequality !== undefined;
  const y = options.y ?? (hasInequality ? 'gap' : 'value');
  if (!['value', 'gap', 'left', 'right'].includes(y)) throw new RhoError('invalid-argument', `--y takes value, gap, left or right, not "${y}".`);
  if (y !== 'value' && !hasInequality) throw new RhoError('invalid-argument', `The spec has no inequality, so there is no ${y} to plot; use --y value.`);
  const x = options.x ?? names[0] ?? 'index';
  if (x !== 'index' && !names.includes(x)) throw new RhoError('invalid-argument', `--x names no parameter of this sweep (${names.join(', ') || 'it has none'}); "index" plots by point.`);
  const color = options.color ?? names.find((n) => n !== x);
  if (color !== undefined && !names.includes(color)) throw new RhoError('invalid-argument', `--color names no parameter of this sweep (${names.join(', ')}).`);
  const rows: Record<string, unknown>[] = [];
  let failed = 0, notNumeric = 0;
  for (const { value: v } of file.lines) {
    if (v.end) continue;
    if (v.failed) {
      failed++;
      continue;
    }
    const yv = num(v[y]);
    if (yv === undefined) {
      notNumeric++;
      continue;
    }
    rows.push({
      x: x === 'index' ? v.index : v.parameters[x],
      y: yv,
      ...(color ? { color: v.parameters[color] } : {}),
      kind: v.refined !== undefined ? 'refined' : v.violated === true ? 'violation' : 'point',
    });
  }
  if (rows.length === 0) throw new RhoError('invalid-argument', `The file has no point with a numeric ${y} to plot.`);
  const left = [failed ? `${failed} failed` : '', notNumeric ? `${notNumeric} not finite or not a number` : ''].filter(Boolean).join(', ');
  const xNumeric = rows.every((r) => typeof r.x === 'number');
  const layers: any[] = [
    {
      mark: { type: 'point', filled: true, opacity: 0.6, size: 24 },
      encoding: {
        x: { field: 'x', type: xNumeric ? 'quantitative' : 'nominal', title: x },
        y: { field: 'y', type: 'quantitative', title: y },
        shape: { field: 'kind', type: 'nominal', title: 'point', scale: { domain: ['point', 'violation', 'refined'], range: ['circle', 'cross', 'diamond'] } },
        ...(color ? { color: { field: 'color', type: rows.every((r) => typeof r.color === 'number') ? 'ordinal' : 'nominal', title: color } } : {}),
      },
    },
  ];
  if (y === 'gap') layers.push({ data: { values: [{ zero: 0 }] }, mark: { type: 'rule', strokeDash: [4, 3], color: '#888' }, encoding: { y: { field: 'zero', type: 'quantitative' } } });
  const title = typeof spec.title === 'string' ? spec.title : `sweep ${file.header.specHash.slice(7, 19)}`;
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: title, subtitle: `${rows.length} points${left ? `; left out: ${left}` : ''}; seed ${file.header.seed}` },
    width: 480,
    height: 300,
    data: { values: rows },
    layer: layers,
  } as TopLevelSpec;
}

/** The SVG text and the Vega-Lite specification it was rendered from. */
export async function plotSvg(file: ParsedFile, options: PlotOptions = {}): Promise<{ svg: string; vegaLite: TopLevelSpec }> {
  const vegaLite = plotSpec(file, options);
  const [vega, { compile }] = await Promise.all([import('vega'), import('vega-lite')]);
  const view = new vega.View(vega.parse(compile(vegaLite).spec), { renderer: 'none' });
  const svg = await view.toSVG();
  view.finalize();
  return { svg: svg.endsWith('\n') ? svg : `${svg}\n`, vegaLite };
}
