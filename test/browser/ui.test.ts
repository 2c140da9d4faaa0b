// The UI components in a real browser: Debian's Chromium (playwright-core, never a downloaded browser)
// loads the components' test page (test/browser/ui-page, bundled by webpack with the real engine worker)
// from a 127.0.0.1 server, and the person's actions are played on it: typing entries, an unreadable
// entry, keyboard navigation of the grid, a paste of numpy's printed array, the cancel of a long solve,
// and the dark theme. Every number the page shows must be the number `handle` gives in Node for the same
// request (the request is read back from the calculator): the UI computes nothing itself. The numbers'
// correctness against numpy/scipy is tested in test/ops and below; this file tests that the page shows
// them, and behaves, as it should (common practice for UI tests, no published source).
//
// Under CI=true a missing /usr/bin/chromium fails; elsewhere the suite is skipped with a message.
// Screenshots (light and dark) go to <tmpdir>/rhosigma-ui-*.png for a person to look at.
import { describe, it, beforeAll, afterAll } from '@jest/globals';
import assert from 'node:assert/strict';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { handle } from '../../src/ops/index.js';
import { serveFolder } from '../helpers/static-server.js';

const require = createRequire(import.meta.url);
const { bundleUiPage } = require('../../scripts/bundle-ui-page.cjs') as { bundleUiPage: (dir: string) => Promise<string> };

const CHROMIUM = '/usr/bin/chromium';
const CHROMIUM_ARGS = [
  '--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update',
  '--disable-sync', '--no-first-run',
];
/** Numbers equal within 1e-12 relative (the same engine code in two JavaScript engines; see engine.test.ts). */
function close(a: number, b: number): boolean {
  return a === b || Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b));
}

const haveChromium = existsSync(CHROMIUM);
const inCI = process.env.CI === 'true';

