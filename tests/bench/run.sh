#!/bin/sh
# make bench: hone against the one-pass floor and the scripted baseline (tests/bench/bench.py).
#   BENCH_QUICK=1        n = 10^4 and 10^5 only, fewer runs
#   BENCH_BASELINE=DIR   the baseline folder (default ../shared/tools/baseline beside the checkout)
#   BENCH_OUT=PREFIX     where PREFIX.txt and PREFIX.json go (default tests/bench/results-latest)
top=$(cd "$(dirname "$0")/../.." && pwd)
py=/usr/bin/python3
[ -x "$py" ] || py=python3
exec "$py" "$top/tests/bench/bench.py"
