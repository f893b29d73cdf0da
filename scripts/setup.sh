#!/usr/bin/env bash
# Installs what is missing: npm packages (npm ci) and Debian packages (ensure-system.sh).
#   setup.sh [db|test]
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$here"
export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1
bash scripts/ensure-system.sh "${1:-db}"
# npm ci when node_modules is missing or older than the lock file
if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "trenchbook: installing npm packages (npm ci)"
  npm ci --no-audit --no-fund
fi
mkdir -p .data exports
# a stable signing secret for sessions, made once per checkout and kept out of git
if [ ! -s .data/nextauth-secret ]; then
  node -e "process.stdout.write(require('crypto').randomBytes(32).toString('base64url'))" > .data/nextauth-secret
  chmod 600 .data/nextauth-secret
fi
