#!/usr/bin/env bash
# Build the page and serve web/ on the loopback interface.
#
#   bash web/serve.sh            (PORT=8080 bash web/serve.sh for another port)
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
PORT="${PORT:-8000}"

bash "$ROOT/web/build.sh"
echo "stratamap: open http://127.0.0.1:${PORT}/ (Ctrl-C stops)"
exec node "$ROOT/tests/static-server.mjs" "$ROOT/web" "$PORT"
