/**
 * Keystroke → result in the kernel (issue 8, speed goal: under 100 ms median), in a real JupyterLab and
 * Chromium (test/helpers/jupyterlab.ts): a divergence calculator between two 2×2 state editors; each
 * round types one new entry into σ's grid (σ may have any trace, so every edit is a valid request), the
 * page's worker computes, the widget saves the answer, and a Python `observe` callback stamps its arrival
 * (time.time(), the same wall clock as the page's Date.now()). Printed: the median keystroke → kernel
 * latency, and beside it, measured in the same run, the median of the kernel's own headless path for the
 * same request (rhosigma.compute through the engine process), and their ratio.
 *
 * Usage: npm run bench -- lab-roundtrip [-- --slow] (needs scripts/setup.sh: the extension and Chromium).
 * Not a test: it asserts nothing. Cost: JupyterLab's start plus ~25 rounds of 0.4 s (100 with --slow).
 */
import { labMissing, startLab } from '../test/helpers/jupyterlab.js';
import { median } from './timing.js';

// Run inside the page by playwright (this program is type-checked without the DOM library).
declare const document: any;

const CELLS = [
  'import json, time, numpy as np, rhosigma\nfrom rhosigma.widgets import StateEditor, DivergenceCalculator\nrho = StateEditor(np.diag([0.7, 0.3]))\nrho',
  'sigma = StateEditor(np.eye(2) / 2)\ncalc = DivergenceCalculator(rho, sigma)\nstamps = []\ncalc.observe(lambda ch: stamps.append(time.time() * 1000), "result")\nsigma',
  'print("STAMPS" + json.dumps(stamps))',
  'ts = []\nfor _ in range(25):\n    t = time.perf_counter(); rhosigma.compute(calc.request); ts.append((time.perf_counter() - t) * 1000)\nprint("HEADLESS" + json.dumps(ts))',
];

export default async function main(args: string[]): Promise<void> {
  const missing = labMissing();
  if (missing.length) {
    console.log(`lab-roundtrip: skipped, missing ${missing.join(', ')} (run bash scripts/setup.sh)`);
    return;
  }
  const rounds = args.includes('--slow') ? 100 : 25;
  const lab = await startLab(CELLS, 'bench.ipynb');
  try {
    await lab.open();
    await lab.runCell(0);
    await lab.runCell(1);
    const sigmaCell = lab.page.locator('.jp-Notebook .jp-Cell').nth(1).locator('input.rs-cell');
    await sigmaCell.first().waitFor({ timeout: 60_000 });
    await lab.page.waitForTimeout(3000); // first compute and the worker's start out of the way
    await lab.runCell(2);
    const before = JSON.parse((await lab.outputText(2)).split('STAMPS')[1]).length as number;
    const typed: number[] = [];
    for (let k = 0; k < rounds; k++) {
      const value = (0.5 + (k + 1) * 0.001).toFixed(3);
      // One edit: the entry's new text and its input event, stamped in the page at the keystroke.
      typed.push(await sigmaCell.nth(0).evaluate((input: any, v: string) => {
        input.value = v;
        const t = Date.now();
        input.dispatchEvent(new Event('input', { bubbles: true }));
        return t;
      }, value));
      await lab.page.waitForTimeout(400);
    }
    await lab.runCell(2);
    const stamps = (JSON.parse((await lab.outputText(2)).split('STAMPS')[1]) as number[]).slice(before);
    const latencies: number[] = [];
    for (let k = 0; k < typed.length; k++) {
      const next = k + 1 < typed.length ? typed[k + 1] : Infinity;
      const arrived = stamps.find((s) => s >= typed[k] && s < next);
      if (arrived !== undefined) latencies.push(arrived - typed[k]);
    }
    await lab.runCell(3);
    const headless = JSON.parse((await lab.outputText(3)).split('HEADLESS')[1]) as number[];
    const m = median(latencies);
    const h = median(headless);
    console.log(`lab-roundtrip: keystroke → result in the kernel, median ${m.toFixed(1)} ms over ${latencies.length}/${rounds} edits (goal < 100 ms)`);
    console.log(`lab-roundtrip: reference, the kernel's headless rhosigma.compute of the same request: median ${h.toFixed(2)} ms; ratio ${(m / h).toFixed(1)}×`);
  } finally {
    await lab.stop();
  }
}
