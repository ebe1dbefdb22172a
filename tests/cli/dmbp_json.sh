#!/bin/sh
# The GARCH(1,1) benchmark through the JSON interface: Bollerslev & Ghysels
# (1996) DM/BP returns, constant mean + GARCH(1,1) normal; published values
# are the double-precision estimates of Fiorentini, Calzolari & Panattoni
# (1996) as listed in the benchmark file quoted in
# reference/bollerslev-ghysels-dmbp/SOURCE.md (benchmark_values.csv).
ref="${HONE_REFERENCE_DIR:-../shared/reference}"
csv="$ref/bollerslev-ghysels-dmbp/dmbp_returns.csv"
[ -f "$csv" ] || { echo "reference data not found (set HONE_REFERENCE_DIR)"; exit 77; }
out=$("$HONE" --json -c "load $csv column=return_pct; fit garch(1,1); forecast 3; holdout 10") ||
  { echo "hone failed: $out"; exit 1; }
printf '%s\n' "$out" | /usr/bin/python3 -c '
import json, math, sys
objs = [json.loads(l) for l in sys.stdin if l.strip()]
assert all(o["ok"] for o in objs), objs
fit = objs[1]
want = {"mu": -0.006190408379994, "omega": 0.0107613978518,
        "alpha1": 0.153134061820, "beta1": 0.805973670305}
robust = {"mu": 0.009189353979760952, "omega": 0.006493186182105218,
          "alpha1": 0.05353170349543810, "beta1": 0.07246144960234878}
def lre(x, w):
    return 16 if x == w else -math.log10(abs(x - w) / abs(w))
for k, w in want.items():
    assert lre(fit["params"][k], w) >= 5, (k, fit["params"][k], w)
    assert lre(fit["se_robust"][k], robust[k]) >= 3, (k, fit["se_robust"][k], robust[k])
assert abs(fit["loglik"] - (-1106.607881041288)) < 1e-6, fit["loglik"]
assert fit["converged"] is True and fit["n_eff"] == 1974
fc = objs[2]
assert len(fc["mean"]) == 3 and all(lo < m < hi for lo, m, hi in zip(fc["lo"], fc["mean"], fc["hi"]))
# GARCH(1,1) variance forecast recursion (common practice):
# v_{T+k} = omega + (alpha1 + beta1) v_{T+k-1} for k >= 2.
p = fit["params"]; v = fc["variance"]
for k in (1, 2):
    assert abs(v[k] - (p["omega"] + (p["alpha1"] + p["beta1"]) * v[k - 1])) < 1e-12 * v[k], v
ho = objs[3]
assert ho["h"] == 10 and 0 <= ho["coverage"] <= 1 and ho["rmse"] >= ho["mae"] > 0
print("dm/bp json ok:", {k: fit["params"][k] for k in want}, fit["loglik"])
'
