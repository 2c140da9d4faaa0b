/**
 * The `<rhosigma-calculator>` element: mounts one live calculator where a page puts it, from the JSON
 * configuration block inside it (`<script type="application/json">`, config.ts).
 *
 * Safe by construction: everything is built with createElement and textContent (no HTML from strings),
 * no style attribute is ever written from a string (styles come from the stylesheet file beside the
 * script, linked inside the element's shadow root), nothing is read from the page but this element, the
 * URL's fragment (for shared links) and the address of our own script; the only requests are for the
 * embed's own files beside the script (the stylesheet, the worker, the chunks loaded on first need). Works under `Content-Security-Policy: default-src
 * 'self'`.
 *
 * What it does not do: compute (the calculator asks the page's one engine worker) or draw the editors
 * and calculators itself (src/ui does; mount.ts wires them). Cost: one shadow root and the components.
 */
import { ConfigError, readConfig, controlsOf, type EmbedConfig } from './config.js';
import { decodeShared, encodeShared, linkTo, pythonSnippet, requestText, sharedEntries } from './share.js';
import { mountCalculator, type Mounted } from './mount.js';
import type { EngineLike } from './engine.js';

export const ELEMENT_NAME = 'rhosigma-calculator';

/** Where the embed's files are (the stylesheet, the worker), and the engine to share. */
export interface EmbedEnvironment {
  stylesheet: string;
  engine(): EngineLike;
}

let environment: EmbedEnvironment | null = null;

/** Set once by the entry (main.ts) before the element is defined. */
export function setEmbedEnvironment(env: EmbedEnvironment): void {
  environment = env;
}

function el<K extends keyof HTMLElementTagNameMap>(tag: K, className?: string, text?: string): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag);
  if (className) node.className = className;
  if (text !== undefined) node.textContent = text;
  return node;
}

const CALCULATOR_NAMES: Record<string, string> = {
  divergence: 'Divergence calculator',
  recoverability: 'Recoverability calculator',
  guessing: 'Guessing calculator',
  'one-shot': 'One-shot calculator',
};

export class CalculatorElement extends HTMLElement {
  private mounted: Mounted | null = null;
  private started = false;
  private frame: HTMLElement | null = null;
  /** The latest request a result answered (for "copy request" and "copy Python"). */
  private lastRequest: Record<string, unknown> | null = null;

  /** The key of this calculator in shared links: the element's id, else its position on the page. */
  get shareKey(): string {
    if (this.id) return this.id;
    const all = Array.from(document.getElementsByTagName(ELEMENT_NAME));
    return String(all.indexOf(this));
  }

  /** The calculator's current inputs (plain data), or null before it is mounted. */
  get inputs(): unknown {
    return this.mounted ? this.mounted.inputs() : null;
  }

  connectedCallback(): void {
    if (this.started) return;
    this.started = true;
    // The configuration block may still be parsing when the element is upgraded: wait for the parser.
    if (document.readyState === 'loading') document.addEventListener('DOMContentLoaded', () => void this.start(), { once: true });
    else void this.start();
  }

  disconnectedCallback(): void {
    // Kept mounted when moved; disposed only when removed for good (checked after the move settles).
    queueMicrotask(() => {
      if (!this.isConnected) this.dispose();
    });
  }

  dispose(): void {
    this.mounted?.dispose();
    this.mounted = null;
    this.started = false;
  }

  private shell(): HTMLElement {
    const root = this.shadowRoot ?? this.attachShadow({ mode: 'open' });
    root.replaceChildren();
    if (environment) {
      const link = el('link');
      link.rel = 'stylesheet';
      link.href = environment.stylesheet;
      root.append(link);
    }
    const frame = el('section', 'rs-embed');
    root.append(frame);
    this.frame = frame;
    return frame;
  }

  private async start(): Promise<void> {
    const frame = this.shell();
    let config: EmbedConfig;
    try {
      const block = this.querySelector(':scope > script[type="application/json"]');
      if (!block) throw new ConfigError('', `a <${ELEMENT_NAME}> needs its configuration in a <script type="application/json"> block inside it`);
      config = readConfig(block.textContent ?? '');
      const shared = sharedEntries(location.hash).get(this.shareKey);
      if (shared !== undefined) {
        const fromLink = await decodeShared(shared);
        if (fromLink.calculator !== config.calculator) throw new ConfigError('link', `the shared link is for a ${fromLink.calculator} calculator, this one is ${config.calculator}`);
        config = { ...config, inputs: fromLink.inputs };
      }
      if (!environment) throw new ConfigError('', 'the embed script did not start (rhosigma-embed.js)');
    } catch (err) {
      this.showError(frame, err);
      return;
    }
    this.render(frame, config, environment);
  }

