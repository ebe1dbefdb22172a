#!/bin/sh
# hone batch: one JSON line per series in input order, the same whatever the
# thread count, the same as a session per series, a failed series reported
# in its line with the others carried on, and the same work sharded across
# processes with GNU parallel giving the same lines as one batch run.
top=$(cd "$(dirname "$0")/../.." && pwd)
H=${HONE:-$top/hone}
cd "$top" || exit 1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail() { echo "batch: $*"; exit 1; }

d=tests/data
# checks_series.csv holds two columns (arch, walk); short.csv is too short to fit
files="$d/checks_series.csv $d/wn200.csv $d/ar1_120.csv $d/t5_211.csv $d/short.csv"
cmds='fit ar(1); check; advise'

"$H" batch --threads 1 --commands "$cmds" $files >"$tmp/one" 2>"$tmp/err"
rc=$?
[ "$rc" -eq 1 ] || fail "exit code $rc with a failing series, want 1"
[ ! -s "$tmp/err" ] || fail "standard error not empty off a terminal: $(cat "$tmp/err")"
[ "$(wc -l <"$tmp/one")" -eq 6 ] || fail "want 6 lines (5 files, one with 2 columns), got $(wc -l <"$tmp/one")"
sed -n 's/^{"series":"\([^"]*\)".*/\1/p' "$tmp/one" >"$tmp/names"
printf '%s\n' "$d/checks_series.csv:arch" "$d/checks_series.csv:walk" "$d/wn200.csv:x" \
    "$d/ar1_120.csv:x" "$d/t5_211.csv:x" "$d/short.csv:value" >"$tmp/want"
cmp -s "$tmp/names" "$tmp/want" || fail "series order: $(tr '\n' ' ' <"$tmp/names")"
[ "$(grep -c '"ok":false' "$tmp/one")" -eq 1 ] || fail "want exactly one failed series"
sed -n 6p "$tmp/one" | grep -q '"ok":false,"failed_command":"fit"' || fail "short.csv should fail at fit"
sed -n 5p "$tmp/one" | grep -q '"ok":true' || fail "the series before the failure should pass"

# the thread count changes nothing
"$H" batch --threads 2 --commands "$cmds" $files >"$tmp/two"
cmp -s "$tmp/one" "$tmp/two" || fail "2 threads differ from 1 thread"

# a batch line holds what a session of its own prints with --json
"$H" --json -c "load \"$d/wn200.csv\" column=\"x\"; $cmds" | paste -sd, - >"$tmp/session"
sed -n 3p "$tmp/one" | sed 's/^.*"commands":\[//; s/\]}$//' >"$tmp/line"
cmp -s "$tmp/session" "$tmp/line" || fail "the wn200 line differs from its own --json session"

# all succeed: exit 0
"$H" batch --commands 'fit arma(0,0)' $d/wn200.csv >/dev/null || fail "exit code $? when every series passed"
# usage errors: exit 2
"$H" batch $d/wn200.csv >/dev/null 2>&1
[ $? -eq 2 ] || fail "no commands should be a usage error (exit 2)"
"$H" batch --commands 'record j.txt' $d/wn200.csv | grep -q '"error":"'"'"'record'"'"' is not available' ||
    fail "record should be refused in a batch"

if ! command -v parallel >/dev/null 2>&1; then
    echo "GNU parallel is not installed (Debian package parallel): sharding across processes not checked"
    exit 77
fi
# one process per file, output kept in input order (-k)
parallel -q -k --will-cite "$H" batch --threads 1 --commands "$cmds" {} ::: $files >"$tmp/by_file"
cmp -s "$tmp/one" "$tmp/by_file" || fail "one process per file (GNU parallel) differs from one batch run"
# the series list cut into 4 contiguous shards
parallel -q -k --will-cite "$H" batch --threads 1 --shard {}/4 --commands "$cmds" $files ::: 1 2 3 4 \
    >"$tmp/by_shard"
cmp -s "$tmp/one" "$tmp/by_shard" || fail "4 shards (GNU parallel) differ from one batch run"
exit 0
