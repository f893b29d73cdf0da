#!/usr/bin/env bash
# npm start: set up everything, then serve Trenchbook on http://127.0.0.1:${PORT:-3000} with its job worker
# in a process of its own. `npm run stop` (scripts/stop.sh) stops the web server, the worker and the database.
# PGPORT moves the whole instance to another database cluster; PORT to another web port.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
source scripts/instance.sh
if pid="$(instance_pid web)"; then
  echo "trenchbook: already running (web server pid $pid$( [ -f "$RUN_DIR/web.url" ] && echo ", $(cat "$RUN_DIR/web.url")")); stop it first with: npm run stop" >&2
  exit 1
fi
if pid="$(instance_pid worker)"; then
  echo "trenchbook: a worker from an earlier start is still running (pid $pid); stop it first with: npm run stop" >&2
  exit 1
fi
bash scripts/setup.sh db
bash scripts/db.sh start
export DATABASE_URL="${DATABASE_URL:-$(bash scripts/db.sh url)}"
export NEXTAUTH_SECRET="${NEXTAUTH_SECRET:-$(cat .data/nextauth-secret)}"
PORT="${PORT:-3000}"
export PORT NEXTAUTH_URL="${NEXTAUTH_URL:-http://127.0.0.1:$PORT}"
npm run --silent db:migrate
npm run --silent db:seed
if [ "${SKIP_BUILD:-0}" != 1 ]; then npx next build; fi

worker=""; web=""
cleanup() {
  trap - EXIT INT TERM
  [ -n "$web" ] && kill "$web" 2>/dev/null || true
  [ -n "$worker" ] && kill "$worker" 2>/dev/null || true
  wait 2>/dev/null || true
  rm -f "$RUN_DIR/web.pid" "$RUN_DIR/worker.pid" "$RUN_DIR/web.url"
}
trap cleanup EXIT INT TERM
mkdir -p "$RUN_DIR"
start_worker() {
  node --import tsx scripts/worker.ts >>"$RUN_DIR/worker.log" 2>&1 &
  worker=$!
  echo "$worker" >"$RUN_DIR/worker.pid"
  echo "trenchbook: job worker started (pid $worker, log $RUN_DIR/worker.log)"
  if [ -z "${SMTP_URL:-}" ] && [ -z "${SMTP_HOST:-}" ]; then
    echo "trenchbook: no SMTP configured: e-mail goes to the local fake SMTP server in the worker (its log names the port); read it at http://127.0.0.1:$PORT/admin/mail"
  fi
}
start_worker
node --import tsx scripts/server.ts &
web=$!
echo "$web" >"$RUN_DIR/web.pid"
echo "http://127.0.0.1:$PORT" >"$RUN_DIR/web.url"
# the instance lives as long as its web server; a worker that dies is started again
while :; do
  wait -n "$web" "$worker" || true
  kill -0 "$web" 2>/dev/null || break
  if ! kill -0 "$worker" 2>/dev/null; then
    echo "trenchbook: the job worker stopped; starting it again (housekeeping fails the job it was running)" >&2
    sleep 1
    start_worker
  fi
done
