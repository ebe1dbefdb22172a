#!/bin/sh
# Box-Jenkins Series F through the JSON interface: AR(2) by conditional least
# squares must give ar1 -0.3397, ar2 0.1904 (older NIST/SEMATECH e-Handbook
# page pmc449.htm, see reference/box-jenkins-series-f/SOURCE.md item 2), and
# every object must carry the contract keys.
ref="${HONE_REFERENCE_DIR:-../shared/reference}"
csv="$ref/box-jenkins-series-f/series_f.csv"
[ -f "$csv" ] || { echo "reference data not found (set HONE_REFERENCE_DIR)"; exit 77; }
out=$("$HONE" --json -c "load $csv column=yield; fit ar(2); check") || { echo "hone failed"; exit 1; }
printf '%s\n' "$out" | /usr/bin/python3 -c '
import json, sys
objs = [json.loads(l) for l in sys.stdin if l.strip()]
assert [o["command"] for o in objs] == ["load", "fit", "check"], objs
for o in objs:
    assert o["ok"] is True, o
fit = objs[1]
for k in ("model", "params", "se", "loglik", "aic", "aicc", "bic", "n_eff", "converged", "iterations"):
    assert k in fit, k
assert fit["model"] == "ar(2)"
p = fit["params"]
assert round(p["ar1"], 4) == -0.3397 and round(p["ar2"], 4) == 0.1904, p
# Recomputed values in SOURCE.md: -0.339719, 0.190402.
assert abs(p["ar1"] + 0.339719) < 5e-7 and abs(p["ar2"] - 0.190402) < 5e-7, p
assert fit["n_eff"] == 68 and fit["converged"] is True
chk = objs[2]
for k in ("tests", "verdict", "failed", "acf", "pacf"):
    assert k in chk, k
for t in chk["tests"]:
    for k in ("name", "criterion", "statistic", "df", "p", "pass"):
        assert k in t, (k, t)
assert chk["verdict"] in ("white", "not white")
print("series F json ok:", p["ar1"], p["ar2"])
'
