# Shared shell helpers for scripts/start.sh and scripts/test.sh (sourced, not run).
# They install what a fresh machine lacks and run the project's own PostgreSQL cluster on loopback.

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
export NEXT_TELEMETRY_DISABLED=1

log() { printf '\033[1mcorvane\033[0m %s\n' "$*" >&2; }
die() { printf 'corvane: %s\n' "$*" >&2; exit 1; }

is_root() { [ "$(id -u)" = 0 ]; }

# apt-get as root, or through sudo for a normal user.
apt_install() {
  local sudo=""
  if ! is_root; then
    command -v sudo >/dev/null 2>&1 || die "need root or sudo to install Debian packages: $*"
    sudo="sudo"
  fi
  log "installing Debian packages: $* (one-off)"
  $sudo apt-get update -qq >/dev/null
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq "$@" >/dev/null
}

# The newest installed server's bin folder (Debian keeps them under /usr/lib/postgresql/N/bin).
pg_bindir() {
  local dirs
  dirs=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V)
  [ -n "$dirs" ] && printf '%s\n' "$dirs" | tail -n 1
}

ensure_postgres() {
  if [ -z "$(pg_bindir)" ] || [ ! -x "$(pg_bindir)/pg_ctl" ]; then
    apt_install postgresql
  fi
  PG_BIN="$(pg_bindir)"
  [ -x "$PG_BIN/pg_ctl" ] || die "pg_ctl not found after installing postgresql"
}

ensure_chromium() {
  [ -x /usr/bin/chromium ] || apt_install chromium
}

