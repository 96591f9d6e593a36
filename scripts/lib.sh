# Shared set-up steps for `npm start` and `npm test`. Source it; it defines functions only.
# Every step installs what is missing and says what it does.

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
log() { printf '\033[1;34m[tilldawn]\033[0m %s\n' "$*"; }
die() { printf '\033[1;31m[tilldawn] %s\033[0m\n' "$*" >&2; exit 1; }

as_root() {
  if [ "$(id -u)" = 0 ]; then "$@"; elif command -v sudo >/dev/null; then sudo "$@"; else
    die "Need root to run: $* (install it by hand, or run as root)"; fi
}

APT_UPDATED=""
apt_install() {
  if [ -z "$APT_UPDATED" ]; then
    log "Updating Debian's package lists"
    as_root env DEBIAN_FRONTEND=noninteractive apt-get update -qq || die "apt-get update failed"
    APT_UPDATED=1
  fi
  log "Installing Debian packages: $*"
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$@" \
    >/dev/null || die "apt-get install $* failed"
}

ensure_node_modules() {
  local stamp="$ROOT/node_modules/.package-lock.json"
  if [ ! -f "$stamp" ] || [ "$ROOT/package-lock.json" -nt "$stamp" ]; then
    log "Installing node dependencies (npm ci)"
    (cd "$ROOT" && npm ci --include=dev --no-audit --no-fund --loglevel=error) || die "npm ci failed"
  fi
}

pg_bin_dir() {
  local dir
  dir=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)
  [ -n "$dir" ] && [ -x "$dir/initdb" ] && echo "$dir"
}

ensure_postgres() {
  PG_BIN="$(pg_bin_dir || true)"
  if [ -z "$PG_BIN" ]; then
    apt_install postgresql
    PG_BIN="$(pg_bin_dir || true)"
    [ -n "$PG_BIN" ] || die "PostgreSQL binaries not found after installing Debian's postgresql"
  fi
}

ensure_chromium() {
  [ -x /usr/bin/chromium ] || apt_install chromium
}

