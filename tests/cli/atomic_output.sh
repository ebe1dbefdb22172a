#!/bin/sh
# Output files are written whole or not at all: a command that fails leaves
# an existing file byte for byte as it was and no temporary file behind; a
# process killed while writing leaves either the old file or the complete
# new one.  Also: nothing in the program can start another program, so a
# command file cannot reach beyond its job.
: "${HONE:=./hone}"
top=$(pwd)
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
fail=0
bad() { echo "FAIL: $*"; fail=1; }

printf 'date,value\n2024-01-01,1\n2024-01-02,2\n' > "$tmp/existing.csv"
cp "$tmp/existing.csv" "$tmp/orig.csv"
unchanged() {   # CASE
  cmp -s "$tmp/existing.csv" "$tmp/orig.csv" || bad "$1: existing.csv was changed"
  ls "$tmp" | grep -q '\.tmp-' && { bad "$1: a temporary file was left: $(ls "$tmp")"; rm -f "$tmp"/*.tmp-*; }
}
expect_fail() {   # CASE COMMANDS
  ( cd "$tmp" && "$HONE" -c "$2" ) > "$tmp/out.txt" 2>&1 && bad "$1: the command did not fail"
  rm -f "$tmp/out.txt"
  unchanged "$1"
}

cp "$top/tests/data/wn200.csv" "$tmp/wn.csv"
expect_fail "simulate, bad parameter" "simulate ar(1) n=50 seed=1 set=mu:0,ar1:0.5,sigma2:-1 file=existing.csv"
expect_fail "simulate, path explodes" "simulate ar(1) n=3000 seed=1 set=mu:0,ar1:1.5,sigma2:1 file=existing.csv"
expect_fail "simulate, unknown option" "simulate ar(1) n=50 seed=1 set=mu:0,ar1:0.5,sigma2:1 file=existing.csv colour=red"
expect_fail "save before any fit" "load wn.csv; save resid existing.csv"
expect_fail "save forecast without a forecast" "load wn.csv; fit ar(1); save forecast existing.csv banana"
expect_fail "report before any load" "report existing.csv"

# A directory in the way of the output is refused, not replaced.
mkdir "$tmp/adir"
( cd "$tmp" && "$HONE" -c "simulate ar(1) n=50 seed=1 set=mu:0,ar1:0.5,sigma2:1 file=adir" ) > "$tmp/out.txt" 2>&1 &&
  bad "writing over a directory did not fail"
[ -d "$tmp/adir" ] || bad "the directory was replaced"
rm -f "$tmp/out.txt"

# A good command replaces the file whole.
( cd "$tmp" && "$HONE" -c "simulate ar(1) n=50 seed=1 set=mu:0,ar1:0.5,sigma2:1 file=existing.csv" ) >/dev/null 2>&1 ||
  bad "a valid simulate failed"
[ "$(wc -l < "$tmp/existing.csv")" -eq 51 ] || bad "the new file does not have 1 + 50 lines"
cp "$tmp/existing.csv" "$tmp/orig.csv"

# Killed while writing a large file: old or new, never a part.
( cd "$tmp" && exec "$HONE" -c "simulate ar(1) n=3000000 seed=2 set=mu:0,ar1:0.5,sigma2:1 freq=hourly file=existing.csv" ) >/dev/null 2>&1 &
pid=$!
i=0
# kill as soon as writing has begun: bytes in a temporary file, or the
# target itself changed (a writer that is not atomic)
until [ -n "$(find "$tmp" -name 'existing.csv.tmp-*' -size +0 2>/dev/null)" ] ||
      ! cmp -s "$tmp/existing.csv" "$tmp/orig.csv" || [ $i -ge 400 ]; do
  sleep 0.02; i=$((i + 1))
done
kill -9 $pid 2>/dev/null || bad "the writer ended before it could be killed"
wait $pid 2>/dev/null
lines=$(wc -l < "$tmp/existing.csv")
if cmp -s "$tmp/existing.csv" "$tmp/orig.csv"; then
  echo "killed while writing: the old file is intact"
elif [ "$lines" -eq 3000001 ]; then
  echo "killed after the rename: the new file is complete"
else
  bad "killed while writing: existing.csv has $lines lines, neither the old file nor the new one"
fi
rm -f "$tmp"/*.tmp-*

# No way out to a shell: the program has no call that starts another program.
if grep -nE '\b(system|popen|execl|execle|execlp|execv|execve|execvp|fork|vfork|posix_spawnp?)[[:space:]]*\(' \
     "$top"/shell/*.c "$top"/fit/*.c "$top"/diagnose/*.c; then
  bad "a call that starts another program is in the sources (above)"
fi
out=$(printf '!echo escaped\n$(echo escaped)\n`echo escaped`\n' | "$HONE" --keep-going 2>&1)
printf '%s' "$out" | grep -qx 'escaped' && bad "a command line reached a shell"

[ $fail -eq 0 ] && echo "atomic output: failed commands leave files untouched; no shell escape"
exit $fail
