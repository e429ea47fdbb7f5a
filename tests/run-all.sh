#!/usr/bin/env bash
# Every test of stratamap, as CI runs it: formatting, lints, the Rust tests (unit,
# integration, property and doc tests), the browser tests against the built page, then
# the cross-checks against reference libraries from PyPI (skipped where unavailable).
# Installs what a fresh machine lacks (wasm32 target, wasm-bindgen-cli, Chromium,
# playwright-core) and skips what is already there.
#
#   bash tests/run-all.sh          (from any folder)
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"
export PATH="$HOME/.cargo/bin:$PATH"

step() { printf '\n== %s\n' "$*"; }

step "rustfmt and clippy components"
for c in rustfmt clippy; do
  rustup component list --installed | grep -q "^$c" || rustup component add "$c"
done
rustup target list --installed | grep -qx wasm32-unknown-unknown || rustup target add wasm32-unknown-unknown

step "cargo fmt --check"
cargo fmt --all -- --check

step "cargo clippy (native and wasm32)"
cargo clippy --workspace --all-targets -- -D warnings
cargo clippy -p stratamap --lib --target wasm32-unknown-unknown -- -D warnings

step "cargo test"
cargo test --workspace

step "browser tests"
bash tests/run-browser.sh

step "cross-checks against reference libraries (skipped where Python or the package is missing)"
bash tests/crosscheck/run.sh