# Run a PostgreSQL binary as the postgres user when we are root (initdb refuses root).
pg_run() {
  if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

# pg_up DATA_DIR PORT DB: create (if missing) and start a project-local cluster on 127.0.0.1.
pg_up() {
  local data="$1" port="$2" db="$3" run="$1/../run" logf="$1/../postgres.log"
  mkdir -p "$(dirname "$data")" "$run" || die "Cannot create $(dirname "$data")"
  if [ "$(id -u)" = 0 ]; then
    id postgres >/dev/null 2>&1 || die "There is no postgres user; reinstall Debian's postgresql"
    chown postgres "$(dirname "$data")" "$run" 2>/dev/null
    # The postgres user must be able to reach the project folder.
    local d="$(dirname "$data")"
    while [ "$d" != "/" ]; do chmod o+x "$d" 2>/dev/null || true; d="$(dirname "$d")"; done
    touch "$logf" && chown postgres "$logf"
  fi
  if [ ! -f "$data/PG_VERSION" ]; then
    log "Creating a PostgreSQL cluster in ${data#$ROOT/}"
    mkdir -p "$data" && chmod 700 "$data"
    [ "$(id -u)" = 0 ] && chown postgres "$data"
    pg_run "$PG_BIN/initdb" -D "$data" -U postgres -A trust -E UTF8 --no-locale >/dev/null \
      || die "initdb failed for $data (is the folder writable by the postgres user?)"
  fi
  [ -r "$data/PG_VERSION" ] || die "Cannot read the database folder $data"
  if pg_run "$PG_BIN/pg_ctl" -D "$data" status >/dev/null 2>&1; then
    log "PostgreSQL already running in ${data#$ROOT/}"
  else
    if (exec 3<>"/dev/tcp/127.0.0.1/$port") 2>/dev/null; then
      die "Port $port is taken by another program. Set PGPORT to a free port."
    fi
    log "Starting PostgreSQL on 127.0.0.1:$port"
    pg_run "$PG_BIN/pg_ctl" -D "$data" -l "$logf" -w -t 30 \
      -o "-c listen_addresses=127.0.0.1 -p $port -k $run -c fsync=${PG_FSYNC:-on}" start >/dev/null \
      || { tail -n 5 "$logf" >&2; die "PostgreSQL did not start (log: $logf)"; }
  fi
  if ! pg_run "$PG_BIN/psql" -h 127.0.0.1 -p "$port" -U postgres -tAc \
      "select 1 from pg_roles where rolname='tilldawn'" | grep -q 1; then
    pg_run "$PG_BIN/psql" -q -h 127.0.0.1 -p "$port" -U postgres -c "create role tilldawn login" \
      || die "Cannot create the tilldawn role"
  fi
  if ! pg_run "$PG_BIN/psql" -h 127.0.0.1 -p "$port" -U postgres -tAc \
      "select 1 from pg_database where datname='$db'" | grep -q 1; then
    pg_run "$PG_BIN/createdb" -h 127.0.0.1 -p "$port" -U postgres -O tilldawn "$db" \
      || die "Cannot create database $db"
  fi
}

pg_down() {
  local data="$1"
  if [ -f "$data/postmaster.pid" ]; then
    pg_run "$PG_BIN/pg_ctl" -D "$data" -m fast -w stop >/dev/null 2>&1 || true
  fi
}

# port_free PORT: fails when something already listens on 127.0.0.1:PORT.
port_free() { ! (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

# ---- the local stack that `npm start` and `npm run dev` share ------------------------------

# local_stack_env: the settings both use (each may be set from outside).
local_stack_env() {
  export PORT="${PORT:-3000}"
  export HOST="${HOST:-127.0.0.1}" # scripts/serve.mjs and Vite listen on loopback only unless told otherwise
  export PGPORT="${PGPORT:-54329}"
  export DATABASE_URL="${DATABASE_URL:-postgres://tilldawn@127.0.0.1:$PGPORT/tilldawn}"
  export APP_URL="${APP_URL:-http://127.0.0.1:$PORT}"
  export SMTP_PORT="${SMTP_PORT:-2525}"
  export PHOTOS_S3_PORT="${PHOTOS_S3_PORT:-4569}"
  export PHOTOS_S3_DIR="${PHOTOS_S3_DIR:-$ROOT/.data/s3}"
  DATA_DIR="${TILLDAWN_DATA_DIR:-$ROOT/.data/dev}"
}

# local_stack_up COMMAND: checks the settings, then starts PostgreSQL, migrates, seeds and
# starts the local fakes. The children run in sessions of their own (their ids in PIDS): a
# Ctrl-C reaches only the calling script, which stops them once, in order, and PostgreSQL last.
local_stack_up() {
  ensure_node_modules
  # Check the configuration before anything starts, so a bad value gives a clear message.
  node --import tsx scripts/check-env.ts || exit 1
  port_free "$PORT" || die "Port $PORT is taken by another program. Set PORT to a free port (e.g. PORT=3001 $1)."
  ensure_postgres
  PIDS=()
  trap local_stack_down EXIT
  trap 'local_stack_down 0' INT TERM
  pg_up "$DATA_DIR/pg" "$PGPORT" tilldawn
  node --import tsx scripts/migrate.ts || exit 1
  # The fakes start before the seed: it uploads the demo rig's photos to the S3 fake.
  if [ -f scripts/fakes.ts ]; then
    setsid node --import tsx scripts/fakes.ts & PIDS+=($!)
    if [ -z "${PHOTOS_S3_BUCKET:-}${PHOTOS_S3_ENDPOINT:-}" ]; then
      node scripts/wait-ready.mjs "http://127.0.0.1:$PHOTOS_S3_PORT/" 20000 || die "The S3 fake did not start on port $PHOTOS_S3_PORT (set PHOTOS_S3_PORT to a free port)"
    fi
  fi
  node --import tsx scripts/seed.ts || exit 1
  node --import tsx scripts/photo-sweep.ts || true
  # The alert worker (pg-boss jobs: evaluate, the minute sweep, push and e-mail delivery).
  setsid node --import tsx scripts/worker.ts & PIDS+=($!)
}

local_stack_down() {
  local code="${1:-$?}"
  trap - EXIT INT TERM
  log "Stopping"
  for pid in "${PIDS[@]}"; do kill "$pid" 2>/dev/null; done
  wait 2>/dev/null
  pg_down "$DATA_DIR/pg"
  exit "$code"
}
