#!/usr/bin/env bash
# npm run bench[:engine|:ingest]: benchmarks, apart from the tests. The ingest benchmark gets its own PostgreSQL
# cluster (port 55434, fresh each run), so it never touches npm start's or npm test's data.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"
what="${1:-all}"
ensure_node_modules

if [ "$what" = engine ] || [ "$what" = all ]; then
  node --import tsx scripts/bench-engine.ts
fi
if [ "$what" = ingest ] || [ "$what" = all ]; then
  ensure_postgres
  trap 'pg_stop' EXIT
  PG_DATA="$(pg_datadir bench)"
  rm -rf "$PG_DATA"
  pg_start bench "${CORVANE_BENCH_PG_PORT:-55434}"
  ensure_database corvane corvane_bench
  export DATABASE_URL="postgres://corvane@127.0.0.1:$PG_PORT/corvane_bench"
  export NEXTAUTH_SECRET="bench-only-secret" LOG_LEVEL="${LOG_LEVEL:-warn}"
  node_modules/.bin/tsx node_modules/knex/bin/cli.js --knexfile knexfile.ts migrate:latest >/dev/null
  node --import tsx scripts/bench-ingest.ts
fi
