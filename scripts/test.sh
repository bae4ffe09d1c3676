#!/usr/bin/env bash
# npm test: dependencies, a throwaway PostgreSQL on its own port and folder, a client build, then every test.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-deps.sh
bash scripts/ensure-chromium.sh

TEST_PGPORT=${TEST_PGPORT:-54339}
TEST_DIR=.data/test-pg-$$
cleanup() { bash scripts/pg.sh stop "$TEST_DIR" "$TEST_PGPORT" || true; rm -rf "$TEST_DIR"; }
trap cleanup EXIT INT TERM
PG_EXTRA_OPTS="-c fsync=off -c synchronous_commit=off -c full_page_writes=off" bash scripts/pg.sh start "$TEST_DIR" "$TEST_PGPORT"
export TEST_PG_URL="postgres://postgres@127.0.0.1:$TEST_PGPORT/postgres"

echo "Checking import boundaries…" >&2
bash scripts/check-boundaries.sh
echo "Type-checking…" >&2
npx tsc --noEmit -p tsconfig.json
echo "Building the client…" >&2
npx vite build --logLevel warn
npx vitest run "$@"
