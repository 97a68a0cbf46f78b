# Installs what the project needs from npm (node_modules matching package-lock.json) and from Debian
# (PostgreSQL, Chromium, poppler). Sourced after common.sh.

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
