#!/usr/bin/env bash
# Cross-checks against reference implementations from PyPI, in a virtual environment
# under target/ that is made once. Each check skips with a message (and success) when
# Python, venv, pip or the package cannot be had; a check that runs and disagrees fails.
#
#   bash tests/crosscheck/run.sh        (from any folder; builds the command line if needed)
set -uo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
cd "$ROOT"
TARGET="${CARGO_TARGET_DIR:-$ROOT/target}"
VENV="$TARGET/crosscheck-venv"
BIN="$TARGET/release/stratamap"

log() { printf 'crosscheck: %s\n' "$*" >&2; }

if ! command -v python3 >/dev/null 2>&1; then
  log "skipped: python3 is not installed"
  exit 0
fi
if [ ! -x "$VENV/bin/python" ]; then
  python3 -m venv "$VENV" >/dev/null 2>&1 || { log "skipped: python3 -m venv is not available"; rm -rf "$VENV"; exit 0; }
fi
PY="$VENV/bin/python"

# ipfn (and the numpy and pandas it needs), installed once.
if ! "$PY" -c "import ipfn" >/dev/null 2>&1; then
  log "installing ipfn into $VENV"
  "$PY" -m pip install --quiet --disable-pip-version-check "ipfn==1.4.4" >/dev/null 2>&1 \
    || { log "skipped ipfn: pip could not install ipfn"; exit 0; }
fi
cargo build --quiet -p stratamap --release --bin stratamap || exit 1

status=0
OUT="$(mktemp -d)"
trap 'rm -rf "$OUT"' EXIT
F=tests/fixtures/rake
"$BIN" rake --margins "$F/margins.csv" --groups "$F/groups.csv" -o "$OUT/electorate.csv" 2>"$OUT/report.txt" \
  || { cat "$OUT/report.txt" >&2; log "stratamap rake failed"; exit 1; }
"$PY" tests/crosscheck/ipfn_check.py "$F/margins.csv" "$F/groups.csv" "$OUT/electorate.csv" || status=1
exit $status
