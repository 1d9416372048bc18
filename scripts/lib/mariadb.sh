# The private MariaDB: its own datadir and socket under .data/mariadb, bound to 127.0.0.1:$DB_PORT.
# Source after common.sh. Functions: db_start, db_stop, db_status, db_setup, db_ensure.
# shellcheck shell=bash

DB_BASE="${DB_DIR:-$ROOT/.data/mariadb}"
DB_DATADIR="$DB_BASE/data"
DB_PIDFILE="$DB_BASE/mysqld.pid"
DB_LOG="$DB_BASE/mysqld.log"

# Note: a unix socket path must stay under 108 bytes; deep checkouts fall back to a short path in /tmp.
DB_SOCKET="$DB_BASE/mysqld.sock"
if [ "${#DB_SOCKET}" -ge 100 ]; then
  DB_SOCKET="/tmp/arcwright-$(printf '%s' "$DB_BASE" | md5sum | cut -c1-12).sock"
fi
export DB_SOCKET

find_mariadbd() {
  if command -v mariadbd >/dev/null 2>&1; then command -v mariadbd; return; fi
  [ -x /usr/sbin/mariadbd ] && { echo /usr/sbin/mariadbd; return; }
  die "mariadbd not found. Install it with: apt-get install -y mariadb-server"
}

# The server's pid when it is alive; a zombie (state Z in /proc/PID/stat) counts as dead.
db_pid() {
  local pid state
  [ -f "$DB_PIDFILE" ] || return 1
  pid="$(cat "$DB_PIDFILE" 2>/dev/null)"
  [[ "$pid" =~ ^[0-9]+$ ]] || return 1
  [ -r "/proc/$pid/stat" ] || return 1
  state="$(sed -E 's/^[0-9]+ \(.*\) ([A-Za-z]).*/\1/' "/proc/$pid/stat" 2>/dev/null)"
  [ "$state" = "Z" ] && return 1
  echo "$pid"
}

db_root() {
  mariadb --no-defaults --protocol=socket --socket="$DB_SOCKET" -uroot "$@"
}

db_ping() {
  mariadb-admin --no-defaults --protocol=socket --socket="$DB_SOCKET" -uroot --connect-timeout=2 ping >/dev/null 2>&1
}

db_status() {
  local pid
  if pid="$(db_pid)" && db_ping; then
    say "Private MariaDB is running (pid $pid, 127.0.0.1:$DB_PORT, socket $DB_SOCKET)"
    return 0
  fi
  say "Private MariaDB is not running"
  return 1
}

port_in_use() {
  (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null
}

db_start() {
  local pid mariadbd user_args=() i
  if pid="$(db_pid)" && db_ping; then
    say "Private MariaDB already running (pid $pid, port $DB_PORT)"
    return 0
  fi
  if pid="$(db_pid)"; then
    # Alive but not answering yet (another script is starting it): wait for it instead of starting twice.
    for ((i = 0; i < 120; i++)); do db_ping && { say "Private MariaDB is up (pid $pid)"; return 0; }; sleep 0.25; done
    die "MariaDB (pid $pid) runs but does not answer on $DB_SOCKET. See $DB_LOG; stop it with: npm run db:stop"
  fi
  if port_in_use "$DB_PORT"; then
    die "Port $DB_PORT on 127.0.0.1 is taken by another program. Set DB_PORT to a free port (in .env), then run this again."
  fi
  mariadbd="$(find_mariadbd)"
  [ "$(id -u)" -eq 0 ] && user_args=(--user=root)
  mkdir -p "$DB_BASE"
  if [ ! -d "$DB_DATADIR/mysql" ]; then
    say "Creating the private MariaDB data directory in $DB_DATADIR"
    mariadb-install-db --no-defaults "${user_args[@]}" --datadir="$DB_DATADIR" \
      --auth-root-authentication-method=normal --skip-test-db --skip-name-resolve >"$DB_BASE/install.log" 2>&1 \
      || die "mariadb-install-db failed; see $DB_BASE/install.log"
  fi
  rm -f "$DB_PIDFILE"
  say "Starting the private MariaDB on 127.0.0.1:$DB_PORT"
  (
    # Detach: own session, no inherited descriptors (a held pipe or lock would make callers wait forever).
    for fd in /proc/$BASHPID/fd/*; do
      fd="${fd##*/}"
      [ "$fd" -gt 2 ] 2>/dev/null && eval "exec $fd>&-"
    done
    exec setsid "$mariadbd" --no-defaults "${user_args[@]}" --datadir="$DB_DATADIR" --socket="$DB_SOCKET" \
      --pid-file="$DB_PIDFILE" --log-error="$DB_LOG" --port="$DB_PORT" --bind-address=127.0.0.1 \
      --skip-name-resolve --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
      </dev/null >>"$DB_BASE/mysqld.out" 2>&1
  ) &
  disown 2>/dev/null || true
  for ((i = 0; i < 240; i++)); do
    if db_ping; then
      say "Private MariaDB is ready"
      return 0
    fi
    sleep 0.25
  done
  tail -n 20 "$DB_LOG" >&2 2>/dev/null || true
  die "MariaDB did not become ready within 60 s; see $DB_LOG"
}

