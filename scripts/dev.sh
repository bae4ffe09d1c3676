#!/usr/bin/env bash
# npm run dev: PostgreSQL + Express (with the local fakes) + Vite dev server with hot reload on :5173.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
export PGPORT=${PGPORT:-54329}
bash scripts/pg.sh start .data/pg "$PGPORT"
psql -h 127.0.0.1 -p "$PGPORT" -U postgres -d postgres -tAc "select 1 from pg_database where datname='ironledger'" | grep -q 1 \
  || psql -h 127.0.0.1 -p "$PGPORT" -U postgres -d postgres -qc "create database ironledger" >/dev/null
export PUBLIC_URL=http://127.0.0.1:5173
node --import tsx server/index.ts & APP_PID=$!
trap 'kill $APP_PID 2>/dev/null; wait $APP_PID 2>/dev/null; bash scripts/pg.sh stop .data/pg "$PGPORT"' EXIT
npx vite
