#!/usr/bin/env bash
# npm run dev: the development loop. Starts PostgreSQL and the local fakes on loopback like
# `npm start` (same data folder, migrations and demo seed), then React Router's dev server
# (Vite) with hot module reload instead of a production build. No service worker in dev.
# Ctrl-C stops everything it started.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export NODE_ENV=development
export PORT="${PORT:-3000}"
export HOST="${HOST:-127.0.0.1}"
export PGPORT="${PGPORT:-54329}"
export DATABASE_URL="${DATABASE_URL:-postgres://tilldawn@127.0.0.1:$PGPORT/tilldawn}"
export APP_URL="${APP_URL:-http://127.0.0.1:$PORT}"
export SMTP_PORT="${SMTP_PORT:-2525}"
DATA_DIR="${TILLDAWN_DATA_DIR:-$ROOT/.data/dev}"

ensure_node_modules
node --import tsx scripts/check-env.ts || exit 1
port_free "$PORT" || die "Port $PORT is taken by another program. Set PORT to a free port (e.g. PORT=3001 npm run dev)."
ensure_postgres

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

log "Starting the dev server (hot reload) on http://$HOST:$PORT"
setsid ./node_modules/.bin/react-router dev --host "$HOST" --port "$PORT" --strictPort & PIDS+=($!)
node scripts/wait-ready.mjs "http://127.0.0.1:$PORT/api/health" 60000 || die "The dev server did not start"
log "Ready: http://127.0.0.1:$PORT (edit a file under app/ and the page updates)"
node --import tsx scripts/sign-in-help.ts 2>/dev/null || true
log "Press Ctrl-C to stop."
wait "${PIDS[-1]}"
