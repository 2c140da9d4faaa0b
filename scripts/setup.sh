#!/usr/bin/env bash
# Installs everything a new machine needs to run and test rhosigma, and nothing by hand:
#  - Debian's Chromium, for the real-browser tests (playwright-core drives it; no test tool ever
#    downloads a browser of its own). Debian is used only for what PyPI and npm do not carry.
#  - one Python virtual environment in the checkout (.venv) from the pinned requirements.txt: JupyterLab,
#    ipywidgets, the kernel, numpy/scipy/cvxopt/mpmath for the reference checks, pandas, Dask, pytest, nbclient;
#  - the npm packages (npm ci from package-lock.json), then the build;
#  - the Python package rhosigma (kernel-bridge/) installed into .venv in editable mode.
# Safe to run again: each step runs only when what it installs is missing or out of date.
set -euo pipefail
cd "$(dirname "$0")/.."

SUDO=""
[ "$(id -u)" -eq 0 ] || SUDO="sudo"

debs=(chromium)
missing=()
for p in "${debs[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q 'install ok installed' || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing Debian packages: ${missing[*]}"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${missing[@]}" >/dev/null
fi

# The Python environment: recreated only when requirements.txt changed (its hash is kept in the venv).
want="$(sha256sum requirements.txt | cut -d' ' -f1)"
have="$(cat .venv/.requirements-sha256 2>/dev/null || true)"
if [ ! -x .venv/bin/python ] || [ "$want" != "$have" ]; then
  echo "setup: creating the Python environment .venv from requirements.txt"
  [ -x .venv/bin/python ] || python3 -m venv .venv
  .venv/bin/python -m pip install -q --disable-pip-version-check -r requirements.txt
  echo "$want" > .venv/.requirements-sha256
fi
# The checkout's package.json says "type": "module"; without this marker Node would read the CommonJS
# helpers inside .venv (JupyterLab's yarn.js, jupyter_builder's) as ES modules and fail.
[ -f .venv/package.json ] || echo '{"type": "commonjs"}' > .venv/package.json

if [ ! -d node_modules ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  npm ci --no-audit --no-fund
fi
npm run --silent build

# The Python package in editable mode: again only when kernel-bridge/pyproject.toml changed or the
# package is not importable from this checkout (the venv may have been re-created).
want_py="$(sha256sum kernel-bridge/pyproject.toml | cut -d' ' -f1)"
have_py="$(cat .venv/.rhosigma-editable-sha256 2>/dev/null || true)"
py="$PWD/.venv/bin/python"
where="$(cd /tmp && "$py" -c 'import rhosigma, os; print(os.path.dirname(rhosigma.__file__))' 2>/dev/null || true)"
if [ "$want_py" != "$have_py" ] || [ "$where" != "$PWD/kernel-bridge/rhosigma" ]; then
  echo "setup: installing the Python package rhosigma (kernel-bridge) into .venv, editable"
  .venv/bin/python -m pip install -q --disable-pip-version-check --no-build-isolation --no-deps -e kernel-bridge
  echo "$want_py" > .venv/.rhosigma-editable-sha256
fi

# The JupyterLab extension (npm run build:labextension → kernel-bridge/rhosigma/labextension), rebuilt
# when a front-end source is newer than the build, and linked into .venv so that `jupyter labextension
# list` shows it enabled (the link follows later rebuilds).
lab_out=kernel-bridge/rhosigma/labextension/package.json
if [ ! -f "$lab_out" ] || [ -n "$(find src/lab src/widgets src/ui src/worker style package.json scripts/build-labextension.mjs scripts/labextension.webpack.cjs -newer "$lab_out" -type f 2>/dev/null | head -1)" ]; then
  echo "setup: building the JupyterLab extension"
  RHOSIGMA_PYTHON="$py" npm run --silent build:labextension >/dev/null
fi
if [ "$(readlink .venv/share/jupyter/labextensions/rhosigma 2>/dev/null)" != "$PWD/kernel-bridge/rhosigma/labextension" ]; then
  PATH="$PWD/.venv/bin:$PATH" .venv/bin/jupyter labextension develop --overwrite kernel-bridge >/dev/null
fi
