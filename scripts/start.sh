#!/usr/bin/env bash
# npm start: dependencies, private MariaDB, web export (when stale), then the server.
#   PORT (8080), FW_DB_PORT (3407), FW_SMTP_PORT (2525), FW_DEMO_OUTBOX (1), FW_SEED_DEMO (1)
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"

if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "[start] installing dependencies (npm install)"
  npm install --no-audit --no-fund
fi

export FW_DB_PORT="${FW_DB_PORT:-3407}"
FW_DB_DIR="${FW_DB_DIR:-.data/mariadb}" bash scripts/db.sh start

# Rebuild the web export when dist/ is missing or any app source is newer than it.
if [ -d app ] && [ -n "$(ls -A app 2>/dev/null)" ]; then
  stale=0
  if [ ! -f dist/index.html ]; then
    stale=1
  else
    for src in app assets app.json; do
      [ -e "$src" ] || continue
      if [ -n "$(find "$src" -newer dist/index.html -type f -print -quit 2>/dev/null)" ]; then stale=1; break; fi
    done
  fi
  if [ "$stale" = 1 ]; then
    echo "[start] building the web export (expo export --platform web); the first build takes a few minutes"
    EXPO_OFFLINE=1 CI=1 EXPO_NO_TELEMETRY=1 npx expo export --platform web
  fi
else
  echo "[start] note: app/ is empty or missing, serving the API only"
fi

export FW_DEMO_OUTBOX="${FW_DEMO_OUTBOX:-1}"
exec npx tsx server/main.ts
