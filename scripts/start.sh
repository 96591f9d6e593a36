#!/usr/bin/env bash
# npm start: install what is missing, start PostgreSQL and the local fakes on loopback,
# migrate, seed the demo rig, build and serve. Ctrl-C stops everything it started.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export NODE_ENV=production
export PORT="${PORT:-3000}"
export HOST="${HOST:-127.0.0.1}" # scripts/serve.mjs listens on loopback only unless told otherwise
export PGPORT="${PGPORT:-54329}"
export DATABASE_URL="${DATABASE_URL:-postgres://tilldawn@127.0.0.1:$PGPORT/tilldawn}"
export APP_URL="${APP_URL:-http://127.0.0.1:$PORT}"
export SMTP_PORT="${SMTP_PORT:-2525}"
DATA_DIR="${TILLDAWN_DATA_DIR:-$ROOT/.data/dev}"
started=$(date +%s)

ensure_node_modules
# Check the configuration before anything starts, so a bad value gives a clear message.
node --import tsx scripts/check-env.ts || exit 1
port_free "$PORT" || die "Port $PORT is taken by another program. Set PORT to a free port (e.g. PORT=3001 npm start)."
ensure_postgres

# The children run in sessions of their own: a Ctrl-C reaches only this script, which stops
# them once, in order.
PIDS=()
cleanup() {
  local code="${1:-$?}"
  trap - EXIT INT TERM
  log "Stopping"
  for pid in "${PIDS[@]}"; do kill "$pid" 2>/dev/null; done
  wait 2>/dev/null
  pg_down "$DATA_DIR/pg"
  exit "$code"
}
trap cleanup EXIT
trap 'cleanup 0' INT TERM

pg_up "$DATA_DIR/pg" "$PGPORT" tilldawn
node --import tsx scripts/migrate.ts || exit 1
node --import tsx scripts/seed.ts || exit 1
if [ -f scripts/fakes.ts ]; then
  setsid node --import tsx scripts/fakes.ts & PIDS+=($!)
fi
log "Building the app"
npx react-router build >"$ROOT/.data/build.log" 2>&1 || { tail -n 30 "$ROOT/.data/build.log"; die "Build failed (full log: .data/build.log)"; }

setsid node scripts/serve.mjs ./build/server/index.js & PIDS+=($!)
node scripts/wait-ready.mjs "http://127.0.0.1:$PORT/api/health" 30000 || die "The server did not start"
log "Ready in $(( $(date +%s) - started )) s: http://127.0.0.1:$PORT"
node --import tsx scripts/sign-in-help.ts 2>/dev/null || true
log "Press Ctrl-C to stop."
wait "${PIDS[-1]}"
