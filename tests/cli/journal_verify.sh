#!/bin/sh
# A recorded demo session replays with verify and every command reproduces;
# a changed byte in the recorded output is found at its journal line.
top=$(pwd)
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/demo-data/bakery-orders.csv" "$tmp/" || exit 1
cd "$tmp" || exit 1
cat > session.hone <<'CMDS'
load bakery-orders.csv
series
fit ar(1)
check
note the weekly lag is still in the residuals
fit ar[1,7]
check
models
plot acf width=60 height=12
forecast 7
save resid resid.csv
report report.html
set alpha 0.01
check
fit nonsense(1)
CMDS
"$HONE" --keep-going --record j.txt session.hone > run.out 2>&1
[ $? -eq 1 ] || { echo "the session should end with exit 1 (one bad command)"; cat run.out; exit 1; }
n=$(grep -c '^> ' j.txt)
[ "$n" -eq 15 ] || { echo "journal holds $n commands, want 15"; exit 1; }
grep -q '^input     sha256=[0-9a-f]\{64\} bytes=16730 path=bakery-orders.csv$' j.txt ||
  { echo "no input line with the SHA-256"; head -n 12 j.txt; exit 1; }
grep -q '^ended ' j.txt || { echo "no ended line"; exit 1; }
grep -q '^! ' j.txt || { echo "the failed command is not recorded as an error"; exit 1; }

out=$("$HONE" -c 'replay j.txt verify' 2>&1)
rc=$?
printf '%s\n' "$out"
[ $rc -eq 0 ] || { echo "verify failed (exit $rc)"; exit 1; }
printf '%s\n' "$out" | grep -q "verified j.txt: all 15 commands reproduced" || { echo "no 'all 15 reproduced'"; exit 1; }

# One byte of a recorded output changed: verify names the line.
line=$(grep -n '^| loaded 730' j.txt | cut -d: -f1)
sed 's/^| loaded 730 values/| loaded 731 values/' j.txt > j2.txt
out=$("$HONE" -c 'replay j2.txt verify' 2>&1)
rc=$?
printf '%s\n' "$out"
[ $rc -ne 0 ] || { echo "verify of an edited journal passed"; exit 1; }
printf '%s\n' "$out" | grep -q "differs at command 1 of 15" || { echo "difference not placed at command 1"; exit 1; }
printf '%s\n' "$out" | grep -q "journal line $line: *| loaded 731" || { echo "difference not at line $line"; exit 1; }

# A journal saved with CRLF line ends (a reviewer's editor) still verifies.
sed 's/$/\r/' j.txt > jcrlf.txt
out=$("$HONE" -c 'replay jcrlf.txt verify' 2>&1) || { printf '%s\n' "$out"; echo "CRLF journal did not verify"; exit 1; }
printf '%s\n' "$out" | grep -q "all 15 commands reproduced" || { printf '%s\n' "$out"; exit 1; }

# A plain replay leaves the session in the recorded state, notes included.
out=$("$HONE" -c 'replay j.txt; models; note' 2>/dev/null)
printf '%s\n' "$out" | grep -q "every output matched the journal" || { echo "plain replay did not match"; exit 1; }
printf '%s\n' "$out" | grep -q '^ \* *2  ar\[1,7\]' || { echo "replayed session lacks the current model 2"; exit 1; }
printf '%s\n' "$out" | grep -q '^   1  (model 1)  the weekly lag is still in the residuals$' || { echo "replayed session lacks the note"; exit 1; }

# record FILE / record off at the prompt: only the commands in between are kept.
out=$("$HONE" -c 'record k.txt; record; load bakery-orders.csv; fit ar(2); record off; fit ar(3); replay k.txt verify' 2>&1) ||
  { printf '%s\n' "$out"; echo "record/replay at the prompt failed"; exit 1; }
printf '%s\n' "$out" | grep -q "recording to k.txt" || { echo "record did not say where"; exit 1; }
[ "$(grep -c '^> ' k.txt)" -eq 2 ] || { cat k.txt; echo "want 2 recorded commands (load, fit ar(2))"; exit 1; }
grep -q '^> record' k.txt && { echo "record commands were recorded"; exit 1; }
printf '%s\n' "$out" | grep -q "verified k.txt: all 2 commands reproduced" || { printf '%s\n' "$out"; exit 1; }
"$HONE" -c 'record off' > /dev/null 2>&1 && { echo "record off without a journal succeeded"; exit 1; }
exit 0
