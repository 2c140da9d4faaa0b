#!/usr/bin/env bash
# Starts JupyterLab from .venv on 127.0.0.1 (token-protected) with the example notebook open, and prints
# the URL to open. Run `bash scripts/setup.sh` first (it builds and links the rhosigma extension).
# PORT (default 8888) and NOTEBOOK (default examples/leaky-relay.ipynb) may be set in the environment.
# Stop it with Ctrl-C.
set -euo pipefail
cd "$(dirname "$0")/.."
[ -x .venv/bin/jupyter ] || { echo "lab: .venv is missing; run bash scripts/setup.sh first" >&2; exit 1; }
port="${PORT:-8888}"
notebook="${NOTEBOOK:-examples/leaky-relay.ipynb}"
token="$(.venv/bin/python -c 'import secrets; print(secrets.token_hex(16))')"
extra=()
[ "$(id -u)" -ne 0 ] || extra+=(--allow-root)
echo "lab: open http://127.0.0.1:${port}/lab/tree/${notebook}?token=${token}"
exec .venv/bin/jupyter lab --no-browser --ServerApp.ip=127.0.0.1 --ServerApp.port="$port" \
  --IdentityProvider.token="$token" --ServerApp.root_dir="$PWD" "${extra[@]}" "$notebook"
