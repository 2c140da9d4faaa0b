// A real JupyterLab in a real browser, for the lab tests and the round-trip benchmark: JupyterLab from
// .venv on 127.0.0.1 on a free port with a random token, in a fresh temporary root with its own settings,
// workspaces, config and runtime folders; Debian's /usr/bin/chromium through playwright-core with a fresh
// user-data folder (playwright-core never downloads a browser). `stop()` ends both (JupyterLab's whole
// process group) and removes the folders.
//
// Deliberately not here: assertions. Cost: JupyterLab's start (5–20 s) and the first page load.
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

// Run inside the page by playwright (this program is type-checked without the DOM library).
declare const document: any;
declare function getComputedStyle(e: unknown): { backgroundColor: string; color: string };

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const CHROMIUM = '/usr/bin/chromium';
export const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];
export const JUPYTER = join(ROOT, '.venv', 'bin', 'jupyter');
export const PYTHON = join(ROOT, '.venv', 'bin', 'python');
export const LABEXT = join(ROOT, 'kernel-bridge', 'rhosigma', 'labextension', 'package.json');

/** What is missing for a lab session (empty when everything is there). */
export function labMissing(): string[] {
  return [CHROMIUM, JUPYTER, LABEXT].filter((p) => !existsSync(p));
}

export function notebook(cells: string[]): string {
  return JSON.stringify({
    nbformat: 4, nbformat_minor: 5,
    metadata: { kernelspec: { name: 'python3', display_name: 'Python 3', language: 'python' } },
    cells: cells.map((source, i) => ({ cell_type: 'code', id: `c${i}`, metadata: {}, execution_count: null, outputs: [], source })),
  });
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
    s.on('error', reject);
  });
}

export interface LabSession {
  page: Page;
  browser: BrowserContext;
  base: string;
  token: string;
  settings: string;
  /** Opens the notebook written at start. */
  open(): Promise<void>;
  /** Runs the code cell at `index` and waits until its prompt shows a new execution count. */
  runCell(index: number): Promise<void>;
  /** The text of the last output of cell `index`. */
  outputText(index: number): Promise<string>;
  stop(): Promise<void>;
}

export async function startLab(cells: string[], name = 'scenario.ipynb'): Promise<LabSession> {
  const work = mkdtempSync(join(tmpdir(), 'rhosigma-lab-'));
  const settings = join(work, 'settings');
  mkdirSync(join(work, 'root'));
  mkdirSync(settings);
  writeFileSync(join(work, 'root', name), notebook(cells));
  const port = await freePort();
  const token = randomBytes(16).toString('hex');
  const lab: ChildProcess = spawn(JUPYTER, ['lab', '--no-browser', '--ServerApp.ip=127.0.0.1', `--ServerApp.port=${port}`, '--ServerApp.port_retries=0',
    `--IdentityProvider.token=${token}`, `--ServerApp.root_dir=${join(work, 'root')}`, '--LabApp.news_url=',
    ...(process.getuid?.() === 0 ? ['--allow-root'] : [])], {
    env: { ...process.env, JUPYTERLAB_SETTINGS_DIR: settings, JUPYTERLAB_WORKSPACES_DIR: join(work, 'workspaces'), JUPYTER_CONFIG_DIR: join(work, 'config'), JUPYTER_RUNTIME_DIR: join(work, 'runtime') },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  });
  const base = `http://127.0.0.1:${port}`;
  const stopLab = async () => {
    if (!lab.pid || lab.exitCode !== null) return;
    try { process.kill(-lab.pid, 'SIGTERM'); } catch { /* gone */ }
    await new Promise((r) => setTimeout(r, 1000));
    try { process.kill(-lab.pid, 'SIGKILL'); } catch { /* stopped */ }
  };
  try {
    await new Promise<void>((resolve, reject) => {
      let log = '';
      const timer = setTimeout(() => reject(new Error(`JupyterLab did not start:\n${log}`)), 120_000);
      const onData = (b: Buffer) => {
        log += b.toString();
        if (log.includes(`127.0.0.1:${port}/lab`)) {
          clearTimeout(timer);
          resolve();
        }
      };
      lab.stdout!.on('data', onData);
      lab.stderr!.on('data', onData);
      lab.on('exit', (code) => reject(new Error(`JupyterLab exited (${code}):\n${log}`)));
    });
  } catch (e) {
    await stopLab();
    rmSync(work, { recursive: true, force: true });
    throw e;
  }
  const userData = mkdtempSync(join(tmpdir(), 'rhosigma-lab-chromium-'));
  const browser = await chromium.launchPersistentContext(userData, { executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true, viewport: { width: 1280, height: 1000 } });
  const page = browser.pages()[0] ?? (await browser.newPage());
  page.on('pageerror', (e) => console.warn('page error:', e.message));
  page.on('console', (m) => {
    if (m.type() === 'error') console.warn(`browser error: ${m.text()}`);
  });
  const cell = (i: number) => page.locator('.jp-Notebook .jp-Cell').nth(i);
  return {
    page, browser, base, token, settings,
    async open() {
      await page.goto(`${base}/lab/tree/${name}?token=${token}`);
      await page.waitForSelector('.jp-Notebook .jp-Cell', { timeout: 120_000 });
      // The kernel is ready when the toolbar's kernel status says idle.
      await page.waitForSelector('.jp-Notebook-ExecutionIndicator[data-status="idle"]', { timeout: 120_000 }).catch(() => undefined);
      await page.waitForTimeout(1500);
    },
    async runCell(index: number) {
      const before = (await cell(index).locator('.jp-InputPrompt').textContent()) ?? '';
      const ran = (timeout: number) => page.waitForFunction(([i, b]) => {
        const c = document.querySelectorAll('.jp-Notebook .jp-Cell')[i as number];
        const prompt = c?.querySelector('.jp-InputPrompt')?.textContent ?? '';
        return /\[\d+\]/.test(prompt) && prompt !== b;
      }, [index, before] as const, { timeout });
      for (let attempt = 0; ; attempt++) {
        await cell(index).locator('.jp-InputArea-editor').click();
        await page.keyboard.press('Shift+Enter');
        try {
          await ran(attempt === 0 ? 30_000 : 120_000);
          return;
        } catch (e) {
          // A first run can be swallowed while the kernel connects (the prompt stays empty): once more.
          const prompt = (await cell(index).locator('.jp-InputPrompt').textContent()) ?? '';
          if (attempt > 0 || prompt.includes('*')) {
            if (prompt.includes('*')) await ran(120_000).then(() => undefined);
            else throw e;
            return;
          }
        }
      }
    },
    async outputText(index: number) {
      return (await cell(index).locator('.jp-OutputArea-output').last().textContent()) ?? '';
    },
    async stop() {
      await browser.close().catch(() => undefined);
      await stopLab();
      rmSync(work, { recursive: true, force: true });
      rmSync(userData, { recursive: true, force: true });
    },
  };
}
