#!/bin/sh
# hone does not link cairo: it loads the library when a report first needs
# it.  Without it (HONE_CAIRO names a library that is not there, or one
# that is not cairo), fitting and checking still work, the report command
# fails with an error that names cairo and the reason, and no file is left;
# with it, the same session writes the report.
top=$(pwd)
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/demo-data/bakery-orders.csv" "$tmp/" || exit 1
cd "$tmp" || exit 1
ldd "$HONE" 2>/dev/null | grep -q libcairo && { echo "hone is linked against cairo"; exit 1; }
for lib in /nonexistent/libcairo.so.2 libm.so.6; do
  HONE_CAIRO=$lib "$HONE" -c 'load bakery-orders.csv; fit ar(1); check; report r.html' > run.out 2>&1
  rc=$?
  [ $rc -eq 1 ] || { cat run.out; echo "exit $rc without cairo ($lib), want 1"; exit 1; }
  grep -q "verdict" run.out || { cat run.out; echo "the check did not run without cairo"; exit 1; }
  grep -q "error: drawing needs the cairo library" run.out || { cat run.out; echo "no cairo error ($lib)"; exit 1; }
  [ -e r.html ] && { echo "a report was left behind without cairo"; exit 1; }
  ls -A | grep -v -e '^run.out$' -e '^bakery-orders.csv$' && { echo "stray files"; exit 1; }
done
"$HONE" -c 'load bakery-orders.csv; fit ar(1); check; report r.html' > run.out 2>&1 || { cat run.out; exit 1; }
grep -q "<svg" r.html || { echo "the report with cairo has no chart"; exit 1; }
exit 0
