/**
 * DivergenceCalculator: D(ρ‖σ) of a chosen family (Umegaki, Petz, sandwiched, α-z, geometric, max,
 * min, measured) at α and z, with its defining formula typeset by KaTeX, every family's value at the
 * same parameters side by side, and the curve of the chosen family over α (Vega, ./plot.ts) with the
 * α-interval where the α-z family is known to satisfy data processing shaded (op
 * `data-processing-region`, H. Zhang, Adv. Math. 2020) for the α-z and Petz (z = 1) families.
 *
 * Inputs: `calc.inputs = { rho, sigma }` (the protocol's state forms, e.g. a StateEditor's `value`).
 * Settings (`value`): { family, alpha, z, base, curve }.
 *
 * KaTeX (./formula.ts; in the wiki embed, MathML written at build time instead) and the plotting (vega,
 * ./plot.ts) are loaded with import() when first needed (KaTeX after the first result), so a page has its
 * first result before it has fetched either (in the embed: chunks of their own beside the script).
 *
 * Deliberately not here: numerics (the α grid of the curve is the set of parameters asked for; every
 * value drawn is an answer). Cost: 1 + 7 divergence requests per change, plus the curve's points.
 */
import type { Answer } from '../worker/types.js';
import { el, field, formatNumber, setChildren } from './dom.js';
import { baseText, Calculator, numberControl, resultCard, selectControl, type CalculatorOptions, type NamedRequest } from './calculator.js';
import { formulasReady, typesetFormula } from './formula.js';
import { FAMILIES } from './families.js';

let plotModule: Promise<typeof import('./plot.js')> | null = null;
/** The plotting module (vega), loaded on first use. */
function loadPlot(): Promise<typeof import('./plot.js')> {
  return (plotModule ??= import(/* webpackChunkName: "plot" */ './plot.js'));
}
import type { StateValue } from './state-editor.js';

export interface DivergenceInputs {
  rho: StateValue;
  sigma: StateValue;
}

export interface DivergenceSettings {
  family: string;
  alpha: number;
  z: number;
  base: 2 | 'e';
  /** Draw the curve over α (default true). */
  curve: boolean;
}

export { FAMILIES };

/** Families shown side by side (measured is left out: it is an optimisation, on demand only). */
const TABLE = ['umegaki', 'petz', 'sandwiched', 'alpha-z', 'geometric', 'max', 'min'];

/** The α of the curve: the parameters asked for (not computed values). */
const CURVE_ALPHAS = [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 0.95, 1.05, 1.1, 1.25, 1.5, 1.75, 2, 2.25, 2.5, 2.75, 3];

export class DivergenceCalculator extends Calculator<DivergenceInputs, DivergenceSettings> {
  private familySelect: HTMLSelectElement;
  private alphaInput: HTMLInputElement;
  private zInput: HTMLInputElement;
  private baseSelect: HTMLSelectElement;
  private formula: HTMLElement;
  private chart: HTMLElement;
  private chartSeq = 0;
  private formulaSeq = 0;
  /** Resolves when the newest chart has been drawn. */
  drawn: Promise<void> = Promise.resolve();
  /** Resolves when the newest formula has been typeset. */
  typeset: Promise<void> = Promise.resolve();

  constructor(host: HTMLElement, options: CalculatorOptions<DivergenceInputs, DivergenceSettings>) {
    super(host, options, { family: 'sandwiched', alpha: 2, z: 1, base: 2, curve: true }, 'divergence', 'Divergence');
    this.familySelect = selectControl(FAMILIES.map((f) => [f.name, f.label]), (v) => this.setSetting('family', v));
    this.alphaInput = numberControl({ min: 0, step: 0.05 }, (v) => this.setSetting('alpha', v));
    this.zInput = numberControl({ min: 0, step: 0.05 }, (v) => this.setSetting('z', v));
    this.baseSelect = selectControl([['2', 'bits (log₂)'], ['e', 'nats (ln)']], (v) => this.setSetting('base', v === 'e' ? 'e' : 2));
    this.controls.append(field('Family', this.familySelect), field('α', this.alphaInput), field('z', this.zInput), field('Units', this.baseSelect));
    this.formula = el('div', { class: 'rs-formula', 'aria-label': 'Definition' });
    this.chart = el('div', { class: 'rs-chart', role: 'img', 'aria-label': 'The divergence over α' });
    this.element.append(this.formula, this.chart);
    this.start();
  }

  protected syncControls(): void {
    const s = this.settings;
    this.familySelect.value = s.family;
    this.alphaInput.value = String(s.alpha);
    this.zInput.value = String(s.z);
    this.baseSelect.value = String(s.base);
    const fam = FAMILIES.find((f) => f.name === s.family);
    this.alphaInput.disabled = !fam?.alpha;
    this.zInput.disabled = !fam?.z;
    if (this.formula) {
      const seq = ++this.formulaSeq;
      if (fam) {
        // The first time, KaTeX is fetched after the first result (start() runs recompute() right after
        // this, so one microtask later `computed` is that round) or after a second, whichever comes first,
        // so that it does not compete with the worker for the page's bandwidth.
        const firstRound = () => Promise.race([this.computed.catch(() => undefined), new Promise((r) => setTimeout(r, 1000))]);
        const ready = formulasReady() ? Promise.resolve() : Promise.resolve().then(firstRound);
        this.typeset = ready.then(async () => {
          if (seq === this.formulaSeq) await typesetFormula(this.formula, fam.tex);
        }).catch(() => {
          // KaTeX could not be loaded (offline, a missing chunk): the formula's TeX source, as text.
          if (seq === this.formulaSeq) setChildren(this.formula, [el('code', {}, [fam.tex])]);
        });
      } else setChildren(this.formula, []);
    }
  }

