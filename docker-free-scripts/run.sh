#!/usr/bin/env bash
# Entry point for `npm start`, `npm test`, `npm run dev` and `npm run bench`.
# Installs what a fresh Debian machine lacks (npm packages from the lock, PostgreSQL from
# Debian's packages), then hands over to the TypeScript orchestrator of that command.
set -euo pipefail
cd "$(dirname "$0")/.."
cmd="${1:-start}"
shift || true

need_npm_install() {
  [ ! -d node_modules ] && return 0
  [ ! -f node_modules/.package-lock.json ] && return 0
  [ package-lock.json -nt node_modules/.package-lock.json ] && return 0
  return 1
}

if need_npm_install; then
  echo "proofyard: installing npm packages from the lock file..."
  npm ci --no-audit --no-fund
fi

apt_updated=0
apt_install() {
  if [ "$apt_updated" = 0 ]; then
    apt-get update -qq
    apt_updated=1
  fi
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$@"
}

if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1; then
  echo "proofyard: installing PostgreSQL from Debian's packages..."
  apt_install postgresql
fi

if [ "$cmd" = "test" ] || [ "$cmd" = "bench" ]; then
  if [ ! -x /usr/bin/chromium ]; then
    echo "proofyard: installing Chromium from Debian's packages for the browser tests..."
    apt_install chromium
  fi
fi

export AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED=true
exec node --import tsx "docker-free-scripts/$cmd.ts" "$@"
