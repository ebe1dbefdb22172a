#!/bin/sh
# Numerical edge cases end in words, never in NaN or an infinity printed as a
# number: each session below runs in text and in JSON mode; the text must
# hold the expected words and no "nan"/"inf" token, and every JSON line must
# parse under a strict reader that refuses NaN and Infinity (Python's json
# module with parse_constant raising).
: "${HONE:=./hone}"
PY=/usr/bin/python3
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
fail=0

# y_t = 0.5 y_{t-1} exactly (halving is exact in binary), and a straight line.
awk 'BEGIN { print "value"; y = 1; for (i = 0; i < 200; i++) { printf "%.17g\n", y; y /= 2 } }' > "$tmp/halving.csv"
awk 'BEGIN { print "value"; for (i = 0; i < 200; i++) printf "%.17g\n", 3 + 0.25 * i }' > "$tmp/line.csv"

case_run() {   # NAME EXPECTED-TEXT EXIT COMMANDS
  out=$("$HONE" -c "$4" 2>&1); rc=$?
  [ $rc -eq "$3" ] || { echo "FAIL $1: exit $rc, want $3"; fail=1; }
  printf '%s\n' "$out" | grep -qF -- "$2" || { echo "FAIL $1: no '$2' in:"; printf '%s\n' "$out" | tail -n 8; fail=1; }
  if printf '%s\n' "$out" | grep -iqE '(^|[^a-z])(nan|inf|infinity)([^a-z]|$)'; then
    echo "FAIL $1: a non-finite number in the text:"; printf '%s\n' "$out" | grep -inE '(^|[^a-z])(nan|inf)([^a-z]|$)' | head -n 5; fail=1
  fi
  if [ -x "$PY" ]; then
    "$HONE" --json -c "$4" 2>/dev/null | "$PY" -c '
import json, sys
def refuse(c):
    raise ValueError("non-finite number " + c)
for line in sys.stdin:
    if line.strip():
        json.loads(line, parse_constant=refuse)
' || { echo "FAIL $1: JSON output is not strict JSON"; fail=1; }
  fi
}

case_run "exactly predictable AR(1): estimate" "ar1                   0.5" 0 \
  "load $tmp/halving.csv; fit ar(1)"
case_run "exactly predictable AR(1): checks of rounding noise" "the residuals are zero to rounding error" 0 \
  "load $tmp/halving.csv; series; fit ar(1); check; forecast 3; advise"
case_run "linear trend" "near a unit root" 0 \
  "load $tmp/line.csv; series; fit ar(1); check; forecast 3"
case_run "near unit root" "within 0.01 of the unit circle" 0 \
  "simulate ar(1) n=300 seed=1 set=mu:0,ar1:0.999,sigma2:1 burn=0; fit ar(1); check; forecast 10"
case_run "values near 1e308" "whose squares could overflow in the likelihood" 1 \
  "load tests/data/bad/huge_1e308.csv; series; fit ar(1)"
case_run "explosive path kept finite" "sd 5.68985e+103" 0 \
  "simulate ar(1) n=100 seed=1 set=mu:0,ar1:1.5,sigma2:1; series; fit ar(1); check"
case_run "explosive path overflowing" "the path exploded" 1 \
  "simulate ar(1) n=2000 seed=1 set=mu:0,ar1:1.5,sigma2:1"
case_run "GARCH persistence at the boundary" "is close to 1: shocks to the variance barely die out" 0 \
  "simulate garch(1,1) n=3000 seed=11 set=mu:0,omega:0.01,alpha1:0.15,beta1:0.849; fit garch(1,1); check; forecast 5"
case_run "GARCH on white noise: standard errors of the mean alone" "standard errors for the mean terms only" 0 \
  "simulate arma(0,0) n=500 seed=11 set=mu:0,sigma2:1; fit garch(1,1); check; forecast 5"
# alpha1 at its bound (simulated white noise, seed 1): beta1 and the persistence are not
# identified, so neither is printed as a number, and no "persistence close to 1" warning.
case_run "GARCH with alpha1 at its bound: persistence in words" \
  "persistence not identified: alpha1 is at its bound" 0 \
  "simulate arma(0,0) n=2000 seed=1 set=mu:0,sigma2:1; fit garch(1,1)"
if "$HONE" -c "simulate arma(0,0) n=2000 seed=1 set=mu:0,sigma2:1; fit garch(1,1)" 2>&1 | grep -q "close to 1"; then
  echo "FAIL alpha1 at its bound: a persistence warning beside it"; fail=1
fi
if [ -x "$PY" ]; then
  "$HONE" --json -c "simulate arma(0,0) n=2000 seed=1 set=mu:0,sigma2:1; fit garch(1,1)" 2>/dev/null | tail -n 1 |
    "$PY" -c '
import json, sys
d = json.loads(sys.stdin.read())
assert d["persistence"] is None and d["half_life"] is None, d
assert "not identified" in d["null_reasons"]["persistence"], d["null_reasons"]
assert "alpha1 at bound" in d["warnings"] and not any("persistence" in w for w in d["warnings"]), d["warnings"]
' || { echo "FAIL alpha1 at its bound: JSON persistence not null with its reason"; fail=1; }
fi
case_run "constant series" "the data are constant" 1 \
  "load tests/data/bad/constant.csv; series; fit arma(0,0)"
case_run "blocks wider than the series" "not computed: needs at least 2 blocks" 0 \
  "load tests/data/wn200.csv; fit ar(1); check window=1000000000"

[ $fail -eq 0 ] && echo "edge outcomes: all in words, no non-finite number printed"
exit $fail
