# Sourced by start.sh and stop.sh: where a running instance keeps its process ids (one instance a PGPORT).
RUN_DIR="$here/.data/run-${PGPORT:-54329}"

# prints the pid of the instance's `web` or `worker` process and succeeds when it is alive and ours
instance_pid() {
  local f="$RUN_DIR/$1.pid" pid
  [ -f "$f" ] || return 1
  pid="$(cat "$f")"
  [ -n "$pid" ] && [ -r "/proc/$pid/cmdline" ] || return 1
  # the pid file may outlive its process and the number be reused: check it is our script
  tr '\0' ' ' <"/proc/$pid/cmdline" | grep -q "scripts/$([ "$1" = web ] && echo server || echo worker).ts" || return 1
  echo "$pid"
}
