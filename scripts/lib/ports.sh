# Ports on 127.0.0.1 and the processes behind them: refuse a busy port, wait for a server to listen,
# stop a process politely. Sourced after common.sh.

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
