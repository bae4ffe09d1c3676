#!/usr/bin/env bash
# The import boundaries of .dependency-cruiser.cjs over every TypeScript file of the project.
# Files are listed here, not as folders: dependency-cruiser 17 scans folders only for the extensions its own
# transpilers handle, and this project reads .ts/.tsx through babel (TypeScript 7 is newer than it supports).
set -euo pipefail
cd "$(dirname "$0")/.."
mapfile -t files < <(find src server shared etl migrations scripts tests -type f \( -name '*.ts' -o -name '*.tsx' \) -not -path '*/node_modules/*' | sort)
exec npx depcruise --config .dependency-cruiser.cjs --output-type err "${files[@]}"
