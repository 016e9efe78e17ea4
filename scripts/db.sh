#!/usr/bin/env bash
# Ergoshelf's private PostgreSQL: installed from Debian's packages if missing, one cluster per
# purpose ("main" for npm start, "test" for npm test), data inside the project, listening on
# 127.0.0.1 only. Usage: scripts/db.sh up [main|test] | reset [main|test] | stop | status [main|test] | url [main|test]
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT=$(pwd -P)
DATA_DIR=${ERGOSHELF_DATA_DIR:-.data}
mkdir -p "$DATA_DIR"
DATA_DIR=$(cd "$DATA_DIR" && pwd -P)

cmd=${1:-up}
purpose=${2:-main}
if [ "$purpose" = test ]; then
  PORT=${ERGOSHELF_TEST_DB_PORT:-54339}
  DB_NAME=ergoshelf_test
else
  PORT=${ERGOSHELF_DB_PORT:-54329}
  DB_NAME=ergoshelf
fi
DB_USER=ergoshelf

say() { echo "[db] $*" >&2; }

pg_bin_dir() {
  local d
  d=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)
  [ -n "$d" ] && [ -x "$d/postgres" ] && echo "$d"
}

install_postgres() {
  say "PostgreSQL server binaries not found; installing Debian's postgresql package"
  local sudo=""
  if [ "$(id -u)" != 0 ]; then
    command -v sudo >/dev/null || { say "not root and no sudo: install the 'postgresql' package, then run again"; exit 1; }
    sudo="sudo"
  fi
  # Do not let the package create and start its own cluster on 5432.
  $sudo mkdir -p /etc/postgresql-common
  echo "create_main_cluster = false" | $sudo tee -a /etc/postgresql-common/createcluster.conf >/dev/null
  $sudo env DEBIAN_FRONTEND=noninteractive apt-get update -qq
  $sudo env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null
}

as_pg() {
  # The server refuses to run as root: run its commands as the postgres system user then.
  if [ "$(id -u)" = 0 ]; then (cd / && runuser -u postgres -- "$@"); else "$@"; fi
}

# Where the cluster lives: inside the project, unless the postgres user cannot reach it (a parent
# folder of mode 700, such as root's home or a mktemp folder); then under /var/tmp, said aloud.
cluster_dir() {
  local wanted="$DATA_DIR/pg-$purpose"
  local pointer="$DATA_DIR/pg-$purpose.location"
  if [ -f "$pointer" ]; then cat "$pointer"; return; fi
  if [ "$(id -u)" = 0 ]; then
    mkdir -p "$wanted"
    chown postgres:postgres "$wanted"
    if ! (cd / && runuser -u postgres -- test -x "$wanted"); then
      rmdir "$wanted" 2>/dev/null || true
      local key
      key=$(printf '%s' "$ROOT" | sha1sum | cut -c1-12)
      wanted="/var/tmp/ergoshelf-pg/$key/pg-$purpose"
      say "the postgres user cannot enter $DATA_DIR (a parent folder is private);"
      say "keeping this cluster in $wanted instead (set ERGOSHELF_DATA_DIR to choose another place)"
      mkdir -p "$wanted"
      chmod 755 /var/tmp/ergoshelf-pg "/var/tmp/ergoshelf-pg/$key"
      chown postgres:postgres "$wanted"
    fi
  else
    mkdir -p "$wanted"
  fi
  echo "$wanted" >"$pointer"
  echo "$wanted"
}

password_file() { echo "$DATA_DIR/db-password"; }

ensure_password() {
  local f
  f=$(password_file)
  if [ ! -s "$f" ]; then
    (umask 077; node -e 'process.stdout.write(require("crypto").randomBytes(18).toString("base64url"))' >"$f")
  fi
}

url() {
  ensure_password
  echo "postgres://$DB_USER:$(cat "$(password_file)")@127.0.0.1:$PORT/$DB_NAME"
}

is_running() {
  local bin=$1 dir=$2
  [ -f "$dir/PG_VERSION" ] || return 1
  as_pg "$bin/pg_ctl" -D "$dir" status >/dev/null 2>&1 || return 1
  as_pg "$bin/pg_isready" -q -h 127.0.0.1 -p "$PORT" >/dev/null 2>&1
}