  private divergence(family: string, inputs: Partial<DivergenceInputs>, s: DivergenceSettings, alpha = s.alpha): Record<string, unknown> {
    const fam = FAMILIES.find((f) => f.name === family);
    const r: Record<string, unknown> = { op: 'divergence', family, rho: inputs.rho, sigma: inputs.sigma, base: s.base };
    if (fam?.alpha) r.alpha = alpha;
    if (fam?.z) r.z = s.z;
    return r;
  }

  protected requests(inputs: Partial<DivergenceInputs>, s: DivergenceSettings): NamedRequest[] | string {
    if (!inputs.rho || !inputs.sigma) return 'Give ρ and σ (connect two state editors).';
    const out: NamedRequest[] = [{ name: 'divergence', request: this.divergence(s.family, inputs, s), long: s.family === 'measured' }];
    for (const f of TABLE) if (f !== s.family) out.push({ name: `table:${f}`, request: this.divergence(f, inputs, s) });
    return out;
  }

  protected render(answers: { req: NamedRequest; answer: Answer }[]): void {
    const s = this.settings;
    const [main, ...table] = answers;
    const fam = FAMILIES.find((f) => f.name === s.family);
    const conventions = (a: Record<string, any>) => {
      const c = [baseText(a, s.base)];
      if (a.alpha !== undefined) c.push(`α = ${a.alpha}`);
      if (a.z !== undefined) c.push(`z = ${a.z}`);
      if (a.dataProcessing !== undefined) c.push(a.dataProcessing ? 'data processing holds at (α, z)' : 'data processing not known at (α, z)');
      c.push('σ of any trace; infinite when the support condition fails');
      return c;
    };
    const value = (a: Record<string, any>) => [formatNumber(a.value, 8)];
    const rows = table.map(({ req, answer }) => {
      const f = FAMILIES.find((x) => x.name === (req.request.family as string))!;
      return el('tr', { 'data-family': f.name }, [
        el('th', { scope: 'row' }, [f.label]),
        el('td', { class: 'rs-number', 'data-value': answer.ok ? String((answer as Record<string, any>).value) : '' }, [answer.ok ? formatNumber((answer as Record<string, any>).value, 6) : `${answer.error.code}`]),
      ]);
    });
    setChildren(this.output, [
      resultCard(fam?.label ?? s.family, main.answer, value, conventions),
      el('table', { class: 'rs-table', 'aria-label': 'Every family at these parameters' }, [
        el('caption', {}, [`Other families at α = ${s.alpha}, z = ${s.z} (α-z)`]),
        el('tbody', {}, rows),
      ]),
    ]);
    if (s.curve && fam?.alpha && main.answer.ok) void this.drawCurve();
    else {
      this.chartSeq++;
      if (plotModule) void plotModule.then((p) => p.clearChart(this.chart));
      setChildren(this.chart, []);
    }
  }

  private drawCurve(): void {
    const seq = ++this.chartSeq;
    const s = this.settings;
    const inputs = this.inputs;
    const points = CURVE_ALPHAS.map((alpha) =>
      this.engine.compute(this.divergence(s.family, inputs, s, alpha), { key: `${this.id}:curve:${alpha}` }).then((answer) => ({ alpha, answer })));
    const z = s.family === 'petz' ? 1 : s.family === 'alpha-z' ? s.z : null;
    const region = z === null ? Promise.resolve(null) : this.engine.compute({ op: 'data-processing-region', z, alphaMax: 3, points: 2 }, { key: `${this.id}:region` });
    this.drawn = Promise.all([Promise.all(points), region]).then(async ([pts, reg]) => {
      if (seq !== this.chartSeq) return;
      const data = pts.filter((p) => p.answer.ok && typeof (p.answer as Record<string, any>).value === 'number')
        .map((p) => ({ alpha: p.alpha, value: (p.answer as Record<string, any>).value as number }));
      const intervals = reg && reg.ok ? ((reg as Record<string, any>).alphaIntervals as [number, number][]).map(([a, b]) => ({ from: a, to: b })) : [];
      const unit = s.base === 'e' ? 'nats' : 'bits';
      const { renderCurve } = await loadPlot();
      if (seq !== this.chartSeq) return;
      await renderCurve(this.chart, {
        points: data.map((p) => ({ x: p.alpha, y: p.value })),
        bands: intervals,
        rule: s.alpha,
        xTitle: 'α',
        yTitle: `D (${unit})`,
        height: 180,
      });
      this.chart.setAttribute('aria-label', `${FAMILIES.find((f) => f.name === s.family)?.label} over α from ${CURVE_ALPHAS[0]} to ${CURVE_ALPHAS[CURVE_ALPHAS.length - 1]}${intervals.length ? '; shaded: where data processing is known to hold (Zhang 2020)' : ''}`);
      if (reg && reg.ok) this.chart.title = String((reg as Record<string, any>).source);
    });
  }
}
