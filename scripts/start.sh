#!/usr/bin/env bash
# npm start: dependencies, private MariaDB, web export (when stale), then the server.
#   PORT (8080), FW_DB_PORT (3407), FW_SMTP_PORT (2525), FW_DEMO_OUTBOX (1), FW_SEED_DEMO (1)
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"

bash scripts/ensure-deps.sh

export FW_DB_PORT="${FW_DB_PORT:-3407}"
FW_DB_DIR="${FW_DB_DIR:-.data/mariadb}" bash scripts/db.sh start

# Rebuild the web export when dist/ is missing or older than the app sources.
bash scripts/build-web.sh --if-stale

export FW_DEMO_OUTBOX="${FW_DEMO_OUTBOX:-1}"
exec npx tsx server/main.ts
