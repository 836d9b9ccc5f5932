#!/usr/bin/env bash
# Shared helpers for start.sh and test.sh: install what is missing, manage a private PostgreSQL cluster.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
cd "$ROOT"
export NEXT_TELEMETRY_DISABLED=1

log() { printf '\033[1;34m[setup]\033[0m %s\n' "$*"; }
die() { printf '\033[1;31m[setup]\033[0m %s\n' "$*" >&2; exit 1; }

as_root() { if [ "$(id -u)" = 0 ]; then "$@"; else sudo -n "$@"; fi; }

apt_ready=0
apt_install() {
  if [ "$apt_ready" = 0 ]; then log "apt-get update"; as_root apt-get update -qq; apt_ready=1; fi
  log "apt-get install $*"
  DEBIAN_FRONTEND=noninteractive as_root apt-get install -y -qq --no-install-recommends "$@" >/dev/null
}

pg_bindir() {
  local d
  for d in /usr/lib/postgresql/15/bin /usr/lib/postgresql/*/bin; do
    [ -x "$d/pg_ctl" ] && { echo "$d"; return 0; }
  done
  return 1
}

ensure_postgres() {
  pg_bindir >/dev/null || apt_install postgresql
  pg_bindir >/dev/null || die "PostgreSQL binaries not found after install"
}

ensure_chromium() {
  command -v chromium >/dev/null || apt_install chromium
}

# npm ci when node_modules is missing or older than the lock file's content.
ensure_node_modules() {
  local want have=""
  want=$(sha256sum package-lock.json | cut -d' ' -f1)
  [ -f node_modules/.ergodex-lock ] && have=$(cat node_modules/.ergodex-lock)
  if [ "$want" != "$have" ]; then
    log "npm ci (node_modules missing or stale)"
    npm ci --no-audit --no-fund --loglevel=error
    echo "$want" > node_modules/.ergodex-lock
  fi
}

# Build the Next.js app when no build exists or a source is newer than it.
ensure_build() {
  local stamp=.next/BUILD_ID
  if [ ! -f "$stamp" ] || [ -n "$(find app components lib models public next.config.mjs tailwind.config.ts package-lock.json -newer "$stamp" -print -quit 2>/dev/null)" ]; then
    log "next build"
    npx next build
  fi
}

# A private cluster under $1 (data dir). Owned by postgres when we are root: the server refuses root.
pg_init() {
  local data="$1" bin; bin=$(pg_bindir)
  if [ -f "$data/PG_VERSION" ]; then return 0; fi
  log "initdb $data"
  mkdir -p "$(dirname "$data")"
  chmod a+x "$(dirname "$data")" # the postgres user must be able to traverse to its data directory
  if [ "$(id -u)" = 0 ]; then
    install -d -o postgres -g postgres -m 700 "$data"
    runuser -u postgres -- "$bin/initdb" -D "$data" -U postgres --auth-local=trust --auth-host=scram-sha-256 -E UTF8 --locale=C.UTF-8 >/dev/null
  else
    install -d -m 700 "$data"
    "$bin/initdb" -D "$data" -U postgres --auth-local=trust --auth-host=scram-sha-256 -E UTF8 --locale=C.UTF-8 >/dev/null
  fi
}
