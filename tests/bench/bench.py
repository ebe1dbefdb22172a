"""bench.py - the make bench driver: hone's speed against the one-pass C floor and the scripted baseline.

Run by tests/bench/run.sh.  Everything is measured in one run on this machine:
  * the floor: the baseline folder's limit.c, built to a temporary directory with cc -O2 and run 3
    times (its best-of-20 figure per pass; the median of the 3 runs is used);
  * hone: tests/bench/hbench (linked against build/libhone.a) times the computation alone, several
    runs, the median quoted; whole-process, start-up and thread-scaling figures time ./hone itself;
  * the baseline (numpy/scipy scripts, when the folder and scipy are present): the same files, the
    same number of runs, its own time_s for the computation and the process wall time.
The series are written by the baseline's simulate.py into a temporary directory (without the
baseline, by hone's simulator with the same recipe, so that hone's figures still exist).
Results: tests/bench/results-latest.txt and tests/bench/results-latest.json.
Only the standard library is used here; the baseline itself needs numpy and scipy.
"""
import json
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time

TOP = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
HONE = os.environ.get("HONE", os.path.join(TOP, "hone"))
BENCH_DIR = os.environ.get("BENCH_DIR", os.path.join(TOP, "build", "bench"))
HBENCH = os.path.join(BENCH_DIR, "hbench")
EMPTY = os.path.join(BENCH_DIR, "empty")
BASE = os.environ.get("BENCH_BASELINE", os.path.join(TOP, "..", "shared", "tools", "baseline"))
PY = os.environ.get("BENCH_PYTHON", "/usr/bin/python3" if os.path.exists("/usr/bin/python3") else "python3")
QUICK = os.environ.get("BENCH_QUICK", "") not in ("", "0")
SIZES = [10**4, 10**5] if QUICK else [10**4, 10**5, 10**6]
# runs per measurement, by n (the median is quoted)
REPS = {10**4: 9, 10**5: 7, 10**6: 5} if not QUICK else {10**4: 5, 10**5: 3}
BASE_REPS = {10**4: 3, 10**5: 3, 10**6: 3} if not QUICK else {10**4: 3, 10**5: 3}

FITS = [  # name, series, hone spec, floor pass, baseline arguments
    ("ARMA(2,1) fit", "arma21", "arma(2,1)", "arma", ["fit-arma", None, "2", "1"]),
    ("GARCH(1,1) fit", "garch", "garch(1,1)", "garch", ["fit-garch", None]),
    ("AR(1)-GARCH(1,1) fit", "ar1garch", "ar(1)+garch(1,1)", "garch", ["fit-garch", None, "--mean", "1", "0"]),
]
BATTERIES = [  # name, series, residuals of, baseline arguments
    ("battery m=20, ARMA(2,1) residuals", "arma21", "arma(2,1)", ["battery", None, "20", "--resid", "2", "1"]),
    ("battery m=20, the series", "garch", None, ["battery", None, "20"]),
    ("battery m=20, AR(1) residuals", "ar1garch", "ar(1)", ["battery", None, "20", "--resid", "1", "0"]),
]


def run(cmd, env=None, check=True):
    """Run CMD; return (stdout, wall seconds)."""
    t0 = time.perf_counter()
    p = subprocess.run(cmd, capture_output=True, env=env)
    wall = time.perf_counter() - t0
    if check and p.returncode != 0:
        raise RuntimeError("%s failed (%d): %s" % (" ".join(cmd), p.returncode, p.stderr.decode()[-500:]))
    return p.stdout.decode(), wall


def run_rss(cmd):
    """Wall seconds and the peak RSS (KiB) of this one child, via wait4."""
    t0 = time.perf_counter()
    pid = os.fork()
    if pid == 0:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, 1)
        os.dup2(devnull, 2)
        try:
            os.execv(cmd[0], cmd)
        finally:
            os._exit(127)
    _, status, ru = os.wait4(pid, 0)
    wall = time.perf_counter() - t0
    if os.waitstatus_to_exitcode(status) != 0:
        raise RuntimeError("%s failed" % " ".join(cmd))
    return wall, ru.ru_maxrss


def med(xs):
    return statistics.median(xs) if xs else None


def have_baseline():
    if not os.path.isfile(os.path.join(BASE, "baseline.py")):
        return False, "baseline folder not found at %s" % BASE
    try:
        subprocess.run([PY, "-c", "import numpy, scipy"], check=True, capture_output=True)
    except (OSError, subprocess.CalledProcessError):
        return False, "%s cannot import numpy and scipy" % PY
    return True, ""