if (!haveChromium && inCI) {
  describe('UI components in Chromium', () => {
    it('needs Debian\'s chromium at /usr/bin/chromium', () => assert.fail(`${CHROMIUM} is missing under CI=true`));
  });
} else {
  (haveChromium ? describe : describe.skip)('UI components in Chromium with the real engine worker', () => {
    let workDir = '';
    let closeServer: (() => Promise<void>) | undefined;
    let context: BrowserContext | undefined;
    let page: Page;
    const pageErrors: string[] = [];

    const cell = (editor: string, r: number, c: number) => page.locator(`#${editor} input.rs-cell[data-row="${r}"][data-col="${c}"]`);
    const settle = () => page.evaluate(async () => {
      const rs = (window as any).rs;
      for (let k = 0; k < 3; k++) await Promise.all([rs.rho.checked, rs.divergence.computed, rs.oneShot.computed]);
    });
    /** Types `text` into a cell as a person does (select all, type), then waits for checks and results. */
    async function typeInto(editor: string, r: number, c: number, text: string) {
      const input = cell(editor, r, c);
      await input.click();
      await input.press('Control+A');
      await input.pressSequentially(text);
      await settle();
    }

    beforeAll(async () => {
      workDir = mkdtempSync(join(tmpdir(), 'rhosigma-ui-test-'));
      const site = await bundleUiPage(join(workDir, 'site'));
      const served = await serveFolder(site);
      closeServer = served.close;
      context = await chromium.launchPersistentContext(join(workDir, 'profile'), {
        executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS, viewport: { width: 1300, height: 1600 },
      });
      page = context.pages()[0] ?? (await context.newPage());
      page.on('pageerror', (e) => pageErrors.push(e.message));
      page.on('console', (m) => { if (m.type() === 'error') pageErrors.push(m.text()); });
      await page.goto(served.url);
      await page.waitForSelector('body[data-ready="true"]');
      await settle();
    }, 240_000);

    afterAll(async () => {
      await context?.close();
      await closeServer?.();
      if (workDir) rmSync(workDir, { recursive: true, force: true });
    });

    it('loads with no page errors and shows the first checks and results', async () => {
      assert.deepEqual(pageErrors, []);
      await page.locator('#rho .rs-check--ok').first().waitFor();
      assert.equal(await page.locator('#rho .rs-check--ok').count(), 3);
      await page.locator('#divergence .rs-card__value').first().waitFor();
    });

    it('typing an entry updates the checks and the divergence, with the value handle gives in Node for the same request', async () => {
      await typeInto('rho', 0, 3, '0.15');
      // Only one of the Hermitian pair changed: the check points at the entry and its partner.
      assert.equal(await page.locator('#rho .rs-cell--offending').count(), 1);
      assert.equal(await cell('rho', 0, 3).evaluate((e) => e.classList.contains('rs-cell--offending') || e.classList.contains('rs-cell--partner')), true);
      await typeInto('rho', 3, 0, '0.15');
      assert.equal(await page.locator('#rho .rs-check--ok').count(), 3);
      const { request, answer, shown, table } = await page.evaluate(() => {
        const rs = (window as any).rs;
        const r = rs.divergence.results.divergence;
        return {
          request: r.request, answer: r.answer,
          shown: document.querySelector('#divergence .rs-card__value')!.getAttribute('data-value'),
          table: [...document.querySelectorAll('#divergence tr[data-family]')].map((tr) => ({
            family: tr.getAttribute('data-family')!, value: tr.querySelector('td')!.getAttribute('data-value'),
            request: rs.divergence.results[`table:${tr.getAttribute('data-family')}`].request,
          })),
        };
      });
      assert.deepEqual(request.rho.matrix[0][3], 0.15);
      const node = handle(request) as Record<string, any>;
      assert.equal(node.ok, true);
      assert.ok(close(answer.value, node.value), `browser ${answer.value}, Node ${node.value}`);
      assert.equal(Number(shown), answer.value);
      // Every family in the table: the number shown is Node's for the same request.
      for (const row of table) {
        assert.equal(row.request.family, row.family);
        const n = handle(row.request) as Record<string, any>;
        assert.ok(close(Number(row.value), n.value), `${row.family}: shown ${row.value}, Node ${n.value}`);
      }
      // The spectrum shown is the engine's (state-check in Node).
      const spectrum = await page.locator('#rho .rs-eigenvalue').evaluateAll((els) => els.map((e) => Number(e.getAttribute('title')!.split('= ')[1])));
      const check = handle({ op: 'state-check', state: request.rho }) as Record<string, any>;
      spectrum.forEach((x, k) => assert.ok(close(x, check.spectrum[k]), `eigenvalue ${k}`));
    });

    it('an unreadable entry is marked in place with the engine\'s error; the other entries stay and no number is shown', async () => {
      await typeInto('rho', 1, 1, 'sqrt(');
      await page.locator('#rho .rs-cell--error').waitFor();
      assert.equal(await cell('rho', 1, 1).getAttribute('aria-invalid'), 'true');
      assert.match(await page.locator('#rho .rs-error__code').first().innerText(), /parse-error/);
      assert.equal(await cell('rho', 0, 0).inputValue(), '0.4');
      assert.equal(await cell('rho', 1, 1).inputValue(), 'sqrt(');
      assert.equal(await page.locator('#divergence .rs-card--error').count() >= 1, true);
      assert.equal(await page.locator('#divergence .rs-card__value').count(), 0);
      await typeInto('rho', 1, 1, '0.2');
      assert.equal(await page.locator('#rho .rs-cell--error').count(), 0);
      assert.equal(await page.locator('#rho .rs-check--ok').count(), 3);
    });

    it('a negative eigenvalue is picked out, and the clip repair runs only when pressed and says what it changed', async () => {
      await typeInto('rho', 0, 3, '0.3');
      await typeInto('rho', 3, 0, '0.3');
      await page.locator('#rho .rs-eigenvalue--worst').waitFor();
      const before = await cell('rho', 0, 3).inputValue();
      assert.equal(before, '0.3');
      await page.locator('#rho button', { hasText: 'Clip negative eigenvalues' }).click();
      await page.locator('#rho .rs-note', { hasText: 'negative eigenvalue' }).waitFor();
      await settle();
      assert.equal(await page.locator('#rho .rs-eigenvalue--worst').count(), 0);
      const state = await page.evaluate(() => (window as any).rs.rho.value);
      const ref = handle({ op: 'repair-state', state: { matrix: [[0.4, 0, 0, 0.3], [0, 0.2, 0, 0], [0, 0, 0.2, 0], [0.3, 0, 0, 0.2]], dims: [2, 2] }, actions: ['clip'] }) as Record<string, any>;
      state.matrix.forEach((row: number[], i: number) => row.forEach((x, j) => assert.ok(close(x, ref.value[i][j]), `[${i}][${j}]`)));
    });

    it('the grid is navigable by keyboard: arrows, Enter, Shift+Enter, Tab, and Escape restores the entry', async () => {
      const focused = () => page.evaluate(() => {
        const e = document.activeElement as HTMLElement;
        return `${e.dataset.row},${e.dataset.col}`;
      });
      await cell('sigma', 0, 0).click();
      await page.keyboard.press('ArrowDown');
      assert.equal(await focused(), '1,0');
      await page.keyboard.press('Enter');
      assert.equal(await focused(), '2,0');
      await page.keyboard.press('Shift+Enter');
      assert.equal(await focused(), '1,0');
      await page.keyboard.press('Tab');
      assert.equal(await focused(), '1,1');
      await page.keyboard.press('End');
      await page.keyboard.press('ArrowRight');
      assert.equal(await focused(), '1,2');
      await page.keyboard.press('ArrowUp');
      assert.equal(await focused(), '0,2');
      await page.keyboard.press('Home');
      await page.keyboard.press('ArrowLeft');
      assert.equal(await focused(), '0,1');
      await page.keyboard.type('9');
      await page.keyboard.press('Escape');
      assert.equal(await cell('sigma', 0, 1).inputValue(), '0');
    });

    it('a matrix pasted as numpy prints it replaces the grid, complex entries included', async () => {
      const text = 'array([[0.5+0.j , 0. -0.25j],\n       [0. +0.25j, 0.5+0.j ]])';
      await cell('sigma', 0, 0).evaluate((input, t) => {
        const dt = new DataTransfer();
        dt.setData('text/plain', t);
        input.dispatchEvent(new ClipboardEvent('paste', { clipboardData: dt, bubbles: true, cancelable: true }));
      }, text);
      await page.evaluate(() => (window as any).rs.sigma.checked);
      const v = await page.evaluate(() => (window as any).rs.sigma.value);
      // numpy's "0.5+0.j" travels as the expression "0.5+0*i" (the engine's reader decides what it means).
      assert.deepEqual(v.matrix, [['0.5+0*i', '0 -0.25*i'], ['0 +0.25*i', '0.5+0*i']]);
      assert.deepEqual(v.dims, [2]);
      await page.evaluate(async () => {
        const rs = (window as any).rs;
        await rs.sigma.checked;
      });
      assert.equal(await page.locator('#sigma .rs-check--ok').count(), 3);
      const check = await page.evaluate(() => (window as any).rs.sigma.check);
      // The engine read "0. -0.25i" as −i/4: the spectrum of [[1/2, −i/4], [i/4, 1/2]] is {1/4, 3/4} (closed form).
      assert.ok(close(check.spectrum[0], 0.25) || Math.abs(check.spectrum[0] - 0.25) < 1e-15);
      assert.ok(Math.abs(check.spectrum[1] - 0.75) < 1e-15);
    });

    it('a long solve reports progress and is cancelled by its signal; the restarted worker answers the next request', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const st = await rs.engine.compute({ op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 2, 4], seed: 3 });
        const abort = new AbortController();
        const progress: unknown[] = [];
        const t0 = performance.now();
        // Cancelled at its first progress report (the solve is then surely in flight), or after 700 ms: a
        // fixed delay alone let a fast, idle machine finish the solve before the abort.
        let firstProgress: () => void = () => {};
        const reported = new Promise<void>((res) => (firstProgress = res));
        const pending = rs.engine.compute(
          { op: 'fidelity-of-recovery', rho: st.value, a: [0], b: [1], c: [2] },
          { signal: abort.signal, onProgress: (p: unknown) => { progress.push(p); firstProgress(); } },
        );
        await Promise.race([reported, new Promise((res) => setTimeout(res, 700))]);
        abort.abort();
        const answer = await pending;
        const ms = performance.now() - t0;
        const after = await rs.engine.compute({ op: 'entropy', rho: { matrix: [[0.5, 0], [0, 0.5]] } });
        return { answer, ms, progress, after, starts: rs.engine.starts };
      });
      assert.equal(r.answer.ok, false);
      assert.equal(r.answer.error.code, 'cancelled');
      assert.ok(r.ms < 2000, `cancelled after ${r.ms} ms`);
      assert.ok(r.progress.length >= 1, 'no progress reported before the abort (700 ms at most) of an SDP');
      assert.equal(r.after.ok, true);
      assert.equal(r.after.value, 1); // H(1/2, 1/2) = 1 bit (textbook)
      assert.ok(r.starts >= 2);
    });

    it("shows the engine's notes on a result card: D_max(ρ‖ρ), 0 in exact arithmetic (Datta 2009), lands at rounding level with the note saying so", async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const rho = { matrix: [[0.4, 0.1, 0, 0.05], [0.1, 0.2, 0, 0], [0, 0, 0.2, 0], [0.05, 0, 0, 0.2]], dims: [2, 2] };
        const before = rs.divergence.value;
        rs.divergence.inputs = { rho, sigma: rho };
        rs.divergence.value = { ...before, family: 'max' };
        await rs.divergence.computed;
        const answer = rs.divergence.results.divergence.answer;
        const shown = [...document.querySelectorAll('#divergence .rs-card .rs-note--engine')].map((x) => x.textContent);
        rs.divergence.value = before;
        rs.divergence.inputs = { rho: rs.rho.value, sigma: rs.sigma.value };
        await rs.divergence.computed;
        return { answer, shown };
      });
      assert.equal(r.answer.ok, true);
      assert.ok(Math.abs(r.answer.value) < 1e-12, String(r.answer.value));
      assert.deepEqual(r.shown, r.answer.notes ?? []);
      assert.equal(r.answer.value !== 0, r.shown.some((t: string) => /0 within rounding/.test(t)));
    });

    it('a request asked as long runs on the second lane: quick requests asked after it are answered while it runs, and stopping it restarts only that lane', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const st = await rs.engine.compute({ op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 2, 4], seed: 12 });
        const before = rs.engine.laneStarts;
        const done: string[] = [];
        const stop = new AbortController();
        let reported: () => void = () => {};
        const running = new Promise<void>((res) => (reported = res));
        const solve = rs.engine.compute(
          { op: 'fidelity-of-recovery', rho: st.value, a: [0], b: [1], c: [2] },
          { long: true, signal: stop.signal, onProgress: () => reported() },
        ).then((a: any) => { done.push('solve'); return a; });
        await Promise.race([running, new Promise((res) => setTimeout(res, 10000))]);
        const quick = await rs.engine.compute({ op: 'entropy', rho: { matrix: [[0.5, 0], [0, 0.5]] } });
        done.push('quick');
        stop.abort();
        const stopped = await solve;
        const after = await rs.engine.compute({ op: 'entropy', rho: { matrix: [[0.5, 0], [0, 0.5]] } }, { long: true });
        return { done, quick, stopped, after, before, lanes: rs.engine.laneStarts };
      });
      assert.deepEqual(r.done, ['quick', 'solve']);
      assert.equal(r.quick.value, 1); // H(1/2, 1/2) = 1 bit (textbook)
      assert.equal(r.stopped.error?.code, 'cancelled');
      assert.equal(r.after.value, 1);
      // The quick lane's worker was not restarted by the stop; the long lane's was (once more than before the stop).
      assert.equal(r.lanes.quick, r.before.quick);
      assert.equal(r.lanes.long, Math.max(1, r.before.long) + 1);
    });

    it('small requests that wait together go to the worker as one batch, each answered as if alone; one that cannot reach the worker fails alone', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const client = new rs.EngineClient();
        const h = (p: number) => ({ op: 'entropy', rho: { matrix: [[p, 0], [0, 1 - p]] } });
        await client.compute(h(0.5));
        const before = client.messages;
        // Six asked in the same task leave together, as one message.
        const ps = [0.5, 0.1, 0.2, 0.3, 0.4, 0.25].map((p) => client.compute(h(p)));
        const answers = await Promise.all(ps);
        const batched = client.messages - before;
        // A function cannot be cloned to a worker: that request fails, the others in its batch are answered.
        const first = client.compute(h(0.5));
        const mixed = await Promise.all([client.compute(h(0.125)), client.compute({ ...h(0.5), note: () => 1 }), client.compute(h(0.375))]);
        await first;
        client.dispose();
        return { values: answers.map((a: any) => a.value), batched, mixed };
      });
      // Binary entropy h(p) = −p log₂ p − (1 − p) log₂(1 − p) (textbook).
      const h2 = (p: number) => -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
      [0.5, 0.1, 0.2, 0.3, 0.4, 0.25].forEach((p, i) => assert.ok(Math.abs(r.values[i] - h2(p)) < 1e-14, `${p}: ${r.values[i]}`));
      assert.equal(r.batched, 1);
      assert.ok(Math.abs(r.mixed[0].value - h2(0.125)) < 1e-14);
      assert.equal(r.mixed[1].ok, false);
      assert.equal(r.mixed[1].error.code, 'internal-error');
      assert.ok(Math.abs(r.mixed[2].value - h2(0.375)) < 1e-14);
    });

    it('latest wins: queued requests with the same key are answered cancelled, the newest is computed', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const st = await rs.engine.compute({ op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 2, 4], seed: 4 });
        const busy = rs.engine.compute({ op: 'fidelity-of-recovery', rho: st.value, a: [0], b: [1], c: [2], deadline: 400 });
        const a = rs.engine.compute({ op: 'entropy', rho: { matrix: [[1, 0], [0, 0]] } }, { key: 'k' });
        const b = rs.engine.compute({ op: 'entropy', rho: { matrix: [[0.5, 0], [0, 0.5]] } }, { key: 'k' });
        return Promise.all([busy, a, b]);
      });
      assert.equal(r[1].ok, false);
      assert.equal(r[1].error.code, 'cancelled');
      assert.equal(r[2].ok, true);
      assert.equal(r[2].value, 1);
    });

    it('background requests (the re-checks) wait until nothing else is queued; a running one is not interrupted', async () => {
      const order = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const st = await rs.engine.compute({ op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 2, 4], seed: 8 });
        const done: string[] = [];
        const busy = rs.engine.compute({ op: 'fidelity-of-recovery', rho: st.value, a: [0], b: [1], c: [2], deadline: 300 }).then(() => done.push('busy'));
        const h = (p: number) => ({ op: 'entropy', rho: { matrix: [[p, 0], [0, 1 - p]] } });
        const a = rs.engine.compute(h(0.1), { priority: 'background' }).then(() => done.push('background'));
        const b = rs.engine.compute(h(0.2)).then(() => done.push('normal 1'));
        const c = rs.engine.compute(h(0.3)).then(() => done.push('normal 2'));
        await Promise.all([busy, a, b, c]);
        return done;
      });
      assert.deepEqual(order, ['busy', 'normal 1', 'normal 2', 'background']);
    });

    it('an SDP answer shown is re-checked from its own points (verify-answer), with the verdict Node gives for the same answer', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        // The page's two-qubit ρ again (earlier tests edited the editors), H_min(A|B): an SDP.
        rs.oneShot.inputs = { rho: { matrix: [[0.4, 0, 0, 0.1], [0, 0.2, 0, 0], [0, 0, 0.2, 0], [0.1, 0, 0, 0.2]], dims: [2, 2] } };
        rs.oneShot.value = { quantity: 'conditional-min-entropy' };
        await rs.oneShot.computed;
        await rs.oneShot.verified;
        const shown = document.querySelector('#oneshot .rs-verdict') as HTMLElement | null;
        if (!shown) return { verdict: 'none', text: document.querySelector('#oneshot')!.textContent, request: null, answer: null };
        const res = Object.values(rs.oneShot.results)[0] as { request: unknown; answer: unknown };
        return { verdict: shown.dataset.verdict, text: shown.textContent, request: res.request, answer: res.answer };
      });
      const node = handle({ op: 'verify-answer', request: r.request, answer: r.answer }) as Record<string, any>;
      assert.equal(node.ok, true, JSON.stringify(node));
      assert.equal(r.verdict, node.value === true ? 'certified' : 'not-certified', `${r.text} vs ${JSON.stringify(node)}`);
      assert.equal(node.value, true, 'the one-shot answer of the test page is certified');
      assert.match(String(r.text), /re-checked from its points: certified/);
    });

    it('a value at the end of its range is shown clipped to the range, with the excess stated exactly when the answer states one', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        // Orthogonal pure states: the guessing probability is exactly 1 (Helstrom; textbook).
        rs.guessing.inputs = { probabilities: [0.5, 0.5], states: [{ matrix: [[1, 0], [0, 0]] }, { matrix: [[0, 0], [0, 1]] }] };
        await rs.guessing.computed;
        const res = rs.guessing.results['guessing-probability'];
        return { answer: res.answer, note: document.querySelector('#guessing .rs-clipped')?.textContent ?? null };
      });
      assert.equal(r.answer.ok, true);
      assert.ok(r.answer.value <= 1 && r.answer.value > 1 - 1e-8, String(r.answer.value));
      assert.ok(r.answer.certificate.bounds.upper <= 1);
      assert.equal(r.note !== null, r.answer.certificate.clipped !== undefined, `${r.note} vs ${JSON.stringify(r.answer.certificate.clipped)}`);
      if (r.note) assert.match(r.note, /clipped to the range/);
    });

    it('identical requests in flight go to the worker once (the widgets\' SharedRequests); a superseded first asker does not cost the others their answer; Stop stops it for all', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const shared = new rs.SharedRequests(rs.engine);
        const st = await rs.engine.compute({ op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2, 2, 4], seed: 6 });
        const fr = { op: 'fidelity-of-recovery', rho: st.value, a: [0], b: [1], c: [2] };
        const h = (p: number) => ({ op: 'entropy', rho: { matrix: [[p, 0], [0, 1 - p]] } });
        // 1. Two askers, one request: one worker call, the same answer.
        const [x, y] = await Promise.all([shared.compute(h(0.5), { key: 'model' }), shared.compute(h(0.5), { key: 'view' })]);
        const afterPair = { ...shared.counts };
        // 2. The worker busy; the first asker's request is superseded by its own newer one (latest wins)
        //    while queued: the first asker gets 'cancelled', the joiner still its answer.
        const busy = shared.compute({ ...fr, deadline: 400 });
        const first = shared.compute(h(0.25), { key: 'model' });
        const joiner = shared.compute(h(0.25), { key: 'view' });
        const newer = shared.compute(h(0.125), { key: 'model' });
        const [, f, j, n] = await Promise.all([busy, first, joiner, newer]);
        // 3. Stop from one asker stops the shared solve: both are answered 'cancelled'.
        const stop = new AbortController();
        // Stopped at its first progress report (the solve is then surely running; a fixed delay let an idle
        // worker finish it first), or after 5 s.
        const a = shared.compute(fr, { signal: stop.signal, key: 'view', onProgress: () => stop.abort() });
        const b = shared.compute(fr, { key: 'model' });
        setTimeout(() => stop.abort(), 5000);
        const [sa, sb] = await Promise.all([a, b]);
        return { x, y, afterPair, f, j, n, sa, sb };
      });
      assert.deepEqual(r.x, r.y);
      assert.equal(r.x.value, 1); // H(1/2, 1/2) = 1 bit (textbook)
      assert.deepEqual(r.afterPair, { sent: 1, shared: 1 });
      assert.equal(r.f.ok, false);
      assert.equal(r.f.error.code, 'cancelled');
      assert.equal(r.j.ok, true, JSON.stringify(r.j));
      // h(1/4) = 2 − (3/4) log₂ 3 bits (textbook binary entropy).
      assert.ok(Math.abs(r.j.value - (2 - 0.75 * Math.log2(3))) < 1e-14, String(r.j.value));
      assert.ok(Math.abs(r.n.value - (-(0.125 * Math.log2(0.125)) - 0.875 * Math.log2(0.875))) < 1e-14);
      assert.equal(r.sa.error?.code, 'cancelled');
      assert.equal(r.sb.error?.code, 'cancelled');
    });

    it('a worker that cannot run is not restarted for ever: after three deaths in a row every request is refused, saying why', async () => {
      const r = await page.evaluate(async () => {
        const rs = (window as any).rs;
        const script = URL.createObjectURL(new Blob(['throw new Error("this worker cannot start")'], { type: 'text/javascript' }));
        const client = new rs.EngineClient({ createWorker: () => new Worker(script) });
        const first = await client.compute({ op: 'entropy', rho: { matrix: [[1, 0], [0, 0]] } });
        await new Promise((res) => setTimeout(res, 1500));
        const later = await client.compute({ op: 'entropy', rho: { matrix: [[1, 0], [0, 0]] } });
        return { first, later, starts: client.starts, broken: client.broken };
      });
      assert.equal(r.first.ok, false);
      assert.equal(r.first.error.code, 'internal-error');
      assert.equal(r.later.ok, false);
      assert.equal(r.later.error.code, 'internal-error');
      assert.match(r.later.error.message, /not restarted/);
      assert.equal(r.starts, 3);
      assert.ok(r.broken);
    });

    it('renders in the dark theme with light text on a dark ground (screenshot for a person to look at)', async () => {
      await page.screenshot({ path: join(tmpdir(), 'rhosigma-ui-light.png'), fullPage: true });
      await page.evaluate(() => document.body.classList.add('rs-theme-dark'));
      await page.evaluate(async () => {
        const rs = (window as any).rs;
        // The paste above made σ a qubit; give the calculator a two-qubit σ again.
        const sigma = { matrix: [[0.25, 0, 0, 0], [0, 0.25, 0, 0], [0, 0, 0.25, 0], [0, 0, 0, 0.25]], dims: [2, 2] };
        rs.sigma.value = sigma;
        // The clip above left ρ with trace ≠ 1 (the repairs do only what is asked); a valid ρ again.
        const rho = { matrix: [[0.4, 0, 0, 0.1], [0, 0.2, 0, 0], [0, 0, 0.2, 0], [0.1, 0, 0, 0.2]], dims: [2, 2] };
        rs.rho.value = rho;
        rs.divergence.inputs = { sigma, rho };
        await rs.divergence.computed;
        await rs.divergence.drawn;
      });
      const colours = await page.locator('#divergence .rs-component').evaluate((e) => {
        const cs = getComputedStyle(e);
        return { bg: cs.backgroundColor, fg: cs.color };
      });
      // Relative luminance (WCAG 2.1 definition) of the two colours.
      const lum = (css: string) => {
        const [r, g, b] = css.match(/\d+(\.\d+)?/g)!.slice(0, 3).map(Number).map((v) => {
          const c = v / 255;
          return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
        });
        return 0.2126 * r + 0.7152 * g + 0.0722 * b;
      };
      const [hi, lo] = [lum(colours.fg), lum(colours.bg)];
      assert.ok(lo < 0.05, `background ${colours.bg} is not dark`);
      assert.ok((hi + 0.05) / (lo + 0.05) >= 7, `contrast ${(hi + 0.05) / (lo + 0.05)} below 7:1 (WCAG AAA)`);
      assert.ok(await page.locator('#divergence .rs-chart svg').count() >= 1, `no chart drawn: ${await page.locator('#divergence .rs-results').innerText()}`);
      await page.screenshot({ path: join(tmpdir(), 'rhosigma-ui-dark.png'), fullPage: true });
      assert.deepEqual(pageErrors, []);
    });
  });
}
