# A private PostgreSQL cluster per checkout and purpose (dev, test), started from Debian's binaries on a
# port of our own, its databases, and the migrations applied to them. Sourced after common.sh.

pg_bin_dir() {
  local dir
  dir="$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)"
  [ -n "$dir" ] && [ -x "$dir/postgres" ] || return 1
  printf '%s\n' "$dir"
}

# Root may not run initdb/postgres: everything server-side runs as the postgres OS user, from /
# so it never tries to stat root's working directory.
PG_AS=()
pg_as_init() {
  if is_root; then
    getent passwd postgres >/dev/null || die "the 'postgres' OS user is missing; reinstall the postgresql package"
    PG_AS=(runuser -u postgres -- env -C /)
  else
    PG_AS=()
  fi
}

pg_run() { "${PG_AS[@]}" "$@"; }

pg_fallback_base() {
  printf '/var/tmp/fintrail-%s\n' "$(printf '%s' "$ROOT" | sha256sum | cut -c1-12)"
}

# Sets PGDATA_DIR for cluster NAME: storage/pg-NAME when the server user can reach it, else a
# folder under /var/tmp keyed by this checkout's path.
pg_choose_data_dir() {
  local name="$1"
  local inside="$STORAGE_DIR/pg-$name"
  local outside
  outside="$(pg_fallback_base)/pg-$name"

  # An existing cluster wins, so a later permission change does not start an empty one.
  if [ -f "$inside/PG_VERSION" ]; then PGDATA_DIR="$inside"; return; fi
  if [ -f "$outside/PG_VERSION" ]; then PGDATA_DIR="$outside"; return; fi

  mkdir -p "$STORAGE_DIR"
  if is_root; then
    # Root creates pg-NAME and hands it over, so postgres only needs to traverse storage/.
    if runuser -u postgres -- test -x "$STORAGE_DIR" 2>/dev/null; then
      PGDATA_DIR="$inside"
      return
    fi
    say "The postgres OS user cannot reach $STORAGE_DIR (a parent folder lacks o+x),"
    say "so the '$name' database cluster lives in $outside instead."
  else
    if [ -w "$STORAGE_DIR" ]; then
      PGDATA_DIR="$inside"
      return
    fi
    say "$STORAGE_DIR is not writable, so the '$name' database cluster lives in $outside instead."
  fi
  PGDATA_DIR="$outside"
}

pg_prepare_data_dir() {
  local dir="$1"
  mkdir -p "$(dirname "$dir")"
  mkdir -p "$dir"
  if is_root; then
    # The fallback parent is created by root: postgres needs to pass through it.
    chmod 755 "$(dirname "$dir")" 2>/dev/null || true
    chown postgres:postgres "$dir"
  fi
  chmod 700 "$dir"
}

# Settings live in fintrail.conf (rewritten on every start, included from postgresql.conf), so
# a plain `pg_ctl start` — as the test suite runs it — picks up the same port and socket.
pg_write_config() {
  local dir="$1" port="$2" fast="$3"
  local conf="$dir/fintrail.conf"
  {
    printf '# Written by scripts/lib/postgres.sh on every start; edits here are lost.\n'
    printf "listen_addresses = '127.0.0.1'\n"
    printf 'port = %s\n' "$port"
    printf "unix_socket_directories = '%s'\n" "$dir"
    printf 'unix_socket_permissions = 0700\n'
    if [ "$fast" = fast ]; then
      # Throwaway test data: durability is not worth the time.
      printf 'fsync = off\nsynchronous_commit = off\nfull_page_writes = off\n'
    fi
  } | pg_run tee "$conf" >/dev/null
  if ! grep -q "^include_if_exists = 'fintrail.conf'" "$dir/postgresql.conf"; then
    printf "\ninclude_if_exists = 'fintrail.conf'\n" | pg_run tee -a "$dir/postgresql.conf" >/dev/null
  fi
}

pg_initdb() {
  local dir="$1" bin="$2"
  say "Creating a PostgreSQL cluster in $dir ..."
  pg_run "$bin/initdb" -D "$dir" -E UTF8 --locale=C.UTF-8 -U postgres --auth=trust >"$dir.initdb.log" 2>&1 || {
    cat "$dir.initdb.log" >&2
    die "initdb failed for $dir"
  }
  rm -f "$dir.initdb.log"
  # Trust only over the owner-only socket and loopback TCP; nothing listens elsewhere.
  pg_run tee "$dir/pg_hba.conf" >/dev/null <<'EOF'
# Written by scripts/lib/postgres.sh. The server listens on 127.0.0.1 and on a socket inside the
# data folder (mode 0700) only.
local   all   all                  trust
host    all   all   127.0.0.1/32   trust
EOF
}

pg_running_port() {
  # Line 4 of postmaster.pid is the port the running server listens on.
  sed -n 4p "$1/postmaster.pid" 2>/dev/null || true
}

pg_psql() {
  local port="$1"
  shift
  PGCONNECT_TIMEOUT=5 PGOPTIONS="-c client_min_messages=warning" "$PG_BIN/psql" -X -q -v ON_ERROR_STOP=1 -h 127.0.0.1 -p "$port" -U postgres "$@"
}