def floor(tmp):
    """Median over 3 runs of limit.c's best-of-20 ns/obs for each pass."""
    exe = os.path.join(tmp, "limit")
    src = os.path.join(BASE, "limit.c")
    if not os.path.isfile(src):
        return None
    subprocess.run(["cc", "-O2", "-o", exe, src, "-lm"], check=True)
    got = {}
    for _ in range(3):
        out, _ = run([exe])
        for line in out.splitlines():
            w = line.split()
            if len(w) >= 5 and w[1] == "best":
                got.setdefault(w[0], []).append(float(w[4]))
    return {k: med(v) for k, v in got.items()}


def simulate(tmp, with_baseline):
    data = os.path.join(tmp, "data")
    os.makedirs(data, exist_ok=True)
    if with_baseline:
        env = dict(os.environ, BASELINE_DATA=data)
        subprocess.run([PY, os.path.join(BASE, "simulate.py")], check=True, env=env, cwd=tmp,
                       capture_output=True)
        return data, "the baseline's simulate.py (seeds 100+k, 200+k, 300+k for n = 10^(4+k))"
    # the same recipe with hone's generator (other random numbers, same models)
    for k, n in enumerate(SIZES):
        for name, spec, sets in (("arma21", "arma(2,1)", "mu:1,ar1:0.5,ar2:-0.3,ma1:0.4,sigma2:1"),
                                 ("garch", "garch(1,1)", "mu:0,omega:0.05,alpha1:0.08,beta1:0.9"),
                                 ("ar1garch", "ar(1)+garch(1,1)",
                                  "mu:0.5,ar1:0.6,omega:0.05,alpha1:0.08,beta1:0.9")):
            seed = {"arma21": 100, "garch": 200, "ar1garch": 300}[name] + k
            out = os.path.join(data, "%s_n%d.csv" % (name, n))
            run([HONE, "-c", "simulate %s n=%d seed=%d burn=2000 set=%s file=%s" % (spec, n, seed, sets, out)])
    return data, "hone's simulate command with the baseline's recipe (the baseline was not run)"


def hbench(args):
    out, _ = run([HBENCH] + args)
    return json.loads(out)


def baseline_runs(args, reps):
    """Computation seconds (time_s; total_time_s for GARCH), wall seconds, and the last output."""
    comp, wall, last = [], [], None
    for _ in range(reps):
        out, w = run([PY, os.path.join(BASE, "baseline.py")] + args)
        last = json.loads(out)
        comp.append(last.get("total_time_s", last.get("time_s")))
        wall.append(w)
    return med(comp), med(wall), last


def main():
    tmp = tempfile.mkdtemp(prefix="hone-bench-")
    try:
        return bench(tmp)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)


