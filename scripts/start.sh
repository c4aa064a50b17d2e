#!/usr/bin/env bash
# Starts Sympodia with demo data at http://127.0.0.1:${PORT:-8790}: installs what is
# missing (npm packages, PostgreSQL), starts the project's database, migrates, seeds
# the demo collection when the database is empty, builds the web app and serves it.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$root"

ensure_node_modules
bash scripts/db.sh start dev
build_web

export NODE_ENV=production
export SEED_DEMO=${SEED_DEMO:-1}
export WEB_ROOT="$root/dist"
export PORT=${PORT:-8790}
export HOST=${HOST:-127.0.0.1}
# Mail goes to a local fake SMTP server and is read at /dev/mailbox, unless real SMTP is configured.
if [ -z "${SMTP_HOST:-}" ]; then export MAIL_FAKE=1; fi
# Night forecasts come from a local fake forecast service (invented values), unless WEATHER_URL names a real one.
if [ -z "${WEATHER_URL:-}" ]; then export WEATHER_FAKE=1; fi
echo "[start] Sympodia will be at http://$HOST:$PORT (Ctrl-C stops it; npm run db:stop stops PostgreSQL)"
exec tsx server/index.ts
