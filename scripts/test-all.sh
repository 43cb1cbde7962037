#!/usr/bin/env bash
# Every test: installs what is missing, starts the test profile's services, builds the app, runs all vitest projects.
set -euo pipefail
cd "$(dirname "$0")/.."
started=$(date +%s)
bash scripts/ensure-system.sh --with-browser --with-nginx
bash scripts/ensure-node-modules.sh
# GREYBODY_TEST_PROFILE=test-N runs beside another test run (own services, ports and build folder).
profile="${GREYBODY_TEST_PROFILE:-test}"
node scripts/services.mjs start --profile "$profile"
echo "Building the app for the end-to-end and browser tests…"
mkdir -p ".data/$profile/logs"
npx nuxt build > ".data/$profile/logs/build.log" 2>&1 || { tail -60 ".data/$profile/logs/build.log"; exit 1; }
status=0
npx vitest run "$@" || status=$?
node scripts/services.mjs stop --profile "$profile" || true
echo "Test run took $(( $(date +%s) - started )) s."
exit $status