def bench(tmp):
    ok_base, why_not = have_baseline()
    res = {"machine": {"cpus": os.cpu_count(), "platform": platform.platform(),
                       "load_average_at_start": os.getloadavg()},
           "started": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()),
           "baseline": ok_base, "baseline_note": why_not, "quick": QUICK}
    fl = floor(tmp) if os.path.isdir(BASE) else None
    if fl is None:  # without limit.c the floor cannot be measured; the baseline README's figures
        fl = {}
    res["floor_ns_per_obs"] = fl
    print("floor (limit.c, median of 3 runs of best-of-20):",
          ", ".join("%s %.2f ns/obs" % kv for kv in fl.items()), file=sys.stderr)
    data, how = simulate(tmp, ok_base)
    res["data"] = how
    rows = []

    def file_of(series, n):
        return os.path.join(data, "%s_n%d.csv" % (series, n))

    for n in SIZES:
        reps, breps = REPS[n], BASE_REPS[n]
        for name, series, spec, pas, bargs in FITS:
            f = file_of(series, n)
            h = hbench(["fit", spec, f, str(reps)])
            row = {"computation": name, "n": n, "median_s": h["median_s"], "cpu_median_s": h["cpu_median_s"],
                   "runs": reps, "evaluations": h["evaluations"], "iterations": h["iterations"],
                   "converged": h["converged"], "loglik": h["loglik"],
                   "ns_per_obs_per_eval": 1e9 * h["median_s"] / (n * max(h["evaluations"], 1)),
                   "maxrss_kb": h["maxrss_kb_after"], "maxrss_kb_loaded": h["maxrss_kb_loaded"],
                   "data_bytes": h["data_bytes"]}
            if pas in fl:
                one = fl[pas] * 1e-9 * n
                row["floor_pass_s"] = one
                row["floor_passes"] = h["median_s"] / one
                row["floor_passes_cpu"] = h["cpu_median_s"] / one
            # whole process as a user runs it, and its peak memory
            walls, rss = [], 0
            for _ in range(max(3, reps // 2)):
                w, r = run_rss([HONE, "-c", "load %s; fit %s" % (f, spec)])
                walls.append(w)
                rss = max(rss, r)
            row["process_s"] = med(walls)
            row["process_maxrss_kb"] = rss
            if ok_base:
                a = [x if x is not None else f for x in bargs]
                c, w, last = baseline_runs(a, breps)
                row.update(baseline_s=c, baseline_process_s=w, baseline_loglik=last.get("loglik"),
                           baseline_nfev=last.get("nfev"), speedup=c / h["median_s"],
                           process_speedup=w / row["process_s"])
            rows.append(row)
            print("  %-22s n=%-8d %.4g s" % (name, n, h["median_s"]), file=sys.stderr)
        for name, series, resid, bargs in BATTERIES:
            f = file_of(series, n)
            h = hbench(["battery", f, str(reps)] + ([resid] if resid else []))
            row = {"computation": name, "n": n, "median_s": h["median_s"], "cpu_median_s": h["cpu_median_s"],
                   "runs": reps, "checks": h["checks"], "p": h["p"]}
            if "stream" in fl:
                one = fl["stream"] * 1e-9 * n
                row["floor_pass_s"] = one
                row["floor_passes"] = h["median_s"] / one
                row["floor_passes_cpu"] = h["cpu_median_s"] / one
            if ok_base:
                a = [x if x is not None else f for x in bargs]
                c, w, last = baseline_runs(a, breps)
                row.update(baseline_s=c, speedup=c / h["median_s"],
                           baseline_p={k: last[k]["p"] for k in ("ljung_box", "mcleod_li", "arch_lm",
                                                                 "jarque_bera") if k in last})
            rows.append(row)
            print("  %-22s n=%-8d %.4g s" % (name[:22], n, h["median_s"]), file=sys.stderr)
            # the baseline's own four checks alone, against the same baseline run
            h = hbench(["checks", f, str(reps)] + ([resid] if resid else []))
            row4 = {"computation": "  its 4 checks alone", "n": n, "median_s": h["median_s"],
                    "cpu_median_s": h["cpu_median_s"], "runs": reps, "checks": 4, "p": h["p"],
                    "like_for_like": True}
            if "floor_pass_s" in row:
                row4["floor_pass_s"] = row["floor_pass_s"]
                row4["floor_passes"] = h["median_s"] / row["floor_pass_s"]
                row4["floor_passes_cpu"] = h["cpu_median_s"] / row["floor_pass_s"]
            if ok_base:
                row4.update(baseline_s=row["baseline_s"], speedup=row["baseline_s"] / h["median_s"],
                            baseline_p=row.get("baseline_p"))
            rows.append(row4)
        f = file_of("arma21", n)
        h = hbench(["csv", f, str(reps)])
        rows.append({"computation": "CSV read", "n": n, "median_s": h["median_s"],
                     "cpu_median_s": h["cpu_median_s"], "runs": reps, "bytes": h["bytes"],
                     "mb_per_s": h["mb_per_s"]})
    res["rows"] = rows

    # start-up: hone -c quit against an empty program linked against the same libraries
    st_h = [run_rss([HONE, "-c", "quit"])[0] for _ in range(21)]
    st_e = [run_rss([EMPTY])[0] for _ in range(21)]
    res["startup"] = {"hone_s": med(st_h), "empty_s": med(st_e), "ratio": med(st_h) / med(st_e), "runs": 21}

    # scaling to both cores: batch and scan, 1 thread against 2
    n = 10**5
    files = [file_of(s, n) for s in ("arma21", "garch", "ar1garch")] * 2
    # the two thread counts alternate, so that a neighbour's load falls on both alike
    many = [file_of(s, 10**4) for s in ("arma21", "garch", "ar1garch")] * 66
    # series of many lengths (each a new FFT length): hone's simulate, seeds 500..539
    varied = []
    for k in range(40):
        out = os.path.join(tmp, "varied_%d.csv" % k)
        run([HONE, "-c", "simulate arma(1,1) n=%d seed=%d set=mu:0,ar1:0.5,ma1:0.3,sigma2:1 file=%s"
             % (20000 + 137 * k, 500 + k, out)])
        varied.append(out)
    tb = {1: [], 2: []}
    ts = {1: [], 2: []}
    tm = {1: [], 2: []}
    tv = {1: [], 2: []}
    scaling_runs = 11
    for _ in range(scaling_runs):
        for th in (1, 2):
            env = dict(os.environ, OMP_NUM_THREADS=str(th))
            t0 = time.perf_counter()
            subprocess.run([HONE, "batch", "--threads", str(th), "--commands", "fit arma(1,1); check"] + files,
                           check=True, capture_output=True, env=env)
            tb[th].append(time.perf_counter() - t0)
            t0 = time.perf_counter()
            subprocess.run([HONE, "batch", "--threads", str(th), "--commands", "fit arma(1,1); check"] + many,
                           check=True, capture_output=True, env=env)
            tm[th].append(time.perf_counter() - t0)
            t0 = time.perf_counter()
            subprocess.run([HONE, "batch", "--threads", str(th), "--commands", "fit arma(1,1); check"] + varied,
                           check=True, capture_output=True, env=env)
            tv[th].append(time.perf_counter() - t0)
            t0 = time.perf_counter()
            subprocess.run([HONE, "-c", "load %s; scan p=0..2 q=0..2" % file_of("arma21", n)],
                           check=True, capture_output=True, env=env)
            ts[th].append(time.perf_counter() - t0)
    sc = {th: (med(tb[th]), med(ts[th]), med(tm[th]), med(tv[th])) for th in (1, 2)}
    res["scaling"] = {"batch_1_s": sc[1][0], "batch_2_s": sc[2][0], "batch_speedup": sc[1][0] / sc[2][0],
                      "batch_many_1_s": sc[1][2], "batch_many_2_s": sc[2][2],
                      "batch_many_speedup": sc[1][2] / sc[2][2],
                      "batch_many_work": "198 series of n = 10^4 (arma21, garch, ar1garch, 66 times): fit arma(1,1); check",
                      "batch_varied_1_s": sc[1][3], "batch_varied_2_s": sc[2][3],
                      "batch_varied_speedup": sc[1][3] / sc[2][3],
                      "batch_varied_work": "40 series of n = 20000 + 137k, k = 0..39 (arma(1,1), seeds 500 + k): fit arma(1,1); check",
                      "scan_1_s": sc[1][1], "scan_2_s": sc[2][1], "scan_speedup": sc[1][1] / sc[2][1],
                      "batch_work": "6 series of n = 10^5 (arma21, garch, ar1garch, twice): fit arma(1,1); check",
                      "scan_work": "scan p=0..2 q=0..2 on arma21, n = 10^5", "runs": scaling_runs}
    res["load_average_at_end"] = os.getloadavg()
    res["finished"] = time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())

    text = report(res)
    out_txt = os.environ.get("BENCH_OUT", os.path.join(TOP, "tests", "bench", "results-latest"))
    with open(out_txt + ".json", "w") as fh:
        json.dump(res, fh, indent=1)
        fh.write("\n")
    with open(out_txt + ".txt", "w") as fh:
        fh.write(text)
    sys.stdout.write(text)
    print("written: %s.txt and %s.json" % (out_txt, out_txt), file=sys.stderr)
    return 0


def fmt(x, spec="%.3g"):
    return "-" if x is None else spec % x


def report(r):
    L = []
    L.append("hone make bench  %s  (%d CPUs, load average %.1f at start, %.1f at end)"
             % (r["started"], r["machine"]["cpus"], r["machine"]["load_average_at_start"][0],
                r["load_average_at_end"][0]))
    L.append("medians of several runs; the machine may be shared, so 'cpu' (process CPU seconds) is given beside wall time")
    L.append("data: %s" % r["data"])
    L.append("floor (one pass, limit.c -O2): " + ", ".join("%s %.2f ns/obs" % kv for kv in r["floor_ns_per_obs"].items()))
    if not r["baseline"]:
        L.append("baseline not run: %s" % r["baseline_note"])
    L.append("")
    L.append("%-34s %8s %9s %9s %6s %8s %8s %8s %9s %8s %7s"
             % ("computation", "n", "wall s", "cpu s", "evals", "ns/obs/e", "floor x", "floor xc",
                "baseline", "speedup", "MB/s"))
    for w in r["rows"]:
        L.append("%-34s %8d %9s %9s %6s %8s %8s %8s %9s %8s %7s" % (
            w["computation"], w["n"], fmt(w["median_s"], "%.4g"), fmt(w["cpu_median_s"], "%.4g"),
            fmt(w.get("evaluations"), "%d"), fmt(w.get("ns_per_obs_per_eval"), "%.3g"),
            fmt(w.get("floor_passes"), "%.1f"), fmt(w.get("floor_passes_cpu"), "%.1f"),
            fmt(w.get("baseline_s"), "%.4g"), fmt(w.get("speedup"), "%.1fx"), fmt(w.get("mb_per_s"), "%.0f")))
    L.append("")
    L.append("floor x: hone's wall median over one floor pass (ARMA pass for ARMA fits, GARCH pass for GARCH fits,")
    L.append("one read for the battery); floor xc: the same with CPU seconds; speedup: baseline computation")
    L.append("time (its time_s; total_time_s with the mean fit for GARCH) over hone's wall median.")
    L.append("A battery row is hone's whole battery (11 checks, the ACF/PACF and portmanteau profile, the")
    L.append("practical sizes); the row under it, 'its 4 checks alone', times only the checks the baseline")
    L.append("runs (ACF to lag 20 with Ljung-Box, McLeod-Li, ARCH-LM with 5 lags, Jarque-Bera), each called")
    L.append("once as a library user would; both are set against the same baseline run.")
    L.append("")
    L.append("whole process, as a user runs it (hone -c 'load FILE; fit SPEC' vs the baseline's command):")
    L.append("%-24s %8s %9s %9s %8s %12s %12s" % ("fit", "n", "hone s", "baseline", "speedup", "hone max RSS",
                                                "x data size"))
    for w in r["rows"]:
        if "process_s" in w:
            L.append("%-24s %8d %9s %9s %8s %9.1f MB %12s" % (
                w["computation"], w["n"], fmt(w["process_s"], "%.4g"), fmt(w.get("baseline_process_s"), "%.4g"),
                fmt(w.get("process_speedup"), "%.1fx"), w["process_maxrss_kb"] / 1024.0,
                fmt(w["process_maxrss_kb"] * 1024.0 / w["data_bytes"], "%.1f")))
    L.append("")
    s = r["startup"]
    L.append("start-up: hone -c quit %.2f ms, empty program with the same libraries %.2f ms: %.2fx (median of %d)"
             % (1e3 * s["hone_s"], 1e3 * s["empty_s"], s["ratio"], s["runs"]))
    c = r["scaling"]
    L.append("threads (medians of %d runs, one and two threads alternating):" % c.get("runs", 7))
    L.append("         batch (%s) 1 thread %.3g s, 2 threads %.3g s: %.2fx"
             % (c["batch_work"], c["batch_1_s"], c["batch_2_s"], c["batch_speedup"]))
    L.append("         batch (%s) 1 thread %.3g s, 2 threads %.3g s: %.2fx"
             % (c["batch_many_work"], c["batch_many_1_s"], c["batch_many_2_s"], c["batch_many_speedup"]))
    L.append("         batch (%s) 1 thread %.3g s, 2 threads %.3g s: %.2fx"
             % (c["batch_varied_work"], c["batch_varied_1_s"], c["batch_varied_2_s"], c["batch_varied_speedup"]))
    L.append("         scan (%s) 1 thread %.3g s, 2 threads %.3g s: %.2fx"
             % (c["scan_work"], c["scan_1_s"], c["scan_2_s"], c["scan_speedup"]))
    L.append("")
    L.append("p-values of the shared checks, hone vs baseline (Ljung-Box, McLeod-Li, ARCH-LM, Jarque-Bera):")
    names = (("ljung-box", "ljung_box"), ("mcleod-li", "mcleod_li"), ("arch-lm", "arch_lm"),
             ("jarque-bera", "jarque_bera"))
    last = None
    for w in r["rows"]:
        if not w.get("like_for_like"):
            last = w["computation"]
            continue
        bp = w.get("baseline_p") or {}
        L.append("  %-34s n=%-8d %s" % (last, w["n"], "  ".join(
            "%s %s/%s" % (h, fmt(w["p"].get(h), "%.6g"), fmt(bp.get(b), "%.6g")) for h, b in names)))
    L.append("")
    L.append("estimates, hone vs baseline log-likelihood:")
    for w in r["rows"]:
        if "loglik" in w:
            L.append("  %-24s n=%-8d hone %.3f  baseline %s  (hone evaluations %d, baseline nfev %s)" % (
                w["computation"], w["n"], w["loglik"], fmt(w.get("baseline_loglik"), "%.3f"), w["evaluations"],
                fmt(w.get("baseline_nfev"), "%d")))
    L.append("")
    return "\n".join(L) + "\n"


if __name__ == "__main__":
    sys.exit(main())
