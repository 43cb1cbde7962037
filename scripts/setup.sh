#!/usr/bin/env bash
# One-time set-up on a fresh machine: system packages, npm packages, local services, database, demo data, build.
set -euo pipefail
cd "$(dirname "$0")/.."
started=$(date +%s)
bash scripts/ensure-system.sh --with-browser
bash scripts/ensure-node-modules.sh
node scripts/services.mjs start --profile dev
set -a; . .data/dev/services.env; set +a
node --import tsx scripts/migrate.ts
node --import tsx scripts/seed.ts
echo "Building the app…"
npx nuxt build > .data/dev/logs/build.log 2>&1 || { tail -40 .data/dev/logs/build.log; exit 1; }
echo "Set-up finished in $(( $(date +%s) - started )) s. Start the app with: npm start"
