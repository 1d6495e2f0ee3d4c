#!/usr/bin/env bash
# A throw-away PostgreSQL 15 for the test suite, from the machine's own binaries.
#   scripts/pg-test-server.sh start   initdb + pg_ctl on a temporary folder and a loopback port;
#                                     prints TEST_DATABASE_URL=postgres://… as its last line
#   scripts/pg-test-server.sh stop    stops it and removes the folder
# PostgreSQL refuses to run as root: as root it runs as the `postgres` user (or makes a
# `loftwise-pg` user when there is none). The Debian package is installed only where the
# binaries are missing. PG_TEST_PORT (default 55432) and PG_TEST_DIR choose where.
set -euo pipefail
PORT="${PG_TEST_PORT:-55432}"
DIR="${PG_TEST_DIR:-/tmp/loftwise-pg-$PORT}"
BIN="${PG_BIN:-/usr/lib/postgresql/15/bin}"

as_owner() {
  if [ "$(id -u)" = 0 ]; then runuser -u "$PG_USER" -- "$@"; else "$@"; fi
}
pick_user() {
  if [ "$(id -u)" != 0 ]; then PG_USER="$(id -un)"; return; fi
  if id postgres > /dev/null 2>&1; then PG_USER=postgres; return; fi
  id loftwise-pg > /dev/null 2>&1 || useradd --system --no-create-home --shell /usr/sbin/nologin loftwise-pg
  PG_USER=loftwise-pg
}

case "${1:-start}" in
  start)
    if [ ! -x "$BIN/initdb" ]; then
      echo "PostgreSQL 15 binaries missing from $BIN: installing Debian's postgresql-15" >&2
      apt-get update -qq
      DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql-15 > /dev/null
    fi
    pick_user
    if [ -f "$DIR/postmaster.pid" ] && as_owner "$BIN/pg_ctl" -D "$DIR" status > /dev/null 2>&1; then
      echo "PostgreSQL already running in $DIR" >&2
    else
      rm -rf "$DIR"
      mkdir -p "$DIR"
      chown "$PG_USER" "$DIR"
      chmod 700 "$DIR"
      as_owner "$BIN/initdb" -D "$DIR" -A trust -U postgres -E UTF8 --locale=C.UTF-8 > "$DIR.initdb.log" 2>&1 || { cat "$DIR.initdb.log" >&2; exit 1; }
      # Durability is not under test here (SQLite's is): fsync off keeps the many CREATE DATABASEs quick.
      as_owner "$BIN/pg_ctl" -D "$DIR" -w -t 60 -l "$DIR/server.log" \
        -o "-p $PORT -k /tmp -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=400" start > /dev/null
    fi
    echo "TEST_DATABASE_URL=postgres://postgres@127.0.0.1:$PORT/postgres"
    ;;
  stop)
    pick_user
    if [ -d "$DIR" ]; then
      as_owner "$BIN/pg_ctl" -D "$DIR" -m fast stop > /dev/null 2>&1 || true
      rm -rf "$DIR" "$DIR.initdb.log"
    fi
    ;;
  *)
    echo "usage: $0 start|stop" >&2
    exit 2
    ;;
esac
