# Shared helpers for scripts/start.sh and scripts/test.sh. Sourced, never run on its own;
# callers set `set -euo pipefail` first.

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
STORAGE_DIR="$ROOT/storage"

say() { printf '==> %s\n' "$*"; }
warn() { printf '!!  %s\n' "$*" >&2; }
die() {
  printf '\nERROR: %s\n' "$*" >&2
  exit 1
}

is_root() { [ "$(id -u)" -eq 0 ]; }

sha256_of() { sha256sum "$1" | cut -d' ' -f1; }

random_secret() {
  # 48 hex characters; nuxt-auth-utils wants 32 or more.
  if command -v openssl >/dev/null 2>&1; then
    openssl rand -hex 24
  else
    node -e 'process.stdout.write(require("node:crypto").randomBytes(24).toString("hex") + "\n")'
  fi
}

# --- npm ---------------------------------------------------------------------------------

ensure_node_modules() {
  local lock="$ROOT/package-lock.json"
  local marker="$ROOT/node_modules/.fintrail-lock-sha"
  [ -f "$lock" ] || die "package-lock.json is missing in $ROOT"
  local want
  want="$(sha256_of "$lock")"

  if [ -d "$ROOT/node_modules" ]; then
    if [ -f "$marker" ] && [ "$(cat "$marker")" = "$want" ]; then
      return 0
    fi
    # npm writes node_modules/.package-lock.json on every install; when it is newer than the
    # lock, npm itself installed after the lock last changed, so a second full install would
    # only cost time.
    if [ "$ROOT/node_modules/.package-lock.json" -nt "$lock" ]; then
      printf '%s\n' "$want" >"$marker"
      return 0
    fi
  fi

  say "Installing npm packages (npm ci) ..."
  (cd "$ROOT" && npm ci --no-audit --no-fund) || die "npm ci failed; see the output above."
  printf '%s\n' "$want" >"$marker"
}

# --- Debian packages -----------------------------------------------------------------------

pg_bin_dir() {
  local dir
  dir="$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)"
  [ -n "$dir" ] && [ -x "$dir/postgres" ] || return 1
  printf '%s\n' "$dir"
}

apt_package_present() {
  local pkg="$1"
  if [ "$pkg" = postgresql ]; then
    # Any packaged server will do (postgresql-15, -16, ...), not only the meta package.
    ls /usr/lib/postgresql/*/bin/postgres >/dev/null 2>&1
    return
  fi
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q 'install ok installed'
}

ensure_apt_packages() {
  local missing=() pkg
  for pkg in "$@"; do
    apt_package_present "$pkg" || missing+=("$pkg")
  done
  [ "${#missing[@]}" -eq 0 ] && return 0

  if ! is_root; then
    printf '\nERROR: these Debian packages are needed but not installed: %s\n' "${missing[*]}" >&2
    printf 'Install them once as root, then run this again:\n' >&2
    printf '  sudo apt-get update && sudo apt-get install -y --no-install-recommends %s\n' "${missing[*]}" >&2
    exit 1
  fi

  say "Installing Debian packages: ${missing[*]}"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update || die "apt-get update failed"
  apt-get install -y --no-install-recommends "${missing[@]}" || die "apt-get install ${missing[*]} failed"
}

# --- PostgreSQL private clusters -----------------------------------------------------------

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
    printf '# Written by scripts/lib.sh on every start; edits here are lost.\n'
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
# Written by scripts/lib.sh. The server listens on 127.0.0.1 and on a socket inside the
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
      pg_run "$PG_BIN/pg_ctl" -D "$dir" -m fast -w restart -l "$dir/server.log" >/dev/null ||
        die "could not restart PostgreSQL; see $dir/server.log"
    fi
  else
    say "Starting the '$name' database cluster on 127.0.0.1:$port (files in $dir) ..."
    if ! pg_run "$PG_BIN/pg_ctl" -D "$dir" -w -t 60 -l "$dir/server.log" start >/dev/null; then
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

json_array() { node -e 'process.stdout.write(JSON.stringify(process.argv.slice(1)))' -- "$@"; }

# --- sessions ---------------------------------------------------------------------------

ensure_session_secret() {
  if [ -n "${NUXT_SESSION_PASSWORD:-}" ]; then
    export NUXT_SESSION_PASSWORD
    return 0
  fi
  local file="$STORAGE_DIR/session-secret"
  mkdir -p "$STORAGE_DIR"
  if [ ! -s "$file" ]; then
    (umask 077 && random_secret >"$file")
  fi
  chmod 600 "$file"
  NUXT_SESSION_PASSWORD="$(tr -d '\n' <"$file")"
  export NUXT_SESSION_PASSWORD
}

# --- processes and ports ---------------------------------------------------------------

port_in_use() {
  (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null
}

require_free_port() {
  local port="$1" what="$2"
  if port_in_use "$port"; then
    die "port $port on 127.0.0.1 is already in use, but $what needs it. Is another copy still running? Stop it first."
  fi
}

# wait_for_port PORT PID WHAT [SECONDS]
wait_for_port() {
  local port="$1" pid="$2" what="$3" seconds="${4:-30}" i
  for i in $(seq 1 $((seconds * 10))); do
    port_in_use "$port" && return 0
    kill -0 "$pid" 2>/dev/null || die "$what exited before listening on port $port"
    sleep 0.1
  done
  die "$what did not listen on port $port within ${seconds}s"
}

# stop_process PID — TERM, then KILL after 10 s.
stop_process() {
  local pid="$1" i
  [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null || return 0
  kill -TERM "$pid" 2>/dev/null || true
  for i in $(seq 1 100); do
    kill -0 "$pid" 2>/dev/null || break
    sleep 0.1
  done
  kill -0 "$pid" 2>/dev/null && kill -KILL "$pid" 2>/dev/null || true
  wait "$pid" 2>/dev/null || true
}

start_mail_server() {
  local smtp_port="$1" inbox_port="$2" mail_dir="$3" log="${4:-}"
  require_free_port "$smtp_port" "fake SMTP"
  require_free_port "$inbox_port" "mail inbox"
  mkdir -p "$mail_dir"
  if [ -n "$log" ]; then
    SMTP_PORT="$smtp_port" INBOX_PORT="$inbox_port" MAIL_DIR="$mail_dir" \
      node "$ROOT/scripts/mail-server.mjs" >"$log" 2>&1 &
  else
    SMTP_PORT="$smtp_port" INBOX_PORT="$inbox_port" MAIL_DIR="$mail_dir" \
      node "$ROOT/scripts/mail-server.mjs" &
  fi
  MAIL_PID=$!
  wait_for_port "$smtp_port" "$MAIL_PID" "the mail server"
  wait_for_port "$inbox_port" "$MAIL_PID" "the mail server"
}

run_migrations() {
  local url="$1"
  (cd "$ROOT" && DATABASE_URL="$url" "$ROOT/node_modules/.bin/tsx" scripts/migrate.ts) ||
    die "database migrations failed (see above); stopping."
}
