# Shared by the start and test scripts.
root=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
export PATH="$root/node_modules/.bin:$PATH"

# Installs the locked npm packages when node_modules is missing or older than the lock file.
ensure_node_modules() {
  local marker="$root/node_modules/.package-lock.json"
  if [ ! -f "$marker" ] || [ "$root/package-lock.json" -nt "$marker" ]; then
    echo "[setup] installing npm packages (npm ci)"
    (cd "$root" && npm ci --no-audit --no-fund)
  fi
  # Patches to packages (patches/) apply on install; this catches a patch added since (idempotent).
  (cd "$root" && node_modules/.bin/patch-package >/dev/null)
}

# Debian's Chromium for the browser tests; Playwright never downloads its own.
ensure_chromium() {
  if [ ! -x /usr/bin/chromium ]; then
    echo "[setup] installing Debian's chromium package"
    apt-get update -qq
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
  fi
}

build_web() {
  echo "[build] exporting the web app to dist/"
  (cd "$root" && CI=1 expo export --platform web --output-dir dist --source-maps >/dev/null && node scripts/web/postbuild.mjs dist)
}
