#!/usr/bin/env bash
# A private PostgreSQL cluster for Ebbtide: data inside the project (.data/pg, git-ignored),
# listening on 127.0.0.1 only, on a non-default port, run as the unprivileged "postgres" user
# when this script runs as root (PostgreSQL refuses to run as root).
#   scripts/db.sh start | stop | status | url [dbname] | psql [args]
# start is idempotent: it reuses an existing cluster and a running server.
source "$(dirname "${BASH_SOURCE[0]}")/lib/bootstrap.sh"

PG_PORT="${EBBTIDE_PG_PORT:-54329}"
PG_HOME="$EBBTIDE_ROOT/.data/pg"
PG_DATA="$PG_HOME/data"
PG_LOG="$PG_HOME/server.log"
PG_SOCKET_DIR="$PG_HOME"

run_pg() {
  if as_root; then runuser -u postgres -- "$@"; else "$@"; fi
}

prepare_home() {
  mkdir -p "$PG_HOME"
  if as_root; then
    id postgres >/dev/null 2>&1 || useradd --system --home-dir /var/lib/postgresql --shell /bin/false postgres
    chown postgres "$PG_HOME"
    # The postgres user must be able to walk into the project folder.
    local d="$PG_HOME"
    while [ "$d" != "/" ]; do
      runuser -u postgres -- test -x "$d" || die "The postgres user cannot enter $d (needs the x permission); run chmod o+x on it."
      d=$(dirname "$d")
    done
  fi
}

is_running() {
  [ -f "$PG_DATA/PG_VERSION" ] && run_pg "$PG_BIN_DIR/pg_ctl" -D "$PG_DATA" status >/dev/null 2>&1
}

cmd_start() {
  ensure_postgres_binaries
  prepare_home
  if [ ! -f "$PG_DATA/PG_VERSION" ]; then
    log "creating the PostgreSQL cluster in .data/pg"
    run_pg "$PG_BIN_DIR/initdb" -D "$PG_DATA" -A trust -U postgres -E UTF8 --locale=C.UTF-8 >/dev/null \
      || run_pg "$PG_BIN_DIR/initdb" -D "$PG_DATA" -A trust -U postgres -E UTF8 >/dev/null
  fi
  if is_running; then
    log "PostgreSQL already running on 127.0.0.1:$PG_PORT"
    return 0
  fi
  log "starting PostgreSQL on 127.0.0.1:$PG_PORT"
  run_pg "$PG_BIN_DIR/pg_ctl" -D "$PG_DATA" -l "$PG_LOG" -w -t 30 \
    -o "-p $PG_PORT -k $PG_SOCKET_DIR -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off" \
    start >/dev/null || { tail -n 20 "$PG_LOG" >&2; die "PostgreSQL did not start"; }
  # pg_ctl -w waits for the postmaster; make sure it accepts connections over TCP too.
  for _ in $(seq 1 50); do
    if psql -h 127.0.0.1 -p "$PG_PORT" -U postgres -d postgres -tAc 'select 1' >/dev/null 2>&1; then return 0; fi
    sleep 0.1
  done
  die "PostgreSQL started but does not accept connections on 127.0.0.1:$PG_PORT"
}

cmd_stop() {
  ensure_postgres_binaries
  if is_running; then
    log "stopping PostgreSQL"
    run_pg "$PG_BIN_DIR/pg_ctl" -D "$PG_DATA" -m fast -w stop >/dev/null
  fi
}

cmd_url() {
  echo "postgres://postgres@127.0.0.1:$PG_PORT/${1:-ebbtide}"
}

case "${1:-}" in
  start) cmd_start ;;
  stop) cmd_stop ;;
  status) ensure_postgres_binaries; if is_running; then echo running; else echo stopped; exit 3; fi ;;
  url) shift; cmd_url "$@" ;;
  psql) shift; exec psql -h 127.0.0.1 -p "$PG_PORT" -U postgres "$@" ;;
  *) echo "usage: scripts/db.sh start|stop|status|url [db]|psql [args]" >&2; exit 2 ;;
esac
