#!/usr/bin/env bash
# Installs the Debian packages Greybody needs when they are missing (PostgreSQL 15, Chromium for browser tests).
set -euo pipefail
need=()
[ -x /usr/lib/postgresql/15/bin/initdb ] || need+=(postgresql)
if [ "${1:-}" = "--with-browser" ]; then
  [ -x /usr/bin/chromium ] || need+=(chromium)
fi
if [ ${#need[@]} -gt 0 ]; then
  echo "Installing Debian packages: ${need[*]}"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -q
  apt-get install -y -q "${need[@]}"
fi
