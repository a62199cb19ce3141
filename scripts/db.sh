#!/usr/bin/env bash
# Private MariaDB for Fluxwright: scripts/db.sh start|stop|status
#   FW_DB_DIR       data directory (default .data/mariadb, relative to the repository root)
#   FW_DB_PORT      TCP port on 127.0.0.1 (default 3407; tests use 3417)
#   FW_DB_NAME      application database created on start (default fluxwright)
#   FW_DB_USER      application user (default fluxwright)
#   FW_DB_PASSWORD  its password (default fluxwright-local)
# The server binds to 127.0.0.1 only; root authenticates over the socket in DIR. Sessions run in UTC
# (--default-time-zone), matching the API's timezone "Z" for CURRENT_TIMESTAMP defaults.
# Sweep uploads store the raw file bytes (tens of MB): max_allowed_packet is raised above the 16 MB
# default, and the redo log is sized so one large blob stays well under InnoDB's share of it.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
DIR="${FW_DB_DIR:-.data/mariadb}"
case "$DIR" in /*) ;; *) DIR="$ROOT/$DIR" ;; esac
PORT="${FW_DB_PORT:-3407}"
DB_NAME="${FW_DB_NAME:-fluxwright}"
DB_USER="${FW_DB_USER:-fluxwright}"
DB_PASSWORD="${FW_DB_PASSWORD:-fluxwright-local}"
SOCK="$DIR/mysqld.sock"
PIDFILE="$DIR/mysqld.pid"
ERRLOG="$DIR/err.log"
TIMEOUT="${FW_DB_START_TIMEOUT:-60}"

log() { echo "[db] $*" >&2; }

find_bin() {
  # Debian puts mariadbd in /usr/sbin, which a non-login PATH may lack.
  local name="$1"
  if command -v "$name" >/dev/null 2>&1; then command -v "$name"; return 0; fi
  for d in /usr/sbin /usr/bin /usr/local/sbin /usr/local/bin; do
    if [ -x "$d/$name" ]; then echo "$d/$name"; return 0; fi
  done
  return 1
}

ensure_installed() {
  if find_bin mariadbd >/dev/null && find_bin mariadb-install-db >/dev/null && find_bin mariadb-admin >/dev/null; then
    return 0
  fi
  log "mariadbd not found: installing Debian's mariadb-server"
  if [ "$(id -u)" -ne 0 ]; then
    log "installing needs root (apt-get); run as root or install mariadb-server first"
    exit 1
  fi
  export DEBIAN_FRONTEND=noninteractive
  apt-get update
  apt-get install -y --no-install-recommends mariadb-server mariadb-client
  find_bin mariadbd >/dev/null || { log "mariadb-server installed but mariadbd still missing"; exit 1; }
}

admin() { "$(find_bin mariadb-admin)" --no-defaults --socket="$SOCK" -uroot "$@"; }

is_running() {
  [ -S "$SOCK" ] && admin --connect-timeout=2 ping >/dev/null 2>&1
}

sql_root() { "$(find_bin mariadb)" --no-defaults --socket="$SOCK" -uroot "$@"; }

ensure_schema() {
  # Quote the password for SQL: double any single quote.
  local pw="${DB_PASSWORD//\'/\'\'}"
  sql_root <<SQL
CREATE DATABASE IF NOT EXISTS \`$DB_NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$pw';
CREATE USER IF NOT EXISTS '$DB_USER'@'localhost' IDENTIFIED BY '$pw';
ALTER USER '$DB_USER'@'127.0.0.1' IDENTIFIED BY '$pw';
ALTER USER '$DB_USER'@'localhost' IDENTIFIED BY '$pw';
-- Tests create and drop throwaway databases, so the app user gets global rights on this private server.
GRANT ALL PRIVILEGES ON *.* TO '$DB_USER'@'127.0.0.1';
GRANT ALL PRIVILEGES ON *.* TO '$DB_USER'@'localhost';
FLUSH PRIVILEGES;
SQL
}

lock() {
  # Parallel callers (jest workers, npm start twice) must not initialise or start the same dir at once.
  mkdir -p "$DIR"
  if command -v flock >/dev/null 2>&1; then
    exec 9>"$DIR/.db-sh.lock"
    flock -w 120 9 || { log "could not lock $DIR/.db-sh.lock within 120 s"; exit 1; }
  fi
}

start() {
  ensure_installed
  lock
  if is_running; then
    log "already running on 127.0.0.1:$PORT (data $DIR)"
    ensure_schema
    return 0
  fi
  if [ ! -d "$DIR/mysql" ]; then
    log "initialising data directory $DIR"
    "$(find_bin mariadb-install-db)" --no-defaults --datadir="$DIR" --user=root \
      --auth-root-authentication-method=normal --skip-test-db >"$DIR/install.log" 2>&1 || {
        log "mariadb-install-db failed:"; tail -n 30 "$DIR/install.log" >&2; exit 1; }
  fi
  # A stale pid file or socket from a killed server blocks a clean start.
  if [ -f "$PIDFILE" ] && ! kill -0 "$(cat "$PIDFILE" 2>/dev/null)" 2>/dev/null; then
    rm -f "$PIDFILE" "$SOCK"
  fi
  log "starting mariadbd on 127.0.0.1:$PORT (data $DIR)"
  # setsid + nohup: the server outlives the shell (npm start, jest globalSetup) that launched it.
  setsid nohup "$(find_bin mariadbd)" --no-defaults --datadir="$DIR" --socket="$SOCK" \
    --pid-file="$PIDFILE" --port="$PORT" --bind-address=127.0.0.1 --user=root --default-time-zone=+00:00 \
    --max-allowed-packet="${FW_DB_MAX_PACKET:-256M}" --innodb-log-file-size="${FW_DB_REDO_LOG:-512M}" \
    --skip-log-bin --log-error="$ERRLOG" >/dev/null 2>&1 </dev/null 9>&- &
  local waited=0
  until is_running; do
    sleep 0.25
    waited=$((waited + 1))
    if [ "$waited" -ge $((TIMEOUT * 4)) ]; then
      log "mariadbd did not answer within ${TIMEOUT}s; last lines of $ERRLOG:"
      tail -n 30 "$ERRLOG" >&2 || true
      exit 1
    fi
  done
  ensure_schema
  log "ready: mysql://$DB_USER@127.0.0.1:$PORT/$DB_NAME"
}

stop() {
  if ! find_bin mariadb-admin >/dev/null; then log "mariadb not installed"; return 0; fi
  if is_running; then
    admin shutdown
    log "stopped (data $DIR)"
  else
    log "not running (data $DIR)"
  fi
}

status() {
  if find_bin mariadb-admin >/dev/null && is_running; then
    echo "running on 127.0.0.1:$PORT (data $DIR)"
  else
    echo "stopped (data $DIR)"
    return 3
  fi
}

case "${1:-}" in
  start) start ;;
  stop) stop ;;
  status) status ;;
  *) echo "usage: $0 start|stop|status" >&2; exit 2 ;;
esac
