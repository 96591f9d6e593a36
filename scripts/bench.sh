#!/usr/bin/env bash
# npm run bench: every speed and size target, measured, on a throw-away database.
#   1. the engine on a large rig, and its browser bundle size (scripts/bench.ts)
#   2. page weight of the home page; Now screen toggle latency at 4x CPU throttling and the
#      Now route's JavaScript (scripts/bench-now.ts)
#   3. offline first: server ingest, syncing 10,000 waiting readings, IndexedDB size, offline
#      cold start (scripts/bench-sync.ts)
# Benchmarks report figures; they do not fail on a slow machine. Close other work first:
# figures stretch when the two cores are shared.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export PGPORT="${BENCH_PGPORT:-54349}"
export DATABASE_URL="postgres://tilldawn@127.0.0.1:$PGPORT/tilldawn_bench"
export PG_FSYNC=on
PORT="${BENCH_APP_PORT:-3296}"
DATA_DIR="$ROOT/.data/bench"

ensure_node_modules
ensure_postgres
ensure_chromium
SERVER=""
BARE=""
BARE_PORT="${BENCH_BARE_PORT:-3297}"
cleanup() { local code=$?; [ -n "$SERVER" ] && kill "$SERVER" 2>/dev/null; [ -n "$BARE" ] && kill "$BARE" 2>/dev/null; pg_down "$DATA_DIR/pg"; exit $code; }
trap cleanup EXIT
trap 'exit 130' INT TERM
pg_down "$DATA_DIR/pg"
rm -rf "$DATA_DIR"
pg_up "$DATA_DIR/pg" "$PGPORT" tilldawn_bench
node --import tsx scripts/migrate.ts || exit 1
node --import tsx scripts/seed.ts || exit 1

node --import tsx scripts/bench.ts

log "Building the app"
npx react-router build >"$ROOT/.data/bench/build.log" 2>&1 || die "Build failed (.data/bench/build.log)"
NODE_ENV=production PORT="$PORT" node scripts/serve.mjs ./build/server/index.js >/dev/null & SERVER=$!
node scripts/wait-ready.mjs "http://127.0.0.1:$PORT/api/health" 30000 || die "The app did not start"
# The anchor: a bare React Router app with the same home loader, built here in this run.
log "Building the bare anchor app (scripts/bench-bare)"
(cd scripts/bench-bare && npx react-router build >"$ROOT/.data/bench/bare-build.log" 2>&1) || die "Bare app build failed (.data/bench/bare-build.log)"
# react-router-serve finds the static assets relative to its working folder: start it from there.
(cd scripts/bench-bare && NODE_ENV=production PORT="$BARE_PORT" exec ../../node_modules/.bin/react-router-serve ../../.data/bench/bare-build/server/index.js >/dev/null) & BARE=$!
node scripts/wait-ready.mjs "http://127.0.0.1:$BARE_PORT/" 30000 || die "The bare app did not start"
export BENCH_BARE_URL="http://127.0.0.1:$BARE_PORT/" BENCH_BARE_CLIENT="$ROOT/.data/bench/bare-build/client"
echo
echo "## Pages"
node --import tsx scripts/page-weight.ts "http://127.0.0.1:$PORT/" --against "$BENCH_BARE_URL" "$BENCH_BARE_CLIENT"
node --import tsx scripts/bench-lcp.ts "http://127.0.0.1:$PORT/" "$BENCH_BARE_URL" 5
echo "Server resident memory after start: $(( $(awk '/VmRSS/ {print $2}' /proc/$SERVER/status) / 1024 )) MB"
echo
echo "## Now screen"
node --import tsx scripts/bench-now.ts "http://127.0.0.1:$PORT"
echo
echo "## Offline first"
node --expose-gc --import tsx scripts/bench-sync.ts
echo
echo "## Alerts and device ingest"
node --import tsx scripts/bench-alerts.ts
