// The wiki embed in a real browser, on a page made by a real static-site engine.
//
// How: the embed is built with webpack (webpack.embed.config.cjs) into a temporary folder; MkDocs (PyPI,
// pinned in requirements.txt, run from .venv) builds a tiny site whose Markdown holds the embed snippet as
// raw HTML (test/embed/wiki-site.ts); scripts/embed/static-server.mjs serves it on 127.0.0.1 with
// `Content-Security-Policy: default-src 'self'`; playwright-core drives Debian's /usr/bin/chromium with a
// fresh profile. The test stops the server and the browser.
//
// Outside references: the engine's answer to the same request (`handle` in Node, and `bin/rhosigma.js
// compute` for the copied request) — the embed must show what the engine computes, nothing of its own;
// the browser's own Content-Security-Policy enforcement (securitypolicyviolation events, console
// reports) for safety; the page's requests as the server saw them.
//
// Under CI=true a missing Chromium or mkdocs fails this file; elsewhere a missing Chromium skips it.
import { describe, it, beforeAll, afterAll } from '@jest/globals';
import assert from 'node:assert/strict';
import { existsSync, mkdtempSync, mkdirSync, rmSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { serveStatic, type StaticServer } from '../../scripts/embed/static-server.mjs';
import { buildWorkbench } from '../../scripts/embed/workbench.js';
import { SCENARIOS } from '../../src/embed/scenarios.js';
import { handle } from '../../src/ops/index.js';
import { buildWikiSite } from './wiki-site.js';

const CHROMIUM = '/usr/bin/chromium';
const CHROMIUM_ARGS = [
  '--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update',
  '--disable-sync', '--no-first-run',
];
const root = fileURLToPath(new URL('../..', import.meta.url));
const haveChromium = existsSync(CHROMIUM);
const inCI = process.env.CI === 'true';

/** A hostile configuration: markup and handlers inside strings (written with `<` as \u003c in the block). */
const HOSTILE_TEXT = {
  version: 1,
  calculator: 'divergence',
  title: '<img src=x onerror="window.__pwned = 1">Hostile title',
  description: '<script>window.__pwned = 2</script><a href="javascript:window.__pwned=3" onclick="window.__pwned=4">click</a>',
  inputs: { rho: { matrix: [[1, 0], [0, 0]], labels: ['<svg onload="window.__pwned=5">'] }, sigma: [[0.5, 0], [0, 0.5]], family: 'umegaki' },
};
/** Prototype keys: refused with a message naming the field; Object.prototype untouched. */
const HOSTILE_PROTO_RAW = `<div>
<rhosigma-calculator id="proto">
<script type="application/json">
{"calculator": "divergence", "inputs": {"rho": [[1]], "sigma": [[1]], "__proto__": {"polluted": "yes", "innerHTML": "<img src=x onerror=window.__pwned=6>"}}}
</script>
</rhosigma-calculator>
</div>`;

interface Violation { directive: string; blocked: string; source: string }

function five(): { id: string; config: unknown }[] {
  return [0, 1, 2, 3, 4].map((k) => ({ id: `five-${k}`, config: SCENARIOS[k % SCENARIOS.length].config }));
}

if (!haveChromium && inCI) {
  describe('wiki embed in Chromium', () => {
    it("needs Debian's chromium at /usr/bin/chromium (scripts/setup.sh installs it)", () => assert.fail(`${CHROMIUM} is missing under CI=true`));
  });
} else {
  const skip = haveChromium ? false : `${CHROMIUM} not found; skipped outside CI`;
  (skip ? describe.skip : describe)('wiki embed on a MkDocs page under a strict CSP, in Chromium', () => {
    let work = '';
    let server: StaticServer | undefined;
    let bench: StaticServer | undefined;
    let context: BrowserContext | undefined;
    const violations: Violation[] = [];
    const consoleErrors: string[] = [];
    let shots = '';

    async function open(url: string): Promise<Page> {
      const page = await context!.newPage();
      page.on('pageerror', (e) => consoleErrors.push(`pageerror ${e.message}`));
      page.on('console', (m) => {
        if (m.type() === 'error' || /Content.Security.Policy|Refused to/i.test(m.text())) consoleErrors.push(`${m.type()} ${m.text()}`);
      });
      page.on('worker', (w) => w.on('console', (m) => {
        if (m.type() === 'error' || /Content.Security.Policy|Refused to/i.test(m.text())) consoleErrors.push(`worker ${m.type()} ${m.text()}`);
      }));
      await page.exposeFunction('__reportViolation', (v: Violation) => violations.push(v));
      await page.goto(url);
      return page;
    }

    /** Waits until the calculator `id` has shown a result; returns its latest { request, answer }. */
    async function resultOf(page: Page, id: string, after = 0): Promise<{ request: Record<string, unknown>; answer: { ok: boolean; value: unknown } }> {
      return page.evaluate(async ([id, after]) => {
        const w = window as unknown as { __results: Record<string, { request: unknown; answer: unknown }[]> };
        for (let k = 0; k < 600; k++) {
          const list = w.__results?.[id as string] ?? [];
          if (list.length > (after as number)) return list[list.length - 1];
          await new Promise((r) => setTimeout(r, 50));
        }
        throw new Error(`no result from ${id}`);
      }, [id, after] as const) as never;
    }

    async function resultCount(page: Page, id: string): Promise<number> {
      return page.evaluate((id) => ((window as unknown as { __results: Record<string, unknown[]> }).__results?.[id] ?? []).length, id);
    }

    beforeAll(async () => {
      work = mkdtempSync(join(tmpdir(), 'rhosigma-embed-'));
      shots = join(work, 'screenshots');
      mkdirSync(shots);
      const built = spawnSync(process.execPath, [join(root, 'node_modules/webpack-cli/bin/cli.js'), '--config', join(root, 'webpack.embed.config.cjs')], { cwd: root, encoding: 'utf8' });
      assert.equal(built.status, 0, built.stderr + built.stdout);
      const site = buildWikiSite(join(work, 'wiki'), [
        { name: 'index.md', intro: '# A noisy pair\n\nOur source of Bell pairs drifted; here is the divergence from white noise, live.', blocks: [{ id: 'pair', config: SCENARIOS[0].config }] },
        { name: 'hostile.md', intro: '# Hostile configurations', blocks: [{ id: 'text', config: HOSTILE_TEXT }, { raw: HOSTILE_PROTO_RAW }] },
        { name: 'five.md', intro: '# Five calculators', blocks: five() },
      ]);
      server = await serveStatic(site);
      bench = await serveStatic(buildWorkbench(join(work, 'workbench')));
      context = await chromium.launchPersistentContext(join(work, 'profile'), {
        executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS, viewport: { width: 1100, height: 900 },
        permissions: ['clipboard-read', 'clipboard-write'],
      });
      // Test instrumentation, injected by the browser driver (not by the page, which the CSP binds):
      // CSP violations and every calculator's results, by element id.
      await context.addInitScript(() => {
        const w = window as unknown as { __results: Record<string, unknown[]>; __reportViolation?: (v: unknown) => void };
        w.__results = {};
        document.addEventListener('securitypolicyviolation', (e) => {
          w.__reportViolation?.({ directive: e.violatedDirective, blocked: e.blockedURI, source: e.sourceFile });
        });
        document.addEventListener('rhosigma-result', (e) => {
          const id = (e.target as HTMLElement).id;
          (w.__results[id] ??= []).push((e as CustomEvent).detail);
        });
      });
    }, 600_000);

    afterAll(async () => {
      await context?.close();
      await server?.close();
      await bench?.close();
      process.stdout.write(`embed screenshots: ${shots}\n`);
    });

    it('mounts the calculator on the MkDocs page and shows the engine\'s answer to the very request it sent', async () => {
      const page = await open(`${server!.url}index.html`);
      const { request, answer } = await resultOf(page, 'pair');
      assert.equal(answer.ok, true, JSON.stringify(answer));
      assert.equal(request.op, 'divergence');
      const node = handle(request) as { ok: boolean; value: number };
      assert.equal(node.ok, true);
      assert.ok(Math.abs((answer.value as number) - node.value) <= 1e-12 * Math.abs(node.value), `${answer.value} vs ${node.value}`);
      // The formula is MathML written at build time (no KaTeX in the embed); the plotting is a chunk loaded
      // on first need from beside the script (the site's rhosigma/ folder), under the strict policy.
      const root = page.locator('#pair');
      await root.locator('.rs-formula math').first().waitFor({ timeout: 30_000 });
      await root.locator('.rs-chart svg').first().waitFor({ timeout: 30_000 });
      assert.ok(await root.locator('.rs-chart svg path').count() >= 1, 'the chart has no marks');
      await page.screenshot({ path: join(shots, 'wiki-light.png'), fullPage: true });
      await page.emulateMedia({ colorScheme: 'dark' });
      // The chart follows the switch to dark: its axis text is redrawn in the dark theme's colour, with a
      // contrast against the frame's background of at least 4.5:1 (WCAG 2.1 AA for text, its luminance formula).
      const contrast = () => root.evaluate((host) => {
        const shadow = (host as HTMLElement).shadowRoot ?? host;
        const frame = shadow.querySelector('.rs-component') as HTMLElement;
        const texts = [...shadow.querySelectorAll('.rs-chart svg text')] as SVGTextElement[];
        const lum = (css: string) => {
          const [r, g, b] = css.match(/\d+(\.\d+)?/g)!.slice(0, 3).map(Number).map((v) => {
            const c = v / 255;
            return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
          });
          return 0.2126 * r + 0.7152 * g + 0.0722 * b;
        };
        const bg = lum(getComputedStyle(frame).backgroundColor);
        const ratios = texts.map((t) => {
          const fg = lum(getComputedStyle(t).fill);
          return (Math.max(fg, bg) + 0.05) / (Math.min(fg, bg) + 0.05);
        });
        return { bg, n: texts.length, min: Math.min(...ratios) };
      });
      let seen = await contrast();
      for (let k = 0; k < 40 && !(seen.n > 0 && seen.min >= 4.5); k++) {
        await page.waitForTimeout(100);
        seen = await contrast();
      }
      assert.ok(seen.bg < 0.05, `the frame's background is not dark: ${JSON.stringify(seen)}`);
      assert.ok(seen.n > 0 && seen.min >= 4.5, `chart text contrast in the dark theme: ${JSON.stringify(seen)}`);
      await page.screenshot({ path: join(shots, 'wiki-dark.png'), fullPage: true });
      await page.close();
    });

    it('recomputes when an entry is typed, and the new result equals the engine\'s answer for the new request', async () => {
      const page = await open(`${server!.url}index.html`);
      await resultOf(page, 'pair');
      const before = await resultCount(page, 'pair');
      // σ's top-left entry: 0.25 → 0.4 (σ may have any trace for a divergence).
      const cell = page.locator('#pair .rs-embed-editor').nth(1).locator('input.rs-cell').first();
      await cell.fill('0.4');
      await cell.press('Tab');
      let latest = await resultOf(page, 'pair', before);
      for (let k = 0; k < 20 && JSON.stringify(latest.request).indexOf('0.4') < 0; k++) {
        await page.waitForTimeout(100);
        latest = await resultOf(page, 'pair', before);
      }
      const sigma = latest.request.sigma as { matrix: unknown[][] };
      assert.equal(Number(sigma.matrix[0][0]), 0.4);
      const node = handle(latest.request) as { ok: boolean; value: number };
      assert.equal(latest.answer.ok, true);
      assert.ok(Math.abs((latest.answer.value as number) - node.value) <= 1e-12 * Math.abs(node.value));
      await page.close();
    });

    it('reads an entry typed as an expression (the worker fetches its expression reader on this first need), as the engine does', async () => {
      const page = await open(`${server!.url}index.html`);
      await resultOf(page, 'pair');
      const before = await resultCount(page, 'pair');
      const cell = page.locator('#pair .rs-embed-editor').nth(1).locator('input.rs-cell').first();
      await cell.fill('1/sqrt(8)');
      await cell.press('Tab');
      let latest = await resultOf(page, 'pair', before);
      for (let k = 0; k < 40 && JSON.stringify(latest.request).indexOf('sqrt') < 0; k++) {
        await page.waitForTimeout(100);
        latest = await resultOf(page, 'pair', before);
      }
      assert.equal((latest.request.sigma as { matrix: unknown[][] }).matrix[0][0], '1/sqrt(8)');
      assert.equal(latest.answer.ok, true, JSON.stringify(latest.answer).slice(0, 300));
      // The outside reference: the engine in Node (mathjs's bundle loaded by require) for the same request.
      const node = handle(latest.request) as { ok: boolean; value: number };
      assert.equal(node.ok, true);
      assert.ok(Math.abs((latest.answer.value as number) - node.value) <= 1e-12 * Math.abs(node.value));
      await page.close();
    });

    it('reopens a shared link with the same inputs, and the copied request gives the same value through `rhosigma compute`', async () => {
      const page = await open(`${server!.url}index.html`);
      await resultOf(page, 'pair');
      const cell = page.locator('#pair .rs-embed-editor').nth(1).locator('input.rs-cell').first();
      const before = await resultCount(page, 'pair');
      await cell.fill('0.3');
      await cell.press('Tab');
      // Wait for the result of the edited request itself (a fixed pause let a loaded machine compare the
      // copied new request with the value of the old one).
      let edited = await resultOf(page, 'pair', before);
      const sigmaTop = (r: typeof edited) => Number((r.request.sigma as { matrix: unknown[][] }).matrix[0][0]);
      for (let k = 0; k < 100 && sigmaTop(edited) !== 0.3; k++) {
        await page.waitForTimeout(100);
        edited = await resultOf(page, 'pair', before);
      }
      assert.equal(sigmaTop(edited), 0.3);
      const inputs = await page.evaluate(() => (document.getElementById('pair') as unknown as { inputs: unknown }).inputs);
      await page.locator('#pair button[data-share="link"]').click();
      const shared = page.locator('#pair textarea.rs-embed-shared');
      await shared.waitFor({ state: 'visible' });
      const link = await shared.inputValue();
      assert.ok(link.startsWith(`${server!.url}index.html#rhosigma.pair=`), link);
      await page.locator('#pair button[data-share="request"]').click();
      await page.waitForFunction(() => (document.querySelector('#pair')?.shadowRoot?.querySelector('textarea.rs-embed-shared') as HTMLTextAreaElement | null)?.dataset.kind === 'Request');
      const requestText = await shared.inputValue();
      const shownValue = (await resultOf(page, 'pair')).answer.value as number;
      assert.equal(shownValue, edited.answer.value);
      await page.close();

      const again = await open(link);
      await resultOf(again, 'pair');
      const reopened = await again.evaluate(() => (document.getElementById('pair') as unknown as { inputs: unknown }).inputs);
      assert.deepEqual(reopened, inputs);
      await again.close();

      const cli = spawnSync(process.execPath, [join(root, 'bin/rhosigma.js'), 'compute'], { input: requestText, encoding: 'utf8' });
      assert.equal(cli.status, 0, cli.stderr);
      const viaCli = JSON.parse(cli.stdout) as { ok: boolean; value: number };
      assert.equal(viaCli.ok, true);
      assert.ok(Math.abs(viaCli.value - shownValue) <= 1e-12 * Math.abs(shownValue), `${viaCli.value} vs ${shownValue}`);
    });

    it('runs none of a hostile configuration: markup in strings stays text, prototype keys are refused naming the field', async () => {
      const page = await open(`${server!.url}hostile.html`);
      await resultOf(page, 'text');
      const facts = await page.evaluate(() => {
        const text = document.getElementById('text')!.shadowRoot!;
        const proto = document.getElementById('proto')!.shadowRoot!;
        return {
          pwned: (window as unknown as { __pwned?: unknown }).__pwned,
          polluted: ({} as Record<string, unknown>).polluted,
          title: text.querySelector('.rs-embed-title')?.textContent,
          injected: text.querySelectorAll('img, svg script, script, a[href^="javascript"]').length + proto.querySelectorAll('img, script').length,
          protoError: proto.querySelector('[role="alert"]')?.textContent ?? '',
        };
      });
      assert.equal(facts.pwned, undefined);
      assert.equal(facts.polluted, undefined);
      assert.equal(facts.title, HOSTILE_TEXT.title);
      assert.equal(facts.injected, 0);
      assert.match(facts.protoError, /inputs\.__proto__/);
      await page.close();
    });

    it('shares one engine client among five calculators (its quick lane\'s worker, and the long lane\'s once a calculator solves an SDP), and each shows its first result', async () => {
      const page = await context!.newPage();
      let workers = 0;
      page.on('worker', () => workers++);
      await page.goto(`${server!.url}five.html`);
      for (const { id } of five()) assert.equal((await resultOf(page, id)).answer.ok, true, id);
      // Which of the five ask an SDP or an optimisation (the src/ui calculators ask those on the long lane).
      const solves = five().some(({ config }) => ['one-shot', 'recoverability', 'guessing'].includes(String((config as { calculator?: unknown }).calculator)));
      assert.equal(workers, solves ? 2 : 1);
      await page.close();
    });

    it('shows the workbench with every calculator computed; screenshots in light and dark', async () => {
      const page = await open(bench!.url);
      for (const s of SCENARIOS) {
        const r = await resultOf(page, s.id);
        assert.equal(r.answer.ok, true, `${s.id}: ${JSON.stringify(r.answer).slice(0, 300)}`);
      }
      await page.screenshot({ path: join(shots, 'workbench-light.png'), fullPage: true });
      await page.emulateMedia({ colorScheme: 'dark' });
      await page.screenshot({ path: join(shots, 'workbench-dark.png'), fullPage: true });
      await page.close();
    });

    it('reported no Content-Security-Policy violation and no error on any page, and requested only the site\'s and the embed\'s own files (the script, its stylesheet, its worker and its chunks)', () => {
      assert.deepEqual(violations, []);
      assert.deepEqual(consoleErrors, []);
      const allowed = /^\/(index|hostile|five)\.html$|^\/site\.css$|^\/rhosigma\/rhosigma-embed(-worker|-plot|-expressions)?\.(js|css)$|^\/favicon\.ico$|^\/rhosigma\/favicon\.svg$/;
      const odd = server!.requests.filter((p) => !allowed.test(p));
      assert.deepEqual(odd, []);
    });
  });
}
