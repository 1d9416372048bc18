#!/usr/bin/env bash
# `npm test`: the whole suite. Installs what is missing, starts the private MariaDB when needed, then runs
# type check, lint, unit + API tests (database arcwright_test), builds the client and runs the browser tests
# (database arcwright_e2e). Every step runs even when an earlier one fails; the exit status is non-zero
# if any failed. Extra arguments go to the unit/API vitest run (e.g. `npm test -- tests/server/auth.test.ts`).
set -uo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib/common.sh"
source "$ROOT/scripts/lib/deps.sh"
source "$ROOT/scripts/lib/mariadb.sh"
cd "$ROOT"

ensure_dependencies
db_ensure

FAILED=()
step() {
  local name="$1"
  shift
  say "── $name: $*"
  local started=$SECONDS
  if "$@"; then
    say "── $name passed ($((SECONDS - started)) s)"
  else
    warn "── $name FAILED ($((SECONDS - started)) s)"
    FAILED+=("$name")
  fi
}

step "type check" npx vue-tsc --build --force
step "lint" npx eslint .
step "unit and API tests" npx vitest run "$@"
step "client build" npx vite build --logLevel warn
if [ -f dist/index.html ]; then
  step "browser tests" npx vitest run --config vitest.e2e.config.ts
else
  warn "── browser tests skipped: the client did not build"
  FAILED+=("browser tests")
fi

if [ ${#FAILED[@]} -gt 0 ]; then
  warn "Failed: ${FAILED[*]}"
  exit 1
fi
say "All checks passed."
