#!/usr/bin/env bash
# Installs everything a new machine needs to run and test rhosigma:
# the Debian packages behind the reference checks (numpy, scipy, cvxopt), Debian's Chromium for the
# real-browser test (test/browser; playwright-core drives it and never downloads a browser of its own)
# and the npm packages, then builds the TypeScript. Safe to run again; it installs only what is missing.
set -euo pipefail
cd "$(dirname "$0")/.."

debs=(python3-numpy python3-scipy python3-cvxopt python3-pytest libopenblas0-pthread chromium)
missing=()
for p in "${debs[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q 'install ok installed' || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing Debian packages: ${missing[*]}"
  SUDO=""
  [ "$(id -u)" -eq 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${missing[@]}" >/dev/null
fi

if [ ! -d node_modules ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  npm ci --no-audit --no-fund
fi
npm run --silent build
