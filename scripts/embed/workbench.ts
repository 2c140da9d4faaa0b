/**
 * The workbench: one page holding every calculator, each preloaded with a scenario of our own
 * (src/embed/scenarios.ts), for someone without JupyterLab.
 *
 *   npm run build:workbench            writes the page as static files (dist/workbench/, or OUTDIR)
 *   npm run workbench [-- --port N]    builds it, then serves it on 127.0.0.1 (strict CSP) and prints the URL
 *
 * The page is plain HTML: the embed script, the stylesheet and one `<rhosigma-calculator>` element per
 * scenario, exactly what a wiki page holds, so it can be published as it is. The embed's files come from
 * `npm run build:embed` (webpack, dist/embed/); this script runs that build when they are missing.
 *
 * What it does not do: compute (the page computes in the reader's browser) or listen anywhere but
 * 127.0.0.1. Cost: copying a few files; the embed build when needed (about half a minute).
 */
import { cpSync, existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { SCENARIOS } from '../../src/embed/scenarios.js';
import { serveStatic } from './static-server.mjs';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const EMBED_DIST = join(root, 'dist', 'embed');
export const WORKBENCH_DIST = join(root, 'dist', 'workbench');

/** Text for HTML content and attribute values (the page is written by us, from our own scenarios). */
export function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** JSON for a `<script type="application/json">` block: `<` written as \u003c, so no `</script>` can close it. */
export function jsonBlock(value: unknown, indent = '  '): string {
  return readableJson(value, indent).replace(/</g, '\\u003c');
}

/** JSON indented by object, with arrays of numbers and strings (matrix rows, dims) kept on one line. */
function readableJson(value: unknown, indent: string): string {
  if (Array.isArray(value)) {
    if (value.every((x) => x === null || typeof x !== 'object')) return JSON.stringify(value).replace(/,/g, ', ');
    return `[\n${value.map((x) => `${indent}  ${readableJson(x, `${indent}  `)}`).join(',\n')}\n${indent}]`;
  }
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value).map(([k, v]) => `${indent}  ${JSON.stringify(k)}: ${readableJson(v, `${indent}  `)}`);
    return `{\n${entries.join(',\n')}\n${indent}}`;
  }
  return JSON.stringify(value);
}

/** The snippet a wiki author pastes: the element with its configuration (the script tag goes once per page). */
export function elementSnippet(id: string | null, config: unknown): string {
  return [
    `<rhosigma-calculator${id ? ` id="${escapeHtml(id)}"` : ''}>`,
    '<script type="application/json">',
    jsonBlock(config, ''),
    '</script>',
    '</rhosigma-calculator>',
  ].join('\n');
}

/**
 * The same inside a `<div>`: Markdown engines (Python-Markdown in MkDocs, and most others) pass a block
 * that starts with a known block-level tag through untouched, but wrap an unknown element in `<p>`.
 */
export function markdownSnippet(id: string | null, config: unknown): string {
  return `<div class="rhosigma">\n${elementSnippet(id, config)}\n</div>`;
}

export function workbenchHtml(prefix = 'rhosigma/'): string {
  const sections = SCENARIOS.map((s) => elementSnippet(s.id, s.config)).join('\n\n');
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="color-scheme" content="light dark">
<title>rhosigma workbench</title>
<link rel="icon" href="${prefix}favicon.svg">
<link rel="stylesheet" href="workbench.css">
<script src="${prefix}rhosigma-embed.js" defer></script>
</head>
<body>
<header class="wb-header">
<h1>rhosigma workbench</h1>
<p>Live calculators for quantum information: every number on this page is computed in your browser by the
rhosigma engine, in a background worker. Edit any entry (numbers or expressions such as <code>1/sqrt(2)</code>
or <code>exp(i*pi/4)/2</code>); each calculator can be shared as a link, as the plain request for
<code>rhosigma compute</code>, or as Python for the <code>rhosigma</code> package.</p>
</header>
<main class="wb-main">
${sections}
</main>
<footer class="wb-footer"><p>Numerical answers are evidence, not proofs: a value near zero may be rounding, and an SDP's value
is as good as its certificate (shown beside it).</p></footer>
</body>
</html>
`;
}

const WORKBENCH_CSS = `/* The workbench page's own layout; the calculators bring their stylesheet (rhosigma-embed.css). */
:root { color-scheme: light dark; --wb-fg: #1d2327; --wb-bg: #fbfbf8; --wb-muted: #5b6368; }
@media (prefers-color-scheme: dark) { :root { --wb-fg: #e4e6e3; --wb-bg: #15181b; --wb-muted: #a3aaa8; } }
body { margin: 0; font: 16px/1.5 system-ui, sans-serif; color: var(--wb-fg); background: var(--wb-bg); }
.wb-header, .wb-main, .wb-footer { max-width: 62rem; margin: 0 auto; padding: 0 1.25rem; }
.wb-header h1 { font-size: 1.6rem; margin: 1.2rem 0 0.3rem; }
.wb-header p, .wb-footer p { color: var(--wb-muted); }
.wb-main { display: grid; gap: 1.5rem; }
code { font-family: ui-monospace, monospace; font-size: 0.92em; }
`;

/** An icon of our own (a ρ on a disc), so that the page requests no missing favicon. */
const FAVICON = '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 32 32"><circle cx="16" cy="16" r="15" fill="#2f6f73"/><text x="16" y="22" font-size="18" text-anchor="middle" fill="#fff" font-family="serif">ρ</text></svg>\n';

/** Runs the embed build when its files are missing; returns the folder. */
export function ensureEmbedBuild(): string {
  if (!existsSync(join(EMBED_DIST, 'rhosigma-embed.js'))) {
    const r = spawnSync('npm', ['run', '-s', 'build:embed'], { cwd: root, stdio: 'inherit' });
    if (r.status !== 0) throw new Error('npm run build:embed failed');
  }
  return EMBED_DIST;
}

/** Copies the embed's files into `dir` (the folder a page links as `rhosigma/`). */
export function copyEmbed(dir: string): void {
  mkdirSync(dir, { recursive: true });
  for (const f of readdirSync(ensureEmbedBuild())) cpSync(join(EMBED_DIST, f), join(dir, f), { recursive: true });
  writeFileSync(join(dir, 'favicon.svg'), FAVICON);
}

/** Writes the workbench as static files into outDir. */
export function buildWorkbench(outDir = WORKBENCH_DIST): string {
  mkdirSync(outDir, { recursive: true });
  copyEmbed(join(outDir, 'rhosigma'));
  writeFileSync(join(outDir, 'index.html'), workbenchHtml());
  writeFileSync(join(outDir, 'workbench.css'), WORKBENCH_CSS);
  return outDir;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const args = process.argv.slice(2);
  const serve = args.includes('--serve');
  const portAt = args.indexOf('--port');
  const port = portAt >= 0 ? Number(args[portAt + 1]) : 8070;
  const out = args.find((a, k) => !a.startsWith('--') && args[k - 1] !== '--port');
  const dir = buildWorkbench(out ? resolve(out) : WORKBENCH_DIST);
  if (!serve) {
    process.stdout.write(`workbench written to ${dir}\n`);
  } else {
    const server = await serveStatic(dir, { port });
    process.stdout.write(`rhosigma workbench: ${server.url}  (serving ${dir}; Ctrl+C stops)\n`);
    const stop = () => void server.close().then(() => process.exit(0));
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  }
}
