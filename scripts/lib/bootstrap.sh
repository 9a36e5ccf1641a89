#!/usr/bin/env bash
# Shared set-up for the start and test commands. Source it; do not run it.
# Works on a fresh Debian machine with only Node.js and npm.
set -euo pipefail

EBBTIDE_ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
PNPM_VERSION="12.4.2"
PG_BIN_DIR="${PG_BIN_DIR:-}"

log() { printf '\033[1;36m[ebbtide]\033[0m %s\n' "$*" >&2; }
die() { printf '\033[1;31m[ebbtide]\033[0m %s\n' "$*" >&2; exit 1; }

as_root() { [ "$(id -u)" -eq 0 ]; }

apt_install() {
  as_root || die "Missing system packages ($*) and not root: install them with apt-get first."
  if [ ! -f /var/lib/apt/periodic/ebbtide-updated ] && [ -z "${EBBTIDE_APT_UPDATED:-}" ]; then
    log "apt-get update"
    DEBIAN_FRONTEND=noninteractive apt-get update -qq >/dev/null
    export EBBTIDE_APT_UPDATED=1
  fi
  log "apt-get install $*"
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$@" >/dev/null
}

ensure_pnpm() {
  if [ "$(pnpm --version 2>/dev/null || true)" != "$PNPM_VERSION" ]; then
    log "installing pnpm $PNPM_VERSION with npm (corepack is not used)"
    npm install -g "pnpm@$PNPM_VERSION" >/dev/null 2>&1 || die "npm could not install pnpm@$PNPM_VERSION"
    hash -r
  fi
}

ensure_dependencies() {
  ensure_pnpm
  cd "$EBBTIDE_ROOT"
  # pnpm compares the lockfile with node_modules itself; an up-to-date tree takes about a second.
  pnpm install --frozen-lockfile --reporter=silent
}

find_pg_bin() {
  if [ -n "$PG_BIN_DIR" ] && [ -x "$PG_BIN_DIR/pg_ctl" ]; then return 0; fi
  local dir
  dir=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)
  if [ -n "$dir" ] && [ -x "$dir/pg_ctl" ]; then PG_BIN_DIR="$dir"; return 0; fi
  return 1
}

ensure_postgres_binaries() {
  find_pg_bin || { apt_install postgresql; find_pg_bin || die "PostgreSQL binaries not found after install"; }
  command -v psql >/dev/null || apt_install postgresql-client
  export PG_BIN_DIR
}

ensure_chromium() {
  [ -x /usr/bin/chromium ] || apt_install chromium
}

ensure_poppler() {
  command -v pdftotext >/dev/null || apt_install poppler-utils
}
