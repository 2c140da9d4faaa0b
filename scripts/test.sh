#!/usr/bin/env bash
# The whole test command: set up a new machine, type-check, then run every suite.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
# The reference checks need numpy, scipy, cvxopt, mpmath and pytest in .venv; fail loudly rather than
# let a suite skip when they are missing.
.venv/bin/python -c 'import numpy, scipy, cvxopt, mpmath, pytest' || {
  echo "test: .venv lacks numpy/scipy/cvxopt/mpmath/pytest; scripts/setup.sh should have installed them" >&2
  exit 1
}
npm run --silent typecheck
# The Python package rhosigma (installed editable by setup.sh) against the built command.
(cd kernel-bridge && ../.venv/bin/python -m pytest -q -p no:cacheprovider tests)
# Every TypeScript suite under jest (its summary closes the output).
node scripts/run-tests.mjs "$@"
