#!/usr/bin/env bash
# Builds the static web export into dist/ (one HTML file per route), shipping Skia's wasm for charts.
#   scripts/build-web.sh          always build
#   scripts/build-web.sh --if-stale  build only when dist/ is missing or older than the app sources
set -euo pipefail
cd "$(dirname "$0")/.."

if [ "${1:-}" = "--if-stale" ] && [ -f dist/index.html ]; then
  stale=0
  for src in app client shared calibration assets app.json package-lock.json; do
    [ -e "$src" ] || continue
    if [ -n "$(find "$src" -newer dist/index.html -type f -print -quit 2>/dev/null)" ]; then stale=1; break; fi
  done
  [ "$stale" = 1 ] || exit 0
fi

bash scripts/copy-canvaskit.sh
echo "[fluxwright] building the web export (expo export --platform web); a cold build takes a few minutes"
log="$(mktemp -t fluxwright-export.XXXXXX.log)"
if ! EXPO_OFFLINE=1 CI=1 EXPO_NO_TELEMETRY=1 npx expo export --platform web --output-dir dist >"$log" 2>&1; then
  tail -n 60 "$log"
  echo "web export failed (full log: $log)" >&2
  exit 1
fi
rm -f "$log"
