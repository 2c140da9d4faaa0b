/**
 * webpack configuration of the browser bundles (DESIGN.md: webpack for browser bundles).
 *
 * `npm run build:worker` writes the engine's web worker, dist/browser/engine-worker.js: the ops layer's
 * `handle` behind comlink (src/worker/engine-worker.ts), one file, for pages that load the worker by URL
 * (`new EngineClient({ url })`). A bundle that imports src/worker/client.ts gets the worker without this:
 * webpack sees `new Worker(new URL('./engine-worker.js', import.meta.url))` and emits it beside the bundle.
 *
 * `browserConfig({ ... })` is the shared setting (TypeScript through ts-loader with tsconfig.dom.json,
 * transpile only; ".js" imports resolved to the ".ts" sources; no Node built-ins), used by this file's
 * default export and by the browser tests and benchmarks that bundle their own pages
 * (test/browser/ui.test.ts). Cost: a production build of the worker is about half a minute on two cores.
 */
const path = require('node:path');

/** The rule that inlines the expression reader's import() of mathjs (shared with the labextension's configuration). */
const EAGER_EXPRESSIONS = { test: /[\\/]ops[\\/]expressions\.[jt]s$/, parser: { dynamicImportMode: 'eager' } };

/**
 * @param {{ name: string, entry: Record<string, string>, outputPath: string, mode?: 'production' | 'development', target?: string, lazyExpressions?: boolean }} o
 */
function browserConfig(o) {
  return {
    name: o.name,
    mode: o.mode ?? 'production',
    target: o.target ?? 'web',
    entry: o.entry,
    output: { path: o.outputPath, filename: '[name].js', chunkFilename: '[name].js', publicPath: 'auto', clean: false },
    resolve: {
      extensions: ['.ts', '.js'],
      extensionAlias: { '.js': ['.ts', '.js'] },
      // The engine runs without Node: a built-in reaching the bundle is an error, not a shim.
      fallback: { fs: false, path: false, url: false, module: false, worker_threads: false, child_process: false, os: false, crypto: false },
    },
    module: {
      rules: [
        {
          test: /\.ts$/,
          loader: 'ts-loader',
          exclude: /node_modules/,
          options: { transpileOnly: true, configFile: path.resolve(__dirname, 'tsconfig.dom.json'), compilerOptions: { sourceMap: false, declaration: false, module: 'es2022', moduleResolution: 'bundler' } },
        },
        // The expression reader's mathjs (src/ops/expressions.ts, loaded with import() on first need) kept
        // inside the worker file, not a chunk beside it, unless the build asks for lazy chunks (the embed).
        ...(o.lazyExpressions ? [] : [EAGER_EXPRESSIONS]),
      ],
    },
    // Module concatenation trips over the ops layer's import cycles (handle ↔ registry users): off.
    optimization: { splitChunks: false, concatenateModules: false },
    performance: { hints: false },
    devtool: false,
    stats: 'errors-warnings',
  };
}

module.exports = [
  browserConfig({
    name: 'worker',
    target: 'webworker',
    entry: { 'engine-worker': path.resolve(__dirname, 'src/worker/engine-worker.ts') },
    outputPath: path.resolve(__dirname, 'dist/browser'),
  }),
];
module.exports.browserConfig = browserConfig;
module.exports.EAGER_EXPRESSIONS = EAGER_EXPRESSIONS;
