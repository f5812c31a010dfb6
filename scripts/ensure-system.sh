#!/usr/bin/env bash
# Installs what Bellwether needs and is missing: npm packages (npm ci when node_modules is absent
# or older than package-lock.json), Debian's PostgreSQL (unless DATABASE_URL points elsewhere)
# and, with --with-chromium, Debian's Chromium for the browser tests. Safe to run every time.
set -euo pipefail
cd "$(dirname "$0")/.."

with_chromium=false
[[ "${1:-}" == "--with-chromium" ]] && with_chromium=true

stamp=node_modules/.bellwether-lock
lock_hash=$(sha256sum package-lock.json | cut -d' ' -f1)
if [[ ! -f "$stamp" || "$(cat "$stamp")" != "$lock_hash" ]]; then
  echo "bellwether: installing npm packages (npm ci)…"
  npm ci --no-audit --no-fund --loglevel=error
  echo "$lock_hash" > "$stamp"
fi

as_root() {
  if [[ $(id -u) -eq 0 ]]; then "$@"; else sudo "$@"; fi
}

apt_updated=false
apt_install() {
  if ! $apt_updated; then
    as_root apt-get update -qq
    apt_updated=true
  fi
  DEBIAN_FRONTEND=noninteractive as_root apt-get install -y -qq "$@" >/dev/null
}

if [[ -z "${DATABASE_URL:-}" ]] && ! compgen -G "/usr/lib/postgresql/*/bin/pg_ctl" >/dev/null; then
  echo "bellwether: installing Debian's PostgreSQL…"
  apt_install postgresql
fi

if $with_chromium && [[ ! -x /usr/bin/chromium ]]; then
  echo "bellwether: installing Debian's Chromium for the browser tests…"
  apt_install chromium
fi