# The outside reference libraries the engine's tests run live (DOMAIN §3.4): R with pracma, poweRlaw, fracdiff
# and jsonlite; Debian's python3 with scipy; Octave with its signal package.
REFERENCE_PACKAGES=(r-base-core r-cran-pracma r-cran-powerlaw r-cran-fracdiff r-cran-jsonlite python3-scipy octave octave-signal)
ensure_reference_tools() {
  local missing=() p
  for p in "${REFERENCE_PACKAGES[@]}"; do
    [ "$(dpkg-query -W -f='${Status}' "$p" 2>/dev/null)" = "install ok installed" ] || missing+=("$p")
  done
  [ ${#missing[@]} -eq 0 ] || apt_install "${missing[@]}"
}

# npm ci when node_modules is missing or older than the lockfile.
ensure_node_modules() {
  cd "$ROOT"
  if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    log "installing npm packages (npm ci)"
    npm ci --no-audit --no-fund >/dev/null
  fi
}

# Runs a PostgreSQL tool as the cluster owner: PostgreSQL refuses to run as root.
as_pg_owner() {
  if is_root; then
    (cd / && runuser -u postgres -- "$@")
  else
    "$@"
  fi
}

# Data folder for a named cluster: inside the project (git-ignored) when the cluster owner can reach it,
# otherwise under /tmp, named after the project path (a clone under a mode-700 home, for example).
pg_datadir() {
  local name="$1" inproject="$ROOT/.pgdata/$1"
  if is_root; then
    if runuser -u postgres -- test -x "$ROOT" 2>/dev/null; then
      mkdir -p "$ROOT/.pgdata"
      chmod 755 "$ROOT/.pgdata"
      printf '%s\n' "$inproject"
    else
      printf '/tmp/corvane-pg-%s/%s\n' "$(printf '%s' "$ROOT" | sha1sum | cut -c1-12)" "$name"
    fi
  else
    printf '%s\n' "$inproject"
  fi
}

# pg_start NAME PORT: initialises (once) and starts the cluster; sets PG_STARTED_BY_US=1 when it started it.
pg_start() {
  local name="$1" port="$2"
  PG_DATA="$(pg_datadir "$name")"
  PG_PORT="$port"
  PG_STARTED_BY_US=0
  if [ ! -f "$PG_DATA/PG_VERSION" ]; then
    log "creating PostgreSQL cluster '$name' in $PG_DATA"
    mkdir -p "$PG_DATA"
    chmod 700 "$PG_DATA"
    is_root && chown -R postgres:postgres "$(dirname "$PG_DATA")"
    as_pg_owner "$PG_BIN/initdb" -D "$PG_DATA" -U postgres --auth=trust --encoding=UTF8 --locale=C.UTF-8 >/dev/null
  fi
  if as_pg_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" status >/dev/null 2>&1; then
    log "PostgreSQL '$name' already running on 127.0.0.1:$port"
    return 0
  fi
  # TCP on loopback only and no Unix socket; trust auth is acceptable only because nothing else can reach it.
  as_pg_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" -l "$PG_DATA/server.log" -w -t 60 start \
    -o "-c listen_addresses=127.0.0.1 -p $port -c unix_socket_directories=''" >/dev/null \
    || { tail -n 20 "$PG_DATA/server.log" >&2; die "PostgreSQL '$name' did not start"; }
  PG_STARTED_BY_US=1
  log "PostgreSQL '$name' started on 127.0.0.1:$port (pid $(head -n 1 "$PG_DATA/postmaster.pid"))"
}

pg_stop() {
  [ "${PG_STARTED_BY_US:-0}" = 1 ] || return 0
  [ -f "$PG_DATA/postmaster.pid" ] || return 0
  local pid
  pid="$(head -n 1 "$PG_DATA/postmaster.pid")"
  log "stopping PostgreSQL (pid $pid)"
  as_pg_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" stop -m fast -w >/dev/null 2>&1 || kill -TERM "$pid" 2>/dev/null || true
  PG_STARTED_BY_US=0
}

psql_super() { "$PG_BIN/psql" -X -q -v ON_ERROR_STOP=1 -h 127.0.0.1 -p "$PG_PORT" -U postgres "$@"; }

# ensure_database ROLE DB: the application role (no superuser) and a database it owns.
ensure_database() {
  local role="$1" db="$2"
  if [ "$(psql_super -d postgres -tAc "SELECT 1 FROM pg_roles WHERE rolname = '$role'")" != 1 ]; then
    psql_super -d postgres -c "CREATE ROLE \"$role\" LOGIN NOSUPERUSER NOCREATEDB NOCREATEROLE"
  fi
  if [ "$(psql_super -d postgres -tAc "SELECT 1 FROM pg_database WHERE datname = '$db'")" != 1 ]; then
    psql_super -d postgres -c "CREATE DATABASE \"$db\" OWNER \"$role\" ENCODING 'UTF8'"
  fi
}

# ensure_generated_secret VAR FILE: VAR from the environment, else a random value generated once per checkout
# into .corvane/FILE (git-ignored, mode 600) and reused, so sessions and the scheduler survive a restart.
ensure_generated_secret() {
  local var="$1" file="$ROOT/.corvane/$2"
  [ -n "${!var:-}" ] && return 0
  mkdir -p "$ROOT/.corvane"
  if [ ! -s "$file" ]; then
    node -e 'process.stdout.write(require("crypto").randomBytes(32).toString("base64url"))' > "$file"
    chmod 600 "$file"
  fi
  export "$var=$(cat "$file")"
}

# NEXTAUTH_SECRET signs sessions; CORVANE_SCHEDULER_SECRET lets the scheduler call the compute route.
ensure_secret() { ensure_generated_secret NEXTAUTH_SECRET nextauth-secret; }
ensure_scheduler_secret() { ensure_generated_secret CORVANE_SCHEDULER_SECRET scheduler-secret; }

# supervise NAME CMD…: runs CMD in the background and restarts it (after 2 s) if it exits on its own; a TERM or
# INT to the supervisor stops the command and the supervisor. Appends the supervisor's PID to SUPERVISED.
SUPERVISED=()
supervise() {
  local name="$1"
  shift
  (
    child=""
    stopping=0
    trap 'stopping=1; [ -n "$child" ] && kill -TERM "$child" 2>/dev/null; wait "$child" 2>/dev/null; exit 0' TERM INT
    while :; do
      "$@" &
      child=$!
      wait "$child"
      status=$?
      [ "$stopping" = 1 ] && exit 0
      log "$name exited (status $status); restarting in 2 s"
      sleep 2
    done
  ) &
  SUPERVISED+=($!)
  log "$name started (supervisor pid $!)"
}

stop_supervised() {
  local pid
  for pid in "${SUPERVISED[@]}"; do kill -TERM "$pid" 2>/dev/null || true; done
  for pid in "${SUPERVISED[@]}"; do wait "$pid" 2>/dev/null || true; done
  SUPERVISED=()
}

# Loads .env (if present) without overriding variables already set in the environment.
load_env_file() {
  local file="$ROOT/.env" line key
  [ -f "$file" ] || return 0
  while IFS= read -r line || [ -n "$line" ]; do
    case "$line" in ''|'#'*) continue ;; esac
    key="${line%%=*}"
    [ -n "${!key+x}" ] || export "$line"
  done < "$file"
}

# True when the production build is missing or older than any source it was built from.
build_is_stale() { # [dist dir, default .next]
  local dist="${1:-.next}"
  [ -f "$ROOT/$dist/BUILD_ID" ] || return 0
  local newer
  newer=$(cd "$ROOT" && find app lib components seeds proxy.ts instrumentation.ts knexfile.ts next.config.ts postcss.config.mjs \
    package-lock.json tsconfig.json types -newer "$dist/BUILD_ID" -type f -print -quit 2>/dev/null)
  [ -n "$newer" ]
}

# Waits until URL answers (any HTTP status) or the PID dies.
wait_for_http() {
  local url="$1" pid="$2" tries=0
  until node -e 'fetch(process.argv[1]).then(() => process.exit(0), () => process.exit(1))' "$url" 2>/dev/null; do
    kill -0 "$pid" 2>/dev/null || return 1
    tries=$((tries + 1))
    [ "$tries" -gt 240 ] && return 1
    sleep 0.5
  done
}
