#!/usr/bin/env bash
# Restores a backup made by scripts/backup.sh into an EMPTY database (never over live data).
# Usage: scripts/restore.sh <backup file> [target database URL]   (default target: NUXT_DATABASE_URL)
set -euo pipefail
file="${1:?usage: scripts/restore.sh <backup file> [target database URL]}"
target="${2:-${NUXT_DATABASE_URL:-}}"
[ -n "$target" ] || { echo "No target database: pass its URL or set NUXT_DATABASE_URL." >&2; exit 2; }
[ -f "$file" ] || { echo "No such backup file: $file" >&2; exit 2; }
PG_BIN="${GREYBODY_PG_BIN:-/usr/lib/postgresql/15/bin}"
PSQL="$PG_BIN/psql"; [ -x "$PSQL" ] || PSQL="$(command -v psql)"
PG_RESTORE="$PG_BIN/pg_restore"; [ -x "$PG_RESTORE" ] || PG_RESTORE="$(command -v pg_restore)"
tables=$("$PSQL" "$target" -Atc "select count(*) from pg_tables where schemaname = 'public'")
if [ "$tables" != "0" ]; then
  echo "The target database already has $tables tables: restore only into a new, empty database." >&2
  exit 3
fi
# One transaction: a restore that fails half-way leaves the target empty, not half-filled.
"$PG_RESTORE" --no-owner --no-privileges --exit-on-error --single-transaction --dbname="$target" "$file"
echo "Restored $file into the target database."
