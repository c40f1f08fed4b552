#!/usr/bin/env bash
# npm test: every test, on its own PostgreSQL cluster (port 55433 by default, beside npm start's 55432).
# Steps: typecheck → Vitest (unit + integration on real PostgreSQL) → next build → Playwright on Debian chromium.
# Ends with one line "N passed, N failed" and a non-zero exit on any failure.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export CORVANE_TEST_PG_PORT="${CORVANE_TEST_PG_PORT:-55433}"
export CORVANE_TEST_APP_PORT="${CORVANE_TEST_APP_PORT:-3100}"
PASSED=0
FAILED=0
FAILED_STEPS=()
REPORTS="$ROOT/.corvane/test-reports"

cleanup() { set +e; trap "" PIPE; trap - EXIT INT TERM; [ -n "${REVIEW_NIGHT_PID:-}" ] && kill "$REVIEW_NIGHT_PID" 2>/dev/null; pg_stop; }
trap cleanup EXIT
trap 'exit 130' INT
trap 'exit 143' TERM

step_result() { # name status
  if [ "$2" = 0 ]; then PASSED=$((PASSED + 1)); else FAILED=$((FAILED + 1)); FAILED_STEPS+=("$1"); fi
}

set -e
ensure_postgres
ensure_chromium
ensure_reference_tools
ensure_node_modules
set +e
mkdir -p "$REPORTS"
rm -f "$REPORTS"/*.json

# A fresh cluster each run: tests never see leftovers of an earlier run.
PG_DATA="$(pg_datadir test)"
if [ -f "$PG_DATA/postmaster.pid" ]; then
  PG_STARTED_BY_US=1 pg_stop
fi
rm -rf "$PG_DATA"
pg_start test "$CORVANE_TEST_PG_PORT" || exit 1
for db in corvane_test corvane_migrations corvane_e2e; do ensure_database corvane "$db" || exit 1; done

BASE="postgres://corvane@127.0.0.1:$CORVANE_TEST_PG_PORT"
export DATABASE_URL="$BASE/corvane_test"
export CORVANE_TEST_MIGRATIONS_URL="$BASE/corvane_migrations"
export CORVANE_TEST_SUPERUSER_URL="postgres://postgres@127.0.0.1:$CORVANE_TEST_PG_PORT/corvane_test"
export NEXTAUTH_SECRET="test-secret-not-for-production-$(date +%s)"
export NEXTAUTH_URL="http://127.0.0.1:$CORVANE_TEST_APP_PORT"
export CORVANE_DEMO_MODE=1
export LOG_LEVEL="${LOG_LEVEL:-warn}"
export CORVANE_DIST_DIR=.next-test

for url in "$DATABASE_URL" "$BASE/corvane_e2e"; do
  DATABASE_URL="$url" node_modules/.bin/tsx node_modules/knex/bin/cli.js --knexfile knexfile.ts migrate:latest >/dev/null \
    && DATABASE_URL="$url" node_modules/.bin/tsx scripts/seed.ts >/dev/null \
    || { log "migrate/seed failed for $url"; exit 1; }
done
# A simulated night of beats, windows and flags on four demo beds of the e2e database, for the review screens;
# runs beside the first steps and is waited for before the browser tests.
DATABASE_URL="$BASE/corvane_e2e" node_modules/.bin/tsx tests/support/seed-review-night.ts >"$REPORTS/review-night.log" 2>&1 &
REVIEW_NIGHT_PID=$!

log "1/5 typecheck"
node_modules/.bin/tsc --noEmit
step_result typecheck $?

log "2/5 reference fixtures (R pracma/poweRlaw/fracdiff, scipy, Octave signal — run live)"
bash tests/reference/run.sh
step_result "reference scripts" $?

log "3/5 vitest (unit + integration)"
node_modules/.bin/vitest run --reporter=default --reporter=json --outputFile.json="$REPORTS/vitest.json"
vitest_status=$?
if [ -f "$REPORTS/vitest.json" ]; then
  read -r vp vf < <(node -e 'const r=require(process.argv[1]);console.log(r.numPassedTests, r.numFailedTests + (r.numRuntimeErrorTestSuites||0))' "$REPORTS/vitest.json")
  PASSED=$((PASSED + vp)); FAILED=$((FAILED + vf))
  [ "$vitest_status" != 0 ] && [ "$vf" = 0 ] && { FAILED=$((FAILED + 1)); FAILED_STEPS+=("vitest (exit $vitest_status)"); }
  [ "$vf" != 0 ] && FAILED_STEPS+=("vitest")
else
  step_result vitest 1
fi

log "4/5 next build"
node_modules/.bin/next build
build_status=$?
step_result "next build" $build_status

log "5/5 playwright e2e (Debian chromium)"
if ! wait "$REVIEW_NIGHT_PID"; then
  log "the e2e review night could not be seeded:"; tail -5 "$REPORTS/review-night.log"
  FAILED=$((FAILED + 1)); FAILED_STEPS+=("e2e review night seed")
fi
if [ "$build_status" = 0 ]; then
  DATABASE_URL="$BASE/corvane_e2e" PLAYWRIGHT_JSON_OUTPUT_NAME="$REPORTS/playwright.json" \
    node_modules/.bin/playwright test --reporter=list,json
  e2e_status=$?
  if [ -f "$REPORTS/playwright.json" ]; then
    read -r ep ef < <(node -e 'const s=require(process.argv[1]).stats;console.log(s.expected + s.flaky, s.unexpected)' "$REPORTS/playwright.json")
    PASSED=$((PASSED + ep)); FAILED=$((FAILED + ef))
    [ "$e2e_status" != 0 ] && [ "$ef" = 0 ] && { FAILED=$((FAILED + 1)); FAILED_STEPS+=("playwright (exit $e2e_status)"); }
    [ "$ef" != 0 ] && FAILED_STEPS+=("playwright")
  else
    step_result playwright 1
  fi
else
  step_result "playwright (not run: build failed)" 1
fi

[ "${#FAILED_STEPS[@]}" -gt 0 ] && log "failed: ${FAILED_STEPS[*]}"
echo "$PASSED passed, $FAILED failed"
[ "$FAILED" = 0 ]
