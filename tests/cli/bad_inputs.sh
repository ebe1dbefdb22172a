#!/bin/sh
# The bad-input table: each line runs hone once and names the exit code and a
# piece of text that its output (standard output and error together) must
# contain.  Data files are in tests/data/bad/.  Columns, split at '|':
#   exit code | expected text | arguments (shell words)
# Run from the top of the tree with $HONE naming the program.
: "${HONE:=./hone}"
B=tests/data/bad
tmp=$(mktemp -d); trap 'chmod -R u+rwx "$tmp"; rm -rf "$tmp"' EXIT
pass=0; fail=0; skipped=0

run_case() {   # RC TEXT ARGS...
  want_rc=$1; want=$2; shift 2
  out=$("$HONE" "$@" 2>&1 </dev/null)
  rc=$?
  if [ "$rc" -eq "$want_rc" ] && printf '%s' "$out" | grep -qF -- "$want"; then
    pass=$((pass + 1))
  else
    fail=$((fail + 1))
    echo "FAIL: hone $*"
    echo "  want exit $want_rc and text: $want"
    echo "  got exit $rc:"; printf '%s\n' "$out" | head -n 6 | sed 's/^/    /'
  fi
}

while IFS='|' read -r rc text args; do
  case $rc in ''|\#*) continue ;; esac
  eval "set -- $args"
  run_case "$rc" "$text" "$@"
done <<EOF
# --- data files -------------------------------------------------------------
1|the file is empty|-c "load $B/empty.csv"
1|has a header row but no data rows|-c "load $B/header_only.csv"
1|non_numeric.csv:4:1: column 1 'value': 'abc' is not a number|-c "load $B/non_numeric.csv"
1|a decimal comma is not accepted|-c "load $B/decimal_comma.csv column=value"
1|'NaN' is not accepted: values must be finite numbers|-c "load $B/nan_text.csv"
1|'Inf' is not accepted|-c "load $B/inf_text.csv"
1|'-infinity' is not accepted|-c "load $B/neg_infinity.csv"
1|'1e999' is beyond the range of a double|-c "load $B/overflow_1e999.csv"
1|'0x1p3' is not a number|-c "load $B/hex_float.csv column=value"
0|loaded 200 values of 'value'|-c "load $B/huge_1e308.csv"
1|whose squares could overflow in the likelihood; rescale it|-c "load $B/huge_1e308.csv; fit arma(0,0)"
0|mean 2.13654e+306   sd 7.78934e+307|-c "load $B/huge_1e308.csv; series"
0|note: the column is constant; models cannot be fitted to it|-c "load $B/constant.csv"
1|cannot fit arma(0,0): the data are constant|-c "load $B/constant.csv; fit arma(0,0)"
1|ar(1) needs at least 11 observations; the working series has 3|-c "load $B/three_rows.csv; fit ar(1)"
1|time 2024-01-02 repeats the time on line 3|-c "load $B/duplicate_dates.csv"
1|rows must be in increasing time order|-c "load $B/unsorted_dates.csv"
1|'2024-13-02' is month 13 is out of range|-c "load $B/bad_date.csv"
1|no value column 'nosuch'; the columns are: date, (empty), value|-c "load $B/missing_name.csv column=nosuch"
0|loaded 2 values of 'value'|-c "load $B/missing_name.csv"
1|ragged.csv:3: this row has 1 field but the header row has 2|-c "load $B/ragged.csv"
1|choose a missing-value policy (drop, previous or interpolate)|-c "load $B/missing_cell.csv"
1|the line is longer than 1048576 bytes (the limit)|-c "load $B/long_line.csv"
1|binary.csv:2: this row has 2 fields but the header row has 1|-c "load $B/binary.csv"
1|nul_byte.csv:3:1: column 1 'value'|-c "load $B/nul_byte.csv"
0|loaded 4 values of 'value'|-c "load $B/bom_crlf.csv"
0|loaded 3 values of 'the value'|-c "load $B/quoted.csv"
1|a quote opened in the first line is never closed|-c "load $B/unterminated_quote.csv"
0|loaded 3 values of 'value'|-c "load $B/no_final_newline.csv"
1|tests/data/bad: is a directory, not a CSV file|-c "load $B"
1|nope.csv: cannot open: No such file or directory|-c "load $B/nope.csv"
# --- command lines ----------------------------------------------------------
1|unknown command 'frobnicate'|-c "frobnicate"
1|unknown option 'foo' for fit (accepted: dist=, mean=)|-c "load tests/data/wn200.csv; fit ar(1) foo=1"
1|model 'arma(1': expected ',' between the AR and MA orders (at character 7)|-c "load tests/data/wn200.csv; fit arma(1"
1|order or lag too large (the largest accepted is 400)|-c "load tests/data/wn200.csv; fit ar(401)"
1|more than 32 lags of one kind|-c "load tests/data/wn200.csv; fit ar[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17,18,19,20,21,22,23,24,25,26,27,28,29,30,31,32,33]"
1|no series loaded (use 'load FILE column=NAME')|-c "fit ar(1)"
1|log needs positive values: value 1 of the working series is -0.21516943817182174|-c "load tests/data/wn200.csv; transform log"
1|-c:1: error: unterminated quote|-c 'fit "ar(1)'
1|cannot simulate ar(1): value outside its domain|-c "simulate ar(1) n=10 seed=1 set=mu:0,ar1:0.5,sigma2:-1"
1|the path exploded: is the AR part stationary?|-c "simulate ar(1) n=2000 seed=1 set=mu:0,ar1:1.5,sigma2:1"
1|simulate needs n=N, a whole number from 2 to 10000000|-c "simulate ar(1) n=20000000 seed=1 set=mu:0,ar1:0.5,sigma2:1"
1|the last time stamp would be 10000-12-13, beyond what load reads (years up to 9999)|-c "simulate ar(1) n=4000 seed=1 set=mu:0,ar1:0.5,sigma2:1 start=9990-01-01 file=$tmp/late.csv"
1|the horizon must be a whole number of steps from 1 to 10000|-c "load tests/data/wn200.csv; fit ar(1); forecast 100000000"
1|lags= takes a whole number from 1 to 400|-c "load tests/data/wn200.csv; fit ar(1); check lags=1000000000"
0|not computed: needs at least 2 blocks|-c "load tests/data/wn200.csv; fit ar(1); check window=1000000000"
1|GB of working memory for 8000000 observations, above the limit of 4.3 GB|-c "simulate arma(0,0) n=8000000 seed=1 set=mu:0,sigma2:1; fit ar[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17,18,19,20,21,22,23,24,25,26,27,28,29,30,31,32]+ma[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17,18,19,20,21,22,23,24,25,26,27,28,29,30,31,32]+garch(1,1)"
1|cannot read journal tests/data/bad/nope.journal: No such file or directory|-c "replay $B/nope.journal"
0|is incomplete: the recording ended while writing it, so it was not replayed|-c "replay $B/truncated.journal verify"
# --- command files ----------------------------------------------------------
1|tests/data/bad/line7.hone:7: error: unterminated quote|$B/line7.hone
1|two_errors.hone:1: error: no series loaded|$B/two_errors.hone
1|two_errors.hone:3: error: model 'arma(9'|--keep-going $B/two_errors.hone
1|binary.hone:1: error: unknown command|$B/binary.hone
1|long_line.hone:1: error: line of 1048587 bytes is longer than the limit of 1048576 bytes|$B/long_line.hone
1|shell_escape.hone:3: error: unknown command '!ls'|$B/shell_escape.hone
1|tests/data: error: read failed: Is a directory|tests/data
2|No such file or directory|$B/nope.hone
# --- program options --------------------------------------------------------
2|hone: unknown option '--bogus'|--bogus
2|hone: -c needs an argument|-c
2|hone: -f needs an argument|-f
2|hone: more than one command file given|a.hone b.hone
2|hone: give either a command file or -c, not both|-c help $B/line7.hone
2|hone: cannot write journal /nonexistent-dir/j|--record /nonexistent-dir/j -c help
2|is not a hone journal; refusing to overwrite it|--record $B/three_rows.csv -c help
EOF

