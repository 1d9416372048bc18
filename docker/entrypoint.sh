#!/bin/sh
# Container entry point: `serve` (default) migrates then runs the app; `worker` runs job workers only;
# `migrate`, `seed` run one task.
set -eu
cd /app
if [ "${NODE_ENV:-production}" = "production" ] && [ -z "${SESSION_SECRET:-}" ]; then
  echo "SESSION_SECRET is not set: give the container a long random value (e.g. openssl rand -hex 32)." >&2
  exit 1
fi
case "${1:-serve}" in
  serve) exec node --import tsx server/index.ts ;;
  worker) exec node --import tsx server/worker.ts ;;
  migrate) exec node --import tsx server/cli/migrate.ts ;;
  seed) exec node --import tsx server/cli/seed.ts ;;
  *) exec "$@" ;;
esac
