#!/usr/bin/env bash
# npm test: self-sufficient, because CI runs only this.
# Installs what is missing, starts the database, builds the app, runs vitest on a fresh test database,
# then Playwright on its own server (port 3100) and its own fresh database.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
bash scripts/setup.sh test
bash scripts/db.sh start
export NEXTAUTH_SECRET="${NEXTAUTH_SECRET:-$(cat .data/nextauth-secret)}"
export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1

echo "== typecheck"
npx tsc --noEmit

echo "== unit and integration tests (vitest, database trenchbook_test)"
bash scripts/db.sh recreatedb trenchbook_test
DATABASE_URL="$(bash scripts/db.sh url trenchbook_test)" npx vitest run

echo "== build"
npx next build

echo "== end-to-end tests (playwright, database trenchbook_e2e, port 3100)"
bash scripts/db.sh recreatedb trenchbook_e2e
export DATABASE_URL="$(bash scripts/db.sh url trenchbook_e2e)"
npm run --silent db:migrate
npm run --silent db:seed
npx playwright test
