#!/usr/bin/env bash
# Project-local PostgreSQL on loopback. Usage: scripts/pg.sh start|stop|status <data-dir> <port>
# Installs Debian's postgresql when no server binary is found. PostgreSQL refuses to run as root,
# so when we are root the server runs as the Debian 'postgres' system user via runuser.
set -euo pipefail
cmd=${1:?start|stop|status}; DIR=${2:?data dir}; PORT=${3:?port}
mkdir -p "$DIR"; DIR=$(cd "$DIR" && pwd)
EXTRA=${PG_EXTRA_OPTS:-}

find_bin() { ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1; }
PGBIN=$(find_bin || true)
if [ -z "$PGBIN" ] || [ ! -x "$PGBIN/postgres" ]; then
  if [ "$cmd" != start ]; then exit 0; fi
  echo "PostgreSQL server not found: installing Debian's postgresql package (apt-get)…" >&2
  SUDO=""; [ "$(id -u)" = 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq >&2
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq postgresql >&2
  PGBIN=$(find_bin)
fi

as_pg() { if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi; }
DATA="$DIR/data"; SOCK="$DIR/run"

case "$cmd" in
  start)
    mkdir -p "$DIR"
    if [ "$(id -u)" = 0 ]; then
      chown postgres: "$DIR"
      # every parent must be traversable by the postgres user
      p=$(cd "$DIR" && pwd); while [ "$p" != / ]; do chmod o+x "$p" 2>/dev/null || true; p=$(dirname "$p"); done
    fi
    as_pg mkdir -p "$SOCK"
    if [ ! -s "$DATA/PG_VERSION" ]; then
      as_pg "$PGBIN/initdb" -D "$DATA" -U postgres -A trust -E UTF8 --locale=C.UTF-8 --no-sync >/dev/null
    fi
    if as_pg "$PGBIN/pg_ctl" -D "$DATA" status >/dev/null 2>&1; then
      echo "PostgreSQL already running on 127.0.0.1:$PORT" >&2
    else
      as_pg "$PGBIN/pg_ctl" -D "$DATA" -l "$DIR/server.log" -w -t 60 \
        -o "-c listen_addresses=127.0.0.1 -p $PORT -k $SOCK -c max_connections=200 $EXTRA" start >/dev/null
    fi
    "$PGBIN/pg_isready" -h 127.0.0.1 -p "$PORT" -q
    ;;
  stop)
    [ -s "$DATA/PG_VERSION" ] || exit 0
    as_pg "$PGBIN/pg_ctl" -D "$DATA" -m fast -w stop >/dev/null 2>&1 || true
    ;;
  status)
    as_pg "$PGBIN/pg_ctl" -D "$DATA" status
    ;;
esac
