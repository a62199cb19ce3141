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

bash scripts/build-web.sh

npx jest --ci "$@"
