/**
 * Plots through Vega: the few charts the components draw are written here as Vega specs (what Vega-Lite
 * compiled them to before, without the Vega-Lite compiler, which was the largest part of a page's
 * download), rendered by vega as SVG into a container, with vega's expression interpreter instead of its
 * code generator (no `new Function`, so plots work under a strict Content-Security-Policy, as the wiki
 * embeds need). Colours, axis text included, are read from the component's CSS custom properties
 * (--rs-chart-*), so light and dark themes (JupyterLab's --jp-* variables, or --rs-* overrides) apply;
 * a chart is redrawn in the new colours when the reader's colour scheme or JupyterLab's theme changes.
 *
 * The components load this module with import() when they first draw (a chunk of its own in the embed).
 * Deliberately not here: the data (answers of the engine, passed in), any numerics.
 * Cost: one vega parse per render (milliseconds for our small charts).
 */
import { parse, View } from './vega-core.js';
import { expressionInterpreter } from 'vega-interpreter';

export interface ChartTheme {
  text: string;
  grid: string;
  line: string;
  band: string;
  mark: string;
  font: string;
}

/**
 * The theme colours a chart uses, read from CSS custom properties on `host`; where one is unset (the
 * stylesheet not loaded yet, a page without it) the text colour falls back to the element's own `color`,
 * so axis labels are never dark grey on a dark page.
 */
export function chartTheme(host: Element): ChartTheme {
  const cs = getComputedStyle(host);
  const v = (name: string, fallback: string) => cs.getPropertyValue(name).trim() || fallback;
  const text = v('--rs-chart-text', cs.color || '#333');
  return {
    text,
    grid: v('--rs-chart-grid', '#ddd'),
    line: v('--rs-chart-line', '#2a6f97'),
    band: v('--rs-chart-band', '#b7e4c7'),
    mark: v('--rs-chart-mark', '#c1121f'),
    font: v('--rs-font', 'sans-serif'),
  };
}

/** A curve y(x) drawn as a line with points, optional shaded x-intervals and an optional dashed x-rule. */
export interface CurveChart {
  points: { x: number; y: number }[];
  bands?: { from: number; to: number }[];
  rule?: number | null;
  xTitle: string;
  yTitle: string;
  /** Pixels (default 180); the width is the container's. */
  height?: number;
}

