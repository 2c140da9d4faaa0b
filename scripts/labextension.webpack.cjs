// Added by JupyterLab's builder to its own webpack configuration (package.json jupyterlab.webpackConfig;
// scripts/build-labextension.mjs): TypeScript sources through ts-loader, transpile only (`npm run
// typecheck` is the type check), with the repository's ".js" import specifiers resolved to ".ts" files.
// The engine worker (`new Worker(new URL('./engine-worker.js', import.meta.url))` in src/worker/client.ts)
// becomes its own chunk by webpack's worker support.
const path = require('node:path');

const root = path.resolve(__dirname, '..');

module.exports = {
  resolve: {
    extensions: ['.ts', '.js'],
    extensionAlias: { '.js': ['.ts', '.js'] },
  },
  module: {
    rules: [
      {
        test: /\.ts$/,
        include: [path.join(root, 'src')],
        use: [
          {
            loader: require.resolve('ts-loader'),
            options: {
              transpileOnly: true,
              configFile: path.join(root, 'tsconfig.json'),
              compilerOptions: { module: 'es2022', moduleResolution: 'bundler', declaration: false, sourceMap: false },
            },
          },
        ],
      },
      // The expression reader's mathjs (src/ops/expressions.ts, import() on first need) stays inside the
      // worker chunk, as in the browser worker build (webpack.browser.config.cjs).
      { test: /[\\/]ops[\\/]expressions\.[jt]s$/, parser: { dynamicImportMode: 'eager' } },
    ],
  },
};
