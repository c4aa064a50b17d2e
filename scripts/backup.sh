#!/usr/bin/env bash
# A backup of the product's database in pg_dump's custom format.
#   scripts/backup.sh [file]        (npm run db:backup [-- file])
# The database is DATABASE_URL's, or the dev cluster's (scripts/db.sh) when it is unset.
# Without a file, writes backups/sympodia-<database>-<UTC time>.dump (backups/ is ignored by git).
# Photos are not in the database: back up PHOTO_DIR (.data/photos) or the S3 bucket beside it.
# Restore with scripts/restore.sh.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
# shellcheck source=scripts/pg-tools.sh
source "$root/scripts/pg-tools.sh"

url=$(default_database_url)
bindir=$(pg_bindir "$url")
name=$(database_of "$url")
out=${1:-$root/backups/sympodia-$name-$(date -u +%Y%m%dT%H%M%SZ).dump}
mkdir -p "$(dirname "$out")"

# Written beside the target and moved into place, so a failed dump never leaves a partial file.
tmp="$out.partial"
trap 'rm -f "$tmp"' EXIT
"$bindir/pg_dump" --format=custom --compress=6 --no-owner --no-privileges --file="$tmp" "$url"
mv "$tmp" "$out"
trap - EXIT
echo "[backup] $(redact "$url") → $out ($(du -h "$out" | cut -f1), pg_dump $("$bindir/pg_dump" --version | awk '{print $3}'))"
