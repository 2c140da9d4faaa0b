/**
 * Test fixture: a tiny static site built by a real static-site engine, MkDocs (from PyPI, pinned in
 * requirements.txt, run from .venv), with the embed snippet written the way its users write raw HTML in
 * Markdown: the script tag once, then the element with its JSON block.
 *
 * The theme is a minimal one of the fixture's own (MkDocs' `custom_dir`): the built-in themes carry
 * inline scripts of their own, which a strict Content-Security-Policy refuses, and the tests must see
 * only what the embed does under that policy. The Markdown is rendered by MkDocs itself.
 *
 * What it does not do: start a server (scripts/embed/static-server.mjs does). Cost: one `mkdocs build`,
 * about a second.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { PYTHON } from '../helpers/python.js';
import { copyEmbed, markdownSnippet } from '../../scripts/embed/workbench.js';

export interface WikiPage {
  /** File name under docs/ (`notes.md` becomes `notes.html`). */
  name: string;
  /** Markdown above the calculators. */
  intro: string;
  /** Raw blocks: each a configuration (written as the Markdown snippet, in a <div>) or raw text (hostile cases). */
  blocks: ({ id?: string; config: unknown } | { raw: string })[];
}

const THEME_MAIN = `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>{{ page.title }} - {{ config.site_name }}</title>
<link rel="stylesheet" href="{{ 'site.css' | url }}">
<link rel="icon" href="{{ 'rhosigma/favicon.svg' | url }}">
</head>
<body>
<nav class="site-nav">{{ config.site_name }}</nav>
<main class="site-main">
{{ page.content }}
</main>
</body>
</html>
`;

const SITE_CSS = `body { font: 16px/1.55 Georgia, serif; margin: 0; color: #222; background: #fdfdfb; }
@media (prefers-color-scheme: dark) { body { color: #ddd; background: #121416; } }
.site-nav { padding: 0.6rem 1.2rem; border-bottom: 1px solid #8886; font-weight: bold; }
.site-main { max-width: 52rem; margin: 0 auto; padding: 0 1.2rem 2rem; }
`;

/** Builds the site into `dir/site`; returns that folder. */
export function buildWikiSite(dir: string, pages: WikiPage[]): string {
  const docs = join(dir, 'docs');
  mkdirSync(join(dir, 'theme'), { recursive: true });
  mkdirSync(docs, { recursive: true });
  writeFileSync(join(dir, 'theme', 'main.html'), THEME_MAIN);
  writeFileSync(join(docs, 'site.css'), SITE_CSS);
  copyEmbed(join(docs, 'rhosigma'));
  writeFileSync(
    join(dir, 'mkdocs.yml'),
    ['site_name: Group notes', 'use_directory_urls: false', 'theme:', '  name: null', '  custom_dir: theme', 'nav:', ...pages.map((p) => `  - ${p.name}`), ''].join('\n'),
  );
  for (const page of pages) {
    const blocks = page.blocks.map((b) => ('raw' in b ? b.raw : markdownSnippet(b.id ?? null, b.config)));
    writeFileSync(
      join(docs, page.name),
      [page.intro, '', '<script src="rhosigma/rhosigma-embed.js" defer></script>', '', ...blocks.flatMap((b) => [b, '']), 'Notes continue below the calculator.', ''].join('\n'),
    );
  }
  const r = spawnSync(PYTHON, ['-m', 'mkdocs', 'build', '--quiet', '--strict', '--site-dir', 'site'], { cwd: dir, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`mkdocs build failed (is mkdocs in .venv? scripts/setup.sh installs requirements.txt):\n${r.stderr}${r.stdout}`);
  return join(dir, 'site');
}