# --keep-going runs the commands after an error: the last fit of two_errors.hone
# must appear (model 1), and the exit code still says that something failed.
out=$("$HONE" --keep-going "$B/two_errors.hone" 2>&1); rc=$?
if [ $rc -eq 1 ] && printf '%s' "$out" | grep -q '^model 1  ar(1)'; then pass=$((pass + 1)); else
  fail=$((fail + 1)); echo "FAIL: --keep-going did not run on (exit $rc)"; fi
# ... and without it the first error stops the file: no model is fitted.
out=$("$HONE" "$B/two_errors.hone" 2>&1); rc=$?
if [ $rc -eq 1 ] && ! printf '%s' "$out" | grep -q '^model 1'; then pass=$((pass + 1)); else
  fail=$((fail + 1)); echo "FAIL: the first error did not stop the file (exit $rc)"; fi
# -c with nothing to run is a usage error, so a script notices the empty argument.
out=$("$HONE" -c '' 2>&1); rc=$?
if [ $rc -eq 2 ] && printf '%s' "$out" | grep -q 'no commands'; then pass=$((pass + 1)); else
  fail=$((fail + 1)); echo "FAIL: hone -c '' gave exit $rc: $out"; fi

# An unreadable file.  Permission bits do not stop root, so there the case is
# skipped.
cp "$B/quoted.csv" "$tmp/locked.csv"; chmod 000 "$tmp/locked.csv"
if [ -r "$tmp/locked.csv" ]; then
  skipped=$((skipped + 1)); echo "note: unreadable-file case skipped (running as root)"
else
  run_case 1 "locked.csv: cannot open: Permission denied" -c "load $tmp/locked.csv"
fi

echo "bad inputs: $pass passed, $fail failed, $skipped skipped"
[ $fail -eq 0 ]
