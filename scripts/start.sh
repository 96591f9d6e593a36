#!/usr/bin/env bash
# npm start: install what is missing, start PostgreSQL and the local fakes on loopback,
# migrate, seed the demo rig, build and serve. Ctrl-C stops everything it started.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export NODE_ENV=production
local_stack_env
started=$(date +%s)
local_stack_up "npm start"

log "Building the app"
npx react-router build >"$ROOT/.data/build.log" 2>&1 || { tail -n 30 "$ROOT/.data/build.log"; die "Build failed (full log: .data/build.log)"; }

setsid node scripts/serve.mjs ./build/server/index.js & PIDS+=($!)
node scripts/wait-ready.mjs "http://127.0.0.1:$PORT/api/health" 30000 || die "The server did not start"
log "Ready in $(( $(date +%s) - started )) s: http://127.0.0.1:$PORT"
node --import tsx scripts/sign-in-help.ts 2>/dev/null || true
log "Press Ctrl-C to stop."
wait "${PIDS[-1]}"
