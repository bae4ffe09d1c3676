#!/usr/bin/env bash
# Builds the client into dist/ unless the sources are unchanged since the last build.
set -euo pipefail
cd "$(dirname "$0")/.."
sum=$(find src shared index.html vite.config.ts tailwind.config.ts public package-lock.json -type f -print0 2>/dev/null | sort -z | xargs -0 sha256sum | sha256sum | cut -d' ' -f1)
if [ -f dist/.build-sum ] && [ "$(cat dist/.build-sum)" = "$sum" ] && [ -f dist/index.html ]; then exit 0; fi
echo "Building the client…" >&2
npx vite build --logLevel warn
echo "$sum" > dist/.build-sum
