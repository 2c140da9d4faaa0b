/**
 * SweepModel / SweepView: a sweep in the notebook (docs/sweeps.md, "In the notebook"). The model runs the
 * points of its `spec` in chunks through the page's worker, with the op `sweep-points` that Python's
 * `rhosigma.sweep` sends to its headless engine (src/sweep/op.ts), so a row here is the line that
 * `rhosigma.sweep(spec)` and `rhosigma sweep SPEC` give for the same index: a point's line depends only on
 * the spec (its seed) and the index, never on the chunking. After each chunk it sends the kernel only that
 * chunk's lines, as a custom message {event: "rows", start, rows} (start: the position of the first of them
 * in the run's rows; a run starts with an empty one at 0), then sets `done`/`total` and `save_changes()`; Python appends them to its `rows`
 * (widgets.py), so the transfer is linear in the number of rows. Messages and state updates travel in order
 * on the widget's comm, so Python has every row of the run, once and in order, before it sees `done` move
 * or the status change (also after a Cancel). The page keeps the run's rows itself (`localRows`) for the view;
 * the synced `rows` field is only reset to [] when a run starts (and carries the rows of a headless run that
 * Python made). Modes as in
 * `sweep_rows`: "first-violation" stops after the first violating point; the search mode refines the
 * points with the smallest gaps afterwards, one request each.
 *
 * Runs: when the model is made with status "idle" and `auto` (default true), when `spec` changes, on the
 * view's Run button and on Python's `run()` (a custom message). Cancel (the view's button, or Python's
 * `cancel()`) aborts the chunk in flight (the worker is restarted, as for any stop) and keeps the rows done
 * before it; status becomes "cancelled". The chunk size adapts so that a chunk takes about a third of a
 * second (so Cancel and the progress are prompt) within 1..256 points.
 *
 * The view is src/ui's SweepPanel: the spec's summary, the progress bar with count and rate, Run, Cancel,
 * and the live chart of the rows through src/ui/plot.ts; the chosen axes are written to `plot`.
 *
 * Deliberately not here: any numerics (the worker's). Cost: one request per chunk, in the worker; one
 * message per chunk with that chunk's lines to the kernel.
 */
import { DOMWidgetModel, DOMWidgetView } from '@jupyter-widgets/base';
import { defaultsOf } from './base.js';
import { pageEngine } from './engine.js';
import { SweepPanel, type SweepLine, type SweepPanelState, type SweepPlot } from '../ui/sweep-panel.js';
import type { Answer } from '../worker/types.js';
import type { JSONValue } from '@lumino/coreutils';

/** The deadline of one sweep-points request: the protocol's largest, as Python's `sweep_rows` sends
 * (each request of a point keeps its own default deadline). */
export const SWEEP_DEADLINE_MS = 86_400_000;
/** A chunk aims at this many milliseconds. */
const CHUNK_TARGET_MS = 300;
const MAX_CHUNK = 256;

type Refusal = { code: string; message: string; path?: string };

class Stopped extends Error {
  constructor(readonly status: 'cancelled' | 'error' | 'stale', readonly refusal: Refusal | null = null) {
    super(status);
  }
}

/** The points with the smallest finite gaps, ties by index (as src/sweep/runner.ts and Python's `_candidates` choose). */
export function refineCandidates(rows: SweepLine[], count: number): number[] {
  const scored: [number, number][] = [];
  for (const r of rows) {
    const g = r.gap;
    if (r.failed === undefined && typeof g === 'number' && Number.isFinite(g)) scored.push([g, r.index]);
  }
  scored.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  return scored.slice(0, count).map(([, i]) => i);
}

export class SweepModel extends DOMWidgetModel {
  // Backbone calls initialize() from its constructor, before field initializers run: declared, set there.
  private declare generation: number;
  private declare stop: AbortController | null;
  /** The rows of this page's run (sent to the kernel chunk by chunk, not synced whole), or null. */
  declare localRows: SweepLine[] | null;

  override defaults() {
    return defaultsOf('SweepModel', super.defaults());
  }

