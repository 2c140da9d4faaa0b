/**
 * webpack configuration of the wiki embed (`npm run build:embed`), written to dist/embed/:
 *   rhosigma-embed.js         the script a page includes once (src/embed/main.ts: the element, the ui
 *                             components, the engine client)
 *   rhosigma-embed-worker.js  the engine's web worker (src/worker/engine-worker.ts), loaded by the client
 *                             from beside the script
 *   rhosigma-embed-plot.js    chunks loaded with import() on first need, from beside the script (publicPath
 *   rhosigma-embed-expressions.js  "auto": the script's own address, document.currentScript; in the worker,
 *                             the worker's): vega for the charts, and, in the worker, mathjs for the
 *                             expression reader (only when an entry is an expression)
 *   rhosigma-embed-rhosigma-sweeps.js  the sweep layer (the op sweep-points, for the notebook's sweep widget),
 *                             and the copy of package.json it names for the engine's version: emitted because
 *                             the worker can load it, never requested by an embed (it sends no sweep)
 *   rhosigma-embed.css        the components' stylesheets (style/*.css) and the embed frame's
 *                             (src/embed/embed.css), concatenated: linked inside each element's shadow root
 * No KaTeX: the formulas are MathML that KaTeX wrote at build time (src/embed/formula-mathml.ts replaces
 * src/ui/formula.ts). Sizes, and what a page requests before its first result: `npm run bench -- embed`.
 *
 * Production mode (minified), no source maps, no eval-based devtool (a strict CSP forbids eval).
 * Cost: one production build, about half a minute on two cores.
 */
const fs = require('node:fs');
const path = require('node:path');
const webpack = require('webpack');


const root = __dirname;

/** Emits rhosigma-embed.css: style/*.css in name order, then the frame's own rules. */
class EmbedStylesheet {
  apply(compiler) {
    compiler.hooks.thisCompilation.tap('EmbedStylesheet', (compilation) => {
      compilation.hooks.processAssets.tap({ name: 'EmbedStylesheet', stage: webpack.Compilation.PROCESS_ASSETS_STAGE_ADDITIONAL }, () => {
        const styleDir = path.join(root, 'style');
        const files = fs.existsSync(styleDir) ? fs.readdirSync(styleDir).filter((f) => f.endsWith('.css')).sort().map((f) => path.join(styleDir, f)) : [];
        files.push(path.join(root, 'src', 'embed', 'embed.css'));
        for (const f of files) compilation.fileDependencies.add(f);
        const text = files.map((f) => `/* ${path.relative(root, f)} */\n${fs.readFileSync(f, 'utf8')}`).join('\n');
        compilation.emitAsset('rhosigma-embed.css', new webpack.sources.RawSource(text));
      });
    });
  }
}

const { browserConfig } = require('./webpack.browser.config.cjs');

const base = browserConfig({ name: 'embed', entry: { 'rhosigma-embed': path.join(root, 'src', 'embed', 'main.ts') }, outputPath: path.join(root, 'dist', 'embed'), lazyExpressions: true });

module.exports = {
  ...base,
  output: {
    ...base.output,
    // The worker of `new Worker(new URL('./engine-worker.js', import.meta.url))` in src/worker/client.ts;
    // found beside the script that loaded it (publicPath "auto", from document.currentScript).
    chunkFilename: (data) => (String(data.chunk.id).includes('engine-worker') ? 'rhosigma-embed-worker.js' : 'rhosigma-embed-[id].js'),
    clean: true,
  },
  module: {
    ...base.module,
    // ES modules out of ts-loader (under NodeNext a transpile-only build may write CommonJS `exports.`
    // references, which a worker script cannot run), so that webpack links them itself.
    rules: base.module.rules.map((r) => (r.loader === 'ts-loader'
      ? { ...r, options: { ...r.options, compilerOptions: { ...r.options.compilerOptions, module: 'es2022', moduleResolution: 'bundler' } } }
      : r)),
  },
  optimization: { ...base.optimization, runtimeChunk: false, chunkIds: 'named' },
  // The worker's idle warm-up leaves the expression reader's chunk alone (fetched when an entry is an
  // expression, not by every page): src/worker/engine-worker.ts.
  plugins: [
    new EmbedStylesheet(),
    new webpack.DefinePlugin({ __RHOSIGMA_WARM_EXPRESSIONS__: JSON.stringify(false) }),
    // Formulas: the MathML KaTeX wrote at build time (src/embed/formula-mathml.ts) instead of KaTeX.
    new webpack.NormalModuleReplacementPlugin(/^\.\/formula\.js$/, (resource) => {
      if (path.normalize(resource.context) === path.join(root, 'src', 'ui')) resource.request = path.join(root, 'src', 'embed', 'formula-mathml.ts');
    }),
  ],
};
