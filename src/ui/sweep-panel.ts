/**
 * `SweepPanel`: the face of a sweep (docs/sweeps.md, "In the notebook"): a summary of the spec (its title,
 * its points, its parameters and what each point records), a progress bar with the count and the rate of
 * points, Run and Cancel buttons, the refusal when the spec is refused, and a live chart of the rows so far
 * through plot.ts's `renderCurve` (one parameter, `index` or `sample` on x, one field of a line on y). The curve
 * joins the points in x order; where the points are not one function of x (the spec has draws or samples)
 * a note under the chart says so, and violated points are counted there.
 *
 * The panel is told everything (`update`) and says what the user asked for (`on('run' | 'cancel' | 'plot')`):
 * whoever owns it (the sweep widget's view) runs the sweep. The chart's numbers are the rows' own, as the
 * op sweep-points answers them; points whose value is infinite, or that failed, are left off the chart
 * and counted under it.
 *
 * Deliberately not here: any numerics, running points, the spec's reading (the engine refuses a bad spec
 * with the field at fault; the summary only lists what the spec says). Cost: one chart render per
 * update at most every quarter of a second (vega-lite compile and vega parse: milliseconds for our sizes).
 */
import { el, Emitter, errorBox, field, formatNumber, setChildren } from './dom.js';

// plot.ts (and vega with it) is loaded on the first chart, as the calculators load it.
let plotModule: Promise<typeof import('./plot.js')> | null = null;
function loadPlot(): Promise<typeof import('./plot.js')> {
  return (plotModule ??= import(/* webpackChunkName: "plot" */ './plot.js'));
}

/** One line of the op sweep-points (src/sweep/point.ts, jobs.ts), as plain data. */
export type SweepLine = Record<string, unknown> & { index: number; parameters?: Record<string, unknown>; sample?: number };

export interface SweepPlot {
  /** A parameter's name, "index" or "sample"; null: the first parameter (else "index"). */
  x: string | null;
  /** A field of a line: "value", "gap", "left" or "right"; null: "gap" with an inequality, else "value". */
  y: string | null;
}

export interface SweepPanelState {
  spec: Record<string, unknown> | null;
  rows: SweepLine[];
  done: number;
  total: number;
  status: string;
  error: { code: string; message: string; path?: string } | null;
  plot: SweepPlot;
  computedBy?: string | null;
}

export interface SweepPanelOptions {
  state: SweepPanelState;
  label?: string;
}

type Events = { run: void; cancel: void; plot: SweepPlot };

const Y_FIELDS = ['value', 'gap', 'left', 'right'];

/** The chart's axes: the plot's choice, or the spec's defaults. */
export function plotAxes(spec: Record<string, unknown> | null, plot: SweepPlot): { x: string; y: string } {
  const names = Object.keys((spec?.parameters as Record<string, unknown> | undefined) ?? {});
  const x = plot.x ?? names[0] ?? 'index';
  const y = plot.y ?? (spec?.inequality ? 'gap' : 'value');
  return { x, y };
}

/** What the spec says of a parameter, in words (no values are computed). */
function describeParameter(p: Record<string, unknown>): string {
  if (Array.isArray(p.values)) return `${p.values.length} value${p.values.length === 1 ? '' : 's'}`;
  if (p.count !== undefined) return `${p.count} values from ${formatNumber(p.from)} to ${formatNumber(p.to)}${p.scale === 'log' ? ' (log-spaced)' : ''}`;
  if (p.step !== undefined) return `from ${formatNumber(p.from)} to ${formatNumber(p.to)} in steps of ${formatNumber(p.step)}`;
  return '';
}

function records(spec: Record<string, unknown> | null): string {
  if (!spec) return '';
  const parts: string[] = [];
  const q = spec.quantity as { op?: string; family?: string } | undefined;
  if (q?.op) parts.push(`quantity: ${q.op}${q.family ? ` (${q.family})` : ''}`);
  const ineq = spec.inequality as { relation?: string } | undefined;
  if (ineq) parts.push(`inequality: left ${ineq.relation ?? '<='} right, its gap per point`);
  const mode = spec.mode;
  parts.push(`mode: ${typeof mode === 'string' ? mode : mode && typeof mode === 'object' ? 'search' : 'evaluate'}`);
  return parts.join('; ');
}

