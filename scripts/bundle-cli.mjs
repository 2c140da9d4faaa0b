#!/usr/bin/env node
/**
 * Bundles the `rhosigma` command into one file, dist/cli/bundle.cjs, with esbuild (part of `npm run
 * build`), and writes V8's code cache of it, dist/cli/bundle.cjs.cache; bin/rhosigma.js runs the bundle
 * with that cache when they are there. Why: a cold command spent most of its start-up resolving, reading
 * and linking some seventy modules (and lexing the CommonJS ones); one file loads in a fraction of that,
 * and one file with its bytecode cached skips parsing and compiling it too (bench/transport.ts measures
 * it against a bare `node -e 0`). CommonJS, not an ES module, because Node 20 can cache the compiled code
 * of a script (vm.Script's cachedData) but not of a module; import.meta.url is the bundle's own file URL.
 *
 * mathjs stays outside the bundle: the expression reader loads it from node_modules on first need
 * (src/ops/expressions.ts), so requests without expression strings never pay for it. So do vega, vega-lite
 * (sweep plots) and cli-progress (a terminal's progress bar), loaded by `import()` where they are used.
 * Node's built-in modules that only some commands use (child_process, which commander loads for
 * subcommands run as separate programs, which ours are not; crypto, which the engine itself no longer uses:
 * the sweep spec's hash is @noble/hashes'; worker_threads, the sweep pool's) are required on first use of one
 * of their exports, not at start-up, and so would be ajv's compiler (sweep specs now use a precompiled
 * validator, src/sweep/spec-validator.generated.ts): each import of them becomes a small module of getters (`lazyModules`);
 * together they were about a quarter of a cached cold start (bench/RESULTS.md). What it does not do: minify (stack traces of bugs stay readable) or bundle for browsers
 * (scripts/bundle-engine.mjs). Cost: a second or two (the bundle, then one request run to fill the cache).
 */
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const outfile = join(root, 'dist/cli/bundle.cjs');

/** Built-in modules loaded on first use of an export (every use in the bundle is `module.name`, read at the call). */
const LAZY_BUILTINS = ['node:child_process', 'node:crypto', 'node:worker_threads'];
/** Bundled packages evaluated on first use of an export: ajv's compiler (imported by nothing in the engine today; kept lazy should it be). */
const LAZY_PACKAGES = ['ajv/dist/2020.js'];

/**
 * esbuild plugin: each import of a LAZY_BUILTINS or LAZY_PACKAGES module becomes a module of getters, one
 * per export of the real one (listed here, at build time), that require the real module on first read (a
 * built-in from Node, a package from the bundle, where esbuild wraps it to run on its first require). (Getters, not a
 * Proxy: esbuild's interop copies the names of a module's exports at import, which a Proxy would have to
 * answer by loading it.)
 */
const lazyModules = {
  name: 'lazy-modules',
  setup(b) {
    const escape = (m) => m.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
    const builtins = new RegExp(`^(${LAZY_BUILTINS.map((m) => m.replace('node:', '(node:)?')).join('|')})$`);
    const packages = new RegExp(`^(${LAZY_PACKAGES.map(escape).join('|')})$`);
    b.onResolve({ filter: builtins }, (args) =>
      args.namespace === 'lazy' ? { path: args.path, external: true } : { path: args.path.replace(/^(node:)?/, 'node:'), namespace: 'lazy' },
    );
    // The package itself is resolved and bundled as usual when the module of getters requires it.
    b.onResolve({ filter: packages }, (args) => (args.namespace === 'lazy' ? undefined : { path: args.path, namespace: 'lazy' }));
    b.onLoad({ filter: /.*/, namespace: 'lazy' }, async (args) => {
      const real = await import(args.path);
      const names = Object.keys(args.path.startsWith('node:') ? real : (real.default ?? real)).filter((k) => k !== 'default' && k !== '__esModule');
      return {
        loader: 'js',
        resolveDir: root,
        contents: [
          'let real;',
          `const load = () => (real ??= require(${JSON.stringify(args.path)}));`,
          `for (const key of ${JSON.stringify([...names, 'default'])}) Object.defineProperty(module.exports, key, { get: () => load()[key], enumerable: true });`,
        ].join('\n'),
      };
    });
  },
};

/** Runs a few small requests through bin/rhosigma.js, which writes the code cache when there is none. */
function fillCache() {
  rmSync(`${outfile}.cache`, { force: true });
  const dir = mkdtempSync(join(tmpdir(), 'rhosigma-bundle-'));
  const file = join(dir, 'requests.json');
  writeFileSync(file, JSON.stringify([
    { op: 'spectrum', matrix: [[2, 1], [1, 2]] },
    { op: 'entropy', rho: { matrix: [[0.5, 0], [0, 0.5]] } },
    { op: 'fidelity', rho: { matrix: [[1, 0], [0, 0]] }, sigma: { matrix: [[0.5, 0], [0, 0.5]] } },
  ]));
  const r = spawnSync(process.execPath, [join(root, 'bin/rhosigma.js'), 'compute', file], { encoding: 'utf8' });
  rmSync(dir, { recursive: true, force: true });
  if (r.status !== 0) throw new Error(`bundle-cli: the bundle failed on its first requests (exit ${r.status}): ${r.stderr}${r.stdout}`);
}

export async function bundleCli() {
  await build({
    entryPoints: [join(root, 'src/cli/main.ts')],
    outfile,
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: ['node20'],
    // vega, vega-lite and cli-progress too: only `sweep plot` and a terminal's progress bar need them.
    external: ['mathjs', 'mathjs/*', 'vega', 'vega-lite', 'cli-progress'],
    plugins: [lazyModules],
    // The bundle's own file URL (src/cli/main.ts reads ../../package.json beside it; the expression
    // reader and handle's ajv fallback require from it). import.meta.resolve is reached only from source.
    define: { 'import.meta.url': '__rhosigmaBundleUrl', 'import.meta.resolve': '__rhosigmaResolve' },
    banner: { js: "const __rhosigmaBundleUrl = require('node:url').pathToFileURL(__filename).href; const __rhosigmaResolve = (s) => require.resolve(s);" },
    logLevel: 'warning',
  });
  rmSync(join(root, 'dist/cli/bundle.mjs'), { force: true }); // the former ES module bundle, if an old build left it
  fillCache();
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) await bundleCli();
