#!/usr/bin/env bash
# `npm run db:start` / `npm run db:stop`: the private MariaDB under .data/mariadb.
# Also: `bash scripts/db.sh status`, `bash scripts/db.sh shell` (a mariadb prompt as the app user).
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/lib/common.sh"
source "$ROOT/scripts/lib/mariadb.sh"

case "${1:-}" in
  start) db_ensure ;;
  stop) db_stop ;;
  status) db_status ;;
  shell) exec mariadb --no-defaults --protocol=socket --socket="$DB_SOCKET" -u"$DB_USER" -p"$DB_PASSWORD" "$DB_NAME" ;;
  *) die "Usage: bash scripts/db.sh start|stop|status|shell" ;;
esac
