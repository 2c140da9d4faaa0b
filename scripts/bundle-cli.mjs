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
 * (src/ops/expressions.ts), so requests without expression strings never pay for it. So does cli-progress
 * (a terminal's progress bar); vega and vega-lite (sweep plots) are one-file builds of their own in
 * dist/cli/vendor/ (`vendored`). All three are loaded where they are used.
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
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
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

/** Packages bundled on their own into dist/cli/vendor/NAME.cjs (see `vendored`). */
const VENDORED = ['vega', 'vega-lite'];

/**
 * esbuild plugin: the bundle requires vega and vega-lite from one-file CommonJS builds of them beside it
 * (dist/cli/vendor/, written by `bundleVendored`), not from node_modules. Why: vega is an ES module whose
 * canvas part awaits at its top level, which require() refuses, and a script compiled from V8's code cache
 * cannot import() (see `supported` below); vega-canvas's browser build, used in those one-file builds, is
 * the same module without that optional renderer (both give null canvases when the canvas package is
 * absent): sweep plots render SVG either way. They load only when `sweep plot` runs.
 */
const vendored = {
  name: 'vendored',
  setup(b) {
    b.onResolve({ filter: new RegExp(`^(${VENDORED.join('|')})$`) }, (args) => ({ path: `./vendor/${args.path}.cjs`, external: true }));
  },
};

/** One package (`contents` the entry's text, resolved from the checkout) as one minified CommonJS file. */
function buildPackageFile(contents, outfile, extra = {}) {
  return build({
    stdin: { contents, resolveDir: root, loader: 'js' },
    outfile,
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: ['node20'],
    minify: true,
    logLevel: 'warning',
    ...extra,
  });
}

/** Writes dist/cli/vendor/NAME.cjs (`vendored`) under `cliDir`, each one minified CommonJS file, with its licence. */
async function bundleVendored(cliDir) {
  for (const name of VENDORED) {
    await buildPackageFile(`export * from ${JSON.stringify(name)};`, join(cliDir, 'vendor', `${name}.cjs`), {
      alias: { 'vega-canvas': join(root, 'node_modules/vega-canvas/build/vega-canvas.browser.js') },
      external: ['canvas'],
    });
    copyFileSync(join(root, 'node_modules', name, 'LICENSE'), join(cliDir, 'vendor', `${name}.LICENSE`));
  }
}

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

/** esbuild options shared by the command's bundle and the wheel's: one CommonJS file for Node 20. */
function commonOptions(entry, file, external) {
  return {
    entryPoints: [join(root, entry)],
    outfile: file,
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: ['node20'],
    external,
    plugins: [lazyModules, vendored],
    // import() of a package left outside becomes require(): V8 drops the dynamic-import callback of a
    // script compiled from its code cache (vm.Script with cachedData, Node 20: "A dynamic import callback
    // was not specified"), which broke every import() of the cached bundle (the terminal's progress bar,
    // sweep plots).
    supported: { 'dynamic-import': false },
    // The bundle's own file URL (src/cli/main.ts reads ../../package.json beside it; the expression
    // reader and handle's ajv fallback require from it). import.meta.resolve is reached only from source.
    define: { 'import.meta.url': '__rhosigmaBundleUrl', 'import.meta.resolve': '__rhosigmaResolve' },
    banner: { js: "const __rhosigmaBundleUrl = require('node:url').pathToFileURL(__filename).href; const __rhosigmaResolve = (s) => require.resolve(s);" },
    logLevel: 'warning',
  };
}

/** Packages the command's bundle leaves outside (each loads on first need: progress bars, expressions). */
const OUTSIDE = ['mathjs', 'mathjs/*', 'cli-progress'];

export async function bundleCli() {
  await build(commonOptions('src/cli/main.ts', outfile, OUTSIDE));
  await bundleVendored(dirname(outfile));
  rmSync(join(root, 'dist/cli/bundle.mjs'), { force: true }); // the former ES module bundle, if an old build left it
  fillCache();
}

/**
 * The engine the Python wheel ships (`npm run build:engine-bundle`; kernel-bridge/build_assets.py), in
 * kernel-bridge/rhosigma/_bundle/, laid out as the checkout is, so that the same launcher, the same bundle
 * and the same code cache work there (a wheel starts as fast as the checkout's command):
 *  - bin/rhosigma.js, a copy of the checkout's launcher (V8's code cache beside the bundle, or in the
 *    user's cache folder when site-packages is read-only; no cache is shipped, since one fits a single
 *    Node version: the first command writes it);
 *  - dist/cli/bundle.cjs, the command's bundle as `npm run build` makes it, and dist/sweep/worker.js, the
 *    sweep pool's worker thread bundled the same way (so `sweep --workers N` uses threads there too), with
 *    dist/package.json saying CommonJS for them, and package.json (the version, read as ../../package.json
 *    from the bundle; ES module for the launcher);
 *  - node_modules/ with the packages the bundle leaves outside, each one file, found by Node's usual
 *    resolution from dist/ and loaded only when a request needs it: mathjs's own single-file build (the
 *    expression reader loads exactly that file in the checkout) and cli-progress bundled by esbuild into
 *    one CommonJS file, each with its licence (vega and vega-lite are in dist/cli/vendor/, as in the checkout).
 * Cost: a few seconds.
 */
export async function bundleWheelEngine(dir = join(root, 'kernel-bridge/rhosigma/_bundle')) {
  rmSync(dir, { recursive: true, force: true });
  await build(commonOptions('src/cli/main.ts', join(dir, 'dist/cli/bundle.cjs'), OUTSIDE));
  await build(commonOptions('src/sweep/worker.ts', join(dir, 'dist/sweep/worker.js'), OUTSIDE));
  const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
  const writeJson = (file, value) => writeFileSync(file, `${JSON.stringify(value, null, 2)}\n`);
  writeJson(join(dir, 'dist/package.json'), { type: 'commonjs' });
  writeJson(join(dir, 'package.json'), { name: pkg.name, version: pkg.version, type: 'module', private: true });
  mkdirSync(join(dir, 'bin'), { recursive: true });
  copyFileSync(join(root, 'bin/rhosigma.js'), join(dir, 'bin/rhosigma.js'));
  const vendor = (name, main) => {
    const from = join(root, 'node_modules', name);
    const to = join(dir, 'node_modules', name);
    mkdirSync(to, { recursive: true });
    const version = JSON.parse(readFileSync(join(from, 'package.json'), 'utf8')).version;
    writeJson(join(to, 'package.json'), { name, version, main, type: 'commonjs' });
    for (const licence of ['LICENSE', 'LICENSE.md', 'LICENSE.txt', 'NOTICE']) {
      if (existsSync(join(from, licence))) copyFileSync(join(from, licence), join(to, licence));
    }
    return to;
  };
  await bundleVendored(join(dir, 'dist/cli'));
  const mathjs = vendor('mathjs', './lib/browser/math.js');
  mkdirSync(join(mathjs, 'lib/browser'), { recursive: true });
  copyFileSync(join(root, 'node_modules/mathjs/lib/browser/math.js'), join(mathjs, 'lib/browser/math.js'));
  await buildPackageFile("module.exports = require('cli-progress');", join(vendor('cli-progress', './index.cjs'), 'index.cjs'));
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  if (process.argv.includes('--wheel')) await bundleWheelEngine();
  else await bundleCli();
}
