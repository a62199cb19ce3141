#!/usr/bin/env bash
# `npm test`: bootstraps everything the tests need on a fresh Debian machine, then runs every tier.
set -euo pipefail
cd "$(dirname "$0")/.."

bash scripts/ensure-deps.sh
bash scripts/ensure-chromium.sh

# The tests' own MariaDB: a throwaway data directory and port, stopped again at the end.
export FW_DB_DIR="${FW_TEST_DB_DIR:-.data/test-mariadb}"
export FW_DB_PORT="${FW_TEST_DB_PORT:-3417}"
bash scripts/db.sh start
trap 'bash scripts/db.sh stop >/dev/null 2>&1 || true' EXIT

echo "[fluxwright] type-checking…"
npx tsc --noEmit -p tsconfig.json

echo "[fluxwright] building the web export for the browser tests…"
EXPO_OFFLINE=1 CI=1 EXPO_NO_TELEMETRY=1 npx expo export --platform web --output-dir dist >/tmp/fluxwright-export.log 2>&1 \
  || { tail -n 60 /tmp/fluxwright-export.log; echo "web export failed"; exit 1; }

npx jest --ci "$@"