  static override serializers = { ...DOMWidgetModel.serializers };

  override initialize(attributes: Parameters<DOMWidgetModel['initialize']>[0], options: Parameters<DOMWidgetModel['initialize']>[1]): void {
    super.initialize(attributes, options);
    this.generation = 0;
    this.stop = null;
    this.localRows = null;
    this.on('change:spec', () => {
      if (this.get('auto') !== false) void this.run();
    });
    this.on('msg:custom', (content: { event?: string }) => {
      if (content?.event === 'run') void this.run();
      else if (content?.event === 'cancel') this.cancel();
    });
    this.send({ event: 'attached' }, {});
    if (this.get('auto') !== false && this.get('status') === 'idle' && this.get('spec')) queueMicrotask(() => void this.run());
  }

  /** Whether a run of this model is in flight in this page. */
  get running(): boolean {
    return this.stop !== null;
  }

  /** Stops the run in flight (the chunk being computed is aborted); the rows done so far stay. */
  cancel(): void {
    this.stop?.abort();
  }

  private async ask(spec: unknown, body: { indices?: number[]; refine?: number[][] }, signal: AbortSignal): Promise<Record<string, any>> {
    // `id` (echoed, a common field) keeps this model's requests its own: the page's engine shares identical
    // requests in flight (engine.ts), and a Cancel of another sweep of the same spec must not stop this one.
    const request = { op: 'sweep-points', spec, deadline: SWEEP_DEADLINE_MS, id: `sweep:${this.model_id}`, ...body };
    const answer = (await pageEngine().compute(request, { signal, long: true })) as Answer & Record<string, any>;
    if (!answer.ok) {
      const error = (answer as { error: Refusal }).error;
      throw signal.aborted || error.code === 'cancelled' ? new Stopped('cancelled') : new Stopped('error', error);
    }
    return answer;
  }

  /** The lines of these points (or refinements), asking again for the rest of a partial answer (as Python's `_ask`). */
  private async lines(spec: unknown, body: { indices?: number[]; refine?: number[][] }, signal: AbortSignal): Promise<SweepLine[]> {
    let todoI = body.indices ? [...body.indices] : undefined;
    let todoR = body.refine ? [...body.refine] : undefined;
    const out: SweepLine[] = [];
    for (;;) {
      const a = await this.ask(spec, { ...(todoI ? { indices: todoI } : {}), ...(todoR ? { refine: todoR } : {}) }, signal);
      const got = a.value as SweepLine[];
      out.push(...got);
      if (a.complete !== false) return out;
      if (!got.length) throw new Stopped('error', { code: 'deadline-exceeded', message: 'A sweep point did not finish within the request\'s deadline.' });
      const doneI = Math.min(got.length, todoI?.length ?? 0);
      todoI = todoI?.slice(doneI);
      todoR = todoR?.slice(got.length - doneI);
    }
  }

