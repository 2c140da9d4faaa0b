#!/usr/bin/env node
// Entry point of the `rhosigma` command: the one-file bundle dist/cli/bundle.cjs when it is there (it
// starts fastest; scripts/bundle-cli.mjs), else the compiled modules in dist/ (run `npm run build`). The
// Python wheel ships a copy of this file with its own bundle in the same layout (rhosigma/_bundle/).
//
// The bundle is compiled with V8's code cache: a cold start then reads compiled bytecode instead of
// parsing megabytes of JavaScript, most of a cold start's cost (bench/transport.ts). Node 20 has no
// compile cache for modules (module.enableCompileCache() is Node 22's), hence vm.Script, which takes and
// makes V8's cached data on any Node. V8 checks the cache against its version, its flags and the source's
// length and ignores a cache that does not fit (script.cachedDataRejected; a cache older than the bundle
// is not even offered, since a rebuilt bundle of the same length would pass V8's check); the bundle is then
// compiled from its text as usual, and the cache is written anew after the command's work (to a temporary
// file renamed into place, so concurrent commands never see half a file).
// Where the cache lives: beside the bundle (dist/cli/bundle.cjs.cache) when that folder is writable; else
// (a read-only installation, such as a system-wide site-packages) in the user's cache folder,
// $RHOSIGMA_CACHE_DIR or $XDG_CACHE_HOME/rhosigma or ~/.cache/rhosigma, under a name made from the bundle's
// path; where neither can be written the command works, only without the cache. The bundle runs as a
// CommonJS module: require from dist/cli/, __filename its own path, import() by Node's default loader.
import { existsSync, mkdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { homedir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import vm from 'node:vm';

const bundle = fileURLToPath(new URL('../dist/cli/bundle.cjs', import.meta.url));
const modules = new URL('../dist/cli/main.js', import.meta.url);

/** Where the code cache may be: beside the bundle, then in the user's cache folder. */
function cacheFiles() {
  const env = process.env;
  const userDir = env.RHOSIGMA_CACHE_DIR || join(env.XDG_CACHE_HOME || join(homedir(), '.cache'), 'rhosigma');
  // One file per bundle path (a venv's wheel and a checkout's bundle never share a cache).
  return [`${bundle}.cache`, join(userDir, `${encodeURIComponent(bundle)}.cache`)];
}

/** The first cache file not older than the bundle (V8 checks a cache against the source's length only). */
function readCache(files, bundleTime) {
  for (const file of files) {
    try {
      if (statSync(file).mtimeMs >= bundleTime) return readFileSync(file);
    } catch {
      // not there: try the next place
    }
  }
  return undefined;
}

/** Writes the cache to the first place that takes it (a temporary file renamed into place). */
function writeCacheTo(files, data) {
  for (const [k, file] of files.entries()) {
    const tmp = `${file}.${process.pid}.tmp`;
    try {
      if (k > 0) mkdirSync(dirname(file), { recursive: true });
      writeFileSync(tmp, data);
      renameSync(tmp, file);
      return;
    } catch {
      // a read-only folder (or something else in the cache's place): try the next place
      rmSync(tmp, { force: true });
    }
  }
}

/** Compiles and runs the bundle with the code cache; returns its exports and, when the cache did not fit, a writer of a new one. */
function loadBundle() {
  const files = cacheFiles();
  const cachedData = readCache(files, statSync(bundle).mtimeMs);
  // CommonJS's own wrapper (Module.wrap's), so that the bundle sees require, module and __filename.
  const source = `(function (exports, require, module, __filename, __dirname) { ${readFileSync(bundle, 'utf8')}\n});`;
  const script = new vm.Script(source, {
    filename: bundle,
    cachedData,
    importModuleDynamically: vm.constants?.USE_MAIN_CONTEXT_DEFAULT_LOADER ?? ((specifier) => import(specifier)),
  });
  const module = { exports: {} };
  script.runInThisContext()(module.exports, createRequire(bundle), module, bundle, dirname(bundle));
  const stale = cachedData === undefined || script.cachedDataRejected === true;
  return { main: module.exports.main, writeCache: stale ? () => writeCacheTo(files, script.createCachedData()) : undefined };
}

if (existsSync(bundle)) {
  const { main, writeCache } = loadBundle();
  process.exitCode = await main(process.argv.slice(2));
  writeCache?.();
} else if (existsSync(modules)) {
  const { main } = await import(modules.href);
  process.exitCode = await main(process.argv.slice(2));
} else {
  process.stderr.write('rhosigma: the compiled engine is missing; run `npm run build` (or bash scripts/setup.sh) first.\n');
  process.exit(2);
}
