/**
 * Builds the components' test page (test/browser/ui-page) into a folder with webpack
 * (webpack.browser.config.cjs, development mode: the test needs no minification): page.js, the engine
 * worker chunk webpack emits for `new Worker(new URL(...))`, index.html, style/rhosigma.css and KaTeX's
 * stylesheet with its fonts. Used by test/browser/ui.test.ts and bench/browser-ui.ts.
 * Cost: tens of seconds on two shared cores.
 */
const path = require('node:path');
const fs = require('node:fs');
const webpack = require('webpack');
const { browserConfig } = require('../webpack.browser.config.cjs');

const root = path.resolve(__dirname, '..');

function bundleUiPage(outDir) {
  fs.mkdirSync(outDir, { recursive: true });
  const config = browserConfig({
    name: 'ui-page', mode: 'development',
    entry: { page: path.join(root, 'test/browser/ui-page/page.ts') },
    outputPath: outDir,
  });
  return new Promise((resolve, reject) => {
    webpack(config, (err, stats) => {
      if (err) return reject(err);
      if (stats.hasErrors()) return reject(new Error(stats.toString({ all: false, errors: true })));
      fs.copyFileSync(path.join(root, 'test/browser/ui-page/index.html'), path.join(outDir, 'index.html'));
      fs.copyFileSync(path.join(root, 'style/rhosigma.css'), path.join(outDir, 'rhosigma.css'));
      const katexDist = path.join(root, 'node_modules/katex/dist');
      fs.copyFileSync(path.join(katexDist, 'katex.min.css'), path.join(outDir, 'katex.min.css'));
      fs.cpSync(path.join(katexDist, 'fonts'), path.join(outDir, 'fonts'), { recursive: true });
      resolve(outDir);
    });
  });
}

module.exports = { bundleUiPage };
if (require.main === module) {
  bundleUiPage(process.argv[2] ?? fs.mkdtempSync(path.join(require('node:os').tmpdir(), 'rhosigma-ui-'))).then((d) => console.log(d));
}
