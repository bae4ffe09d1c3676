#!/usr/bin/env bash
# Browser tests drive Debian's Chromium; install it (and poppler-utils for PDF text checks) when missing.
set -euo pipefail
need=()
[ -x /usr/bin/chromium ] || need+=(chromium)
command -v pdftotext >/dev/null 2>&1 || need+=(poppler-utils)
if [ ${#need[@]} -gt 0 ]; then
  echo "Installing ${need[*]} from Debian's packages (apt-get)…" >&2
  SUDO=""; [ "$(id -u)" = 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq >&2
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${need[@]}" >&2
fi
