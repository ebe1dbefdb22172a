#!/bin/sh
# Editing one byte of an input file makes replay refuse before any command
# runs, showing both SHA-256 values.
top=$(pwd)
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/demo-data/bakery-orders.csv" "$tmp/" || exit 1
cd "$tmp" || exit 1
"$HONE" --record j.txt -c 'load bakery-orders.csv; fit ar(1); save resid r.csv' > /dev/null 2>&1 ||
  { echo "recording failed"; exit 1; }
old=$(sed -n 's/^input     sha256=\([0-9a-f]*\) .*/\1/p' j.txt)
[ ${#old} -eq 64 ] || { echo "no input hash in the journal"; exit 1; }
rm -f r.csv
# change one digit of the first value (same size, different content)
sed '2s/389\.5/389.6/' bakery-orders.csv > b.csv && mv b.csv bakery-orders.csv
new=$(sha256sum bakery-orders.csv | cut -d' ' -f1)
[ "$new" != "$old" ] || { echo "the edit did not change the file"; exit 1; }
for mode in "" " verify"; do
  out=$("$HONE" -c "replay j.txt$mode" 2>&1)
  rc=$?
  printf '%s\n' "$out"
  [ $rc -ne 0 ] || { echo "replay$mode ran on a changed input"; exit 1; }
  printf '%s\n' "$out" | grep -q "bakery-orders.csv (journal line [0-9]*) has changed" || { echo "no change report"; exit 1; }
  printf '%s\n' "$out" | grep -q "journal sha256 $old  16730 bytes" || { echo "recorded hash not shown"; exit 1; }
  printf '%s\n' "$out" | grep -q "now     sha256 $new  16730 bytes" || { echo "new hash not shown"; exit 1; }
  printf '%s\n' "$out" | grep -q "nothing replayed" || { echo "no 'nothing replayed'"; exit 1; }
  printf '%s\n' "$out" | grep -q "^> load" && { echo "a command ran"; exit 1; }
  [ ! -e r.csv ] || { echo "save resid ran: r.csv exists"; exit 1; }
done
exit 0