up() {
  local bin dir sock
  bin=$(pg_bin_dir || true)
  if [ -z "$bin" ]; then install_postgres; bin=$(pg_bin_dir); fi
  dir=$(cluster_dir)
  sock="$dir/sock"
  ensure_password
  if [ ! -f "$dir/PG_VERSION" ]; then
    say "creating the $purpose cluster in $dir (port $PORT)"
    local pwtmp
    pwtmp=$(mktemp)
    cp "$(password_file)" "$pwtmp"
    if [ "$(id -u)" = 0 ]; then chown postgres "$pwtmp"; chown -R postgres:postgres "$dir"; fi
    chmod 700 "$dir"
    as_pg "$bin/initdb" -D "$dir" -U "$DB_USER" --pwfile="$pwtmp" --auth=scram-sha-256 -E UTF8 --locale=C.UTF-8 >/dev/null
    rm -f "$pwtmp"
    mkdir -p "$sock"
    [ "$(id -u)" = 0 ] && chown postgres:postgres "$sock"
    {
      echo "listen_addresses = '127.0.0.1'"
      echo "port = $PORT"
      echo "unix_socket_directories = '$sock'"
      echo "fsync = on"
      echo "max_connections = 60"
      echo "shared_buffers = 128MB"
    } >>"$dir/postgresql.conf"
  fi
  # The port may have changed since the cluster was made.
  sed -i "s/^port = .*/port = $PORT/" "$dir/postgresql.conf"
  if ! is_running "$bin" "$dir"; then
    # After a crash the old postmaster may linger a moment: wait for it to go.
    for _ in $(seq 1 20); do
      if [ -f "$dir/postmaster.pid" ] && kill -0 "$(head -n 1 "$dir/postmaster.pid")" 2>/dev/null; then sleep 0.2; else break; fi
    done
    if ! as_pg "$bin/pg_ctl" -D "$dir" -l "$dir/server.log" -w -t 60 start >/dev/null; then
      say "PostgreSQL did not start; last lines of $dir/server.log:"; tail -n 20 "$dir/server.log" >&2; exit 1
    fi
  fi
  for _ in $(seq 1 50); do
    as_pg "$bin/pg_isready" -q -h 127.0.0.1 -p "$PORT" && break
    sleep 0.2
  done
  export PGPASSWORD
  PGPASSWORD=$(cat "$(password_file)")
  if ! "$bin/psql" -h 127.0.0.1 -p "$PORT" -U "$DB_USER" -d postgres -tAc "select 1 from pg_database where datname = '$DB_NAME'" | grep -q 1; then
    "$bin/createdb" -h 127.0.0.1 -p "$PORT" -U "$DB_USER" "$DB_NAME"
  fi
  say "PostgreSQL ($purpose) ready on 127.0.0.1:$PORT, database $DB_NAME"
}

stop() {
  local bin p dir
  bin=$(pg_bin_dir || true)
  [ -z "$bin" ] && return 0
  for p in main test; do
    purpose=$p
    if [ -f "$DATA_DIR/pg-$p.location" ]; then dir=$(cat "$DATA_DIR/pg-$p.location"); else continue; fi
    if [ -f "$dir/postmaster.pid" ]; then
      as_pg "$bin/pg_ctl" -D "$dir" -m fast -w stop >/dev/null 2>&1 && say "stopped the $p cluster" || true
    fi
  done
}

status() {
  local bin dir
  bin=$(pg_bin_dir || true)
  dir=$(cluster_dir)
  if [ -n "$bin" ] && is_running "$bin" "$dir"; then echo "running on 127.0.0.1:$PORT ($dir)"; else echo "stopped"; exit 3; fi
}

reset() {
  # Drops and recreates this purpose's database (the test suite starts from nothing each run).
  local bin
  bin=$(pg_bin_dir)
  export PGPASSWORD
  PGPASSWORD=$(cat "$(password_file)")
  "$bin/psql" -q -h 127.0.0.1 -p "$PORT" -U "$DB_USER" -d postgres -c "drop database if exists $DB_NAME with (force)" -c "create database $DB_NAME" >/dev/null
}

case "$cmd" in
  up) up ;;
  reset) up; reset ;;
  stop) stop ;;
  status) status ;;
  url) url ;;
  *) echo "usage: scripts/db.sh up|stop|status|url [main|test]" >&2; exit 2 ;;
esac
