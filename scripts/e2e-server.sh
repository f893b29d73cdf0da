#!/usr/bin/env bash
# The end-to-end server: its own fresh database (trenchbook_e2e) and its own port (3100), started by Playwright.
# Needs a finished `next build`. Never reuses a developer's running server. Runs the web server and the job
# worker the way `npm start` does (scripts/server.ts, scripts/worker.ts).
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
E2E_PORT="${E2E_PORT:-3100}"
bash scripts/db.sh start
bash scripts/db.sh recreatedb trenchbook_e2e
export DATABASE_URL="$(bash scripts/db.sh url trenchbook_e2e)"
export NEXTAUTH_URL="http://127.0.0.1:$E2E_PORT"
export NEXTAUTH_SECRET="${NEXTAUTH_SECRET:-e2e-secret-not-for-production}"
export EXPORTS_DIR="$here/.data/e2e-exports" STORAGE_DIR="$here/.data/e2e-storage"
# small limits so the sign-in limit can be seen to trip and recover within a test
# the fake SMTP server of the worker on any free port (a developer's own may hold 2525), sending every second
export MAIL_FAKE_PORT=0 MAIL_INTERVAL_SECONDS=1
export SIGNIN_MAX_PER_EMAIL=3 SIGNIN_WINDOW_SECONDS=8 SIGNIN_MAX_PER_IP=1000
npm run --silent db:migrate
npm run --silent db:seed
# the job worker in a process of its own, as npm start runs it; Playwright ends the whole process group
node --import tsx scripts/worker.ts &
PORT="$E2E_PORT" exec node --import tsx scripts/server.ts
