#!/usr/bin/env bash
# Browser tests drive Debian's chromium through playwright-core; install it when missing.
set -euo pipefail
if ! command -v chromium >/dev/null 2>&1; then
  echo "[fluxwright] installing Debian's chromium for the browser tests…"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq chromium >/dev/null
fi
