"""Build function for hatch-jupyter-builder: the npm-built files the wheel ships (pyproject.toml).

- The labextension (`npm run build:labextension` at the repository root fills rhosigma/labextension/,
  shipped as share/jupyter/labextensions/rhosigma). For an editable install it is skipped when the
  folder already holds a built extension.
- The engine bundle (`npm run build:engine-bundle`: rhosigma/_bundle/, the command's launcher, its bundle
  and the few packages it loads on first need, laid out as in the checkout; scripts/bundle-cli.mjs), so that the installed package runs headless outside the checkout. Skipped for
  editable installs, which run the checkout's bin/rhosigma.js.
Both need the repository's npm packages: `npm ci` runs first when node_modules/ is missing. Every
command's failure stops the build (hatch-jupyter-builder turns it into a warning for editable installs,
`optional-editable-build`). RHOSIGMA_WHEEL_WITHOUT_LABEXTENSION=1 builds a wheel without the
labextension (engine only), for the tests of the headless wheel while the extension is being built.

Not here: anything the npm scripts themselves do. Cost: the two npm builds (about a minute).
"""
from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
LABEXTENSION = HERE / "rhosigma" / "labextension"
BUNDLE = HERE / "rhosigma" / "_bundle" / "bin" / "rhosigma.js"


def _npm(*args: str) -> None:
    npm = shutil.which("npm")
    if npm is None:
        raise RuntimeError("npm is needed to build the rhosigma wheel (Node.js 20 or later)")
    print(f"build_assets: npm {' '.join(args)}", flush=True)
    # The labextension's build asks this Python for JupyterLab's core package (scripts/build-labextension.mjs).
    env = {**os.environ, "RHOSIGMA_PYTHON": os.environ.get("RHOSIGMA_PYTHON", sys.executable)}
    subprocess.run([npm, *args], cwd=ROOT, check=True, env=env)


def _scripts() -> dict:
    return json.loads((ROOT / "package.json").read_text(encoding="utf-8")).get("scripts", {})


def build(target_name: str, version: str, **_: object) -> None:
    """Called by hatch-jupyter-builder with the target ("wheel", "sdist") and "standard" or "editable"."""
    editable = version == "editable"
    without_lab = os.environ.get("RHOSIGMA_WHEEL_WITHOUT_LABEXTENSION") == "1"
    want_lab = not without_lab and not (editable and (LABEXTENSION / "package.json").is_file())
    want_bundle = not editable
    if not (want_lab or want_bundle):
        print("build_assets: editable install with a built labextension: nothing to build", flush=True)
        return
    if not (ROOT / "node_modules").is_dir():
        _npm("ci", "--no-audit", "--no-fund")
    scripts = _scripts()
    if want_lab:
        if "build:labextension" not in scripts:
            raise RuntimeError("package.json has no script build:labextension, which builds rhosigma/labextension/")
        _npm("run", "build:labextension")
        if not (LABEXTENSION / "package.json").is_file():
            raise RuntimeError(f"npm run build:labextension did not produce {LABEXTENSION / 'package.json'}")
    if want_bundle:
        _npm("run", "build")
        _npm("run", "build:engine-bundle")
        if not BUNDLE.is_file():
            raise RuntimeError(f"npm run build:engine-bundle did not produce {BUNDLE}")
