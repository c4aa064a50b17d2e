#!/usr/bin/env bash
# Restores a backup made by scripts/backup.sh into a fresh database.
#   scripts/restore.sh <file> <database name or URL> [--force]   (npm run db:restore -- …)
# A name is created on the same server as DATABASE_URL (or the dev cluster). A database that
# already holds tables is refused unless --force, which replaces what the backup contains.
# Then point DATABASE_URL at the restored database and start the server as usual.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
# shellcheck source=scripts/pg-tools.sh
source "$root/scripts/pg-tools.sh"

usage() { echo "usage: scripts/restore.sh <backup file> <new database name or URL> [--force]" >&2; exit 2; }
file=${1:-}
target=${2:-}
force=${3:-}
[ -n "$file" ] && [ -n "$target" ] || usage
[ -z "$force" ] || [ "$force" = --force ] || usage
[ -f "$file" ] || { echo "[restore] no backup file at $file" >&2; exit 2; }

if [[ "$target" == *://* ]]; then
  url=$target
else
  url=$(url_with_database "$(default_database_url)" "$target")
fi
name=$(database_of "$url")
if ! [[ "$name" =~ ^[A-Za-z_][A-Za-z0-9_]{0,62}$ ]]; then
  echo "[restore] '$name' is not a plain database name (letters, digits, _)" >&2
  exit 2
fi
admin=$(url_with_database "$url" postgres)
bindir=$(pg_bindir "$admin")
psql() { "$bindir/psql" -X -v ON_ERROR_STOP=1 -q "$@"; }

# Read the file first: a wrong or damaged file stops here, before any database is touched.
"$bindir/pg_restore" --list "$file" >/dev/null || { echo "[restore] $file is not a pg_dump custom-format backup" >&2; exit 2; }

exists=$(psql "$admin" -tAc "select 1 from pg_database where datname = '$name'")
clean=()
if [ "$exists" = 1 ]; then
  tables=$(psql "$url" -tAc "select count(*) from pg_tables where schemaname not in ('pg_catalog', 'information_schema')")
  if [ "$tables" != 0 ]; then
    if [ "$force" != --force ]; then
      echo "[restore] database $name already holds $tables table(s); refusing to overwrite it (pass --force to replace it)" >&2
      exit 3
    fi
    echo "[restore] --force: replacing the contents of $name"
    clean=(--clean --if-exists)
  fi
else
  psql "$admin" -c "create database \"$name\""
  echo "[restore] created database $name"
fi

# One transaction: a restore that fails part-way leaves the database as it was.
"$bindir/pg_restore" --no-owner --no-privileges --exit-on-error --single-transaction "${clean[@]}" --dbname="$url" "$file"
echo "[restore] $file → $(redact "$url")"
