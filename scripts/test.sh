#!/usr/bin/env bash
# npm test: lint, typecheck, build, then every vitest project against a fresh PostgreSQL
# database and a fake mail server. One run reports everything; it fails if anything failed.
set -euo pipefail
LIB="$(dirname "${BASH_SOURCE[0]}")/lib"
source "$LIB/common.sh"
source "$LIB/packages.sh"
source "$LIB/postgres.sh"
source "$LIB/ports.sh"
source "$LIB/mail.sh"
source "$LIB/session-secret.sh"
cd "$ROOT"

PG_PORT="${FINTRAIL_TEST_PG_PORT:-54339}"
PG_DB=fintrail_test
SMTP_PORT="${FINTRAIL_TEST_SMTP_PORT:-2025}"
INBOX_PORT="${FINTRAIL_TEST_INBOX_PORT:-2080}"
INBOX_URL="http://127.0.0.1:$INBOX_PORT"
TEST_STORAGE_DIR="$STORAGE_DIR/test"
TEST_MAIL_DIR="$STORAGE_DIR/test-mail"
TEST_ENV_FILE="$STORAGE_DIR/test-env.json"

require_free_port "$SMTP_PORT" "test SMTP"
require_free_port "$INBOX_PORT" "test mail inbox"

MAIL_PID=""
CLUSTER_STARTED=""
STOPPED=""
# Silent, so vitest's summary stays the last thing printed.
cleanup() {
  [ -n "$STOPPED" ] && return
  STOPPED=1
  trap - INT TERM EXIT
  [ -n "$MAIL_PID" ] && stop_process "$MAIL_PID" >/dev/null 2>&1
  [ -n "$CLUSTER_STARTED" ] && pg_cluster_stop test >/dev/null 2>&1
  return 0
}
trap 'cleanup; exit 130' INT
trap 'cleanup; exit 143' TERM
trap cleanup EXIT

ensure_node_modules
ensure_apt_packages postgresql chromium poppler-utils

CLUSTER_STARTED=1
pg_cluster_start test "$PG_PORT" fast
pg_fresh_database "$PG_PORT" "$PG_DB"
export DATABASE_URL="postgres://fintrail@127.0.0.1:$PG_PORT/$PG_DB"

say "Applying database migrations to $PG_DB ..."
run_migrations "$DATABASE_URL"

# Uploaded files and mail belong to the database they were made with: start empty with it.
rm -rf "$TEST_STORAGE_DIR" "$TEST_MAIL_DIR"
mkdir -p "$TEST_STORAGE_DIR" "$TEST_MAIL_DIR"

# The browser tests sign in as the demo people, so the test database gets the demo scenario too
# (its photos go into the test storage folder).
say "Loading the demo scenario into $PG_DB ..."
NUXT_STORAGE_DIR="$TEST_STORAGE_DIR" "$ROOT/node_modules/.bin/tsx" scripts/seed.ts || die "loading the demo data failed (see above)."

# A new secret every run: test sessions never match demo ones and never outlive the run.
NUXT_SESSION_PASSWORD="$(random_secret)"
ensure_session_secret

say "Starting the test mail server (SMTP $SMTP_PORT, inbox $INBOX_URL) ..."
start_mail_server "$SMTP_PORT" "$INBOX_PORT" "$TEST_MAIL_DIR" "$STORAGE_DIR/test-mail-server.log"

export NUXT_DATABASE_URL="$DATABASE_URL"
export NUXT_STORAGE_DIR="$TEST_STORAGE_DIR"
export NUXT_SMTP_HOST=127.0.0.1 NUXT_SMTP_PORT="$SMTP_PORT"
export FINTRAIL_TEST_ENV="$TEST_ENV_FILE"

DATABASE_URL_JSON="$DATABASE_URL" PG_DATA_DIR_JSON="$PGDATA_DIR" PG_PORT_JSON="$PG_PORT" \
  PG_START_JSON="$(pg_start_command_json "$PGDATA_DIR")" PG_STOP_JSON="$(pg_stop_command_json "$PGDATA_DIR")" \
  SMTP_PORT_JSON="$SMTP_PORT" INBOX_URL_JSON="$INBOX_URL" STORAGE_DIR_JSON="$TEST_STORAGE_DIR" \
  node -e '
    const e = process.env
    const env = {
      databaseUrl: e.DATABASE_URL_JSON,
      pgDataDir: e.PG_DATA_DIR_JSON,
      pgPort: Number(e.PG_PORT_JSON),
      pgStartCommand: JSON.parse(e.PG_START_JSON),
      pgStopCommand: JSON.parse(e.PG_STOP_JSON),
      smtpPort: Number(e.SMTP_PORT_JSON),
      inboxUrl: e.INBOX_URL_JSON,
      sessionPassword: e.NUXT_SESSION_PASSWORD,
      storageDir: e.STORAGE_DIR_JSON,
    }
    require("node:fs").writeFileSync(process.argv[1], JSON.stringify(env, null, 2) + "\n", { mode: 0o600 })
  ' "$TEST_ENV_FILE"
chmod 600 "$TEST_ENV_FILE"

# `npm test -- --setup-only` leaves the database and the mail service running for running single test files.
if [ "${1:-}" = "--setup-only" ]; then
  STOPPED=1
  trap - INT TERM EXIT
  say "Test environment ready ($TEST_ENV_FILE). Run single files with: npx vitest run tests/api/<file>"
  exit 0
fi

BIN="$ROOT/node_modules/.bin"
prepare_status=0 lint_status=0 typecheck_status=0 build_status=0 vitest_status=0 s3_status=0

say "nuxt prepare ..."
"$BIN/nuxt" prepare || prepare_status=$?

say "Lint (eslint .) ..."
"$BIN/eslint" . || lint_status=$?

say "Typecheck (nuxi typecheck) ..."
"$BIN/nuxi" typecheck || typecheck_status=$?

say "Build (nuxt build) ..."
"$BIN/nuxt" build || build_status=$?

verdict() { if [ "$1" -eq 0 ]; then echo ok; else echo "FAILED (exit $1)"; fi; }
cat <<EOF

  ── before the tests ────────────────────────
  nuxt prepare : $(verdict "$prepare_status")
  lint         : $(verdict "$lint_status")
  typecheck    : $(verdict "$typecheck_status")
  build        : $(verdict "$build_status")
  ────────────────────────────────────────────

EOF

"$BIN/vitest" run || vitest_status=$?

# The photo and archive tests once more, with photos and uploads in an S3-compatible bucket: a fake S3
# (s3rver, tests/support/fake-s3.ts) started by that pass's global setup. Only those files: a few minutes.
say "Photo and archive tests against object storage (fake S3) ..."
FINTRAIL_TEST_STORE=s3 "$BIN/vitest" run || s3_status=$?

cleanup
if [ $((prepare_status + lint_status + typecheck_status + build_status + vitest_status + s3_status)) -ne 0 ]; then
  exit 1
fi
exit 0
