#!/usr/bin/env bash
# Benchmarks on loopback against the built server and a scratch database in the test cluster.
# Usage: bash scripts/bench/run.sh fish-list | timeline | pond-side | pages | photos | archive | which-fish | hostile-uploads | faults | all
# (npm run bench = all). Each figure is printed beside its comparison; a table of them all closes the run.
# (FINTRAIL_TEST_PG_PORT moves the database cluster, as for the tests; BENCH_PORT the server.)
set -euo pipefail
LIB="$(dirname "${BASH_SOURCE[0]}")/../lib"
source "$LIB/common.sh"
source "$LIB/packages.sh"
source "$LIB/postgres.sh"
source "$LIB/ports.sh"
cd "$ROOT"

NAME="${1:?name a benchmark: fish-list, timeline, pond-side, pages, photos, archive, which-fish, hostile-uploads, faults or all}"
BENCHMARKS=(fish-list timeline pond-side pages photos archive which-fish hostile-uploads faults)
if [ "$NAME" != all ] && [ ! -f "scripts/bench/$NAME.ts" ]; then
  echo "No benchmark named $NAME (scripts/bench/$NAME.ts); choose one of: ${BENCHMARKS[*]} or all" >&2
  exit 2
fi
PG_PORT="${FINTRAIL_TEST_PG_PORT:-54339}"
DB="fintrail_bench"

ensure_node_modules
ensure_apt_packages postgresql
# The photo benchmark compares with ImageMagick; the page benchmark drives Chromium.
case "$NAME" in photos) ensure_apt_packages imagemagick ;; pages) ensure_apt_packages chromium ;; all) ensure_apt_packages imagemagick chromium ;; esac
pg_cluster_start test "$PG_PORT" fast
# The fault benchmark stops and starts this cluster itself.
BENCH_PG_START="$(pg_start_command_json "$PGDATA_DIR")"
BENCH_PG_STOP="$(pg_stop_command_json "$PGDATA_DIR")"
export BENCH_PG_START BENCH_PG_STOP
export DATABASE_URL="postgres://fintrail@127.0.0.1:$PG_PORT/$DB"
[ -f .output/server/index.mjs ] || npx nuxt build
export NUXT_SESSION_PASSWORD="$(random_secret)"
export BENCH_STORAGE_DIR="$STORAGE_DIR/bench"
BENCH_LOAD_START="$(cut -d' ' -f1-3 /proc/loadavg)"
export BENCH_LOAD_START
BENCH_RESULTS="$(mktemp)"
export BENCH_RESULTS
trap 'rm -f "$BENCH_RESULTS"' EXIT

# Each benchmark gets a fresh database and storage folder, so one's data never skews the next.
run_one() {
  echo "==> benchmark $1"
  pg_fresh_database "$PG_PORT" "$DB"
  run_migrations "$DATABASE_URL"
  rm -rf "$BENCH_STORAGE_DIR" && mkdir -p "$BENCH_STORAGE_DIR"
  BENCH_NAME="$1" "$ROOT/node_modules/.bin/tsx" "scripts/bench/$1.ts"
}

if [ "$NAME" = all ]; then
  for one in "${BENCHMARKS[@]}"; do run_one "$one"; done
else
  run_one "$NAME"
fi
[ -s "$BENCH_RESULTS" ] && "$ROOT/node_modules/.bin/tsx" scripts/bench/table.ts "$BENCH_RESULTS"
exit 0
