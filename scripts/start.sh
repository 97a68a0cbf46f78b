#!/usr/bin/env bash
# npm start: a local Fintrail with its own PostgreSQL cluster, demo data and a fake mail inbox.
# Ctrl-C stops all of it; the next start reuses the same database.
set -euo pipefail
LIB="$(dirname "${BASH_SOURCE[0]}")/lib"
source "$LIB/common.sh"
source "$LIB/packages.sh"
source "$LIB/postgres.sh"
source "$LIB/ports.sh"
source "$LIB/mail.sh"
source "$LIB/session-secret.sh"
cd "$ROOT"

PORT="${PORT:-3000}"
# Other ports let a second checkout run beside this one.
PG_PORT="${FINTRAIL_PG_PORT:-54329}"
SMTP_PORT="${FINTRAIL_SMTP_PORT:-1025}"
INBOX_PORT="${FINTRAIL_INBOX_PORT:-1080}"
INBOX_URL="http://127.0.0.1:$INBOX_PORT"
APP_ORIGIN="http://127.0.0.1:$PORT"

# Fail before touching anything when another copy still holds the ports.
require_free_port "$PORT" "the app (set PORT=... to choose another)"
require_free_port "$SMTP_PORT" "fake SMTP"
require_free_port "$INBOX_PORT" "mail inbox"

APP_PID=""
MAIL_PID=""
CLUSTER_STARTED=""
STOPPED=""
cleanup() {
  [ -n "$STOPPED" ] && return
  STOPPED=1
  trap - INT TERM EXIT
  echo
  if [ -n "$APP_PID" ]; then say "Stopping the app ..."; stop_process "$APP_PID"; fi
  if [ -n "$MAIL_PID" ]; then say "Stopping the mail server ..."; stop_process "$MAIL_PID" >/dev/null; fi
  if [ -n "$CLUSTER_STARTED" ]; then pg_cluster_stop demo || warn "could not stop the demo database cleanly"; fi
  say "Stopped."
}
trap 'cleanup; exit 130' INT
trap 'cleanup; exit 143' TERM
trap cleanup EXIT

ensure_node_modules
ensure_apt_packages postgresql

CLUSTER_STARTED=1
pg_cluster_start demo "$PG_PORT"
pg_ensure_database "$PG_PORT" fintrail
export DATABASE_URL="postgres://fintrail@127.0.0.1:$PG_PORT/fintrail"

export NUXT_DATABASE_URL="$DATABASE_URL"
export NUXT_STORAGE_DIR="$STORAGE_DIR"
mkdir -p "$NUXT_STORAGE_DIR"

say "Applying database migrations ..."
run_migrations "$DATABASE_URL"

if [ -f "$ROOT/scripts/seed.ts" ]; then
  say "Loading demo data (skipped when already present) ..."
  "$ROOT/node_modules/.bin/tsx" scripts/seed.ts || die "loading the demo data failed (see above)."
else
  say "Notice: scripts/seed.ts does not exist yet; starting without demo data."
fi

needs_build() {
  local built="$ROOT/.output/server/index.mjs" sources=()
  [ -f "$built" ] || return 0
  local path
  for path in app server shared public nuxt.config.ts package-lock.json; do
    [ -e "$ROOT/$path" ] && sources+=("$ROOT/$path")
  done
  [ -n "$(find "${sources[@]}" -type f -newer "$built" -print -quit)" ]
}
if needs_build; then
  say "Building the app (nuxt build) ..."
  "$ROOT/node_modules/.bin/nuxt" build || die "the build failed (see above)."
else
  say "The build in .output is up to date."
fi

ensure_session_secret

say "Starting the mail server ..."
start_mail_server "$SMTP_PORT" "$INBOX_PORT" "$STORAGE_DIR/mail"

say "Starting the app ..."
export HOST=127.0.0.1 NITRO_HOST=127.0.0.1 PORT NITRO_PORT="$PORT"
export NUXT_APP_ORIGIN="$APP_ORIGIN"
export NUXT_SMTP_HOST=127.0.0.1 NUXT_SMTP_PORT="$SMTP_PORT"
# nuxt-auth-utils marks the cookie Secure; browsers drop that on plain http except localhost.
case "$APP_ORIGIN" in http://*) export NUXT_SESSION_COOKIE_SECURE=false ;; esac
# One server process per core behind the one port (FINTRAIL_WORKERS=1 for a single process).
node "$ROOT/scripts/cluster.mjs" "$ROOT/.output/server/index.mjs" &
APP_PID=$!
wait_for_port "$PORT" "$APP_PID" "the app" 60

cat <<EOF

  ────────────────────────────────────────────────────────────
  Fintrail is running:   $APP_ORIGIN
  Mail it sends:         $INBOX_URL
  Database:              $DATABASE_URL
  Stop with Ctrl-C.
  ────────────────────────────────────────────────────────────
EOF
if [ -f "$ROOT/scripts/demo-accounts.txt" ]; then
  echo
  sed 's/^/  /' "$ROOT/scripts/demo-accounts.txt"
  echo
fi

set +e
wait "$APP_PID"
status=$?
APP_PID=""
set -e
[ "$status" -eq 0 ] || warn "the app exited with status $status"
exit "$status"
