#!/usr/bin/env bash
# `npm start`: installs what is missing, starts the private MariaDB, creates database and user, migrates,
# seeds the demo club, builds the client, starts the fakes and the app on http://$HOST:$PORT.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib/common.sh"
source "$ROOT/scripts/lib/deps.sh"
source "$ROOT/scripts/lib/mariadb.sh"
cd "$ROOT"

ensure_dependencies
db_ensure

say "Applying database migrations"
run_ts server/cli/migrate.ts || die "Migrations failed (see above). Fix the cause, then run npm start again."
say "Seeding the demo club"
run_ts server/cli/seed.ts || die "Seeding the demo data failed (see above)."

if [ "${SKIP_BUILD:-0}" != "1" ]; then
  say "Building the web client (vite build)"
  npx vite build --logLevel warn || die "The web client did not build (see the errors above). Fix them, or run with SKIP_BUILD=1 to serve the last build."
fi
[ -f "$ROOT/dist/index.html" ] || die "dist/index.html is missing: the client was not built. Run npm run build and look at its errors."

stop_children_on_exit

if [ "$FAKES" != "0" ]; then
  start_ts server/fakes/run.ts
  wait_for_http "http://127.0.0.1:$OAUTH_FAKE_PORT/health" 30 "${PIDS[-1]}" || die "The OAuth fake did not start (port $OAUTH_FAKE_PORT)."
  wait_for_http "http://127.0.0.1:$MAILBOX_FAKE_PORT/health" 30 "${PIDS[-1]}" || die "The SMTP sink did not start (its listing on port $MAILBOX_FAKE_PORT)."
  wait_for_http "http://127.0.0.1:$PAYMENT_FAKE_PORT/health" 30 "${PIDS[-1]}" || die "The payment fake did not start (port $PAYMENT_FAKE_PORT)."
fi

# The local stand-ins never run beside a production process (the app refuses to start so): with the
# fakes on, the app runs in development mode; with FAKES=0 in production mode.
if [ "$FAKES" != "0" ]; then APP_NODE_ENV="${NODE_ENV:-development}"; else APP_NODE_ENV="${NODE_ENV:-production}"; fi
NODE_ENV="$APP_NODE_ENV" start_ts server/index.ts
APP_PID="${PIDS[-1]}"
wait_for_http "http://$HOST:$PORT/api/v1/health" 60 "$APP_PID" || die "The app did not answer on http://$HOST:$PORT (see the log above)."

cat <<MSG

  Arcwright is running at  http://$HOST:$PORT

  Demo sign-ins (password for all: arcwright-demo)
    admin@fennickvale.example     Maren Holloway, club admin
    coach@fennickvale.example     Teodor Quill, coach
    athlete@fennickvale.example   Isla Brackwater, athlete
$( [ "$FAKES" != "0" ] && echo "  \"Continue with Google\" uses the local stand-in on http://127.0.0.1:$OAUTH_FAKE_PORT" )
$( [ "$FAKES" != "0" ] && echo "  E-mails the app sends (invitations, password reset): http://$HOST:$PORT/dev/mailbox" )
$( [ "$FAKES" != "0" ] && echo "  Payments go to the local stand-in on http://127.0.0.1:$PAYMENT_FAKE_PORT (card 4782 1000 0000 0008 pays)" )

  Stop with Ctrl+C. The database keeps running; stop it with: npm run db:stop

MSG

wait "$APP_PID"
