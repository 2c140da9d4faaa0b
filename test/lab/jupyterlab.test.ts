// The notebook product in a real JupyterLab and a real browser (issue 8, "Tests"): JupyterLab from .venv
// on 127.0.0.1 with a random token (fresh root, settings and workspaces; stopped by the test), Debian's
// /usr/bin/chromium driven by playwright-core with a fresh user-data folder (test/helpers/jupyterlab.ts).
// The test opens a notebook, runs cells that create two state editors and a divergence calculator, types
// new entries into the grid, runs a cell that prints the calculator's `result` in Python, and checks it
// against the engine's answer for the same request through `rhosigma.compute` (the headless engine: the
// same engine in another runtime), and the number against an outside fact: for commuting states the
// Umegaki relative entropy is the Kullback–Leibler divergence of the spectra (Umegaki 1962; Nielsen &
// Chuang §11.3). An invalid entry shows an error, keeps the other entries and yields a refusal, never a
// number. The dark theme renders (light text on a dark page). A second notebook (its own JupyterLab) runs
// the sweep widget: a small sweep run by the browser whose rows Python compares with rhosigma.sweep's
// headless rows (a consistency check between two runtimes of the same engine), and a longer one stopped by
// Cancel and by Python's cancel(). Screenshots: <tmpdir>/rhosigma-lab-*.png.
//
// Needs the labextension built and linked (scripts/setup.sh), .venv with JupyterLab, and Chromium. Under
// CI=true anything missing fails the file; elsewhere it is skipped with a message. Cost: a minute or two.
import { describe, it, beforeAll, afterAll } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { labMissing, PYTHON, startLab, type LabSession } from '../helpers/jupyterlab.js';

// Run inside the page by playwright (this program is type-checked without the DOM library).
declare const document: any;
declare function getComputedStyle(e: unknown): { backgroundColor: string; color: string };

const SHOTS = tmpdir();
const missing = labMissing();
if (missing.length && process.env.CI === 'true') throw new Error(`JupyterLab browser test: missing ${missing.join(', ')} (run bash scripts/setup.sh)`);
const maybe = missing.length ? describe.skip : describe;
if (missing.length) console.warn(`JupyterLab browser test skipped: missing ${missing.join(', ')} (run bash scripts/setup.sh)`);

const CELLS = [
  'import json, numpy as np\nfrom rhosigma.widgets import StateEditor, DivergenceCalculator\nrho = StateEditor(np.diag([0.7, 0.3]), title="rho")\nrho',
  'sigma = StateEditor(np.eye(2) / 2, title="sigma")\ncalc = DivergenceCalculator(rho, sigma)\ncalc',
  'print("RESULT" + json.dumps({"result": calc.result, "request": calc.request, "by": calc.computed_by, "matrix": rho.matrix}))',
  // A four-qubit state: 256 entries, so Python sends its matrix packed (binary comm buffers).
  'g = np.random.default_rng(2026).normal(size=(16, 16)) + 1j * np.random.default_rng(7).normal(size=(16, 16))\nbig = g @ g.conj().T\nbig /= np.trace(big).real\ntau = StateEditor(big, dims=[2, 2, 2, 2], title="tau")\nflat = StateEditor(np.eye(16) / 16, dims=[2, 2, 2, 2], title="flat")\nbig_calc = DivergenceCalculator(tau, flat)\ntau',
  'big_calc',
  'lam = np.linalg.eigvalsh(big)\nprint("RESULT" + json.dumps({"result": big_calc.result, "request": big_calc.request, "by": big_calc.computed_by, "packed": isinstance(tau.matrix, dict) and tau.matrix.get("packed"), "numpy": float(4 + np.sum(lam * np.log2(lam)))}))',
];

interface Printed { result: any; request: any; by: string; matrix: unknown }

