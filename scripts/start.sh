#!/usr/bin/env bash
# npm start: install what is missing, start PostgreSQL on loopback, build the client when it changed,
# then run Ironledger (which migrates, loads the demo into an empty warehouse and starts the local fakes).
# The demo's history ends the day before the first start; that day is kept in .data/demo/anchor.txt.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh

export PGPORT=${PGPORT:-54329}
PGDIR=.data/pg
if [ -z "${DATABASE_URL:-}" ]; then
  bash scripts/pg.sh start "$PGDIR" "$PGPORT"
  psql -h 127.0.0.1 -p "$PGPORT" -U postgres -d postgres -tAc "select 1 from pg_database where datname='ironledger'" | grep -q 1 \
    || psql -h 127.0.0.1 -p "$PGPORT" -U postgres -d postgres -qc "create database ironledger" >/dev/null
  STARTED_PG=1
fi

bash scripts/build-client.sh

stop() {
  [ -n "${APP_PID:-}" ] && kill -TERM "$APP_PID" 2>/dev/null && wait "$APP_PID" 2>/dev/null || true
  [ -n "${STARTED_PG:-}" ] && bash scripts/pg.sh stop "$PGDIR" "$PGPORT"
  echo "Ironledger stopped." >&2
}
trap 'stop; exit 0' INT TERM
# a young generation of 8 MB semi-spaces: the heap is collected before it grows by 100 MB between full
# collections (docs/reliability.md: peak RSS under load 367 → 291 MB, median of runs)
node --max-semi-space-size=8 --import tsx server/index.ts &
APP_PID=$!
set +e
wait "$APP_PID"; rc=$?
APP_PID=""
[ -n "${STARTED_PG:-}" ] && bash scripts/pg.sh stop "$PGDIR" "$PGPORT"
exit $rc
