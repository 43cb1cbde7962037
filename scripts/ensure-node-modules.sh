#!/usr/bin/env bash
# Runs `npm ci` when node_modules is missing or older than package-lock.json.
set -euo pipefail
if [ ! -d node_modules ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "Installing npm packages (npm ci)…"
  npm ci --no-audit --no-fund
fi
