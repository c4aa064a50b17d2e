#!/usr/bin/env bash
# The project's own PostgreSQL cluster on 127.0.0.1.
#   scripts/db.sh start|stop|status [dev|test]
# dev: port 54329, database "sympodia". test: port 54339, database "sympodia_test",
# fsync off (throwaway data only; TEST_PG_PORT moves it, for a second checkout testing at the same time). faults: port 54349, database "sympodia_faults", stopped and
# started on purpose by scripts/faults/run.ts (never share it). With DATABASE_URL set, nothing is started: the
# product uses that database instead.
set -euo pipefail

action=${1:-start}
instance=${2:-dev}
root=$(cd "$(dirname "$0")/.." && pwd)

case "$instance" in
  dev) port=54329; database=sympodia ;;
  test) port=${TEST_PG_PORT:-54339}; database=sympodia_test ;;
  faults) port=${FAULTS_PG_PORT:-54349}; database=sympodia_faults ;;
  *) echo "unknown instance: $instance (dev, test or faults)" >&2; exit 2 ;;
esac

log() { printf '[db:%s] %s\n' "$instance" "$*"; }

if [ -n "${DATABASE_URL:-}" ] && [ "$instance" = dev ]; then
  log "DATABASE_URL is set; using that database, not starting a local cluster"
  exit 0
fi

# Runs from / so the postgres user never needs to enter the clone's folder.
as_postgres() {
  if [ "$(id -u)" = 0 ]; then (cd / && runuser -u postgres -- "$@"); else "$@"; fi
}

find_bindir() {
  local dir
  for dir in $(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V -r); do
    if [ -x "$dir/initdb" ] && [ -x "$dir/pg_ctl" ]; then echo "$dir"; return 0; fi
  done
  return 1
}

install_postgres() {
  log "PostgreSQL server binaries not found; installing Debian's postgresql package"
  if [ "$(id -u)" != 0 ]; then echo "installing PostgreSQL needs root (apt-get)" >&2; exit 1; fi
  # Keep Debian from creating and starting its own cluster on 5432.
  mkdir -p /etc/postgresql-common/createcluster.d
  echo 'create_main_cluster = false' > /etc/postgresql-common/createcluster.d/sympodia.conf
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null
}

# The data folder lives under the project's ignored .data/ when the postgres user can
# reach it; a clone inside a folder closed to that user keeps it under /var/tmp instead.
data_dir() {
  local inside="$root/.data/pg-$instance"
  mkdir -p "$root/.data"
  if [ "$(id -u)" != 0 ] || runuser -u postgres -- test -x "$root/.data" 2>/dev/null; then
    echo "$inside"
  else
    local key
    key=$(printf '%s' "$root" | sha1sum | cut -c1-10)
    echo "/var/tmp/sympodia-$key-$instance"
  fi
}

bindir=$(find_bindir || true)
if [ -z "$bindir" ]; then
  if [ "$action" != start ]; then log "PostgreSQL is not installed"; exit 0; fi
  install_postgres
  bindir=$(find_bindir)
fi

pgdata=$(data_dir)
socketdir="/tmp/sympodia-pg-$port"
# Loopback password of the local cluster; only 127.0.0.1 is listened on.
password=sympodia-local
pglog="$pgdata.log"

is_ready() { "$bindir/pg_isready" -q -h 127.0.0.1 -p "$port" >/dev/null 2>&1; }

init_cluster() {
  log "creating cluster in $pgdata"
  mkdir -p "$pgdata"
  [ "$(id -u)" = 0 ] && chown postgres:postgres "$pgdata"
  chmod 700 "$pgdata"
  local pwfile
  pwfile=$(mktemp)
  echo "$password" > "$pwfile"
  [ "$(id -u)" = 0 ] && chown postgres "$pwfile"
  as_postgres "$bindir/initdb" -D "$pgdata" -U postgres --pwfile="$pwfile" \
    --auth-local=trust --auth-host=scram-sha-256 -E UTF8 --locale=C.UTF-8 >/dev/null
  rm -f "$pwfile"
  {
    echo "listen_addresses = '127.0.0.1'"
    echo "port = $port"
    echo "unix_socket_directories = '$socketdir'"
    echo "max_connections = 200"
    if [ "$instance" = test ]; then
      echo "fsync = off"
      echo "synchronous_commit = off"
      echo "full_page_writes = off"
    fi
  } >> "$pgdata/postgresql.conf"
}

start() {
  if is_ready; then log "already running on 127.0.0.1:$port"; ensure_database; return; fi
  [ -f "$pgdata/PG_VERSION" ] || init_cluster
  mkdir -p "$socketdir"
  [ "$(id -u)" = 0 ] && chown postgres:postgres "$socketdir"
  touch "$pglog"; [ "$(id -u)" = 0 ] && chown postgres "$pglog"
  # After a crash the old postmaster can look alive for a moment: wait until it is ready or gone.
  if [ -f "$pgdata/postmaster.pid" ]; then
    local pid
    pid=$(head -1 "$pgdata/postmaster.pid" 2>/dev/null || true)
    for _ in $(seq 1 20); do
      if is_ready; then log "running on 127.0.0.1:$port"; ensure_database; return; fi
      if [ -z "$pid" ] || ! kill -0 "$pid" 2>/dev/null; then break; fi
      sleep 0.5
    done
    if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null; then
      log "a postmaster (pid $pid) holds $pgdata but does not answer; stop it first"; exit 1
    fi
    log "removing stale postmaster.pid"
    rm -f "$pgdata/postmaster.pid"
  fi
  as_postgres "$bindir/pg_ctl" -D "$pgdata" -l "$pglog" -w -t 60 start >/dev/null
  log "running on 127.0.0.1:$port"
  ensure_database
}

ensure_database() {
  local exists
  exists=$(as_postgres "$bindir/psql" -h "$socketdir" -p "$port" -U postgres -d postgres -tAc \
    "select 1 from pg_database where datname = '$database'")
  if [ "$exists" != 1 ]; then
    as_postgres "$bindir/psql" -h "$socketdir" -p "$port" -U postgres -d postgres -qc "create database $database" >/dev/null
    log "created database $database"
  fi
}

stop() {
  if [ ! -f "$pgdata/postmaster.pid" ]; then log "not running"; return; fi
  as_postgres "$bindir/pg_ctl" -D "$pgdata" -m fast -w stop >/dev/null 2>&1 || true
  log "stopped"
}

case "$action" in
  start) start ;;
  stop) stop ;;
  status) if is_ready; then log "running on 127.0.0.1:$port (data: $pgdata)"; else log "not running"; exit 3; fi ;;
  *) echo "usage: scripts/db.sh start|stop|status [dev|test|faults]" >&2; exit 2 ;;
esac