function headless(request: unknown): any {
  const out = spawnSync(PYTHON, ['-c', 'import json, sys, rhosigma; print(json.dumps(rhosigma.compute(json.loads(sys.stdin.read())).to_protocol_data()))'], {
    input: JSON.stringify(request), encoding: 'utf8', timeout: 120_000,
  });
  assert.equal(out.status, 0, out.stderr);
  return JSON.parse(out.stdout);
}

maybe('rhosigma widgets in a real JupyterLab (Chromium)', () => {
  let lab: LabSession;

  beforeAll(async () => {
    lab = await startLab(CELLS);
  }, 240_000);

  afterAll(async () => {
    await lab?.stop();
  }, 30_000);

  const grid = () => lab.page.locator('.jp-Notebook .jp-Cell').nth(0).locator('input.rs-cell');

  async function printed(index = 2): Promise<Printed> {
    await lab.runCell(index);
    const text = await lab.outputText(index);
    assert.ok(text.includes('RESULT'), text);
    return JSON.parse(text.slice(text.indexOf('RESULT') + 6).trim());
  }

  /** Prints the result until the browser's answer for the expected request is there (or a minute passed). */
  async function browserResult(pred: (r: Printed) => boolean, index = 2): Promise<Printed> {
    const deadline = Date.now() + 60_000;
    for (;;) {
      const r = await printed(index);
      if ((r.by === 'browser' && pred(r)) || Date.now() > deadline) return r;
      await lab.page.waitForTimeout(300);
    }
  }

  async function showWidgets(): Promise<void> {
    await lab.open();
    await lab.runCell(0);
    await lab.runCell(1);
    await grid().first().waitFor({ timeout: 60_000 }).catch(async (e) => {
      await lab.page.screenshot({ path: join(SHOTS, 'rhosigma-lab-failure.png'), fullPage: true });
      throw new Error(`the state editor did not render: ${e}\noutputs: ${await lab.outputText(0)}`);
    });
    await lab.page.locator('.rs-calculator-widget .rs-card__value').first().waitFor({ timeout: 60_000 });
  }

  it('an edit typed into the grid reaches the kernel as the calculator result, equal to the headless engine for the same request', async () => {
    await showWidgets();
    assert.equal(await grid().count(), 4, 'a 2×2 grid');
    await lab.page.screenshot({ path: join(SHOTS, 'rhosigma-lab-light.png'), fullPage: true });
    // Type 0.9 and 0.1 on the diagonal: ρ = diag(0.9, 0.1).
    await grid().nth(0).fill('0.9');
    await grid().nth(3).fill('0.1');
    const isEdited = (r: Printed) => {
      const m = JSON.stringify(r.request?.rho?.matrix ?? '');
      return m.includes('0.9') && m.includes('0.1');
    };
    const got = await browserResult(isEdited);
    assert.equal(got.by, 'browser', 'the browser computed the result');
    assert.ok(isEdited(got), JSON.stringify(got.request));
    assert.equal(got.result.ok, true, JSON.stringify(got.result));
    assert.deepEqual(got.request.rho.matrix.map((r: unknown[]) => r.map(Number)), [[0.9, 0], [0, 0.1]]);
    const expected = headless(got.request);
    assert.equal(expected.ok, true);
    assert.ok(Math.abs(got.result.value - expected.value) <= 1e-12 * Math.abs(expected.value), `${got.result.value} vs ${expected.value}`);
    const kl = 0.9 * Math.log2(0.9 / 0.5) + 0.1 * Math.log2(0.1 / 0.5);
    assert.ok(Math.abs(got.result.value - kl) < 1e-12, `${got.result.value} vs KL ${kl}`);
    await lab.page.screenshot({ path: join(SHOTS, 'rhosigma-lab-edited.png'), fullPage: true });
  }, 400_000);

  it('an invalid entry shows an error, keeps the other entries and yields a refusal, not a number', async () => {
    await grid().nth(1).fill('0.2+');
    await lab.page.waitForFunction(() => !!document.querySelector('.jp-Notebook [aria-invalid="true"], .jp-Notebook [role="alert"]'), undefined, { timeout: 60_000 });
    const got = await browserResult((r) => r.result && r.result.ok === false);
    assert.equal(got.result.ok, false, 'no number for an unreadable entry');
    assert.equal(got.result.error.code, 'parse-error');
    assert.ok(String(got.result.error.path ?? '').includes('rho'), JSON.stringify(got.result.error));
    assert.deepEqual([got.request.rho.matrix[0][0], got.request.rho.matrix[1][1]].map(Number), [0.9, 0.1], 'the other entries are kept');
    const expected = headless(got.request);
    assert.equal(expected.ok, false);
    assert.equal(expected.error.code, got.result.error.code);
    await lab.page.screenshot({ path: join(SHOTS, 'rhosigma-lab-invalid.png'), fullPage: true });
  }, 300_000);

  it('a four-qubit state travels packed, its 16×16 grid renders, and the browser computes the same number as numpy', async () => {
    await lab.runCell(3);
    await lab.runCell(4);
    const bigGrid = lab.page.locator('.jp-Notebook .jp-Cell').nth(3).locator('input.rs-cell');
    await bigGrid.first().waitFor({ timeout: 60_000 });
    assert.equal(await bigGrid.count(), 256, 'a 16×16 grid');
    await lab.page.locator('.jp-Notebook .jp-Cell').nth(4).locator('.rs-card__value').first().waitFor({ timeout: 60_000 });
    const got = (await browserResult((r) => r.result?.ok === true, 5)) as Printed & { packed: unknown; numpy: number };
    assert.equal(got.by, 'browser', 'the browser computed the result');
    assert.equal(got.packed, 'float64-le', 'Python holds the matrix packed');
    assert.equal(got.request.rho.matrix.packed, 'float64-le', 'the request the browser sent carries the packed matrix');
    // D(ρ‖1/d) = log₂ d − S(ρ) (Nielsen & Chuang §11.3; S from numpy's eigvalsh).
    assert.ok(Math.abs(got.result.value - got.numpy) < 1e-10, `${got.result.value} vs numpy ${got.numpy}`);
    const expected = headless(got.request);
    assert.ok(Math.abs(got.result.value - expected.value) <= 1e-12 * Math.abs(expected.value), `${got.result.value} vs ${expected.value}`);
    // The view shows the same number, and says what Python holds.
    const shown = await lab.page.locator('.jp-Notebook .jp-Cell').nth(4).locator('.rs-card__value').first().getAttribute('data-value');
    assert.ok(Math.abs(Number(shown) - got.result.value) <= 1e-12 * Math.abs(got.result.value), `shown ${shown}`);
    // The line under the calculator says what Python holds. (It once stayed at "computing…": a status
    // set by the page, then overwritten by Python's headless answer, was sent back stale by ipywidgets.)
    await lab.page.waitForFunction(() => {
      const el = document.querySelectorAll('.jp-Notebook .jp-Cell')[4]?.querySelector('.rs-kernel-line');
      return !!el && String(el.textContent).includes('computed in the browser');
    }, undefined, { timeout: 30_000 }).catch(() => undefined);
    const line = await lab.page.locator('.jp-Notebook .jp-Cell').nth(4).locator('.rs-kernel-line').textContent();
    assert.ok(line?.includes('computed in the browser'), String(line));
    await lab.page.locator('.jp-Notebook .jp-Cell').nth(4).screenshot({ path: join(SHOTS, 'rhosigma-lab-four-qubits.png') });
    await lab.page.locator('.jp-Notebook .jp-Cell').nth(3).screenshot({ path: join(SHOTS, 'rhosigma-lab-four-qubit-grid.png') });
  }, 300_000);

  it('the dark theme renders the widgets', async () => {
    const dir = join(lab.settings, '@jupyterlab', 'apputils-extension');
    mkdirSync(dir, { recursive: true });
    writeFileSync(join(dir, 'themes.jupyterlab-settings'), JSON.stringify({ theme: 'JupyterLab Dark' }));
    await showWidgets();
    await lab.page.waitForFunction(() => document.body.dataset.jpThemeLight === 'false', undefined, { timeout: 60_000 });
    const colors = await lab.page.evaluate(() => {
      const card = document.querySelector('.rs-calculator-widget');
      return { bg: getComputedStyle(document.querySelector('.jp-Notebook')).backgroundColor, fg: getComputedStyle(card).color, body: getComputedStyle(document.body).backgroundColor };
    });
    // Light text on a dark page (WCAG relative luminance; common practice, no published source for the threshold).
    const lum = (c: string) => {
      const [r, g, b] = (c.match(/\d+(\.\d+)?/g) ?? ['0', '0', '0']).slice(0, 3).map((x) => Number(x) / 255).map((v) => (v <= 0.03928 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4));
      return 0.2126 * r + 0.7152 * g + 0.0722 * b;
    };
    assert.ok(lum(colors.fg) > lum(colors.body), JSON.stringify(colors));
    await lab.page.screenshot({ path: join(SHOTS, 'rhosigma-lab-dark.png'), fullPage: true });
  }, 400_000);
});

