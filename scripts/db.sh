#!/usr/bin/env bash
# scripts/db.sh – a private MariaDB instance for Quorum (Debian's packages, data under .data/).
#
#   bash scripts/db.sh start    initialise (first time), start on 127.0.0.1:$QUORUM_DB_PORT, ensure
#                               the databases `quorum` and `quorum_test` and the user quorum@127.0.0.1
#   bash scripts/db.sh stop     SIGTERM the server and wait until it is gone
#   bash scripts/db.sh status   "running …" (exit 0) or "not running" (exit 3)
#   bash scripts/db.sh reset    drop and recreate `quorum` and `quorum_test` (starts the server if needed)
#   bash scripts/db.sh url      print the development DATABASE_URL
#   bash scripts/db.sh shell    a root client on the socket (for poking around)
#
# Environment: QUORUM_DB_PORT (default 3366); QUORUM_DB_DATA (default <repo>/.data: data dir, socket,
# pid, log — tests use it for a throw-away second instance). DATABASE_URL set means "use that existing server":
# start/stop/status only say so, reset refuses, url prints it.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
DATA="${QUORUM_DB_DATA:-$ROOT/.data}"
mkdir -p "$DATA"
DATA="$(cd "$DATA" && pwd)"
DATADIR="$DATA/mariadb"
PID_FILE="$DATA/mariadb.pid"
LOG_FILE="$DATA/mariadb.log"
PORT_FILE="$DATA/mariadb.port" # the port the running server listens on
PORT="${QUORUM_DB_PORT:-3366}"
SOCK="$DATA/mariadb.sock"
# A unix socket path is limited to ~107 bytes; fall back to /tmp for deeply nested checkouts.
if [ "${#SOCK}" -gt 100 ]; then
  SOCK="/tmp/quorum-mariadb-$(printf '%s' "$ROOT" | cksum | cut -d' ' -f1).sock"
fi
DB_DEV="quorum"
DB_TEST="quorum_test"
DB_USER="quorum"
DB_PASS="quorum"
ME="$(id -un)"

say() { printf 'db: %s\n' "$*"; }
die() { printf 'db: %s\n' "$1" >&2; exit "${2:-1}"; }

find_bin() { # find_bin NAME → path (PATH, then /usr/sbin, /usr/bin)
  local p
  p="$(command -v "$1" 2>/dev/null || true)"
  if [ -z "$p" ]; then
    for d in /usr/sbin /usr/bin /usr/local/sbin /usr/local/bin; do
      if [ -x "$d/$1" ]; then p="$d/$1"; break; fi
    done
  fi
  printf '%s' "$p"
}

ensure_installed() {
  MARIADBD="$(find_bin mariadbd)"
  MARIADB="$(find_bin mariadb)"
  INSTALL_DB="$(find_bin mariadb-install-db)"
  if [ -n "$MARIADBD" ] && [ -n "$MARIADB" ] && [ -n "$INSTALL_DB" ]; then return 0; fi
  local cmd="apt-get update && apt-get install -y --no-install-recommends mariadb-server-core mariadb-client-core"
  if [ "$(id -u)" -ne 0 ]; then
    die "MariaDB is not installed. As root, run: $cmd" 4
  fi
  say "MariaDB is not installed; installing Debian's packages (about 10 s)"
  apt-get update -q >/dev/null
  DEBIAN_FRONTEND=noninteractive apt-get install -y -q --no-install-recommends \
    mariadb-server-core mariadb-client-core >/dev/null
  MARIADBD="$(find_bin mariadbd)"
  MARIADB="$(find_bin mariadb)"
  INSTALL_DB="$(find_bin mariadb-install-db)"
  [ -n "$MARIADBD" ] && [ -n "$MARIADB" ] && [ -n "$INSTALL_DB" ] || die "installing MariaDB failed"
}

# proc_running PID → 0 if the process exists and is not a zombie (state Z counts as dead)
proc_running() {
  local pid="$1" state
  [ -n "$pid" ] && [ -r "/proc/$pid/stat" ] || return 1
  state="$(sed -e 's/^.*) //' "/proc/$pid/stat" 2>/dev/null | cut -d' ' -f1)" || return 1
  [ -n "$state" ] && [ "$state" != "Z" ] && [ "$state" != "X" ]
}

