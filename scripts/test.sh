#!/usr/bin/env bash
# npm test: install what is missing, start a throw-away PostgreSQL cluster, then typecheck,
# lint, unit tests, integration tests, a production build and browser tests in Chromium.
# Ends with one line "N passed, N failed" and exits non-zero on any failure.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export PGPORT="${TEST_PGPORT:-54339}"
export DATABASE_URL="postgres://tilldawn@127.0.0.1:$PGPORT/tilldawn_test"
export E2E_PORT="${E2E_PORT:-3199}"
export PG_FSYNC=off
# The S3 fake for photos (seed, integration and browser tests), on a port of its own.
export PHOTOS_S3_PORT="${TEST_S3_PORT:-4599}"
export PHOTOS_S3_DIR="$ROOT/.data/test/s3"
unset PHOTOS_S3_BUCKET PHOTOS_S3_ENDPOINT
DATA_DIR="$ROOT/.data/test"
REPORTS="$DATA_DIR/reports"
started=$(date +%s)

ensure_node_modules
ensure_postgres
ensure_chromium

S3_PID=""
cleanup() { local code=$?; [ -n "$S3_PID" ] && kill "$S3_PID" 2>/dev/null; pg_down "$DATA_DIR/pg"; exit $code; }
trap cleanup EXIT
trap 'exit 130' INT TERM

# A fresh cluster every run: nothing carries over between runs.
pg_down "$DATA_DIR/pg"
rm -rf "$DATA_DIR"
mkdir -p "$REPORTS"
pg_up "$DATA_DIR/pg" "$PGPORT" tilldawn_test
node --import tsx scripts/migrate.ts || exit 1
port_free "$PHOTOS_S3_PORT" || die "Port $PHOTOS_S3_PORT (the S3 fake) is taken. Set TEST_S3_PORT to a free port."
setsid node --import tsx scripts/s3-fake.ts & S3_PID=$!
node scripts/wait-ready.mjs "http://127.0.0.1:$PHOTOS_S3_PORT/" 20000 || die "The S3 fake did not start"
node --import tsx scripts/seed.ts || exit 1

STEPS=()
step() { # step NAME COMMAND...: a non-test check that counts as one pass or failure
  local name="$1"; shift
  log "$name"
  if "$@"; then STEPS+=("$name:pass"); else STEPS+=("$name:fail"); log "$name FAILED"; fi
}
vitest_project() { # vitest_project NAME
  ./node_modules/.bin/vitest run --config tests/vitest.config.ts --project "$1" \
    --reporter=default --reporter=json --outputFile.json="$REPORTS/$1.json"
}

step typecheck npm run -s typecheck
step lint npm run -s lint
step "unit tests" vitest_project unit
step "integration tests" vitest_project integration
step build npx react-router build
if [ -f build/server/index.js ]; then
  step "browser tests" vitest_project e2e
fi

log "npm test took $(( $(date +%s) - started )) s"
# The closing line is the count: "N passed, N failed".
node scripts/test-summary.mjs "$REPORTS" "${STEPS[@]}"
