#!/usr/bin/env bash
# Write one self-contained HTML file of the page for DATASET: engine (WebAssembly),
# script, style and dataset inlined. It works opened from disk (file://) and from any
# static host, makes no network request, and carries a strict Content-Security-Policy
# (the inline script and style allowed by their hashes, no 'unsafe-inline').
#
#   bash web/bundle.sh DATASET OUT.html
#
# DATASET is a dataset's manifest (dataset.json) or the folder that holds it. Builds the
# engine first (web/build.sh) and installs esbuild into web/tools/ when it is missing.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"

log() { printf 'bundle.sh: %s\n' "$*" >&2; }

if [ "$#" -ne 2 ]; then
  printf 'usage: bash web/bundle.sh DATASET OUT.html\n  DATASET: a dataset'"'"'s manifest (dataset.json) or the folder that holds it\n' >&2
  exit 2
fi

if ! command -v node >/dev/null; then
  log "node is needed (it runs esbuild)"
  exit 1
fi

TOOLS="$ROOT/web/tools"
if [ ! -x "$TOOLS/node_modules/.bin/esbuild" ] || [ "$TOOLS/package-lock.json" -nt "$TOOLS/node_modules/.package-lock.json" ]; then
  log "installing esbuild (npm ci in web/tools)"
  (cd "$TOOLS" && npm ci --no-audit --no-fund >&2)
fi

if [ "${STRATAMAP_SKIP_BUILD:-}" != "1" ]; then
  bash "$ROOT/web/build.sh"
fi

node "$TOOLS/bundle.mjs" "$1" "$2"
