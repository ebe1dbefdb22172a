#!/bin/sh
# The HTML report of a demo session is self-contained, and rendered headless by
# chromium its charts draw: the screenshot has the asked size, is not blank and
# holds many strongly coloured pixels (lines, bars, bands).
top=$(pwd)
browser=$(command -v chromium || command -v chromium-browser)
if [ -z "$browser" ]; then
  [ -n "$CI" ] && { echo "chromium missing in CI (tools/install-deps.sh installs it)"; exit 1; }
  echo "chromium not installed (Debian package chromium; tools/install-deps.sh installs it)"
  exit 77
fi
/usr/bin/python3 -c 'import numpy' 2>/dev/null || { echo "python3-numpy not installed"; exit 77; }
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/demo-data/bakery-orders.csv" "$tmp/" || exit 1
cd "$tmp" || exit 1
"$HONE" -c 'load bakery-orders.csv; fit ar(1); check; note lag 7 sticks out; fit ar[1,7]; check; forecast 14; report r.html' \
  > run.out 2>&1 || { cat run.out; echo "the session failed"; exit 1; }
grep -q "wrote HTML report r.html: 2 models, 9 charts, 1 note" run.out || { cat run.out; exit 1; }
svgs=$(grep -o '<svg' r.html | wc -l)
[ "$svgs" -eq 9 ] || { echo "$svgs inline SVG charts, want 9"; exit 1; }
if grep -qi '<script\|<link\|<img\|src="http\|href="http\|url(http\|@import' r.html; then
  echo "the report refers to something outside itself"; exit 1
fi
for words in "Data and provenance" "Models tried" "Final model" "Residual checks" "lag 7 sticks out" \
             "Method notes" "Limitations" "model-risk policy"; do
  grep -q "$words" r.html || { echo "the report lacks '$words'"; exit 1; }
done
prof=$(mktemp -d)
timeout 120 "$browser" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
  --disable-background-networking --disable-component-update --disable-sync --user-data-dir="$prof" \
  --screenshot="$tmp/shot.png" --window-size=1200,3000 "file://$tmp/r.html" > chromium.log 2>&1
rm -rf "$prof"
[ -s shot.png ] || { tail -n 5 chromium.log; echo "no screenshot"; exit 1; }
/usr/bin/python3 "$top/tests/cli/imgcheck.py" shot.png 1200 3000 20000
