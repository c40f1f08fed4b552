#!/usr/bin/env bash
# npm run bench[:engine|:ingest|:ui|:audit]: benchmarks, apart from the tests. The ingest, UI and audit benchmarks get their own
# PostgreSQL cluster (port 55434, fresh each run), so they never touch npm start's or npm test's data; the UI benchmark
# also builds into its own folder (.next-bench) and serves it on 127.0.0.1:3300.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"
what="${1:-all}"
ensure_node_modules

if [ "$what" = engine ] || [ "$what" = all ]; then
  node --import tsx scripts/bench-engine.ts
fi
APP_PID=""
bench_cleanup() {
  set +e
  [ -n "$APP_PID" ] && kill -TERM "$APP_PID" 2>/dev/null && wait "$APP_PID" 2>/dev/null
  pg_stop
}
# A fresh cluster and migrated database for one benchmark.
bench_database() { # name
  ensure_postgres
  trap bench_cleanup EXIT
  if [ -z "${PG_PORT:-}" ]; then
    PG_DATA="$(pg_datadir bench)"
    # Another benchmark may be using the cluster: deleting it under a running server voids that run.
    if [ -f "$PG_DATA/postmaster.pid" ] && as_pg_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" status >/dev/null 2>&1; then
      log "a benchmark's PostgreSQL is already running in $PG_DATA; wait for it to finish (or stop it) and run again"
      exit 1
    fi
    rm -rf "$PG_DATA"
    pg_start bench "${CORVANE_BENCH_PG_PORT:-55434}"
  fi
  ensure_database corvane "$1"
  export DATABASE_URL="postgres://corvane@127.0.0.1:$PG_PORT/$1"
  export NEXTAUTH_SECRET="bench-only-secret" LOG_LEVEL="${LOG_LEVEL:-warn}"
  node_modules/.bin/tsx node_modules/knex/bin/cli.js --knexfile knexfile.ts migrate:latest >/dev/null
}

if [ "$what" = ingest ] || [ "$what" = all ]; then
  bench_database corvane_bench
  node --import tsx scripts/bench-ingest.ts
fi
if [ "$what" = audit ] || [ "$what" = all ]; then
  bench_database corvane_bench_audit
  # react-server: lib files used by pages import "server-only", which only resolves to an empty module under that
  # condition (as in Next's server bundle). --expose-gc: memory is measured from a collected heap.
  node --conditions=react-server --expose-gc --import tsx scripts/bench-audit.ts
fi
if [ "$what" = ui ] || [ "$what" = all ]; then
  bench_database corvane_bench_ui
  ensure_chromium
  log "writing 48 beds × 7 days of windows"
  export CORVANE_BENCH_DATA="$(node_modules/.bin/tsx scripts/bench-ui-data.ts)"
  export CORVANE_DIST_DIR=.next-bench NEXT_TELEMETRY_DISABLED=1 NEXTAUTH_URL="http://127.0.0.1:3300"
  if build_is_stale .next-bench; then
    log "building (next build into .next-bench)"
    node_modules/.bin/next build >/dev/null
  fi
  NODE_ENV=production node_modules/.bin/next start -H 127.0.0.1 -p 3300 >/dev/null &
  APP_PID=$!
  wait_for_http "http://127.0.0.1:3300/api/health" "$APP_PID" || die "the app did not come up"
  CORVANE_BENCH_URL="http://127.0.0.1:3300" node --import tsx scripts/bench-ui.ts
  # The bench build's generated route types would be typechecked beside .next-test's (tsconfig includes both
  # folders) and disagree with them whenever the two builds saw different routes.
  rm -rf .next-bench/types .next-bench/dev/types
fi
