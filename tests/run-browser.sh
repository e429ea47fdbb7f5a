#!/usr/bin/env bash
# Run the browser tests: installs Debian's Chromium when missing (never downloads a
# browser of its own), installs the test dependencies, builds the page and the command
# line, then runs node's test runner. The tests start their own static server on a free
# loopback port. Exits with the test runner's status.
#
#   bash tests/run-browser.sh            (from any folder; honours CARGO_TARGET_DIR)
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"

log() { printf 'run-browser.sh: %s\n' "$*" >&2; }

if [ ! -x /usr/bin/chromium ]; then
  log "installing chromium from Debian"
  apt-get update
  DEBIAN_FRONTEND=noninteractive apt-get install -y chromium
fi

# Reinstall when node_modules is missing or older than the lock file.
if [ ! -d tests/node_modules ] || [ tests/package-lock.json -nt tests/node_modules/.package-lock.json ] \
  || [ ! -f tests/node_modules/.package-lock.json ]; then
  log "installing test dependencies (npm ci)"
  (cd tests && npm ci --no-audit --no-fund)
fi

bash web/build.sh

log "building the command line"
cargo build -p stratamap --release --bin stratamap

mkdir -p tests/output
log "running the browser tests"
set +e
(cd tests && node --test --test-concurrency=1 browser/)
status=$?
set -e
exit "$status"
