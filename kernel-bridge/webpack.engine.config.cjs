/**
 * webpack configuration of the engine bundle: the `rhosigma` command (dist/cli/main.js, built by
 * `npm run build`) and everything it imports in one ES module file for Node, written to
 * kernel-bridge/rhosigma/_bundle/rhosigma.mjs so that the Python wheel can run the engine with `node`
 * alone, outside the checkout (with a copy of package.json beside it, for the version)
 * (`npm run build:engine-bundle`).
 *
 * What the bundle is for: `rhosigma serve` (and compute, ops, demo). Sweeps run in the calling thread
 * there: the sweep pool's worker threads load worker.js beside their module, which the bundle does not
 * carry (src/sweep/pool.js is left as it is written, below).
 * Not here: the browser bundles (worker, labextension) have configurations of their own. Cost: one
 * production build (minified), about half a minute on two cores.
 */
const path = require('node:path');
const webpack = require('webpack');

module.exports = {
  mode: 'production',
  target: 'node20',
  entry: path.resolve(__dirname, 'engine-bundle.entry.mjs'),
  experiments: { outputModule: true },
  output: {
    path: path.resolve(__dirname, 'rhosigma', '_bundle'),
    filename: 'rhosigma.mjs',
    module: true,
    chunkFormat: 'module',
    library: { type: 'module' },
    clean: true,
  },
  module: {
    rules: [
      // src/cli/main.ts reads its version from `new URL('../../package.json', import.meta.url)`: webpack
      // copies that file beside the bundle under its own name, so `rhosigma --version` and the ready
      // line still tell the version (without it the command works and says "unknown").
      { test: /package\.json$/, type: 'asset/resource', generator: { filename: 'package.json' } },
      // The sweep pool finds its worker (and, from source, tsx) through import.meta at run time: left
      // untouched rather than resolved at build time.
      { test: /[\\/]sweep[\\/]pool\.js$/, parser: { url: false, worker: false, importMeta: false } },
      // The expression reader's mathjs (import() on first need) inlined in the one file.
      { test: /[\\/]ops[\\/]expressions\.[jt]s$/, parser: { dynamicImportMode: 'eager' } },
    ],
  },
  // One file of code: no split chunks, no separate runtime, and modules the command loads on first need
  // (`import()`) inlined rather than emitted as chunks beside it.
  optimization: { splitChunks: false, runtimeChunk: false },
  plugins: [new webpack.optimize.LimitChunkCountPlugin({ maxChunks: 1 })],
  // vega's optional canvas renderer (sweep plots render SVG without it).
  externals: { canvas: 'commonjs canvas' },
  externalsType: 'module',
  performance: { hints: false },
  devtool: false,
  stats: 'errors-warnings',
};
