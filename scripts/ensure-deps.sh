#!/usr/bin/env bash
# Installs npm dependencies when they are missing or older than the lock file.
# Shared by `npm start` and `npm test` so a fresh clone needs nothing else.
set -euo pipefail
cd "$(dirname "$0")/.."
stamp=node_modules/.package-lock.json
if [ ! -f "$stamp" ] || [ package-lock.json -nt "$stamp" ]; then
  echo "[fluxwright] installing npm dependencies (npm ci)…"
  npm ci --no-audit --no-fund
fi