db_stop() {
  local pid i
  if ! pid="$(db_pid)"; then
    say "Private MariaDB is not running"
    rm -f "$DB_PIDFILE"
    return 0
  fi
  say "Stopping the private MariaDB (pid $pid)"
  mariadb-admin --no-defaults --protocol=socket --socket="$DB_SOCKET" -uroot shutdown >/dev/null 2>&1 || kill -TERM "$pid" 2>/dev/null || true
  for ((i = 0; i < 120; i++)); do
    db_pid >/dev/null || { say "Private MariaDB stopped"; return 0; }
    sleep 0.25
  done
  warn "MariaDB did not stop within 30 s; sending SIGKILL (InnoDB recovers at the next start)"
  kill -KILL "$pid" 2>/dev/null || true
}

sql_string() { printf "'%s'" "$(printf '%s' "$1" | sed "s/\\\\/\\\\\\\\/g; s/'/''/g")"; }
sql_ident() { printf '`%s`' "$(printf '%s' "$1" | sed 's/`/``/g')"; }

# Creates the application database and user (both @'127.0.0.1' for TCP and @'localhost' for the socket,
# as --skip-name-resolve needs), granting it the app, test and e2e databases. Safe to repeat.
db_setup() {
  local user pass host db sql=""
  user="$(sql_string "$DB_USER")"
  pass="$(sql_string "$DB_PASSWORD")"
  sql+="CREATE DATABASE IF NOT EXISTS $(sql_ident "$DB_NAME") CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;"
  for host in 127.0.0.1 localhost; do
    sql+="CREATE USER IF NOT EXISTS $user@'$host' IDENTIFIED BY $pass;"
    sql+="ALTER USER $user@'$host' IDENTIFIED BY $pass;"
    # The third test database is scratch space for the migration round-trip test, the fourth a stand-in
    # read replica for the replication test; the last is the API bench's.
    for db in "$DB_NAME" "$TEST_DB_NAME" "$E2E_DB_NAME" "${TEST_DB_NAME}_migrations" "${TEST_DB_NAME}_replica" "$BENCH_DB_NAME"; do
      sql+="GRANT ALL PRIVILEGES ON $(sql_ident "$db").* TO $user@'$host';"
    done
  done
  db_root -e "$sql" || die "Could not create the database and user in the private MariaDB"
}

# Starts the private server when needed and makes sure database and user exist.
# With DB_PRIVATE=0 the database is someone else's: only check that it answers.
db_ensure() {
  if [ "$DB_PRIVATE" = "0" ]; then
    say "DB_PRIVATE=0: using the MariaDB at $DB_HOST:$DB_PORT as configured"
    return 0
  fi
  db_start
  db_setup
}
