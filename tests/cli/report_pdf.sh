#!/bin/sh
# The PDF report of the GARCH demo turns into A4 pages with pdftoppm; no page
# is blank, the chart pages hold strongly coloured pixels, and the text holds
# every section and the caution.
top=$(pwd)
if ! command -v pdftoppm > /dev/null; then
  [ -n "$CI" ] && { echo "pdftoppm missing in CI (tools/install-deps.sh installs poppler-utils)"; exit 1; }
  echo "pdftoppm not installed (Debian package poppler-utils)"
  exit 77
fi
/usr/bin/python3 -c 'import numpy' 2>/dev/null || { echo "python3-numpy not installed"; exit 77; }
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/demo-data/grain-index-returns.csv" "$tmp/" || exit 1
cd "$tmp" || exit 1
"$HONE" -c 'load grain-index-returns.csv; fit ar(1); check; fit ar(1)+garch(1,1) t; check; note t innovations for the tails; report r.pdf h=20' \
  > run.out 2>&1 || { cat run.out; echo "the session failed"; exit 1; }
grep -q "wrote PDF report r.pdf: 2 models, 9 charts, 1 note" run.out || { cat run.out; exit 1; }
head -c 5 r.pdf | grep -q '%PDF-' || { echo "not a PDF"; exit 1; }
pdftoppm -r 50 r.pdf page || { echo "pdftoppm failed"; exit 1; }
pages=$(ls page-*.ppm 2>/dev/null | wc -l)
[ "$pages" -ge 3 ] || { echo "$pages pages, want at least 3"; exit 1; }
charts=0
for p in page-*.ppm; do
  # A4 at 50 dpi: 595 x 842 points -> 414 x 585 pixels
  out=$(/usr/bin/python3 "$top/tests/cli/imgcheck.py" "$p" 414 585 0) || { echo "$out"; exit 1; }
  echo "$out"
  n=$(printf '%s\n' "$out" | sed -n 's/.*coloured pixels \([0-9]*\)$/\1/p')
  [ "${n:-0}" -ge 2000 ] && charts=$((charts + 1))
done
[ $charts -ge 2 ] || { echo "only $charts pages with charts drawn"; exit 1; }
if command -v pdftotext > /dev/null; then
  pdftotext r.pdf r.txt
  for words in "Data and provenance" "Models tried" "Final model" "Residual checks" "alpha1" "beta1" \
               "t innovations for the tails" "Method notes" "Limitations" "model-risk policy"; do
    grep -q "$words" r.txt || { echo "the PDF text lacks '$words'"; exit 1; }
  done
fi
exit 0
