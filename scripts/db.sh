#!/usr/bin/env bash
# The project's own PostgreSQL: Debian's server binaries, a git-ignored data folder, 127.0.0.1 only, a
# non-default port. Works as root (the server then runs as the `postgres` system user) and as an ordinary
# user. Idempotent; recovers after the server was killed.
#
# usage: scripts/db.sh start|stop|status|url [dbname]|reset|ensure-db NAME|drop-db NAME|backup FILE [db]|restore FILE [db]|psql [args]
set -euo pipefail

ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
PORT=${SUMPWISE_PG_PORT:-54329}
DB_USER=sumpwise
DEV_DB=sumpwise
LOG_PREFIX="[db]"

say() { echo "$LOG_PREFIX $*" >&2; }
die() { echo "$LOG_PREFIX error: $*" >&2; exit 1; }

find_bin() {
  local dir
  for dir in $(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -t/ -k4 -V -r); do
    [ -x "$dir/pg_ctl" ] && [ -x "$dir/postgres" ] && { echo "$dir"; return 0; }
  done
  return 1
}

PGBIN=$(find_bin || true)
if [ -z "$PGBIN" ]; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    say "PostgreSQL server not found: installing Debian's postgresql package (apt-get)…"
    (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null) \
      || die "apt-get could not install postgresql; install it by hand: apt-get install -y postgresql"
    PGBIN=$(find_bin) || die "postgresql installed but no server binaries under /usr/lib/postgresql/*/bin"
  else
    die "PostgreSQL server binaries not found. Install them as root: sudo apt-get install -y postgresql"
  fi
fi

AS_ROOT=0
[ "$(id -u)" = 0 ] && AS_ROOT=1
RUN=()
if [ $AS_ROOT = 1 ]; then
  id postgres >/dev/null 2>&1 || die "running as root but there is no 'postgres' system user (apt-get install -y postgresql creates it)"
  RUN=(runuser -u postgres --)
fi

# Where the cluster lives: .data/pg in the clone, unless the server's user cannot reach it (a clone under a
# mode-700 home folder, say); then a folder under /tmp named after a hash of the clone's path.
can_reach() {
  if [ $AS_ROOT = 1 ]; then runuser -u postgres -- test -x "$1" 2>/dev/null; else test -x "$1"; fi
}
if [ -n "${SUMPWISE_PG_DIR:-}" ]; then
  BASE=$SUMPWISE_PG_DIR
else
  mkdir -p "$ROOT/.data"
  if can_reach "$ROOT/.data"; then BASE="$ROOT/.data/pg"
  else
    HASH=$(printf '%s' "$ROOT" | sha256sum | cut -c1-12)
    BASE="${XDG_RUNTIME_DIR:-/tmp}/sumpwise-pg-$HASH"
  fi
fi
DATA="$BASE/data"
SOCK="$BASE/run"
LOG="$BASE/server.log"

# Password (scram-sha-256) authentication, even on loopback: any local user or process could otherwise sign in
# as the database owner. One generated password per clone, kept in .data/pg-password (mode 600, owned by whoever
# runs the project); clients read it from there (src/lib/db/embedded-password.ts sets PGPASSWORD), so a
# DATABASE_URL without a password keeps working.
SECRET="$ROOT/.data/pg-password"
ensure_secret() {
  mkdir -p "$ROOT/.data"
  if [ ! -s "$SECRET" ]; then
    (umask 077; head -c 32 /dev/urandom | base64 | tr -dc 'A-Za-z0-9' | head -c 32 > "$SECRET")
  fi
  chmod 600 "$SECRET"
  PGPASSWORD=$(cat "$SECRET")
  export PGPASSWORD
}
ensure_secret

# From / so the server's user is never asked to enter a folder it cannot (a clone under a mode-700 home).
pg() { (cd / && "${RUN[@]}" "$PGBIN/$1" "${@:2}"); }
psql_admin() { (cd / && "${RUN[@]}" "$PGBIN/psql" -X -q -v ON_ERROR_STOP=1 -h 127.0.0.1 -p "$PORT" -U "$DB_USER" -d postgres "$@"); }

ready() { "$PGBIN/pg_isready" -q -h 127.0.0.1 -p "$PORT" -d postgres -U "$DB_USER" >/dev/null 2>&1; }

