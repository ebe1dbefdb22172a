#!/bin/sh
# save resid and save forecast write complete CSV files atomically: the time
# stamps follow the data's calendar, the columns agree with the fit and the
# forecast that the JSON interface reports, and a failed write leaves an
# existing file as it was.
top=$(pwd)
tmp=$(mktemp -d) || exit 1
trap 'rm -rf "$tmp"' EXIT
cp "$top/demo-data/bakery-orders.csv" "$top/demo-data/grain-index-returns.csv" "$tmp/" || exit 1
cd "$tmp" || exit 1
"$HONE" --json -c 'load bakery-orders.csv; fit ar[1,7]; forecast 5; save resid r.csv; save forecast f.csv; save forecast f9.csv 9' > b.json 2> b.err ||
  { cat b.err; echo "bakery session failed"; exit 1; }
"$HONE" --json -c 'load grain-index-returns.csv; fit ar(1)+garch(1,1); save resid g.csv; save forecast gf.csv 8' > g.json 2> g.err ||
  { cat g.err; echo "grain session failed"; exit 1; }
ls ./*.tmp-* > /dev/null 2>&1 && { echo "temporary files left behind"; exit 1; }
/usr/bin/python3 - <<'PY' || exit 1
import csv, json, math, sys
from datetime import date, timedelta

def objs(path):
    return [json.loads(l) for l in open(path) if l.strip()]

def rows(path):
    with open(path) as f:
        return list(csv.reader(f))

def close(a, b, tol=1e-12):
    return abs(a - b) <= tol * max(1.0, abs(b))

b = objs("b.json")
fit, fc = b[1], b[2]
r = rows("r.csv")
assert r[0] == ["time", "obs", "resid", "std_resid"], r[0]
assert len(r) - 1 == fit["n_eff"] == 723, len(r)
# the first residual is observation 8 (7 conditioning values); the data start on 2024-01-01, daily
assert r[1][0] == "2024-01-08" and r[1][1] == "8", r[1]
assert r[-1][0] == "2025-12-30" and r[-1][1] == "730", r[-1]
s2 = sum(float(x[2]) ** 2 for x in r[1:]) / fit["n_eff"]
for x in r[1:]:
    assert close(float(x[3]), float(x[2]) / math.sqrt(s2), 1e-9), x
f = rows("f.csv")
assert f[0] == ["time", "step", "mean", "se", "lo95", "hi95", "variance"], f[0]
assert len(f) - 1 == 5
for k, x in enumerate(f[1:]):
    assert x[0] == (date(2025, 12, 31) + timedelta(days=k)).isoformat(), x
    assert close(float(x[2]), fc["mean"][k]) and close(float(x[3]), fc["se"][k]), (x, k)
    assert close(float(x[4]), fc["lo"][k]) and close(float(x[5]), fc["hi"][k]), (x, k)
assert len(rows("f9.csv")) - 1 == 9

g = objs("g.json")
gr = rows("g.csv")
assert gr[0] == ["time", "obs", "resid", "std_resid", "sigma_t"], gr[0]
assert len(gr) - 1 == g[1]["n_eff"]
for x in gr[1:]:
    assert close(float(x[3]), float(x[2]) / float(x[4]), 1e-12), x
gf = rows("gf.csv")
# the grain data end on a Friday (2024-12-20); business days skip the weekend
last = date.fromisoformat(gr[-1][0])
assert last.weekday() == 4, last
want, d = [], last
while len(want) < 8:
    d += timedelta(days=1)
    if d.weekday() < 5:
        want.append(d.isoformat())
assert [x[0] for x in gf[1:]] == want, [x[0] for x in gf[1:]]
print("csv files check out")
PY
# A write that fails (the target is a directory) reports it; an existing file stays.
cp r.csv keep.csv
mkdir dir.csv
out=$("$HONE" -c 'load bakery-orders.csv; fit ar(1); save resid dir.csv' 2>&1) && { echo "save into a directory succeeded"; exit 1; }
printf '%s\n' "$out" | grep -q "dir.csv is a directory" || { printf '%s\n' "$out"; echo "no message"; exit 1; }
out=$("$HONE" -c 'load bakery-orders.csv; save resid r.csv' 2>&1) && { echo "save without a model succeeded"; exit 1; }
cmp -s r.csv keep.csv || { echo "a failed save changed r.csv"; exit 1; }
exit 0
