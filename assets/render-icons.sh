#!/usr/bin/env bash
# Re-renders the committed app icons from assets/icon.svg. Run by hand after editing the SVG;
# the build and CI use the committed PNG/ICO/ICNS files and need none of these tools.
# Tools (Debian): librsvg2-bin (rsvg-convert), imagemagick (convert), icnsutils (png2icns).
set -euo pipefail
cd "$(dirname "$0")"
for size in 16 32 48 64 128 256 512 1024; do
  rsvg-convert -w "$size" -h "$size" icon.svg -o "icons/${size}x${size}.png"
done
cp icons/512x512.png icon.png
convert icons/16x16.png icons/32x32.png icons/48x48.png icons/64x64.png icons/128x128.png icons/256x256.png icon.ico
png2icns icon.icns icons/16x16.png icons/32x32.png icons/48x48.png icons/128x128.png icons/256x256.png icons/512x512.png icons/1024x1024.png
