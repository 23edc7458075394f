# Sourced by tests/run.sh: a throwaway PostgreSQL 15 on 127.0.0.1 for the shared-store tests.
# Exports LOOKAHEAD_TEST_POSTGRES (an Npgsql connection string) when the server is up.
PG_BIN="${PG_BIN:-/usr/lib/postgresql/15/bin}"
PG_DIR=""
PG_PORT="${LOOKAHEAD_TEST_PG_PORT:-54329}"

start_test_postgres() {
  if [ -n "${LOOKAHEAD_TEST_POSTGRES:-}" ]; then return 0; fi
  if [ ! -x "$PG_BIN/initdb" ]; then
    if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
      (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null) || return 1
    else
      return 1
    fi
  fi
  PG_DIR="$(mktemp -d /tmp/lookahead-pg.XXXXXX)"
  local run_as=()
  if [ "$(id -u)" = 0 ]; then chown postgres "$PG_DIR"; run_as=(runuser -u postgres --); fi
  "${run_as[@]}" "$PG_BIN/initdb" -D "$PG_DIR/data" -U postgres -A trust >/dev/null || return 1
  "${run_as[@]}" "$PG_BIN/pg_ctl" -D "$PG_DIR/data" -l "$PG_DIR/log" -w \
    -o "-c listen_addresses=127.0.0.1 -p $PG_PORT -k $PG_DIR -c fsync=off -c max_connections=300" start >/dev/null || return 1
  export LOOKAHEAD_TEST_POSTGRES="Host=127.0.0.1;Port=$PG_PORT;Username=postgres;Database=postgres;Pooling=true"
}

stop_test_postgres() {
  if [ -n "$PG_DIR" ] && [ -d "$PG_DIR/data" ]; then
    local run_as=()
    if [ "$(id -u)" = 0 ]; then run_as=(runuser -u postgres --); fi
    "${run_as[@]}" "$PG_BIN/pg_ctl" -D "$PG_DIR/data" -m fast stop >/dev/null 2>&1 || true
    rm -rf "$PG_DIR"
  fi
}
