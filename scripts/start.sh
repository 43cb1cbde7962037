#!/usr/bin/env bash
# Starts the local services (idempotent), applies migrations and serves the built app on http://127.0.0.1:3000.
set -euo pipefail
cd "$(dirname "$0")/.."
[ -f .output/server/index.mjs ] || { echo "No build found: run 'npm run setup' first."; exit 1; }
node scripts/services.mjs start --profile dev
set -a; . .data/dev/services.env; set +a
node --import tsx scripts/migrate.ts
echo "Greybody is starting on ${NUXT_APP_URL} (Ctrl-C stops the app; 'npm run stop' stops the services)."
exec node .output/server/index.mjs
