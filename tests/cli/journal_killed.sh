#!/bin/sh
# A session killed with SIGKILL part-way through a long command file leaves a
# journal whose finished entries replay and verify.
top=$(pwd)
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/demo-data/bakery-orders.csv" "$tmp/" || exit 1
cd "$tmp" || exit 1
{
  echo "load bakery-orders.csv"
  i=0
  while [ $i -lt 400 ]; do
    echo "fit arma(2,1)"; echo "check"; echo "use 1"
    i=$((i + 1))
  done
} > long.hone
"$HONE" --record j.txt long.hone > /dev/null 2>&1 &
pid=$!
tries=0
while :; do
  done_n=$(grep -c '^= ok' j.txt 2>/dev/null)
  [ "${done_n:-0}" -ge 6 ] && break
  tries=$((tries + 1))
  [ $tries -gt 600 ] && { kill -9 $pid 2>/dev/null; echo "the session made no progress"; exit 1; }
  sleep 0.05
done
kill -9 $pid 2>/dev/null || { echo "the session ended before it could be killed"; exit 1; }
wait $pid 2>/dev/null
grep -q '^ended ' j.txt && { echo "a killed session wrote its ended line"; exit 1; }
complete=$(grep -c '^\(= ok\|! \)' j.txt)
out=$("$HONE" -c 'replay j.txt verify' 2>&1)
rc=$?
printf '%s\n' "$out"
[ $rc -eq 0 ] || { echo "verify of the killed session's journal failed"; exit 1; }
printf '%s\n' "$out" | grep -q "all $complete commands reproduced" || { echo "want all $complete complete entries reproduced"; exit 1; }
# Either the kill fell between entries or inside one; both are reported.
printf '%s\n' "$out" | grep -q "is incomplete\|no 'ended' line" || { echo "the cut is not reported"; exit 1; }

# Cut inside an entry on purpose: the last entry is reported incomplete.
last=$(grep -n '^> check' j.txt | tail -n 1 | cut -d: -f1)
head -n $((last + 3)) j.txt > cut.txt
complete=$(grep -c '^\(= ok\|! \)' cut.txt)
out=$("$HONE" -c 'replay cut.txt verify' 2>&1)
rc=$?
printf '%s\n' "$out"
[ $rc -eq 0 ] || { echo "verify of the cut journal failed"; exit 1; }
printf '%s\n' "$out" | grep -q "all $complete commands reproduced" || { echo "want $complete reproduced"; exit 1; }
printf '%s\n' "$out" | grep -q "last entry (journal line $last, 'check') is incomplete" || { echo "incomplete entry not named"; exit 1; }
exit 0
