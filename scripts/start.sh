#!/usr/bin/env bash
# npm start: set up everything, then serve Trenchbook on http://127.0.0.1:${PORT:-3000}
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
bash scripts/setup.sh db
bash scripts/db.sh start
export DATABASE_URL="${DATABASE_URL:-$(bash scripts/db.sh url)}"
export NEXTAUTH_SECRET="${NEXTAUTH_SECRET:-$(cat .data/nextauth-secret)}"
PORT="${PORT:-3000}"
export NEXTAUTH_URL="${NEXTAUTH_URL:-http://127.0.0.1:$PORT}"
npm run --silent db:migrate
npm run --silent db:seed
if [ "${SKIP_BUILD:-0}" != 1 ]; then npx next build; fi
echo "trenchbook: serving http://127.0.0.1:$PORT"
exec npx next start -H 127.0.0.1 -p "$PORT"
