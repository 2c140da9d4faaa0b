#!/usr/bin/env node
// `npm run build:labextension`: the JupyterLab extension (src/lab, src/widgets and the UI they wrap) into
// kernel-bridge/rhosigma/labextension through JupyterLab's builder (@jupyterlab/builder: webpack with
// module federation), which the Python package ships under share/jupyter/labextensions/rhosigma.
//
// Why a staging package.json (build/labextension/package.json, written here from the root one): the
// builder exposes the package's `main` and shares every entry of its `dependencies`; the root package's
// are the Node engine (dist/index.js) and Node-only libraries (commander, cli-progress). The staging file
// keeps the root's name ("rhosigma": the widget module name), version, and `jupyterlab` section (paths
// rewritten relative to the staging folder) and declares no dependencies of its own. TypeScript goes
// through ts-loader (transpile only; `npm run typecheck` checks types) by the builder's `webpackConfig`
// hook (scripts/labextension.webpack.cjs).
//
// The builder needs the JupyterLab core's package.json (--core-path): the `staging` folder of the Python
// package jupyterlab, found through $RHOSIGMA_PYTHON, else .venv/bin/python, else python3.
//
// Deliberately not here: the engine bundle for Node (build:engine-bundle). Cost: one webpack production
// build (about a minute on two cores); `--development` for a faster unminified one.
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const staging = path.join(root, 'build', 'labextension');
const pkg = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));
const lab = pkg.jupyterlab;
if (!lab) throw new Error('package.json has no "jupyterlab" section');

const rel = (p) => path.relative(staging, path.join(root, p)).split(path.sep).join('/');
const section = { ...lab };
for (const key of ['extension', 'mimeExtension', 'outputDir', 'webpackConfig']) {
  if (typeof section[key] === 'string') section[key] = rel(section[key]);
}
const staged = {
  name: pkg.name,
  version: pkg.version,
  description: pkg.description,
  license: pkg.license,
  main: typeof lab.extension === 'string' ? rel(lab.extension) : undefined,
  dependencies: {},
  jupyterlab: section,
};
for (const css of ['style/index.css', 'style/rhosigma.css']) {
  if (existsSync(path.join(root, css))) {
    staged.style = rel(css);
    break;
  }
}
mkdirSync(staging, { recursive: true });
writeFileSync(path.join(staging, 'package.json'), JSON.stringify(staged, null, 2) + '\n');

function findPython() {
  const candidates = [process.env.RHOSIGMA_PYTHON, path.join(root, '.venv', 'bin', 'python'), 'python3'];
  for (const py of candidates) {
    if (!py || (py.includes('/') && !existsSync(py))) continue;
    try {
      const out = execFileSync(py, ['-c', 'import jupyterlab, os; print(os.path.join(os.path.dirname(jupyterlab.__file__), "staging"))'], { encoding: 'utf8' });
      const core = out.trim();
      if (existsSync(path.join(core, 'package.json'))) return core;
    } catch {
      // try the next one
    }
  }
  throw new Error('build:labextension needs the Python package jupyterlab 4 (run bash scripts/setup.sh, or set RHOSIGMA_PYTHON)');
}

const corePath = findPython();
const require = createRequire(import.meta.url);
const builder = require.resolve('@jupyterlab/builder/lib/build-labextension.js');
const args = [builder, '--core-path', corePath, ...process.argv.slice(2), staging];
console.log(`build:labextension: ${pkg.name}@${pkg.version} → ${lab.outputDir} (core ${corePath})`);
execFileSync(process.execPath, args, { stdio: 'inherit', cwd: root });
