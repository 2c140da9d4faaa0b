#!/usr/bin/env node
/**
 * Bundles the engine for the browser with esbuild: the web worker of test/browser/engine-worker.ts
 * (the ops layer behind `handle`, answering postMessage'd batches) and the plain test page beside it.
 *
 * What it is for: the real-browser test (test/browser/engine.test.ts) builds into a temporary folder
 * at test time; `node scripts/bundle-engine.mjs [OUTDIR]` does the same by hand (default: a new folder
 * under the system's temporary folder), to open the page in a browser. Nothing it writes is committed.
 *
 * It refuses any Node built-in (fs, node:path, ...) reaching the bundle: the engine must run where
 * there is no Node. The error names the module that imports the built-in, so the leak can be fixed at
 * its source instead of being papered over with an empty shim.
 *
 * What it does not do: minify, produce source maps, or bundle anything for production (the widget
 * and embed builds are separate). Cost: about one to two seconds (mathjs's bundle is most of the 1.8 MB).
 */
import { builtinModules } from 'node:module';
import { copyFileSync, mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const builtins = new Set(builtinModules.flatMap((m) => [m, `node:${m}`]));

/**
 * esbuild plugin: fail on any import of a Node built-in, naming the importing module. One exception, the
 * same as the webpack builds' `fallback: { crypto: false }`: seedrandom (inside mathjs, whose parser the
 * expression reader loads) requires 'crypto' in a try/catch, only to seed itself when no seed is given; it
 * gets an empty module, and falls back to the browser's own sources.
 */
const refuseNodeBuiltins = {
  name: 'refuse-node-builtins',
  setup(b) {
    b.onLoad({ filter: /.*/, namespace: 'empty-builtin' }, () => ({ contents: 'module.exports = {};', loader: 'js' }));
    b.onResolve({ filter: /.*/ }, (args) => {
      if (!builtins.has(args.path) && !args.path.startsWith('node:')) return undefined;
      if (args.path === 'crypto' && /[\\/]node_modules[\\/]seedrandom[\\/]/.test(args.importer)) return { path: 'crypto', namespace: 'empty-builtin' };
      return {
        errors: [{
          text: `Node built-in "${args.path}" imported by ${relative(root, args.importer) || args.importer}: the engine must run without Node`,
        }],
      };
    });
  },
};

/**
 * Writes engine-worker.js (IIFE, platform browser), index.html and page.js into outDir.
 * Returns the list of bundled source files (relative to the repository), for reports.
 * @param {string} outDir
 * @returns {Promise<{ files: string[], bytes: number }>}
 */
export async function bundleEngine(outDir) {
  mkdirSync(outDir, { recursive: true });
  const result = await build({
    entryPoints: [join(root, 'test/browser/engine-worker.ts')],
    outfile: join(outDir, 'engine-worker.js'),
    bundle: true,
    platform: 'browser',
    format: 'iife',
    target: ['chrome110'],
    metafile: true,
    logLevel: 'silent',
    plugins: [refuseNodeBuiltins],
  });
  copyFileSync(join(root, 'test/browser/index.html'), join(outDir, 'index.html'));
  copyFileSync(join(root, 'test/browser/page.js'), join(outDir, 'page.js'));
  const out = Object.values(result.metafile.outputs)[0];
  return { files: Object.keys(result.metafile.inputs), bytes: out.bytes };
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const outDir = process.argv[2] ? resolve(process.argv[2]) : mkdtempSync(join(tmpdir(), 'rhosigma-bundle-'));
  const { files, bytes } = await bundleEngine(outDir);
  console.log(`bundle-engine: ${files.length} modules, ${(bytes / 1e6).toFixed(2)} MB → ${relative(process.cwd(), outDir) || outDir}`);
}
