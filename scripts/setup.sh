#!/usr/bin/env bash
# Installs what Tacet needs and is missing; silent when everything is present.
# Called by scripts/start.sh and scripts/test.sh. Debian packages need root (or: run the printed apt-get).
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."

have_deb() { dpkg-query -W -f='${Status}' "$1" 2>/dev/null | grep -q 'install ok installed'; }
newest_pg_bin() { ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1; }

missing=()
pg_bin="$(newest_pg_bin)"
if [ -z "$pg_bin" ] || [ ! -x "$pg_bin/initdb" ] || [ ! -x "$pg_bin/pg_ctl" ]; then missing+=(postgresql); fi
command -v redis-server >/dev/null 2>&1 && command -v redis-cli >/dev/null 2>&1 || missing+=(redis-server)
command -v chromium >/dev/null 2>&1 || missing+=(chromium)
# Reference values in tests come from Debian's python3 with numpy/scipy (not a user-level python).
if ! /usr/bin/python3 -c 'import numpy, scipy' >/dev/null 2>&1; then
  [ -x /usr/bin/python3 ] || missing+=(python3)
  missing+=(python3-numpy python3-scipy)
fi
# The native addon (npm run build:native) compiles with node-gyp against OpenBLAS.
command -v g++ >/dev/null 2>&1 || missing+=(g++)
command -v make >/dev/null 2>&1 || missing+=(make)
if command -v dpkg-query >/dev/null 2>&1; then
  have_deb libopenblas-dev || missing+=(libopenblas-dev)
  # runuser (util-linux) lets root start PostgreSQL as the postgres user
  command -v runuser >/dev/null 2>&1 || missing+=(util-linux)
fi

if [ ${#missing[@]} -gt 0 ]; then
  if [ "$(id -u)" -eq 0 ] && command -v apt-get >/dev/null 2>&1; then
    echo "[setup] installing Debian packages: ${missing[*]}"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
  else
    echo "[setup] missing system packages: ${missing[*]}" >&2
    echo "[setup] install them with:  sudo apt-get update && sudo apt-get install -y ${missing[*]}" >&2
    exit 1
  fi
fi

# npm ci when node_modules is absent or older than the lock file (npm writes node_modules/.package-lock.json).
if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "[setup] installing npm packages (npm ci)"
  npm ci --no-audit --no-fund
fi

# The native linear-algebra addon is optional: without it the engine uses its pure-JavaScript backend.
mkdir -p .data
if ! npm run build:native --if-present >.data/build-native.log 2>&1; then
  echo "[setup] note: npm run build:native failed (see .data/build-native.log); continuing with the JavaScript backend" >&2
fi
