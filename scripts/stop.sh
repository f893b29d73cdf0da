#!/usr/bin/env bash
# npm run stop: stops what `npm start` started — the web server, the job worker — and the database.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
source scripts/instance.sh
for name in web worker; do
  if pid="$(instance_pid "$name")"; then
    kill -TERM "$pid" 2>/dev/null || true
    for _ in $(seq 1 50); do [ -d "/proc/$pid" ] || break; sleep 0.2; done
    if [ -d "/proc/$pid" ]; then kill -KILL "$pid" 2>/dev/null || true; fi
    echo "trenchbook: stopped the $name (pid $pid)" >&2
  fi
  rm -f "$RUN_DIR/$name.pid"
done
rm -f "$RUN_DIR/web.url"
bash scripts/db.sh stop
