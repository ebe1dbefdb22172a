#!/bin/sh
# A recording session (hone --record J FILE) killed with SIGKILL at several
# points: every command that had finished before the kill - seen on standard
# output, where the next command's echo appears only after the previous
# entry was written and synced - is in the journal as a closed entry, in
# order, and the journal replays with every finished entry reproduced.
: "${HONE:=./hone}"
top=$(pwd)
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/tests/data/wn200.csv" "$tmp/wn.csv" || exit 1
cd "$tmp" || exit 1
{
  echo "load wn.csv"
  i=0
  while [ $i -lt 300 ]; do
    echo "fit arma(1,1)"; echo "check"; echo "note round $i"; echo "models"
    i=$((i + 1))
  done
} > long.hone

for wait_entries in 3 40 200; do
  rm -f j.txt out.txt
  "$HONE" --record j.txt long.hone > out.txt 2>&1 &
  pid=$!
  tries=0
  while :; do
    n=$(grep -c '^\(= ok\|! \)' j.txt 2>/dev/null)
    [ "${n:-0}" -ge $wait_entries ] && break
    tries=$((tries + 1))
    [ $tries -gt 1000 ] && { kill -9 $pid; echo "no progress"; exit 1; }
    sleep 0.01
  done
  kill -9 $pid 2>/dev/null || { echo "the session ended before the kill"; exit 1; }
  wait $pid 2>/dev/null

  echoed=$(grep -c '^> ' out.txt)
  finished=$((echoed - 1))            # the last echoed command may have been cut
  closed=$(grep -c '^\(= ok\|! \)' j.txt)
  [ "$closed" -ge "$finished" ] || { echo "kill after $wait_entries: $finished commands finished, only $closed entries closed"; exit 1; }
  # the journal's commands are the file's commands, in order
  grep '^> ' j.txt | sed 's/^> //' | head -n "$closed" > got.txt
  grep -v '^#' long.hone | head -n "$closed" > want.txt
  cmp -s got.txt want.txt || { echo "kill after $wait_entries: journal commands differ from the file's"; diff want.txt got.txt | head; exit 1; }
  grep -q '^ended ' j.txt && { echo "a killed session wrote its ended line"; exit 1; }

  out=$("$HONE" -c 'replay j.txt verify' 2>&1) || { echo "replay of the killed journal failed:"; printf '%s\n' "$out" | tail -n 5; exit 1; }
  printf '%s\n' "$out" | grep -q "all $closed commands reproduced" ||
    { echo "want all $closed closed entries reproduced:"; printf '%s\n' "$out" | tail -n 5; exit 1; }
  echo "killed after $closed entries ($finished commands seen finished): all in the journal and reproduced"
done
