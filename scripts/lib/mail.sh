# The local fake mail service (scripts/mail-server.mjs: SMTP in, JSON inbox out) for the demo app and the
# tests. Sourced after common.sh and ports.sh.

start_mail_server() {
  local smtp_port="$1" inbox_port="$2" mail_dir="$3" log="${4:-}"
  require_free_port "$smtp_port" "fake SMTP"
  require_free_port "$inbox_port" "mail inbox"
  mkdir -p "$mail_dir"
  if [ -n "$log" ]; then
    (exec_without_inherited_fds env SMTP_PORT="$smtp_port" INBOX_PORT="$inbox_port" MAIL_DIR="$mail_dir" \
      node "$ROOT/scripts/mail-server.mjs") >"$log" 2>&1 &
  else
    (exec_without_inherited_fds env SMTP_PORT="$smtp_port" INBOX_PORT="$inbox_port" MAIL_DIR="$mail_dir" \
      node "$ROOT/scripts/mail-server.mjs") &
  fi
  MAIL_PID=$!
  wait_for_port "$smtp_port" "$MAIL_PID" "the mail server"
  wait_for_port "$inbox_port" "$MAIL_PID" "the mail server"
}
