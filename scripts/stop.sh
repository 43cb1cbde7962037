#!/usr/bin/env bash
# Stops the local services of the dev profile (the app itself stops with Ctrl-C).
set -euo pipefail
cd "$(dirname "$0")/.."
node scripts/services.mjs stop --profile dev
