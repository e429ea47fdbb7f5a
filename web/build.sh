#!/usr/bin/env bash
# Build the stratamap page's WebAssembly engine into web/pkg/ and copy the demo data
# into web/maps-demo/ (both folders are git-ignored). Safe to run again: it installs
# only what this machine lacks.
#
#   bash web/build.sh            (from any folder)
#
# Honours CARGO_TARGET_DIR.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"

WASM_BINDGEN_VERSION="0.2.130"
TARGET_DIR="${CARGO_TARGET_DIR:-$ROOT/target}"

log() { printf 'build.sh: %s\n' "$*" >&2; }

if ! rustup target list --installed | grep -x 'wasm32-unknown-unknown' >/dev/null; then
  log "adding the wasm32-unknown-unknown target"
  rustup target add wasm32-unknown-unknown
fi

if [ "$(wasm-bindgen --version 2>/dev/null || true)" != "wasm-bindgen ${WASM_BINDGEN_VERSION}" ]; then
  log "installing wasm-bindgen-cli ${WASM_BINDGEN_VERSION} (takes several minutes)"
  cargo install wasm-bindgen-cli --version "${WASM_BINDGEN_VERSION}"
fi

log "building the engine for wasm32"
cargo build -p stratamap --lib --profile wasm --target wasm32-unknown-unknown

log "generating web/pkg"
wasm-bindgen --target web --no-typescript --remove-name-section --remove-producers-section --out-dir web/pkg --out-name stratamap \
  "$TARGET_DIR/wasm32-unknown-unknown/wasm/stratamap.wasm"

log "copying the demo dataset to web/maps-demo"
mkdir -p web/maps-demo
for f in dataset.json districts.geojson electorate.csv poll.csv; do
  if [ ! -f "maps-demo/$f" ]; then
    log "missing maps-demo/$f"
    exit 1
  fi
  cp "maps-demo/$f" "web/maps-demo/$f"
done

log "done: serve web/ (bash web/serve.sh) and open index.html"