init_cluster() {
  mkdir -p "$BASE" "$SOCK"
  [ $AS_ROOT = 1 ] && chown -R postgres:postgres "$BASE"
  chmod 700 "$BASE"
  if [ ! -s "$DATA/PG_VERSION" ]; then
    say "creating a new cluster in $DATA"
    rm -rf "$DATA"
    # initdb reads the password from a file the server's user can read; it is removed right after.
    local pwfile="$BASE/initdb-password"
    (umask 077; printf '%s\n' "$PGPASSWORD" > "$pwfile")
    [ $AS_ROOT = 1 ] && chown postgres:postgres "$pwfile"
    pg initdb -D "$DATA" -U "$DB_USER" --auth=scram-sha-256 --pwfile="$pwfile" --encoding=UTF8 --locale=C.UTF-8 >/dev/null \
      || pg initdb -D "$DATA" -U "$DB_USER" --auth=scram-sha-256 --pwfile="$pwfile" --encoding=UTF8 --locale=C >/dev/null \
      || { rm -f "$pwfile"; die "initdb failed in $DATA"; }
    rm -f "$pwfile"
    # Loopback only, never a public interface.
    {
      echo "listen_addresses = '127.0.0.1'"
      echo "port = $PORT"
      echo "unix_socket_directories = '$SOCK'"
      echo "fsync = on"
      echo "max_connections = 200"
    } >> "$DATA/postgresql.conf"
  fi
}

pid_alive() {
  kill -0 "$1" 2>/dev/null || return 1
  [ "$(awk '{print $3}' "/proc/$1/stat" 2>/dev/null)" != Z ]
}

port_owner_is_other() {
  # Something answers on the port but it is not our cluster.
  if ready; then
    [ -f "$DATA/postmaster.pid" ] || return 0
    local pid; pid=$(head -1 "$DATA/postmaster.pid" 2>/dev/null || true)
    [ -n "$pid" ] && pid_alive "$pid" && return 1
    return 0
  fi
  return 1
}

start() {
  init_cluster
  if ready && ! port_owner_is_other; then require_password; say "already running on 127.0.0.1:$PORT"; return 0; fi
  if port_owner_is_other; then
    die "port $PORT on 127.0.0.1 is taken by another PostgreSQL; set SUMPWISE_PG_PORT to a free port"
  fi
  if (exec 3<>"/dev/tcp/127.0.0.1/$PORT") 2>/dev/null; then
    die "port $PORT on 127.0.0.1 is in use by another program; set SUMPWISE_PG_PORT to a free port"
  fi
  # A server killed with -9 leaves postmaster.pid and the socket lock behind, and its PID can linger for
  # a moment as an unreaped process; wait for it to go, then the files are stale.
  local lock pid other
  # A live server on this data folder but another port (say, one a test run started) cannot be joined here:
  # PostgreSQL allows one postmaster per data folder.
  if [ -f "$DATA/postmaster.pid" ]; then
    pid=$(head -1 "$DATA/postmaster.pid" 2>/dev/null | tr -d ' ' || true)
    other=$(sed -n 4p "$DATA/postmaster.pid" 2>/dev/null | tr -d ' ' || true)
    if [ -n "$pid" ] && pid_alive "$pid" && [ -n "$other" ] && [ "$other" != "$PORT" ]; then
      die "this data folder ($DATA) is already served by PostgreSQL (pid $pid) on port $other; use SUMPWISE_PG_PORT=$other, or stop that server first: SUMPWISE_PG_PORT=$other bash scripts/db.sh stop"
    fi
  fi
  for lock in "$DATA/postmaster.pid" "$SOCK/.s.PGSQL.$PORT.lock"; do
    [ -f "$lock" ] || continue
    pid=$(head -1 "$lock" 2>/dev/null | tr -d ' ' || true)
    for _ in $(seq 1 100); do
      [ -n "$pid" ] && pid_alive "$pid" || break
      ready && { say "already running on 127.0.0.1:$PORT"; return 0; }
      sleep 0.1
    done
    if [ -z "$pid" ] || ! pid_alive "$pid"; then
      say "removing stale $(basename "$lock") (the server had stopped without cleaning up)"
      rm -f "$lock" "${lock%.lock}"
    fi
  done
  pg pg_ctl -D "$DATA" -l "$LOG" -w -t 60 -o "-p $PORT" start >/dev/null \
    || { tail -20 "$LOG" >&2 || true; die "the server did not start (log: $LOG)"; }
  for _ in $(seq 1 100); do ready && break; sleep 0.1; done
  ready || die "the server started but does not answer on 127.0.0.1:$PORT (log: $LOG)"
  require_password
  say "running on 127.0.0.1:$PORT (data: $DATA)"
}

