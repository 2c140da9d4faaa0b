#!/usr/bin/env node
// Entry point of the `rhosigma` command: the one-file bundle dist/cli/bundle.cjs when it is there (it
// starts fastest; scripts/bundle-cli.mjs), else the compiled modules in dist/ (run `npm run build`).
//
// The bundle is compiled with V8's code cache (dist/cli/bundle.cjs.cache, beside it): a cold start then
// reads compiled bytecode instead of parsing two megabytes of JavaScript, most of a cold start's cost
// (bench/transport.ts). Node 20 has no compile cache for modules (module.enableCompileCache() is Node
// 22's), hence vm.Script, which takes and makes V8's cached data on any Node. V8 checks the cache
// against its version, its flags and the source's length and ignores a cache that does not fit
// (script.cachedDataRejected; a cache older than the bundle is not even offered, since a rebuilt bundle
// of the same length would pass V8's check); the bundle is then compiled from its text as usual, and the cache is
// written anew after the command's work (to a temporary file renamed into place, so concurrent commands
// never see half a file; silently skipped where the folder is read-only). The bundle runs as a CommonJS
// module: require from dist/cli/, __filename its own path, import() by Node's default loader.
import { existsSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import vm from 'node:vm';

const bundle = fileURLToPath(new URL('../dist/cli/bundle.cjs', import.meta.url));
const modules = new URL('../dist/cli/main.js', import.meta.url);

/** Compiles and runs the bundle with the code cache; returns its exports and, when the cache did not fit, a writer of a new one. */
function loadBundle() {
  const cacheFile = `${bundle}.cache`;
  let cachedData;
  try {
    // V8 checks a cache against the source's length only: one older than the bundle is not used.
    if (statSync(cacheFile).mtimeMs >= statSync(bundle).mtimeMs) cachedData = readFileSync(cacheFile);
  } catch {
    cachedData = undefined;
  }
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
  const writeCache = () => {
    try {
      const tmp = `${cacheFile}.${process.pid}.tmp`;
      writeFileSync(tmp, script.createCachedData());
      renameSync(tmp, cacheFile);
    } catch {
      // A read-only installation: the command works, only without the cache.
    }
  };
  return { main: module.exports.main, writeCache: stale ? writeCache : undefined };
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
