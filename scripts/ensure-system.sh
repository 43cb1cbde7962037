#!/usr/bin/env bash
# Installs the Debian packages Greybody needs when they are missing (PostgreSQL 15; Chromium for browser tests with
# --with-browser; nginx for the two-instance set-up with --with-nginx). Only nginx's binary is used: it runs from a
# configuration in .data/<profile>/ (scripts/lib/nginx.mjs), never as the system service.
set -euo pipefail
need=()
[ -x /usr/lib/postgresql/15/bin/initdb ] || need+=(postgresql)
for flag in "$@"; do
  case "$flag" in
    --with-browser) [ -x /usr/bin/chromium ] || need+=(chromium) ;;
    --with-nginx) [ -x /usr/sbin/nginx ] || need+=(nginx) ;;
    *) echo "Unknown option $flag (use --with-browser, --with-nginx)" >&2; exit 2 ;;
  esac
done
if [ ${#need[@]} -gt 0 ]; then
  echo "Installing Debian packages: ${need[*]}"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -q
  apt-get install -y -q "${need[@]}"
fi
