# The secret nuxt-auth-utils seals session cookies with: kept in storage/ for the demo app, new for
# every test run. Sourced after common.sh.

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
