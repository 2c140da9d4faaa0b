import { startLab } from '../test/helpers/jupyterlab.js';
const CELLS = [
  'import json, numpy as np\nfrom rhosigma.widgets import StateEditor, DivergenceCalculator\nrho = StateEditor(np.diag([0.7, 0.3]), title="rho")\nrho',
  'sigma = StateEditor(np.eye(2) / 2, title="sigma")\ncalc = DivergenceCalculator(rho, sigma)\ncalc',
  'print("x")',
  'g = np.random.default_rng(2026).normal(size=(16, 16)) + 1j * np.random.default_rng(7).normal(size=(16, 16))\nbig = g @ g.conj().T\nbig /= np.trace(big).real\ntau = StateEditor(big, dims=[2, 2, 2, 2], title="tau")\nflat = StateEditor(np.eye(16) / 16, dims=[2, 2, 2, 2], title="flat")\nbig_calc = DivergenceCalculator(tau, flat)\ntau',
  'big_calc',
  'print("STATE", big_calc.status, big_calc.computed_by, (big_calc.result or {}).get("ok"), calc.status, (calc.result or {}).get("error"))',
];
const lab = await startLab(CELLS);
lab.page.on('console', (m) => { if (m.type() !== 'debug') console.log('console:', m.type(), m.text().slice(0, 300)); });
try {
  await lab.open();
  await lab.runCell(0); await lab.runCell(1);
  const grid = () => lab.page.locator('.jp-Notebook .jp-Cell').nth(0).locator('input.rs-cell');
  await grid().first().waitFor({ timeout: 60_000 });
  await lab.page.locator('.rs-calculator-widget .rs-card__value').first().waitFor({ timeout: 60_000 });
  await grid().nth(0).fill('0.9'); await grid().nth(3).fill('0.1');
  await lab.page.waitForTimeout(2000);
  await grid().nth(1).fill('0.2+');
  await lab.page.waitForTimeout(2000);
  await lab.runCell(3); await lab.runCell(4);
  for (let k = 0; k < 5; k++) {
    await lab.page.waitForTimeout(3000);
    await lab.runCell(5);
    console.log(k, await lab.outputText(5));
    for (const c of [1, 4]) console.log(`line ${c}:`, (await lab.page.locator('.jp-Notebook .jp-Cell').nth(c).locator('.rs-kernel-line').textContent().catch(() => 'none'))?.slice(0, 160));
    console.log('ui status:', await lab.page.locator('.jp-Notebook .jp-Cell').nth(4).locator('.rs-progress').allTextContents().catch(() => []));
  }
} finally { await lab.stop(); }
export default async function main() {}