/** A row's number for the chart, or undefined when it has none (failed, infinite, not a number). */
function chartNumber(v: unknown): number | undefined {
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

/** A row's x: a parameter's value, its index or its sample (a chart of numbers: other values are left off). */
function chartCoordinate(row: SweepLine, x: string): unknown {
  if (x === 'index') return row.index;
  if (x === 'sample') return row.sample;
  return row.parameters?.[x];
}

export class SweepPanel {
  readonly element: HTMLElement;
  private readonly events = new Emitter<Events>();
  private state: SweepPanelState;
  private readonly summary = el('div', { class: 'rs-sweep__summary' });
  private readonly bar = el('progress', { class: 'rs-sweep__bar', max: 1, value: 0 });
  private readonly count = el('span', { class: 'rs-sweep__count', 'aria-live': 'polite' });
  private readonly runButton = el('button', { class: 'rs-button', type: 'button' }, ['Run']);
  private readonly cancelButton = el('button', { class: 'rs-button rs-button--stop', type: 'button' }, ['Cancel']);
  private readonly message = el('div', { class: 'rs-sweep__message' });
  private readonly xSelect = el('select', { class: 'rs-select' });
  private readonly ySelect = el('select', { class: 'rs-select' });
  private readonly chart = el('div', { class: 'rs-chart rs-sweep__chart', role: 'img' });
  private readonly chartNote = el('div', { class: 'rs-note rs-sweep__note' });
  private rendering = false;
  private again = false;
  private timer: ReturnType<typeof setTimeout> | null = null;
  /** When the current run started and how many points were done then (for the rate). */
  private started: { at: number; done: number } | null = null;
  private disposed = false;

  constructor(host: HTMLElement, options: SweepPanelOptions) {
    this.state = options.state;
    this.element = el('section', { class: 'rs-component rs-sweep', 'aria-label': options.label ?? 'Sweep' }, [
      el('header', { class: 'rs-component__title' }, [options.label ?? 'Sweep']),
      this.summary,
      el('div', { class: 'rs-progress rs-sweep__progress' }, [this.bar, this.count, el('span', { class: 'rs-actions' }, [this.runButton, this.cancelButton])]),
      this.message,
      el('div', { class: 'rs-sweep__axes' }, [field('x', this.xSelect), field('y', this.ySelect)]),
      this.chart,
      this.chartNote,
    ]);
    host.append(this.element);
    this.runButton.addEventListener('click', () => this.events.emit('run', undefined));
    this.cancelButton.addEventListener('click', () => this.events.emit('cancel', undefined));
    const choose = () => this.events.emit('plot', { x: this.xSelect.value || null, y: this.ySelect.value || null });
    this.xSelect.addEventListener('change', choose);
    this.ySelect.addEventListener('change', choose);
    this.show(true);
  }

  on<K extends keyof Events>(event: K, cb: (v: Events[K]) => void): () => void {
    return this.events.on(event, cb);
  }

  update(next: Partial<SweepPanelState>): void {
    const specChanged = 'spec' in next && next.spec !== this.state.spec;
    this.state = { ...this.state, ...next };
    this.show(specChanged);
  }

  private show(specChanged: boolean): void {
    const s = this.state;
    if (specChanged) this.showSummary();
    // Progress: the bar, "done of total", and the rate since this run started (points per second).
    if (s.status === 'running') {
      if (!this.started || s.done < this.started.done) this.started = { at: Date.now(), done: s.done };
    }
    const seconds = this.started ? (Date.now() - this.started.at) / 1000 : 0;
    const rate = this.started && seconds > 0.2 ? (s.done - this.started.done) / seconds : undefined;
    if (s.status !== 'running') this.started = null;
    this.bar.max = Math.max(1, s.total);
    this.bar.value = Math.min(s.done, Math.max(1, s.total));
    this.bar.setAttribute('aria-label', `${s.done} of ${s.total} points`);
    const words: Record<string, string> = { idle: 'not run yet', running: 'running', cancelled: 'cancelled', done: 'done', error: 'refused' };
    this.count.textContent = `${s.done} of ${s.total || '?'} points · ${words[s.status] ?? s.status}${rate !== undefined ? ` · ${formatNumber(rate, 3)} points/s` : ''}${s.computedBy ? ` · computed in the ${s.computedBy}` : ''}`;
    this.element.dataset.status = s.status;
    this.runButton.disabled = s.status === 'running' || !s.spec;
    this.cancelButton.disabled = s.status !== 'running';
    setChildren(this.message, [s.error ? errorBox(s.error) : null]);
    this.showAxes();
    this.scheduleChart();
  }

  private showSummary(): void {
    const spec = this.state.spec;
    if (!spec) {
      setChildren(this.summary, [el('span', { class: 'rs-note' }, ['No spec.'])]);
      return;
    }
    const params = Object.entries((spec.parameters as Record<string, Record<string, unknown>> | undefined) ?? {});
    const samples = typeof spec.samples === 'number' ? spec.samples : 1;
    setChildren(this.summary, [
      spec.title ? el('div', { class: 'rs-sweep__title' }, [String(spec.title)]) : null,
      el('div', { class: 'rs-note' }, [`seed ${String(spec.seed)}; ${samples} sample${samples === 1 ? '' : 's'} per combination; ${records(spec)}`]),
      params.length
        ? el('ul', { class: 'rs-sweep__parameters' }, params.map(([name, p]) => el('li', {}, [el('code', {}, [name]), `: ${describeParameter(p)}`])))
        : el('div', { class: 'rs-note' }, ['no parameters']),
    ]);
  }

  private showAxes(): void {
    const s = this.state;
    const { x, y } = plotAxes(s.spec, s.plot);
    const names = [...Object.keys((s.spec?.parameters as Record<string, unknown> | undefined) ?? {}), 'index', 'sample'];
    const fill = (select: HTMLSelectElement, options: string[], chosen: string) => {
      if ([...select.options].map((o) => o.value).join() !== options.join()) {
        setChildren(select, options.map((o) => el('option', { value: o }, [o])));
      }
      select.value = chosen;
    };
    fill(this.xSelect, names, x);
    fill(this.ySelect, Y_FIELDS, y);
  }

  private scheduleChart(): void {
    if (this.timer || this.disposed) return;
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.drawChart();
    }, 250);
  }

  private async drawChart(): Promise<void> {
    if (this.rendering) {
      this.again = true;
      return;
    }
    this.rendering = true;
    try {
      const s = this.state;
      const { x, y } = plotAxes(s.spec, s.plot);
      const points: { x: number; y: number }[] = [];
      let left = 0;
      let violated = 0;
      for (const row of s.rows) {
        if (row.refined !== undefined) continue; // refinements have their own parameters; the chart shows the grid
        const v = chartNumber(row[y]);
        const at = chartNumber(chartCoordinate(row, x));
        if (v === undefined || at === undefined) left++;
        else points.push({ x: at, y: v });
        if (row.violated === true) violated++;
      }
      const drawn = !!s.spec?.draws && Object.keys(s.spec.draws as object).length > 0;
      const repeated = typeof s.spec?.samples === 'number' && s.spec.samples > 1;
      const notes = [
        left ? `${left} point${left === 1 ? '' : 's'} without a finite number for ${x} or ${y} (failed, infinite, or a value that is not a number) left off the chart.` : '',
        points.length > 1 && (drawn || repeated) && x !== 'index'
          ? `Each point has ${drawn ? 'draws' : 'a sample'} of its own: the line joins different ${drawn ? 'random draws' : 'samples'} in order of ${x}, not one curve.`
          : '',
        violated ? `${violated} violated point${violated === 1 ? '' : 's'} (gap below −tolerance).` : '',
      ].filter(Boolean);
      this.chartNote.textContent = notes.join(' ');
      const plot = await loadPlot();
      if (this.disposed) return;
      if (!points.length) {
        plot.clearChart(this.chart);
        return;
      }
      await plot.renderCurve(this.chart, { points, xTitle: x, yTitle: y, height: 200 });
      this.chart.setAttribute('aria-label', `${y} over ${x}, ${points.length} points`);
      this.chart.dataset.points = String(points.length);
    } catch (e) {
      this.chartNote.textContent = `The chart could not be drawn: ${e instanceof Error ? e.message : String(e)}`;
    } finally {
      this.rendering = false;
      if (this.again && !this.disposed) {
        this.again = false;
        this.scheduleChart();
      }
    }
  }

  dispose(): void {
    this.disposed = true;
    if (this.timer) clearTimeout(this.timer);
    if (plotModule) void plotModule.then((p) => p.clearChart(this.chart));
    this.events.clear();
    this.element.remove();
  }
}