/** The Vega spec of a CurveChart (the layered line + rect + rule chart, autosized to the container's width). */
export function curveSpec(chart: CurveChart, theme: ChartTheme): object {
  const finite = (...xs: number[]) => xs.every((x) => typeof x === 'number' && Number.isFinite(x));
  const points = chart.points.filter((p) => finite(p.x, p.y)).map((p) => ({ ...p, description: `${chart.xTitle}: ${p.x}; ${chart.yTitle}: ${p.y}` }));
  const bands = (chart.bands ?? []).filter((b) => finite(b.from, b.to)).map((b) => ({ ...b, description: `from: ${b.from}; to: ${b.to}` }));
  const rule = chart.rule !== undefined && chart.rule !== null && finite(chart.rule) ? [{ x: chart.rule, description: `${chart.xTitle}: ${chart.rule}` }] : [];
  const width = 'isFinite(containerSize()[0]) ? containerSize()[0] : 300';
  const fullHeight = { y: { value: 0 }, y2: { field: { group: 'height' } } };
  const axisStyle = { labelColor: theme.text, titleColor: theme.text, gridColor: theme.grid, domainColor: theme.text, tickColor: theme.text };
  return {
    $schema: 'https://vega.github.io/schema/vega/v6.json',
    autosize: { type: 'fit-x', contains: 'padding' },
    padding: 5,
    height: chart.height ?? 180,
    style: 'cell',
    data: [
      { name: 'bands', values: bands },
      { name: 'points', values: points },
      { name: 'rule', values: rule },
    ],
    signals: [{ name: 'width', init: width, on: [{ update: width, events: 'window:resize' }] }],
    marks: [
      { name: 'band_marks', type: 'rect', style: ['rect'], from: { data: 'bands' },
        encode: { update: { opacity: { value: 0.35 }, fill: { value: theme.band }, description: { field: 'description' }, x: { scale: 'x', field: 'from' }, x2: { scale: 'x', field: 'to' }, ...fullHeight } } },
      { name: 'line_marks', type: 'line', style: ['line'], sort: { field: 'x' }, from: { data: 'points' },
        encode: { update: { stroke: { value: theme.line }, description: { field: 'description' }, x: { scale: 'x', field: 'x' }, y: { scale: 'y', field: 'y' } } } },
      { name: 'point_marks', type: 'symbol', style: ['point'], from: { data: 'points' },
        encode: { update: { opacity: { value: 1 }, fill: { value: theme.line }, ariaRoleDescription: { value: 'point' }, description: { field: 'description' }, x: { scale: 'x', field: 'x' }, y: { scale: 'y', field: 'y' } } } },
      { name: 'rule_marks', type: 'rule', style: ['rule'], from: { data: 'rule' },
        encode: { update: { strokeDash: { value: [4, 3] }, stroke: { value: theme.mark }, description: { field: 'description' }, x: { scale: 'x', field: 'x' }, ...fullHeight } } },
    ],
    scales: [
      { name: 'x', type: 'linear', domain: { fields: [{ data: 'bands', field: 'from' }, { data: 'bands', field: 'to' }, { data: 'points', field: 'x' }, { data: 'rule', field: 'x' }] }, range: [0, { signal: 'width' }], nice: true, zero: true },
      { name: 'y', type: 'linear', domain: { data: 'points', field: 'y' }, range: [{ signal: 'height' }, 0], nice: true, zero: true },
    ],
    axes: [
      { scale: 'x', orient: 'bottom', gridScale: 'y', grid: true, tickCount: { signal: 'ceil(width/40)' }, domain: false, labels: false, aria: false, maxExtent: 0, minExtent: 0, ticks: false, zindex: 0 },
      { scale: 'y', orient: 'left', gridScale: 'x', grid: true, tickCount: { signal: 'ceil(height/40)' }, domain: false, labels: false, aria: false, maxExtent: 0, minExtent: 0, ticks: false, zindex: 0 },
      { scale: 'x', orient: 'bottom', grid: false, title: chart.xTitle, labelFlush: true, labelOverlap: true, tickCount: { signal: 'ceil(width/40)' }, zindex: 0 },
      { scale: 'y', orient: 'left', grid: false, title: chart.yTitle, labelOverlap: true, tickCount: { signal: 'ceil(height/40)' }, zindex: 0 },
    ],
    config: {
      axis: axisStyle,
      style: { 'guide-label': { font: theme.font }, 'guide-title': { font: theme.font }, cell: { stroke: null }, text: { font: theme.font } },
    },
  };
}

/** The charts on the page, by container, so that a change of theme redraws them in the new colours. */
const live = new Map<HTMLElement, { chart: CurveChart; view: View; theme: string }>();
let watching = false;

/** Redraws every live chart when the reader's colour scheme or JupyterLab's theme changes (once per page). */
function watchTheme(): void {
  if (watching || typeof window === 'undefined') return;
  watching = true;
  const redraw = () => {
    for (const [container, { chart, theme }] of live) {
      if (!container.isConnected) clearChart(container);
      // Only when a colour changed (a class toggled on <body> for other reasons costs one style read).
      else if (JSON.stringify(chartTheme(container)) !== theme) void renderCurve(container, chart);
    }
  };
  window.matchMedia?.('(prefers-color-scheme: dark)').addEventListener?.('change', redraw);
  // JupyterLab marks its theme on <body> (data-jp-theme-light); a page may switch a class (rs-theme-dark).
  if (document.body) new MutationObserver(redraw).observe(document.body, { attributes: true, attributeFilter: ['data-jp-theme-light', 'data-jp-theme-name', 'class'] });
}

/** Renders a CurveChart into `container` (replacing its earlier chart); resolves with the view. */
export async function renderCurve(container: HTMLElement, chart: CurveChart): Promise<View> {
  live.get(container)?.view.finalize();
  const theme = chartTheme(container);
  const spec = curveSpec(chart, theme);
  const view = new View(parse(spec as never, undefined, { ast: true }), { expr: expressionInterpreter, renderer: 'svg', container, hover: true });
  live.set(container, { chart, view, theme: JSON.stringify(theme) });
  watchTheme();
  await view.runAsync();
  return view;
}

/** Removes the chart of `container` (its view finalized; the container emptied). */
export function clearChart(container: HTMLElement): void {
  live.get(container)?.view.finalize();
  live.delete(container);
  container.replaceChildren();
}
