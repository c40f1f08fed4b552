#!/usr/bin/env bash
# npm start (and npm run dev with --dev): brings Corvane up on a fresh machine and stops all it started on exit.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

MODE=prod
[ "${1:-}" = "--dev" ] && MODE=dev

load_env_file
export CORVANE_PG_PORT="${CORVANE_PG_PORT:-55432}"
export PORT="${PORT:-3000}"
export DATABASE_URL="${DATABASE_URL:-postgres://corvane@127.0.0.1:$CORVANE_PG_PORT/corvane}"
export NEXTAUTH_URL="${NEXTAUTH_URL:-http://127.0.0.1:$PORT}"
export CORVANE_DEMO_MODE="${CORVANE_DEMO_MODE:-1}"
export CORVANE_SIM_PORT="${CORVANE_SIM_PORT:-3200}"
# Mail goes to the local SMTP sink unless SMTP_HOST/SMTP_PORT name a real relay (see .env.example).
export CORVANE_SMTP_SINK_PORT="${CORVANE_SMTP_SINK_PORT:-2525}"
export SMTP_HOST="${SMTP_HOST:-127.0.0.1}" SMTP_PORT="${SMTP_PORT:-$CORVANE_SMTP_SINK_PORT}"

APP_PID=""
cleanup() {
  # Finish stopping even if the terminal or a pipe reading our output is already gone.
  set +e
  trap '' PIPE
  trap - INT TERM EXIT
  [ ${#SUPERVISED[@]} -gt 0 ] && log "stopping the scheduler, ingest, mail sink and device simulator"
  stop_supervised
  if [ -n "$APP_PID" ] && kill -0 "$APP_PID" 2>/dev/null; then
    log "stopping the app (pid $APP_PID)"
    kill -TERM "$APP_PID" 2>/dev/null || true
    wait "$APP_PID" 2>/dev/null || true
  fi
  pg_stop
}
trap cleanup EXIT
trap 'exit 130' INT
trap 'exit 143' TERM

ensure_postgres
ensure_node_modules
ensure_secret
ensure_scheduler_secret
pg_start main "$CORVANE_PG_PORT"
ensure_database corvane corvane

log "migrating"
node_modules/.bin/tsx node_modules/knex/bin/cli.js --knexfile knexfile.ts migrate:latest >/dev/null
if [ "$CORVANE_DEMO_MODE" = 1 ]; then
  log "seeding the invented demo (idempotent)"
  node_modules/.bin/tsx scripts/seed.ts
fi

# The live pipeline, each part in its own supervised process: the demo's device simulator (invented monitors
# streaming synthetic beats) and the ingest that stores their beats. They need only PostgreSQL, so they start before
# the build and the app: on a first start the previous night's beats are stored while the app is being built.
NODE_TS=(node --import tsx)
if [ "$CORVANE_DEMO_MODE" = 1 ]; then
  supervise "device simulator" "${NODE_TS[@]}" scripts/simulator.ts --port "$CORVANE_SIM_PORT" --seq-ledger .corvane/simulator-seq.json
  wait_for_http "http://127.0.0.1:$CORVANE_SIM_PORT/health" "${SUPERVISED[-1]}" || log "the device simulator is not answering yet"
  # The local SMTP sink in place of a mail service: what it receives is stored and read on the Mailbox page.
  supervise "mail sink" "${NODE_TS[@]}" scripts/mail-sink.ts --port "$CORVANE_SMTP_SINK_PORT"
fi
supervise "ingest" "${NODE_TS[@]}" scripts/ingest.ts

if [ "$MODE" = prod ]; then
  if build_is_stale; then
    log "building (next build)"
    node_modules/.bin/next build >/dev/null
  fi
  NODE_ENV=production node_modules/.bin/next start -H 127.0.0.1 -p "$PORT" &
else
  node_modules/.bin/next dev -H 127.0.0.1 -p "$PORT" &
fi
APP_PID=$!
wait_for_http "http://127.0.0.1:$PORT/api/health" "$APP_PID" || die "the app did not come up"

# The scheduler, which computes windows through the app's compute route, starts once the app answers.
supervise "scheduler" "${NODE_TS[@]}" scripts/scheduler.ts

DEMO_SIGNINS=""
if [ "$CORVANE_DEMO_MODE" = 1 ]; then
  # One short process for the demo's sign-ins, read from the same constants the seed and the tests use.
  DEMO_SIGNINS=$(node_modules/.bin/tsx -e 'import("./seeds/demo-data.ts").then((m) => {
    console.log(`  Demo sign-ins (invented people; password for all: ${m.DEMO_PASSWORD}):`);
    for (const p of m.DEMO_PEOPLE) console.log("    " + p.email.padEnd(36) + p.label);
    console.log("\n  Device simulator: http://127.0.0.1:" + process.env.CORVANE_SIM_PORT + "/health (invented devices, synthetic beats)");
    console.log("  Mail: local SMTP sink on 127.0.0.1:" + process.env.CORVANE_SMTP_SINK_PORT + "; read it on the Mailbox page (administrator)");
  })')
fi
cat <<EOF

  Corvane is running at http://127.0.0.1:$PORT  (decision support only; see SAFETY.md)

$DEMO_SIGNINS

  Ctrl-C stops the app, the workers and PostgreSQL.

EOF
wait "$APP_PID"