# pid_alive PID → 0 if the process is running (not a zombie) and is a mariadbd
pid_alive() {
  local pid="$1" comm
  proc_running "$pid" || return 1
  comm="$(cat "/proc/$pid/comm" 2>/dev/null || true)"
  case "$comm" in mariadbd|mysqld) return 0 ;; *) return 1 ;; esac
}

# running_pid → prints the pid of our running server; removes a stale pid file
running_pid() {
  [ -f "$PID_FILE" ] || return 1
  local pid
  pid="$(tr -dc '0-9' <"$PID_FILE" 2>/dev/null || true)"
  if pid_alive "$pid"; then printf '%s' "$pid"; return 0; fi
  rm -f "$PID_FILE"
  return 1
}

root_sql() { # root_sql [mariadb args…] – root over the unix socket
  "$MARIADB" --no-defaults --protocol=socket --socket="$SOCK" -uroot "$@"
}

socket_ready() { root_sql -N -e 'SELECT 1' >/dev/null 2>&1; }

port_taken() { # something already accepts connections on 127.0.0.1:$PORT
  (exec 3<>"/dev/tcp/127.0.0.1/$PORT") >/dev/null 2>&1
}

port_message() {
  printf 'port %s is in use by another process; set QUORUM_DB_PORT=<free port> or stop it' "$PORT"
}

init_datadir() {
  if [ -d "$DATADIR/mysql" ]; then return 0; fi
  mkdir -p "$DATA"
  rm -rf "$DATADIR" # a half-initialised directory from an interrupted run
  mkdir -p "$DATADIR"
  say "initialising $DATADIR"
  if ! "$INSTALL_DB" --no-defaults --user="$ME" --datadir="$DATADIR" \
      --auth-root-authentication-method=socket --skip-test-db >"$DATA/mariadb-install.log" 2>&1; then
    tail -n 20 "$DATA/mariadb-install.log" >&2 || true
    rm -rf "$DATADIR"
    die "mariadb-install-db failed (log: $DATA/mariadb-install.log)"
  fi
}

