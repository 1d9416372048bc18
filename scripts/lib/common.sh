# Shell functions shared by scripts/*.sh. Source it; it sets ROOT and loads .env without overriding the environment.
# shellcheck shell=bash

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
export ROOT

# Colour only on a terminal, so CI logs stay plain text.
if [ -t 1 ]; then C_INFO=$'\033[1;36m' C_WARN=$'\033[1;33m' C_ERR=$'\033[1;31m' C_OFF=$'\033[0m'; else C_INFO='' C_WARN='' C_ERR='' C_OFF=''; fi
say() { printf '%s[arcwright]%s %s\n' "$C_INFO" "$C_OFF" "$*"; }
warn() { printf '%s[arcwright]%s %s\n' "$C_WARN" "$C_OFF" "$*" >&2; }
die() { printf '%s[arcwright]%s %s\n' "$C_ERR" "$C_OFF" "$*" >&2; exit 1; }

# Reads KEY=VALUE lines of .env (comments and blank lines skipped, optional quotes removed);
# variables already set in the environment win, as in server/config.ts.
load_env() {
  local file="${ENV_FILE:-$ROOT/.env}" line key value
  [ -f "$file" ] || return 0
  while IFS= read -r line || [ -n "$line" ]; do
    line="${line#"${line%%[![:space:]]*}"}"
    [ -z "$line" ] && continue
    [ "${line:0:1}" = "#" ] && continue
    line="${line#export }"
    key="${line%%=*}"
    value="${line#*=}"
    [[ "$key" =~ ^[A-Za-z_][A-Za-z0-9_]*$ ]] || continue
    if [[ "$value" =~ ^\"(.*)\"$ ]] || [[ "$value" =~ ^\'(.*)\'$ ]]; then value="${BASH_REMATCH[1]}"; fi
    if [ -z "${!key+x}" ]; then export "$key=$value"; fi
  done < "$file"
}

# Defaults shared by every script (documented in .env.example).
set_defaults() {
  export HOST="${HOST:-127.0.0.1}"
  export PORT="${PORT:-4780}"
  export DB_HOST="${DB_HOST:-127.0.0.1}"
  export DB_PORT="${DB_PORT:-3398}"
  export DB_NAME="${DB_NAME:-arcwright}"
  export TEST_DB_NAME="${TEST_DB_NAME:-arcwright_test}"
  export E2E_DB_NAME="${E2E_DB_NAME:-arcwright_e2e}"
  export BENCH_DB_NAME="${BENCH_DB_NAME:-arcwright_bench_api}"
  export DB_USER="${DB_USER:-arcwright}"
  export DB_PASSWORD="${DB_PASSWORD:-arcwright-local}"
  export DB_PRIVATE="${DB_PRIVATE:-1}"
  export OAUTH_FAKE_PORT="${OAUTH_FAKE_PORT:-4781}"
  export MAILBOX_FAKE_PORT="${MAILBOX_FAKE_PORT:-4784}"
  export PAYMENT_FAKE_PORT="${PAYMENT_FAKE_PORT:-4782}"
  export FAKES="${FAKES:-1}"
}

# Runs a TypeScript entry point with tsx through Node (no npx start-up cost, signals go straight to node).
run_ts() {
  node --import tsx "$@"
}

# Waits until an HTTP URL answers 2xx; $1 url, $2 seconds, $3 pid that must stay alive (optional).
wait_for_http() {
  local url="$1" seconds="${2:-60}" pid="${3:-}" i
  for ((i = 0; i < seconds * 4; i++)); do
    if node -e "fetch(process.argv[1]).then(r => process.exit(r.ok ? 0 : 1), () => process.exit(1))" "$url" 2>/dev/null; then
      return 0
    fi
    if [ -n "$pid" ] && ! kill -0 "$pid" 2>/dev/null; then return 1; fi
    sleep 0.25
  done
  return 1
}

load_env
set_defaults

# Child processes of a start script: stopped (TERM, then waited for) when the script exits or is interrupted.
PIDS=()
stop_children() {
  trap - EXIT INT TERM
  local pid
  for pid in "${PIDS[@]}"; do kill -TERM "$pid" 2>/dev/null || true; done
  for pid in "${PIDS[@]}"; do wait "$pid" 2>/dev/null || true; done
}
stop_children_on_exit() {
  trap stop_children EXIT
  trap 'exit 130' INT
  trap 'exit 143' TERM
}
# Starts a TypeScript entry point in the background and records node's own pid in PIDS.
# Note: `run_ts … &` would record the pid of a subshell, and stopping that leaves node running.
start_ts() {
  node --import tsx "$@" &
  PIDS+=($!)
}