const SWEEP_CELLS = [
  // Cells 0-4: the sweep widget. A small sweep (Petz–Rényi divergence of two random qubit states over 12
  // values of α, a spec of our own), run by the browser; then a longer one (6000 points) to cancel.
  'import json, rhosigma\nfrom rhosigma.widgets import Sweep\nfrom rhosigma.sweeps import sweep_rows\n'
    + 'small_spec = {"sweep": 1, "seed": 2026, "title": "Petz-Renyi divergence over a grid of alpha", "parameters": {"alpha": {"from": 0.1, "to": 1.9, "count": 12}}, '
    + '"draws": {"rho": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [2]}, "sigma": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [2]}}, '
    + '"quantity": {"op": "divergence", "family": "petz", "alpha": {"$": "alpha"}, "rho": {"$": "rho"}, "sigma": {"$": "sigma"}}, "record": ["rho", "sigma"]}\n'
    + 'small = Sweep(small_spec)\nsmall',
  'print("RESULT" + json.dumps({"status": small.status, "done": small.done, "total": small.total, "by": small.computed_by, "error": small.error}))',
  'headless_rows, _ = sweep_rows(small_spec)\nprint("RESULT" + json.dumps({"rows": small.rows, "headless": headless_rows, "exact": small.rows == headless_rows, "frame": small.frame().equals(rhosigma.sweep(small_spec))}))',
  'long_spec = {"sweep": 1, "seed": 7, "samples": 2000, "parameters": {"alpha": {"values": [0.5, 1.5, 3]}}, '
    + '"draws": {"rho": {"op": "random-state", "ensemble": "bures", "dims": [4]}, "sigma": {"op": "random-state", "ensemble": "bures", "dims": [4]}}, '
    + '"quantity": {"op": "divergence", "family": "sandwiched", "alpha": {"$": "alpha"}, "rho": {"$": "rho"}, "sigma": {"$": "sigma"}}}\n'
    + 'long = Sweep(long_spec)\nlong',
  'print("RESULT" + json.dumps({"status": long.status, "done": long.done, "total": long.total, "indices": [r["index"] for r in long.rows], "by": long.computed_by}))',
  // Cells 5-6: Python's run() and cancel() reach the front end (custom messages).
  'long.run()',
  'long.cancel()',
  // Cells 7-8: a refused spec (a parameter with no values) ends in status "error" naming the field.
  'bad = Sweep({**small_spec, "parameters": {"alpha": {"from": 0.1, "to": 1.9, "count": 0}}})\nbad',
  'print("RESULT" + json.dumps({"status": bad.status, "error": bad.error, "rows": bad.rows}))',
];

