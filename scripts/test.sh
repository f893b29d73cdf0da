#!/usr/bin/env bash
# npm test: self-sufficient, because CI runs only this.
# Installs what is missing (npm packages; postgresql-15-postgis-3, chromium, gdal-bin, python3-openpyxl),
# starts the database, type-checks, runs vitest on a fresh test database, builds the app, runs the fault
# script (npm run test:faults) on a cluster of its own, then Playwright against its own server (port 3100)
# on its own fresh database (scripts/e2e-server.sh).
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1
bash scripts/setup.sh test
bash scripts/db.sh start

echo "== typecheck"
npx tsc --noEmit

echo "== unit and integration tests (vitest, fresh database trenchbook_test)"
npx vitest run

echo "== build"
npx next build

echo "== fault script (kills the server, the worker and PostgreSQL at set points; its own cluster on port 54338)"
npm run --silent test:faults

echo "== end-to-end tests (playwright + chromium, fresh database trenchbook_e2e, port 3100)"
npx playwright test
