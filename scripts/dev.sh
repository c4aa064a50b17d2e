#!/usr/bin/env bash
# Development: the API on :8790 (with a CORS allowance for the dev server only) and the
# Expo dev server on :8081 with hot reload. Ctrl-C stops both.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$root"

ensure_node_modules
bash scripts/db.sh start dev

export DEV_ORIGINS="http://127.0.0.1:8081,http://localhost:8081"
export SEED_DEMO=1
# Invitations and reset links land in the fake mailbox at http://127.0.0.1:8790/dev/mailbox.
export MAIL_FAKE=1
# Night forecasts come from the local fake forecast service unless WEATHER_URL names a real one.
if [ -z "${WEATHER_URL:-}" ]; then export WEATHER_FAKE=1; fi
PORT=8790 tsx watch server/index.ts &
api=$!
trap 'kill $api 2>/dev/null || true' EXIT
EXPO_PUBLIC_API_URL=http://127.0.0.1:8790 expo start --web --port 8081