  /** Runs the sweep of `spec` from its first point (a run in flight is stopped first). */
  async run(): Promise<void> {
    this.stop?.abort();
    const generation = ++this.generation;
    const stop = new AbortController();
    this.stop = stop;
    const spec = this.get('spec') as Record<string, unknown> | null;
    const publish = (fields: Record<string, unknown>) => {
      if (generation !== this.generation) throw new Stopped('stale');
      this.set(fields);
      this.save_changes();
    };
    /** Appends lines to the run's rows: to the kernel as one message of just these lines, then `done`. */
    const append = (lines: SweepLine[]) => {
      if (generation !== this.generation) throw new Stopped('stale');
      const start = rows.length;
      rows = [...rows, ...lines];
      this.localRows = rows;
      this.send({ event: 'rows', start, rows: lines as unknown as JSONValue[] }, {});
      publish({ done: rows.length });
    };
    let rows: SweepLine[] = [];
    try {
      // The kernel's rows restart empty: a message with start 0 (the synced field may already read [] here,
      // and an unchanged field is not sent again).
      this.send({ event: 'rows', start: 0, rows: [] }, {});
      if (!spec) {
        publish({ rows: [], done: 0, total: 0, status: 'idle', error: null, computed_by: null });
        return;
      }
      this.localRows = rows;
      publish({ rows: [], done: 0, total: 0, status: 'running', error: null, computed_by: 'browser' });
      const header = await this.ask(spec, { indices: [] }, stop.signal);
      const total = header.points as number;
      const mode = header.mode as string;
      publish({ total });
      let chunk = 1;
      let stopped = false;
      for (let start = 0; start < total && !stopped; ) {
        const indices = Array.from({ length: Math.min(chunk, total - start) }, (_, k) => start + k);
        const t0 = performance.now();
        const got = await this.lines(spec, { indices }, stop.signal);
        const ms = performance.now() - t0;
        const kept: SweepLine[] = [];
        for (const line of got) {
          kept.push(line);
          if (mode === 'first-violation' && line.violated === true) {
            stopped = true;
            break;
          }
        }
        start += indices.length;
        append(kept);
        chunk = Math.max(1, Math.min(MAX_CHUNK, chunk * 4, Math.round((chunk * CHUNK_TARGET_MS) / Math.max(ms, 1))));
      }
      const search = (spec.mode as { search?: { refine?: number } } | undefined)?.search;
      if (mode === 'search' && search) {
        const jobs = refineCandidates(rows, search.refine ?? 5).map((i, rank) => [i, rank]);
        publish({ total: total + jobs.length });
        for (const job of jobs) {
          append(await this.lines(spec, { refine: [job] }, stop.signal));
        }
      }
      publish({ status: 'done' });
    } catch (e) {
      if (e instanceof Stopped && e.status === 'stale') return;
      if (generation !== this.generation) return;
      if (e instanceof Stopped && e.status === 'cancelled') this.set({ status: 'cancelled' });
      else this.set({ status: 'error', error: e instanceof Stopped ? e.refusal : { code: 'internal-error', message: e instanceof Error ? e.message : String(e) } });
      this.save_changes();
    } finally {
      if (this.stop === stop) this.stop = null;
    }
  }
}

function panelState(model: DOMWidgetModel): SweepPanelState {
  const plot = (model.get('plot') ?? {}) as Partial<SweepPlot>;
  return {
    spec: model.get('spec') ?? null,
    // This page's run keeps its rows itself (they go to the kernel chunk by chunk); a headless run's come synced.
    rows: ((model as SweepModel).localRows && model.get('computed_by') === 'browser' ? (model as SweepModel).localRows : model.get('rows') ?? []) as SweepLine[],
    done: Number(model.get('done') ?? 0),
    total: Number(model.get('total') ?? 0),
    status: String(model.get('status') ?? 'idle'),
    error: model.get('error') ?? null,
    plot: { x: plot.x ?? null, y: plot.y ?? null },
    computedBy: model.get('computed_by') ?? null,
  };
}

/** The view: src/ui's SweepPanel on the model's fields; Run and Cancel go to the model, the axes to `plot`. */
export class SweepView extends DOMWidgetView {
  private panel: SweepPanel | null = null;
  private unsubscribe: (() => void)[] = [];

  override render(): void {
    this.el.classList.add('rs-widget', 'rs-sweep-widget');
    const host = document.createElement('div');
    this.el.replaceChildren(host);
    const panel = new SweepPanel(host, { state: panelState(this.model), label: 'Sweep' });
    this.panel = panel;
    const model = this.model as SweepModel;
    this.unsubscribe.push(
      panel.on('run', () => void model.run()),
      panel.on('cancel', () => model.cancel()),
      panel.on('plot', (p) => {
        this.model.set('plot', p);
        this.touch();
      }),
    );
    this.listenTo(this.model, 'change', () => this.panel?.update(panelState(this.model)));
  }

  override remove(): void {
    for (const u of this.unsubscribe) u();
    this.unsubscribe = [];
    this.panel?.dispose();
    this.panel = null;
    super.remove();
  }
}
