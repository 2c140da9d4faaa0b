#!/usr/bin/env node
/**
 * Bundles the `rhosigma` command into one file, dist/cli/bundle.mjs, with esbuild (part of `npm run
 * build`); bin/rhosigma.js runs it when it is there. Why: a cold command spent most of its start-up
 * resolving, reading and linking some seventy modules (and lexing the CommonJS ones); one file loads in a
 * fraction of that (bench/startup.ts measures it against a bare `node -e 0`).
 *
 * mathjs stays outside the bundle: the expression reader loads it from node_modules on first need
 * (src/ops/expressions.ts), so requests without expression strings never pay for it. So do vega, vega-lite
 * (sweep plots) and cli-progress (a terminal's progress bar), loaded by `import()` where they are used. What it does not do: minify (stack traces of bugs stay readable) or bundle for browsers
 * (scripts/bundle-engine.mjs). Cost: well under a second.
 */
import { build } from 'esbuild';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

export async function bundleCli() {
  await build({
    entryPoints: [join(root, 'src/cli/main.ts')],
    outfile: join(root, 'dist/cli/bundle.mjs'),
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: ['node20'],
    // vega, vega-lite and cli-progress too: only `sweep plot` and a terminal's progress bar need them.
    external: ['mathjs', 'mathjs/*', 'vega', 'vega-lite', 'cli-progress'],
    logLevel: 'warning',
    // CommonJS dependencies bundled into an ES module may call require() for Node built-ins.
    banner: { js: "import { createRequire as __rhosigmaCreateRequire } from 'node:module'; const require = __rhosigmaCreateRequire(import.meta.url);" },
  });
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) await bundleCli();
