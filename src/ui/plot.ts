/**
 * Plots through Vega-Lite: a spec compiled by vega-lite, rendered by vega as SVG into a container, with
 * vega's expression interpreter instead of its code generator (no `new Function`, so plots work under a
 * strict Content-Security-Policy, as the wiki embeds need). Colours are read from the component's CSS
 * custom properties, so light and dark themes (JupyterLab's --jp-* variables, or --rs-* overrides) apply.
 *
 * Deliberately not here: the data (answers of the engine, passed in), any numerics.
 * Cost: one vega-lite compile and one vega parse per render (milliseconds for our small charts).
 */
import { compile, type TopLevelSpec } from 'vega-lite';
import { parse, View } from 'vega';
import { expressionInterpreter } from 'vega-interpreter';

/** The theme colours a chart uses, read from CSS custom properties on `host`. */
export function chartTheme(host: Element): { text: string; grid: string; line: string; band: string; mark: string; font: string } {
  const cs = getComputedStyle(host);
  const v = (name: string, fallback: string) => cs.getPropertyValue(name).trim() || fallback;
  return {
    text: v('--rs-chart-text', '#333'),
    grid: v('--rs-chart-grid', '#ddd'),
    line: v('--rs-chart-line', '#2a6f97'),
    band: v('--rs-chart-band', '#b7e4c7'),
    mark: v('--rs-chart-mark', '#c1121f'),
    font: v('--rs-font', 'sans-serif'),
  };
}

/** Renders `spec` into `container` (replacing an earlier chart); resolves with the view. */
export async function renderChart(container: HTMLElement, spec: TopLevelSpec, previous?: View | null): Promise<View> {
  previous?.finalize();
  const theme = chartTheme(container);
  const vl = compile({
    ...spec,
    config: {
      background: null as unknown as string,
      font: theme.font,
      axis: { labelColor: theme.text, titleColor: theme.text, gridColor: theme.grid, domainColor: theme.text, tickColor: theme.text },
      legend: { labelColor: theme.text, titleColor: theme.text },
      view: { stroke: null },
      ...(spec as { config?: object }).config,
    },
  } as TopLevelSpec);
  const view = new View(parse(vl.spec, undefined, { ast: true }), { expr: expressionInterpreter, renderer: 'svg', container, hover: true });
  await view.runAsync();
  return view;
}
