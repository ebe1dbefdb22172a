#!/bin/sh
# plot draws every chart at the asked size; ASCII outside UTF-8 locales,
# Unicode blocks in them, colour only on a terminal without NO_COLOR.
top=$(pwd)
csv="$top/demo-data/bakery-orders.csv"
cmds="load $csv; fit ar[1,7]; forecast 10"
for k in series fit resid acf pacf acf2 rolling qq profile forecast; do
  cmds="$cmds; plot $k width=60 height=14"
done
out=$(LC_ALL=C LANG=C NO_COLOR=1 "$HONE" --json -c "$cmds") || { echo "plots failed"; exit 1; }
n=$(printf '%s\n' "$out" | grep '^{"command":"plot"' | grep -c '"ok":true}$')
[ "$n" -eq 10 ] || { printf '%s\n' "$out" | grep '"ok":false'; echo "$n of 10 plots worked"; exit 1; }
text=$(LC_ALL=C LANG=C NO_COLOR=1 "$HONE" -c "$cmds") || exit 1
printf '%s' "$text" | LC_ALL=C grep -q '[^ -~]' && { echo "non-ASCII output in the C locale"; exit 1; }
chart=$(LC_ALL=C LANG=C "$HONE" -c "load $csv; plot series width=50 height=12")
rows=$(printf '%s\n' "$chart" | sed -n '/^> plot/,$p' | tail -n +2 | wc -l)
[ "$rows" -eq 12 ] || { printf '%s\n' "$chart"; echo "$rows lines, want 12"; exit 1; }
wide=$(printf '%s\n' "$chart" | sed -n '/^> plot/,$p' | tail -n +2 | awk '{ if (length($0) > m) m = length($0) } END { print m }')
[ "$wide" -le 50 ] || { echo "lines of $wide columns, want at most 50"; exit 1; }
uni=$(LC_ALL=C.UTF-8 LANG=C.UTF-8 "$HONE" -c "load $csv; fit ar(1); plot acf width=60")
printf '%s' "$uni" | grep -q '█' || { echo "no Unicode blocks in a UTF-8 locale"; exit 1; }
esc=$(printf '\033')
printf '%s' "$uni" | grep -q "$esc" && { echo "colour escapes when stdout is not a terminal"; exit 1; }
if command -v script > /dev/null; then
  # a pseudo-terminal: colour on, unless NO_COLOR
  tty=$(env -u NO_COLOR LC_ALL=C.UTF-8 script -qec "$HONE -c 'load $csv; fit ar(1); plot acf width=60'" /dev/null)
  printf '%s' "$tty" | grep -q "$esc\[" || { echo "no colour on a terminal"; exit 1; }
  tty=$(NO_COLOR=1 LC_ALL=C.UTF-8 script -qec "$HONE -c 'load $csv; fit ar(1); plot acf width=60'" /dev/null)
  printf '%s' "$tty" | grep -q "$esc\[" && { echo "colour on a terminal despite NO_COLOR"; exit 1; }
fi
out=$("$HONE" -c "load $csv; plot resid" 2>&1) && { echo "plot resid without a model succeeded"; exit 1; }
printf '%s\n' "$out" | grep -q "needs a model" || { printf '%s\n' "$out"; exit 1; }
exit 0
