#!/usr/bin/env bash
# The whole test command: set up a new machine, type-check, then run every suite.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
npm run --silent typecheck
node scripts/run-tests.mjs "$@"
