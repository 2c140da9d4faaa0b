/**
 * The wiki embed in Chromium (issue 11's speed goals), printed as medians:
 *  - from the page's load event to an interactive calculator with its first result, on a page with one
 *    divergence calculator of a two-qubit state (goal < 500 ms), beside the reference measured in the same
 *    run: the same browser starting a one-line worker of its own and getting one message back (the floor
 *    any page with a worker pays);
 *  - the embed script plus its worker, gzip-compressed (goal < 400 kB), beside their raw sizes; and, since
 *    KaTeX, the plotting and the worker's expression reader are chunks loaded on first need, what that page
 *    requests before its first result (the fair count of the goal) and everything it requests until idle
 *    (the chart and formula included), from the server's request log, each file gzip-compressed.
 * (Five calculators starting one worker is a test: test/embed/browser.test.ts.)
 *
 * Needs the embed build (`npm run build:embed`, run here when dist/embed is missing) and /usr/bin/chromium.
 * Each round is a fresh page load with the HTTP cache off (the server sends no-store). Cost: ~30 s.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import { serveStatic } from '../scripts/embed/static-server.mjs';
import { copyEmbed, EMBED_DIST, ensureEmbedBuild, markdownSnippet } from '../scripts/embed/workbench.js';
import { SCENARIOS } from '../src/embed/scenarios.js';
import { median } from './timing.js';

const ROUNDS = 9;
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];

export default async function run(): Promise<void> {
  ensureEmbedBuild();
  const size = (f: string) => {
    const bytes = readFileSync(join(EMBED_DIST, f));
    return { f, raw: bytes.length, gz: gzipSync(bytes, { level: 9 }).length };
  };
  const kB = (n: number) => `${(n / 1024).toFixed(0)} kB`;
  const files = readdirSync(EMBED_DIST).filter((f) => /\.(js|css)$/.test(f)).sort();
  const sizes = files.map(size);
  const total = ['rhosigma-embed.js', 'rhosigma-embed-worker.js'].reduce((s, f) => s + sizes.find((x) => x.f === f)!.gz, 0);
  for (const s of sizes) console.log(`${s.f}: ${kB(s.raw)} raw, ${kB(s.gz)} gzip`);
  console.log(`embed script + worker, gzip: ${kB(total)} (goal < 400 kB: ${total < 400 * 1024 ? 'met' : 'NOT met'})`);

  const dir = mkdtempSync(join(tmpdir(), 'rhosigma-bench-embed-'));
  copyEmbed(join(dir, 'rhosigma'));
  const config = SCENARIOS.find((s) => s.config.calculator === 'divergence')!.config;
  writeFileSync(join(dir, 'one.html'), `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>one</title><link rel="icon" href="rhosigma/favicon.svg"><script src="rhosigma/rhosigma-embed.js" defer></script></head><body>\n${markdownSnippet('one', { ...config, controls: ['editors', 'settings'] })}\n</body></html>\n`);
  writeFileSync(join(dir, 'ref.html'), '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>ref</title><link rel="icon" href="rhosigma/favicon.svg"><script src="ref.js" defer></script></head><body></body></html>\n');
  writeFileSync(join(dir, 'ref.js'), "addEventListener('load', () => { const t = performance.now(); const w = new Worker('ref-worker.js'); w.onmessage = () => { window.__ms = performance.now() - t; }; w.postMessage(1); });\n");
  writeFileSync(join(dir, 'ref-worker.js'), 'onmessage = (e) => postMessage(e.data);\n');
  const server = await serveStatic(dir);
  const context = await chromium.launchPersistentContext(join(dir, 'profile'), { executablePath: '/usr/bin/chromium', headless: true, args: ARGS });
  try {
    await context.addInitScript(() => {
      let loadAt = 0;
      addEventListener('load', () => { loadAt = performance.now(); });
      document.addEventListener('rhosigma-result', () => {
        const w = window as unknown as { __ms?: number };
        if (w.__ms === undefined) w.__ms = performance.now() - loadAt;
      });
    });
    const time = async (file: string) => {
      const out: number[] = [];
      for (let r = 0; r < ROUNDS; r++) {
        const page = await context.newPage();
        await page.goto(`${server.url}${file}`);
        await page.waitForFunction(() => (window as unknown as { __ms?: number }).__ms !== undefined, undefined, { timeout: 30_000 });
        out.push(await page.evaluate(() => (window as unknown as { __ms: number }).__ms));
        await page.close();
      }
      return median(out);
    };
    // What the page asks for before its first result: the init script requests a marker path at the
    // first result, so the server's log splits in two (a local server: requested is as good as received).
    {
      await context.addInitScript(() => {
        document.addEventListener('rhosigma-result', () => void fetch('/__first-result').catch(() => {}), { once: true });
      });
      server.requests.length = 0;
      const page = await context.newPage();
      await page.goto(`${server.url}one.html`);
      await page.waitForFunction(() => (window as unknown as { __ms?: number }).__ms !== undefined, undefined, { timeout: 30_000 });
      await page.waitForFunction(() => !!document.querySelector('rhosigma-calculator')?.shadowRoot?.querySelector('.rs-chart svg'), undefined, { timeout: 30_000 });
      await page.waitForLoadState('networkidle');
      await page.close();
      const log = [...server.requests];
      const mark = log.indexOf('/__first-result');
      const embedFiles = (paths: string[]) => [...new Set(paths.filter((p) => p.startsWith('/rhosigma/') && files.includes(p.slice('/rhosigma/'.length))).map((p) => p.slice('/rhosigma/'.length)))];
      const before = embedFiles(mark < 0 ? log : log.slice(0, mark));
      const all = embedFiles(log);
      const sum = (fs: string[]) => fs.reduce((s, f) => s + sizes.find((x) => x.f === f)!.gz, 0);
      console.log(`one divergence calculator, requested before its first result: ${before.join(', ')}: ${kB(sum(before))} gzip (goal < 400 kB: ${sum(before) < 400 * 1024 ? 'met' : 'NOT met'})`);
      console.log(`the same page until idle (formula and chart drawn): ${all.join(', ')}: ${kB(sum(all))} gzip`);
    }
    const ref = await time('ref.html');
    const embed = await time('one.html');
    console.log(`load → first result, two-qubit divergence calculator: median ${embed.toFixed(0)} ms over ${ROUNDS} loads (goal < 500 ms: ${embed < 500 ? 'met' : 'NOT met'})`);
    console.log(`reference, load → a one-line worker's first reply: median ${ref.toFixed(1)} ms; ratio ${(embed / ref).toFixed(1)}×`);
  } finally {
    await context.close();
    await server.close();
    rmSync(dir, { recursive: true, force: true });
  }
}
