#!/usr/bin/env bash
# npm run dev: the development loop. Starts PostgreSQL and the local fakes on loopback like
# `npm start` (same data folder, migrations and demo seed), then React Router's dev server
# (Vite) with hot module reload instead of a production build. No service worker in dev.
# Ctrl-C stops everything it started.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export NODE_ENV=development
local_stack_env
local_stack_up "npm run dev"

log "Starting the dev server (hot reload) on http://$HOST:$PORT"
setsid ./node_modules/.bin/react-router dev --host "$HOST" --port "$PORT" --strictPort & PIDS+=($!)
node scripts/wait-ready.mjs "http://127.0.0.1:$PORT/api/health" 60000 || die "The dev server did not start"
log "Ready: http://127.0.0.1:$PORT (edit a file under app/ and the page updates)"
node --import tsx scripts/sign-in-help.ts 2>/dev/null || true
log "Press Ctrl-C to stop."
wait "${PIDS[-1]}"
