#!/usr/bin/env bash
# Starts and stops the project's own PostgreSQL cluster and Redis server, on loopback only.
#
#   services.sh pg-start    DATA_DIR PORT DB_NAME [--ephemeral]   initdb if needed, start, create role+db
#   services.sh pg-stop     DATA_DIR
#   services.sh pg-running  DATA_DIR                              exit 0 when the cluster is up
#   services.sh redis-start DATA_DIR PORT [--ephemeral]
#   services.sh redis-stop  DATA_DIR
#   services.sh redis-running DATA_DIR
#
# The role is "tacet" with password "tacet" (TCP, scram-sha-256); the unix socket (trust) lives in
# DATA_DIR/../pg-socket. --ephemeral trades durability for speed (fsync off; Redis without snapshots).
set -euo pipefail

die() { echo "[services] $*" >&2; exit 1; }
abs() { mkdir -p "$1" && (cd "$1" && pwd); }
pg_bin() {
  local dir
  dir="$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)"
  [ -n "$dir" ] || dir="$(dirname "$(command -v pg_ctl 2>/dev/null || echo /nonexistent/pg_ctl)")"
  [ -x "$dir/pg_ctl" ] || die "PostgreSQL binaries not found; run scripts/setup.sh"
  echo "$dir"
}

# initdb and postgres refuse to run as root; as root we run them as the postgres OS user.
as_pg() {
  if [ "$(id -u)" -eq 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

# The postgres user must be able to reach DATA_DIR: open every ancestor for traversal (x only) if needed.
ensure_traversable() {
  [ "$(id -u)" -eq 0 ] || return 0
  local dir="$1"
  while [ "$dir" != "/" ]; do
    if ! runuser -u postgres -- test -x "$dir" 2>/dev/null; then
      echo "[services] allowing the postgres user to traverse $dir (chmod o+x)"
      chmod o+x "$dir"
    fi
    dir="$(dirname "$dir")"
  done
}

pg_running() {
  local data="$1"
  [ -f "$data/PG_VERSION" ] && as_pg "$(pg_bin)/pg_ctl" -D "$data" status >/dev/null 2>&1
}

pg_start() {
  local data port db ephemeral="${4:-}"
  data="$(abs "$1")"; port="$2"; db="$3"
  local bin socket
  bin="$(pg_bin)"
  socket="$(abs "$(dirname "$data")/pg-socket")"
  if [ "$(id -u)" -eq 0 ]; then
    ensure_traversable "$(dirname "$data")"
    chown postgres:postgres "$data" "$socket"
  fi
  chmod 700 "$data"
  if [ ! -f "$data/PG_VERSION" ]; then
    echo "[services] creating PostgreSQL cluster in $data"
    as_pg "$bin/initdb" -D "$data" -U postgres -E UTF8 --locale=C.UTF-8 \
      --auth-local=trust --auth-host=scram-sha-256 >"$data/../pg-initdb.log" 2>&1 \
      || { cat "$data/../pg-initdb.log" >&2; die "initdb failed"; }
    {
      echo "listen_addresses = '127.0.0.1'"
      echo "port = $port"
      echo "unix_socket_directories = '$socket'"
      echo "max_connections = 200"
      if [ "$ephemeral" = "--ephemeral" ]; then
        echo "fsync = off"; echo "synchronous_commit = off"; echo "full_page_writes = off"
        # throwaway data needs no vacuuming, and an autovacuum worker inside a test database makes
        # DROP DATABASE ... WITH (FORCE) fail for the non-superuser role the tests connect as
        echo "autovacuum = off"
      fi
    } | as_pg tee -a "$data/postgresql.conf" >/dev/null
  fi
  if pg_running "$data"; then
    echo "[services] PostgreSQL already running ($data)"
  else
    as_pg "$bin/pg_ctl" -D "$data" -l "$data/server.log" -w -t 60 \
      -o "-c listen_addresses=127.0.0.1 -p $port -k $socket" start >/dev/null \
      || { tail -n 20 "$data/server.log" >&2; die "PostgreSQL did not start on 127.0.0.1:$port"; }
    echo "[services] PostgreSQL on 127.0.0.1:$port ($data)"
  fi
  local psql=("$bin/psql" -h "$socket" -p "$port" -U postgres -d postgres -v ON_ERROR_STOP=1 -qtA)
  if [ "$("${psql[@]}" -c "SELECT 1 FROM pg_roles WHERE rolname = 'tacet'")" != "1" ]; then
    "${psql[@]}" -c "CREATE ROLE tacet LOGIN CREATEDB PASSWORD 'tacet'" >/dev/null
  fi
  if [ "$("${psql[@]}" -c "SELECT 1 FROM pg_database WHERE datname = '$db'")" != "1" ]; then
    "${psql[@]}" -c "CREATE DATABASE \"$db\" OWNER tacet" >/dev/null
    echo "[services] created database $db"
  fi
}

pg_stop() {
  local data
  data="$(abs "$1")"
  if pg_running "$data"; then
    as_pg "$(pg_bin)/pg_ctl" -D "$data" -m fast -w -t 60 stop >/dev/null && echo "[services] PostgreSQL stopped"
  fi
}

redis_pid() { [ -f "$1/redis.pid" ] && cat "$1/redis.pid"; }

redis_running() {
  local data pid
  data="$(abs "$1")"
  pid="$(redis_pid "$data" || true)"
  [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null
}

redis_start() {
  local data port ephemeral="${3:-}"
  data="$(abs "$1")"; port="$2"
  if redis_running "$data"; then echo "[services] Redis already running ($data)"; return 0; fi
  local persistence=(--save 3600 1 300 100 60 10000 --appendonly no)
  [ "$ephemeral" = "--ephemeral" ] && persistence=(--save "" --appendonly no)
  redis-server --bind 127.0.0.1 --port "$port" --protected-mode no --dir "$data" \
    --daemonize yes --pidfile "$data/redis.pid" --logfile "$data/redis.log" "${persistence[@]}"
  for _ in $(seq 1 100); do
    if redis-cli -h 127.0.0.1 -p "$port" ping 2>/dev/null | grep -q PONG; then
      echo "[services] Redis on 127.0.0.1:$port ($data)"
      return 0
    fi
    sleep 0.1
  done
  tail -n 20 "$data/redis.log" >&2 || true
  die "Redis did not start on 127.0.0.1:$port"
}

redis_stop() {
  local data pid
  data="$(abs "$1")"
  pid="$(redis_pid "$data" || true)"
  if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null; then
    kill -TERM "$pid"
    for _ in $(seq 1 100); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -0 "$pid" 2>/dev/null && kill -KILL "$pid"
    echo "[services] Redis stopped"
  fi
  rm -f "$data/redis.pid"
}

command="${1:-}"; shift || true
case "$command" in
  pg-start) [ $# -ge 3 ] || die "usage: pg-start DATA_DIR PORT DB_NAME [--ephemeral]"; pg_start "$@" ;;
  pg-stop) [ $# -eq 1 ] || die "usage: pg-stop DATA_DIR"; pg_stop "$1" ;;
  pg-running) pg_running "$(abs "$1")" ;;
  redis-start) [ $# -ge 2 ] || die "usage: redis-start DATA_DIR PORT [--ephemeral]"; redis_start "$@" ;;
  redis-stop) [ $# -eq 1 ] || die "usage: redis-stop DATA_DIR"; redis_stop "$1" ;;
  redis-running) redis_running "$1" ;;
  *) die "unknown command '$command' (pg-start, pg-stop, pg-running, redis-start, redis-stop, redis-running)" ;;
esac
