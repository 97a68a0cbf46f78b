# Shared by scripts/start.sh, scripts/test.sh and scripts/bench/run.sh: where the checkout is, how the scripts
# talk, and small helpers the other parts use. Sourced, never run on its own; callers set `set -euo pipefail` first.

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
STORAGE_DIR="$ROOT/storage"

# glibc gives each of libuv's pool threads a malloc arena of its own, and sharp's steps of one photo land on
# different threads: each arena grew and gave back its own copy of the pixel buffers. Two arenas (one per photo
# processed at once) measured 10-15 % less CPU for one photo's sizes, a third to a tenth of the page faults and
# 90 MB less peak memory; ten photos at once through the server cost the same CPU either way
# (scripts/bench/photos.ts; jemalloc was slower here). Every server start (start, test, bench) inherits it.
export MALLOC_ARENA_MAX="${MALLOC_ARENA_MAX:-2}"

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

json_array() { node -e 'process.stdout.write(JSON.stringify(process.argv.slice(1)))' -- "$@"; }

# Closes every file this shell has open beyond stdin, stdout and stderr, then runs the command in its place:
# call it in a subshell, `( exec_without_inherited_fds cmd ... )`. A server that outlives the script
# (PostgreSQL, or the mail service after `npm test -- --setup-only`) must not keep a file it inherited: started
# under `flock heavy.lock npm test ...`, it would hold that lock for as long as it runs.
exec_without_inherited_fds() {
  local fd
  for fd in /proc/$BASHPID/fd/*; do
    fd="${fd##*/}"
    if [ "$fd" -gt 2 ]; then eval "exec $fd>&-"; fi
  done
  exec "$@"
}