maybe('the sweep widget in a real JupyterLab (Chromium)', () => {
  let lab: LabSession;

  beforeAll(async () => {
    lab = await startLab(SWEEP_CELLS, 'sweep.ipynb');
    await lab.open();
  }, 240_000);

  afterAll(async () => {
    await lab?.stop();
  }, 30_000);

  /** Prints cell `index`'s RESULT until `pred` holds (or two minutes passed). */
  async function until<T>(index: number, pred: (r: T) => boolean, ms = 120_000): Promise<T> {
    const deadline = Date.now() + ms;
    for (;;) {
      await lab.runCell(index);
      const text = await lab.outputText(index);
      assert.ok(text.includes('RESULT'), text);
      const r = JSON.parse(text.slice(text.indexOf('RESULT') + 6).trim()) as T;
      if (pred(r) || Date.now() > deadline) return r;
      await lab.page.waitForTimeout(500);
    }
  }

  /** Equal as JSON, numbers within `rel` relative (0: exactly); the first difference as text, or ''. */
  function difference(a: unknown, b: unknown, rel: number, at = ''): string {
    if (typeof a === 'number' && typeof b === 'number') return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b)) ? '' : `${at}: ${a} vs ${b}`;
    if (Array.isArray(a) && Array.isArray(b)) {
      if (a.length !== b.length) return `${at}: length ${a.length} vs ${b.length}`;
      for (let k = 0; k < a.length; k++) {
        const d = difference(a[k], b[k], rel, `${at}[${k}]`);
        if (d) return d;
      }
      return '';
    }
    if (a && b && typeof a === 'object' && typeof b === 'object') {
      const ka = Object.keys(a).sort(), kb = Object.keys(b).sort();
      if (ka.join() !== kb.join()) return `${at}: keys ${ka} vs ${kb}`;
      for (const k of ka) {
        const d = difference((a as any)[k], (b as any)[k], rel, `${at}.${k}`);
        if (d) return d;
      }
      return '';
    }
    return a === b ? '' : `${at}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`;
  }

  it('a sweep widget runs in the browser, its rows reach the kernel live, equal row for row to rhosigma.sweep headless; Cancel stops a longer one', async () => {
    await lab.runCell(0);
    const sweepCell = lab.page.locator('.jp-Notebook .jp-Cell').nth(0);
    await sweepCell.locator('.rs-sweep').waitFor({ timeout: 60_000 });
    const got = await until<{ status: string; done: number; total: number; by: string; error: unknown }>(1, (r) => r.status === 'done' || r.status === 'error');
    assert.equal(got.status, 'done', JSON.stringify(got));
    assert.equal(got.by, 'browser', 'the browser ran the sweep');
    assert.equal(got.done, 12);
    assert.equal(got.total, 12);
    // The chart shows every point (all finite), through src/ui/plot.ts.
    await sweepCell.locator('.rs-sweep__chart[data-points="12"] svg').waitFor({ timeout: 30_000 });
    assert.match(String(await sweepCell.locator('.rs-sweep__count').textContent()), /12 of 12 points · done/);
    await sweepCell.screenshot({ path: join(SHOTS, 'rhosigma-lab-sweep.png') });
    // Consistency check, not an outside reference: the rows the browser sent equal those of the headless
    // engine (rhosigma.sweep through `rhosigma serve`) for the same spec, row for row.
    await lab.runCell(2);
    const text = await lab.outputText(2);
    const cmp = JSON.parse(text.slice(text.indexOf('RESULT') + 6).trim()) as { rows: any[]; headless: any[]; exact: boolean; frame: boolean };
    assert.equal(cmp.rows.length, 12);
    assert.deepEqual(cmp.rows.map((r) => r.index), [...Array(12).keys()]);
    // The draws (recorded states) bit for bit: the random path uses only exactly rounded operations
    // (src/linalg/portable-math.ts). The divergence's value goes through Math.pow and Math.log, which
    // Chromium's and Node's JavaScript engines may round differently in the last place (amplified by the
    // formula's cancellation): exact where they agree, else within 1e-12 relative (docs/sweeps.md).
    const withoutValues = (rows: any[]) => rows.map(({ value, ...rest }) => rest);
    assert.equal(difference(withoutValues(cmp.rows), withoutValues(cmp.headless), 0), '', 'browser draws and lines vs headless, exactly');
    assert.equal(difference(cmp.rows, cmp.headless, 1e-12), '', 'browser values vs headless, within 1e-12 relative');
    if (!cmp.exact) console.warn(`sweep widget: values equal the headless ones within 1e-12 relative, not bit for bit: ${difference(cmp.rows, cmp.headless, 0)}`);
    assert.equal(cmp.frame, cmp.exact, 'frame() equals rhosigma.sweep(spec) exactly when the rows do');
    // Cancel: a 6000-point sweep, cancelled from its view as soon as rows arrive, stops before its end.
    await lab.runCell(3);
    const longCell = lab.page.locator('.jp-Notebook .jp-Cell').nth(3);
    await longCell.locator('.rs-sweep[data-status="running"]').waitFor({ timeout: 60_000 });
    await lab.page.waitForFunction((i) => {
      const t = document.querySelectorAll('.jp-Notebook .jp-Cell')[i as number]?.querySelector('.rs-sweep__count')?.textContent ?? '';
      return /^[1-9]\d* of 6000/.test(t);
    }, 3, { timeout: 60_000 });
    await longCell.locator('.rs-sweep .rs-button--stop').click();
    await longCell.locator('.rs-sweep[data-status="cancelled"]').waitFor({ timeout: 30_000 });
    const stopped = await until<{ status: string; done: number; total: number; indices: number[]; by: string }>(4, (r) => r.status === 'cancelled');
    assert.equal(stopped.status, 'cancelled', JSON.stringify({ ...stopped, indices: stopped.indices.length }));
    assert.equal(stopped.total, 6000);
    assert.ok(stopped.done > 0 && stopped.done < 6000, `${stopped.done} of 6000`);
    assert.deepEqual(stopped.indices, [...Array(stopped.done).keys()], 'the rows done before Cancel, in index order');
    await lab.page.waitForTimeout(2000);
    const later = await until<{ done: number; status: string }>(4, () => true);
    assert.equal(later.done, stopped.done, 'nothing runs after Cancel');
    assert.equal(later.status, 'cancelled');
    await longCell.screenshot({ path: join(SHOTS, 'rhosigma-lab-sweep-cancelled.png') });
    // From Python: run() starts the browser's run again from the first point, cancel() stops it.
    await lab.runCell(5);
    await longCell.locator('.rs-sweep[data-status="running"]').waitFor({ timeout: 60_000 });
    await lab.runCell(6);
    await longCell.locator('.rs-sweep[data-status="cancelled"]').waitFor({ timeout: 30_000 });
    const again = await until<{ status: string; done: number; indices: number[] }>(4, (r) => r.status === 'cancelled');
    assert.equal(again.status, 'cancelled');
    assert.ok(again.done < 6000, `${again.done} of 6000`);
    assert.deepEqual(again.indices, [...Array(again.done).keys()], 'a fresh run from point 0');
    // A refused spec: the engine's refusal, with the field at fault, is the widget's `error`; no rows.
    await lab.runCell(7);
    const bad = await until<{ status: string; error: { code: string; path?: string } | null; rows: unknown[] }>(8, (r) => r.status === 'error');
    assert.equal(bad.status, 'error', JSON.stringify(bad));
    assert.equal(bad.error?.code, 'invalid-argument');
    assert.ok(String(bad.error?.path).startsWith('spec.parameters.alpha'), JSON.stringify(bad.error));
    assert.deepEqual(bad.rows, []);
    await lab.page.locator('.jp-Notebook .jp-Cell').nth(7).locator('.rs-sweep .rs-error').waitFor({ timeout: 30_000 });
  }, 400_000);
});