# A cluster made before passwords were required still trusts every local connection: give the owner the
# clone's password while trust still lets us in, then switch pg_hba.conf to scram-sha-256 and reload.
require_password() {
  grep -qE '^[^#]*[[:space:]]trust[[:space:]]*$' "$DATA/pg_hba.conf" 2>/dev/null || return 0
  say "switching this cluster from trust to password (scram-sha-256) authentication"
  psql_admin -c "alter role $DB_USER password '$PGPASSWORD'" >/dev/null
  (cd / && "${RUN[@]}" sed -i -E 's/^([^#]*[[:space:]])trust[[:space:]]*$/\1scram-sha-256/' "$DATA/pg_hba.conf")
  pg pg_ctl -D "$DATA" reload >/dev/null
}

stop() {
  if [ -f "$DATA/postmaster.pid" ]; then
    pg pg_ctl -D "$DATA" -m fast -w -t 60 stop >/dev/null 2>&1 || true
  fi
  say "stopped"
}

status() {
  if ready && ! port_owner_is_other; then echo "running on 127.0.0.1:$PORT (data: $DATA)"; return 0; fi
  echo "not running (data: $DATA)"; return 3
}

ensure_db() {
  local name=$1
  [[ "$name" =~ ^[a-z_][a-z0-9_]*$ ]] || die "bad database name: $name"
  ready || start
  if [ "$(psql_admin -tAc "select 1 from pg_database where datname = '$name'")" != 1 ]; then
    psql_admin -c "create database $name" && say "created database $name"
  fi
}

url() { echo "postgres://$DB_USER@127.0.0.1:$PORT/${1:-$DEV_DB}"; }

case "${1:-}" in
  start) start; ensure_db "$DEV_DB" ;;
  stop) stop ;;
  status) status ;;
  url) url "${2:-}" ;;
  ensure-db) ensure_db "${2:?database name}" ;;
  drop-db)
    [[ "${2:?database name}" =~ ^[a-z_][a-z0-9_]*$ ]] || die "bad database name"
    psql_admin -c "drop database if exists ${2} with (force)" ;;
  reset) stop; say "removing $BASE"; rm -rf "$BASE"; start; ensure_db "$DEV_DB" ;;
  backup)
    # A consistent snapshot of one database in pg_dump's custom format (compressed, restorable table by table).
    out=${2:?usage: db.sh backup FILE [dbname]}; name=${3:-$DEV_DB}
    ready || die "the server is not running (scripts/db.sh start)"
    "$PGBIN/pg_dump" -h 127.0.0.1 -p "$PORT" -U "$DB_USER" -Fc --no-owner -f "$out" "$name"
    say "backed up $name to $out ($(du -h "$out" | cut -f1))" ;;
  restore)
    # Restores into an EMPTY database (created when missing); refuses one that already has tables.
    in=${2:?usage: db.sh restore FILE [dbname]}; name=${3:-$DEV_DB}
    [ -r "$in" ] || die "cannot read $in"
    ensure_db "$name"
    tables=$(psql_admin -d "$name" -tAc "select count(*) from pg_tables where schemaname = 'public'")
    [ "$tables" = 0 ] || die "database $name is not empty ($tables tables): restore into a new name, e.g. scripts/db.sh restore $in ${name}_restored"
    "$PGBIN/pg_restore" -h 127.0.0.1 -p "$PORT" -U "$DB_USER" --no-owner --exit-on-error -d "$name" "$in"
    say "restored $in into $name" ;;
  psql) shift; (cd / && "${RUN[@]}" "$PGBIN/psql" -X -h 127.0.0.1 -p "$PORT" -U "$DB_USER" "$@") ;;
  *) echo "usage: scripts/db.sh start|stop|status|url [db]|ensure-db NAME|drop-db NAME|reset|backup FILE [db]|restore FILE [db]|psql [args]" >&2; exit 2 ;;
esac