ensure_databases() {
  root_sql <<SQL
CREATE DATABASE IF NOT EXISTS \`$DB_DEV\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE DATABASE IF NOT EXISTS \`$DB_TEST\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$DB_PASS';
GRANT ALL PRIVILEGES ON \`$DB_DEV\`.* TO '$DB_USER'@'127.0.0.1';
GRANT ALL PRIVILEGES ON \`$DB_TEST\`.* TO '$DB_USER'@'127.0.0.1';
GRANT ALL PRIVILEGES ON \`quorum\\_%\`.* TO '$DB_USER'@'127.0.0.1';
FLUSH PRIVILEGES;
SQL
}

# Serialise start/stop/reset: two concurrent starts must not launch two servers on one datadir.
take_lock() {
  if command -v flock >/dev/null 2>&1; then
    exec 9>"$DATA/db.lock"
    flock -w 120 9 || die "another db.sh is still busy (lock $DATA/db.lock)"
  fi
}

external_note() {
  local safe
  safe="$(printf '%s' "$DATABASE_URL" | sed -E 's#(://[^:/@]+):[^@]*@#\1:***@#')"
  say "DATABASE_URL is set ($safe): using that existing server, so '$1' does nothing here"
}

cmd_start() {
  if [ -n "${DATABASE_URL:-}" ]; then external_note start; return 0; fi
  ensure_installed
  local pid
  if pid="$(running_pid)"; then
    local actual
    actual="$(cat "$PORT_FILE" 2>/dev/null || echo "$PORT")"
    if [ "$actual" != "$PORT" ]; then
      die "already running (pid $pid) on 127.0.0.1:$actual, not on the requested port $PORT: stop it first (npm run db stop)"
    fi
    ensure_databases
    say "already running (pid $pid) on 127.0.0.1:$PORT"
    return 0
  fi
  if socket_ready; then # our server without a pid file
    ensure_databases
    say "already running (socket $SOCK answers) on 127.0.0.1:$PORT"
    return 0
  fi
  if port_taken; then die "$(port_message)" 2; fi
  init_datadir
  rm -f "$SOCK" "$SOCK.lock"
  printf '%s\n' "$PORT" >"$PORT_FILE"
  : >"$LOG_FILE.start"
  # setsid: the server must outlive the shell (and test runner) that started it.
  local launcher=()
  if command -v setsid >/dev/null 2>&1; then launcher=(setsid); fi
  "${launcher[@]}" "$MARIADBD" --no-defaults --user="$ME" --datadir="$DATADIR" --port="$PORT" \
    --bind-address=127.0.0.1 --socket="$SOCK" --pid-file="$PID_FILE" --log-error="$LOG_FILE" \
    --skip-name-resolve --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
    --default-time-zone=+00:00 \
    </dev/null >>"$LOG_FILE.start" 2>&1 9>&- &
  local child=$!
  local i
  for i in $(seq 1 300); do # up to 30 s
    if socket_ready; then break; fi
    if ! proc_running "$child" && ! running_pid >/dev/null; then
      # the server exited: say why
      if tail -n 40 "$LOG_FILE" 2>/dev/null | grep -qE 'Bind on TCP/IP port|errno: 98|Address already in use'; then
        die "$(port_message)" 2
      fi
      tail -n 15 "$LOG_FILE" >&2 2>/dev/null || true
      die "mariadbd exited during start-up (log: $LOG_FILE)"
    fi
    sleep 0.1
  done
  socket_ready || die "mariadbd did not become ready within 30 s (log: $LOG_FILE)"
  ensure_databases
  pid="$(running_pid || printf '%s' "$child")"
  say "started (pid $pid) on 127.0.0.1:$PORT; databases $DB_DEV, $DB_TEST; user $DB_USER@127.0.0.1"
}

cmd_stop() {
  if [ -n "${DATABASE_URL:-}" ]; then external_note stop; return 0; fi
  local pid
  if ! pid="$(running_pid)"; then say "not running"; return 0; fi
  kill -TERM "$pid" 2>/dev/null || true
  local i
  for i in $(seq 1 600); do # up to 60 s
    if ! pid_alive "$pid"; then
      rm -f "$PID_FILE"
      say "stopped (pid $pid)"
      return 0
    fi
    sleep 0.1
  done
  die "mariadbd (pid $pid) did not stop within 60 s"
}

cmd_status() {
  if [ -n "${DATABASE_URL:-}" ]; then external_note status; return 0; fi
  local pid
  if pid="$(running_pid)"; then
    say "running (pid $pid) on 127.0.0.1:$(cat "$PORT_FILE" 2>/dev/null || echo "$PORT"); socket $SOCK; data $DATADIR"
    return 0
  fi
  say "not running (port $PORT; data $DATADIR)"
  return 3
}

cmd_reset() {
  if [ -n "${DATABASE_URL:-}" ]; then
    die "DATABASE_URL is set: refusing to drop databases on an external server"
  fi
  cmd_start >/dev/null
  root_sql -e "DROP DATABASE IF EXISTS \`$DB_DEV\`; DROP DATABASE IF EXISTS \`$DB_TEST\`;"
  ensure_databases
  say "reset: $DB_DEV and $DB_TEST dropped and recreated (empty; run npm run migrate)"
}

cmd_url() {
  if [ -n "${DATABASE_URL:-}" ]; then printf '%s\n' "$DATABASE_URL"; return 0; fi
  printf 'mysql://%s:%s@127.0.0.1:%s/%s\n' "$DB_USER" "$DB_PASS" "$PORT" "$DB_DEV"
}

cmd_shell() {
  if [ -n "${DATABASE_URL:-}" ]; then die "DATABASE_URL is set: use your own client for that server"; fi
  ensure_installed
  running_pid >/dev/null || socket_ready || die "not running: npm run db start" 3
  root_sql "$@"
}

case "${1:-}" in
  start) take_lock; cmd_start ;;
  stop) take_lock; cmd_stop ;;
  status) cmd_status ;;
  reset) take_lock; cmd_reset ;;
  url) cmd_url ;;
  shell) shift; cmd_shell "$@" ;;
  *)
    echo "usage: bash scripts/db.sh start|stop|status|reset|url|shell   (npm run db -- <command>)" >&2
    exit 64
    ;;
esac
