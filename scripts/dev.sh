#!/usr/bin/env bash
# `npm run dev`: fakes + API (tsx watch, restarts on change) + Vite dev server with hot reload on
# http://127.0.0.1:5173, proxying /api to the API on $PORT.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib/common.sh"
source "$ROOT/scripts/lib/deps.sh"
source "$ROOT/scripts/lib/mariadb.sh"
cd "$ROOT"

ensure_dependencies
db_ensure
run_ts server/cli/migrate.ts || die "Migrations failed (see above)."
run_ts server/cli/seed.ts || die "Seeding the demo data failed (see above)."

DEV_PORT="${DEV_PORT:-5173}"
# Google sign-in must come back through Vite's origin so the session cookie and the page share a host.
export GOOGLE_CALLBACK_URL="${GOOGLE_CALLBACK_URL:-http://127.0.0.1:$DEV_PORT/api/v1/auth/google/callback}"
# Links in e-mails open the Vite dev server, which serves the client in this mode.
export APP_URL="${APP_URL:-http://127.0.0.1:$DEV_PORT}"

stop_children_on_exit

if [ "$FAKES" != "0" ]; then
  start_ts server/fakes/run.ts
fi
NODE_ENV=development npx tsx watch --clear-screen=false server/index.ts &
PIDS+=($!)
npx vite --port "$DEV_PORT" --strictPort &
PIDS+=($!)

wait_for_http "http://$HOST:$PORT/api/v1/health" 60 || warn "The API did not answer yet; see its log above."
say "Dev server: http://127.0.0.1:$DEV_PORT (API on http://$HOST:$PORT). Ctrl+C stops everything."
if [ "$FAKES" != "0" ]; then say "E-mails the app sends: http://127.0.0.1:$DEV_PORT/dev/mailbox"; fi
wait -n "${PIDS[@]}"
