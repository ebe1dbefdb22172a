#!/bin/sh
# Run every test layer and end with one line "N passed, N failed, N skipped".
#   unit:        $BUILD/tests/test_*      (cmocka; each test case counts once)
#   transcripts: tests/transcripts/*.hone (command files; exact output and exit code)
#   cli:         tests/cli/*.sh           (exit 0 pass, 77 skip, other fail)
# HONE_REFERENCE_DIR defaults to ../shared/reference beside the checkout.
top=$(cd "$(dirname "$0")/.." && pwd)
: "${BUILD:=build}"
: "${HONE:=$top/hone}"
: "${HONE_REFERENCE_DIR:=$top/../shared/reference}"
export HONE HONE_REFERENCE_DIR
export HONE_HISTORY=/dev/null LC_ALL=C NO_COLOR=1
pass=0; fail=0; skip=0; failed=""
log=$(mktemp); trap 'rm -f "$log"' EXIT

for t in "$top/$BUILD"/tests/test_*; do
  [ -x "$t" ] || continue
  name=$(basename "$t")
  ( cd "$top" && CMOCKA_MESSAGE_OUTPUT=STDOUT "$t" ) >"$log" 2>&1
  rc=$?
  p=$(sed -n 's/^\[  PASSED  \] \([0-9]*\) test.*/\1/p' "$log" | tail -n 1)
  f=$(sed -n 's/^\[  FAILED  \] \([0-9]*\) test.*/\1/p' "$log" | tail -n 1)
  s=$(grep -c '^\[  SKIPPED \] [a-z_]' "$log")
  : "${p:=0}" "${f:=0}"
  if [ "$rc" -ne 0 ] && [ "$f" -eq 0 ]; then f=1; fi   # crashed before its summary
  p=$((p - s)); [ $p -lt 0 ] && p=0
  pass=$((pass + p)); fail=$((fail + f)); skip=$((skip + s))
  if [ "$f" -ne 0 ]; then failed="$failed $name"; echo "--- $name"; cat "$log"; fi
  grep '^\[  SKIPPED \] [a-z_]' "$log" | sed "s/^/$name: /"
  grep '^skip: ' "$log" | sed "s/^/$name: /"
done

for cf in "$top"/tests/transcripts/*.hone; do
  [ -f "$cf" ] || continue
  base=${cf%.hone}; name=$(basename "$base")
  want_rc=0; [ -f "$base.rc" ] && want_rc=$(cat "$base.rc")
  ( cd "$top/tests/transcripts" && "$HONE" "$(basename "$cf")" ) >"$log" 2>&1
  rc=$?
  if [ "$rc" -eq "$want_rc" ] && cmp -s "$log" "$base.expect"; then
    pass=$((pass + 1))
  else
    fail=$((fail + 1)); failed="$failed $name"
    echo "--- transcript $name: exit $rc (want $want_rc)"
    diff "$base.expect" "$log" | head -n 40
  fi
done

for sc in "$top"/tests/cli/*.sh; do
  [ -f "$sc" ] || continue
  name=$(basename "$sc" .sh)
  ( cd "$top" && sh "$sc" ) >"$log" 2>&1
  rc=$?
  case $rc in
    0) pass=$((pass + 1)) ;;
    77) skip=$((skip + 1)); echo "$name: skipped: $(tail -n 1 "$log")" ;;
    *) fail=$((fail + 1)); failed="$failed $name"; echo "--- cli $name (exit $rc)"; tail -n 40 "$log" ;;
  esac
done

[ -n "$failed" ] && echo "failed:$failed"
echo "$pass passed, $fail failed, $skip skipped"
[ "$fail" -eq 0 ]