# pg_cluster_start NAME PORT [fast]
pg_cluster_start() {
  local name="$1" port="$2" fast="${3:-}"
  PG_BIN="$(pg_bin_dir)" || die "PostgreSQL server binaries not found under /usr/lib/postgresql"
  export PG_BIN
  pg_as_init
  pg_choose_data_dir "$name"
  export PGDATA_DIR
  local dir="$PGDATA_DIR"

  if [ ! -f "$dir/PG_VERSION" ]; then
    pg_prepare_data_dir "$dir"
    pg_initdb "$dir" "$PG_BIN"
  fi
  pg_write_config "$dir" "$port" "$fast"

  if pg_run "$PG_BIN/pg_ctl" -D "$dir" status >/dev/null 2>&1; then
    if [ "$(pg_running_port "$dir")" = "$port" ]; then
      say "Reusing the running '$name' database cluster (port $port, files in $dir)."
    else
      say "Restarting the '$name' database cluster on port $port (files in $dir) ..."
      (exec_without_inherited_fds "${PG_AS[@]}" "$PG_BIN/pg_ctl" -D "$dir" -m fast -w restart -l "$dir/server.log") >/dev/null ||
        die "could not restart PostgreSQL; see $dir/server.log"
    fi
  else
    say "Starting the '$name' database cluster on 127.0.0.1:$port (files in $dir) ..."
    if ! (exec_without_inherited_fds "${PG_AS[@]}" "$PG_BIN/pg_ctl" -D "$dir" -w -t 60 -l "$dir/server.log" start) >/dev/null; then
      tail -n 20 "$dir/server.log" >&2 || true
      die "PostgreSQL did not start (port $port busy?); log: $dir/server.log"
    fi
  fi

  local i
  for i in $(seq 1 60); do
    "$PG_BIN/pg_isready" -q -h 127.0.0.1 -p "$port" && break
    [ "$i" -eq 60 ] && die "PostgreSQL on port $port is not accepting connections; log: $dir/server.log"
    sleep 0.5
  done

  pg_psql "$port" -d postgres -c "DO \$\$ BEGIN
    IF NOT EXISTS (SELECT FROM pg_roles WHERE rolname = 'fintrail') THEN
      CREATE ROLE fintrail LOGIN NOSUPERUSER NOCREATEDB NOCREATEROLE;
    END IF;
  END \$\$;" || die "could not create the fintrail role"
}

pg_database_owned_by_fintrail() {
  local port="$1" db="$2"
  pg_psql "$port" -d postgres -c "ALTER DATABASE \"$db\" OWNER TO fintrail;" &&
    pg_psql "$port" -d "$db" -c "ALTER SCHEMA public OWNER TO fintrail;"
}

# pg_ensure_database PORT DB — creates DB when missing, keeps its data otherwise.
pg_ensure_database() {
  local port="$1" db="$2" exists
  exists="$(pg_psql "$port" -d postgres -tA -c "SELECT 1 FROM pg_database WHERE datname = '$db'")" ||
    die "could not query PostgreSQL on port $port"
  if [ "$exists" != 1 ]; then
    say "Creating database $db ..."
    pg_psql "$port" -d postgres -c "CREATE DATABASE \"$db\" OWNER fintrail;" || die "could not create database $db"
  fi
  pg_database_owned_by_fintrail "$port" "$db" || die "could not give database $db to fintrail"
}

# pg_fresh_database PORT DB — drops DB (closing its connections) and creates it empty.
pg_fresh_database() {
  local port="$1" db="$2"
  pg_psql "$port" -d postgres -c "DROP DATABASE IF EXISTS \"$db\" WITH (FORCE);" || die "could not drop database $db"
  pg_psql "$port" -d postgres -c "CREATE DATABASE \"$db\" OWNER fintrail;" || die "could not create database $db"
  pg_database_owned_by_fintrail "$port" "$db" || die "could not give database $db to fintrail"
}

# pg_cluster_stop NAME
pg_cluster_stop() {
  local name="$1"
  [ -n "${PG_BIN:-}" ] || PG_BIN="$(pg_bin_dir)" || return 0
  pg_as_init
  pg_choose_data_dir "$name" >/dev/null
  [ -f "$PGDATA_DIR/PG_VERSION" ] || return 0
  if pg_run "$PG_BIN/pg_ctl" -D "$PGDATA_DIR" status >/dev/null 2>&1; then
    say "Stopping the '$name' database cluster ..."
    pg_run "$PG_BIN/pg_ctl" -D "$PGDATA_DIR" -m fast -w stop >/dev/null
  fi
}

# Shell-free command arrays (as JSON) for the test suite's child_process.spawn.
pg_start_command_json() {
  local dir="$1"
  json_array "${PG_AS[@]}" "$PG_BIN/pg_ctl" -D "$dir" -w -t 60 -l "$dir/server.log" start
}
pg_stop_command_json() {
  local dir="$1"
  json_array "${PG_AS[@]}" "$PG_BIN/pg_ctl" -D "$dir" -m fast -w stop
}

run_migrations() {
  local url="$1"
  (cd "$ROOT" && DATABASE_URL="$url" "$ROOT/node_modules/.bin/tsx" scripts/migrate.ts) ||
    die "database migrations failed (see above); stopping."
}
