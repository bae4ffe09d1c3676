#!/usr/bin/env bash
# Installs npm dependencies when node_modules is missing or older than the lock file.
set -euo pipefail
cd "$(dirname "$0")/.."
stamp=node_modules/.ironledger-lock-sha
want=$(sha256sum package-lock.json | cut -d' ' -f1)
if [ ! -d node_modules ] || [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
  echo "Installing npm dependencies (npm ci)…" >&2
  npm ci --no-audit --no-fund >&2
  echo "$want" > "$stamp"
fi
