#!/usr/bin/env bash
# Copies Skia's CanvasKit wasm into public/ so `expo export --platform web` ships it at /canvaskit.wasm.
# The chart screens load it at run time (WithSkiaWeb + locateFile → site root). 8 MB: not committed
# (public/.gitignore); run this before every web export.
set -euo pipefail
cd "$(dirname "$0")/.."
src=node_modules/canvaskit-wasm/bin/full/canvaskit.wasm
if [ ! -f "$src" ]; then
  echo "copy-canvaskit: $src is missing (is @shopify/react-native-skia installed?)" >&2
  exit 1
fi
mkdir -p public
if ! cmp -s "$src" public/canvaskit.wasm 2>/dev/null; then
  cp "$src" public/canvaskit.wasm
  echo "copy-canvaskit: copied $(du -h public/canvaskit.wasm | cut -f1) to public/canvaskit.wasm"
fi
