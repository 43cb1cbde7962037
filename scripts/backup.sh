#!/usr/bin/env bash
# Backs up the database named by NUXT_DATABASE_URL with pg_dump (custom format: compressed, restorable table by table).
# Usage: scripts/backup.sh [output file]   (default: backups/greybody-<UTC time>.dump)
# Files in object storage are not in the dump: the rows hold their keys, and the bucket is backed up by the storage
# service's own versioning or replication (see README, "Backups").
set -euo pipefail
: "${NUXT_DATABASE_URL:?NUXT_DATABASE_URL is not set (source .data/dev/services.env, or the production environment)}"
PG_BIN="${GREYBODY_PG_BIN:-/usr/lib/postgresql/15/bin}"
PG_DUMP="$PG_BIN/pg_dump"; [ -x "$PG_DUMP" ] || PG_DUMP="$(command -v pg_dump)"
out="${1:-backups/greybody-$(date -u +%Y%m%dT%H%M%SZ).dump}"
mkdir -p "$(dirname "$out")"
# A consistent snapshot of every table in one transaction; owners and grants are left to the target's set-up.
# The tables are behind the tenant wall (db/tenant-wall.ts), which holds their owner too: pg_dump must read through
# it (--enable-row-security) as system work (greybody.org = '*'), or it would refuse, or see nothing.
export PGOPTIONS="${PGOPTIONS:-} -c greybody.org=*"
# Read through the wall with another setting (say, an options= in the URL), the dump would silently lack rows: refuse.
PSQL="$PG_BIN/psql"; [ -x "$PSQL" ] || PSQL="$(command -v psql)"
seen=$("$PSQL" "$NUXT_DATABASE_URL" -Atc "select current_setting('greybody.org', true)")
[ "$seen" = "*" ] || { echo "The backup connection has greybody.org = '$seen', not '*': it would miss rows. Remove that setting from the URL." >&2; exit 4; }
"$PG_DUMP" --format=custom --no-owner --no-privileges --enable-row-security --file="$out.partial" "$NUXT_DATABASE_URL"
mv "$out.partial" "$out"
echo "Backup written: $out ($(du -h "$out" | cut -f1))"