  private showError(frame: HTMLElement, err: unknown): void {
    frame.replaceChildren();
    frame.classList.add('rs-embed-failed');
    const box = el('div', 'rs-embed-error');
    box.setAttribute('role', 'alert');
    box.append(el('strong', undefined, 'This calculator cannot start. '));
    if (err instanceof ConfigError) {
      box.append(err.field ? `The configuration's field ${err.field} ${err.reason}.` : `The configuration is wrong: ${err.reason}.`);
      this.dataset.error = err.field || 'configuration';
    } else {
      box.append(`An unexpected error: ${err instanceof Error ? err.message : String(err)}.`);
      this.dataset.error = 'internal';
    }
    frame.append(box);
  }

  private render(frame: HTMLElement, config: EmbedConfig, env: EmbedEnvironment): void {
    const label = config.title ?? CALCULATOR_NAMES[config.calculator];
    frame.setAttribute('aria-label', label);
    frame.dataset.theme = config.theme ?? 'auto';
    // The components' stylesheet (style/) picks its dark palette from these classes.
    frame.classList.add(`rs-theme-${config.theme ?? 'auto'}`);
    frame.dataset.calculator = config.calculator;
    if (config.title) frame.append(el('h2', 'rs-embed-title', config.title));
    if (config.description) frame.append(el('p', 'rs-embed-description', config.description));
    const body = el('div', 'rs-embed-body');
    frame.append(body);
    const controls = controlsOf(config);
    try {
      this.mounted = mountCalculator(body, config, controls, env.engine());
    } catch (err) {
      this.showError(frame, err);
      return;
    }
    const mounted = this.mounted;
    mounted.onResult(({ name, request, answer }) => {
      // Only the headline result is shared and announced (a calculator also shows neighbours: other
      // families, other quantities).
      if (name !== undefined && name !== mounted.headline()) return;
      this.lastRequest = request;
      this.dataset.state = (answer as { ok?: boolean }).ok ? 'ready' : 'error';
      this.dispatchEvent(new CustomEvent('rhosigma-result', { detail: { request, answer }, bubbles: true }));
    });
    if (controls.has('share')) frame.append(this.shareBar(config));
  }

  /** Copy as link, as request (JSON), as Python; the copied text is also shown, selected, for copying by hand. */
  private shareBar(config: EmbedConfig): HTMLElement {
    const bar = el('div', 'rs-embed-share');
    bar.setAttribute('role', 'group');
    bar.setAttribute('aria-label', 'Share this calculator');
    const out = el('textarea', 'rs-embed-shared');
    out.readOnly = true;
    out.rows = 4;
    out.hidden = true;
    const outId = `rs-shared-${Math.random().toString(36).slice(2)}`;
    out.id = outId;
    const outLabel = el('label', 'rs-embed-shared-label', 'Copied text');
    outLabel.htmlFor = outId;
    outLabel.hidden = true;
    const status = el('span', 'rs-embed-status');
    status.setAttribute('role', 'status');
    status.setAttribute('aria-live', 'polite');

    const show = async (what: string, text: string) => {
      out.value = text;
      out.hidden = false;
      outLabel.hidden = false;
      out.dataset.kind = what;
      let copied = false;
      try {
        await navigator.clipboard.writeText(text);
        copied = true;
      } catch {
        copied = false;
      }
      out.select();
      status.textContent = copied ? `${what} copied to the clipboard.` : `${what} shown below: press Ctrl+C (⌘C) to copy it.`;
    };
    const button = (text: string, kind: string, make: () => Promise<string | null>) => {
      const b = el('button', 'rs-embed-button', text);
      b.type = 'button';
      b.dataset.share = kind;
      b.addEventListener('click', async () => {
        const made = await make();
        if (made === null) status.textContent = 'Nothing to copy yet: the calculator has no result.';
        else await show(text.replace(/^Copy /, '').replace(/^./, (c) => c.toUpperCase()), made);
      });
      return b;
    };
    bar.append(
      button('Copy link', 'link', async () => linkTo(location.href, this.shareKey, await encodeShared(config.calculator, this.inputs))),
      button('Copy request', 'request', async () => (this.lastRequest ? requestText(this.lastRequest) : null)),
      button('Copy Python', 'python', async () => (this.lastRequest ? pythonSnippet(this.lastRequest) : null)),
      status,
      outLabel,
      out,
    );
    return bar;
  }
}

/** Defines the element (once). */
export function defineCalculatorElement(): void {
  if (!customElements.get(ELEMENT_NAME)) customElements.define(ELEMENT_NAME, CalculatorElement);
}
