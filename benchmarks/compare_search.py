#!/usr/bin/python3
"""Search throughput of lagsieve beside statsmodels SARIMAX, in one run.

    /usr/bin/python3 benchmarks/compare_search.py [--build build] [--workdir DIR] [--sample 30]
                                                  [--skip-single]

Steps:
 1. search_benchmark (build/benchmarks/search_benchmark): candidates per second with 1 and 2
    threads on configs/demo.yaml and on a generated 3-input grid of 5,824 candidates at n = 500;
    it also fits a sample of grid candidates one by one and writes them to sample.json.
 2. the lagsieve binary on the grid config under /usr/bin/time -v: peak resident memory.
 3. statsmodels SARIMAX fits the same sampled candidates as regressions with ARMA errors
    (exog = the lagged inputs); the time is scaled to the full grid.

statsmodels has no rational transfer function: a candidate with r > 0 is fitted with r extra
distributed lags in its place (the same number of parameters, a linear model). For r = 0 the two
models are the same and the log-likelihoods are printed side by side as a sanity check.
Must run under Debian's /usr/bin/python3 (statsmodels is installed there).
"""
import argparse
import json
import os
import re
import subprocess
import sys
import time
import warnings

# One thread for the reference: the comparison is per core.
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[_var] = "1"

import numpy as np  # noqa: E402


def run(cmd, **kw):
    print("$ " + " ".join(cmd), flush=True)
    return subprocess.run(cmd, check=True, **kw)


def peak_memory(binary, config, out_dir):
    """Runs the binary under /usr/bin/time -v; returns (peak RSS in MB, wall seconds, stdout)."""
    t0 = time.perf_counter()
    proc = subprocess.run(["/usr/bin/time", "-v", binary, "search", config, "--out", out_dir, "--quiet",
                           "--threads", "2"], capture_output=True, text=True)
    wall = time.perf_counter() - t0
    if proc.returncode != 0:
        sys.exit(f"lagsieve search failed ({proc.returncode}):\n{proc.stderr}")
    m = re.search(r"Maximum resident set size \(kbytes\): (\d+)", proc.stderr)
    return int(m.group(1)) / 1024.0, wall, proc.stdout


def load_grid_csv(path):
    table = np.genfromtxt(path, delimiter=",", names=True)
    return {name: np.asarray(table[name], dtype=float) for name in table.dtype.names}


def sarimax_fit(data, cand, start):
    from statsmodels.tsa.statespace.sarimax import SARIMAX
    n = len(data["y"])
    columns = []
    first = start
    for term in cand["inputs"]:
        x = data[term["name"]]
        # lags b .. b + s, plus r more in place of the denominator
        for lag in range(term["b"], term["b"] + term["s"] + term["r"] + 1):
            col = np.full(n, np.nan)
            col[lag:] = x[: n - lag]
            columns.append(col)
            first = max(first, lag)
    y = data["y"][first:]
    exog = np.column_stack(columns)[first:] if columns else None
    model = SARIMAX(y, exog=exog, order=(cand["p"], 0, cand["q"]), trend="c" if cand["constant"] else "n")
    t0 = time.process_time()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        res = model.fit(disp=False)
    return time.process_time() - t0, float(res.llf), first


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--build", default=os.path.join(here, "..", "build"))
    ap.add_argument("--workdir", default="/tmp/lagsieve_search_bench")
    ap.add_argument("--sample", type=int, default=30)
    ap.add_argument("--skip-single", action="store_true", help="no 1-thread runs (no speed-up)")
    args = ap.parse_args()
    build = os.path.abspath(args.build)
    bench = os.path.join(build, "benchmarks", "search_benchmark")
    binary = os.path.join(build, "lagsieve")
    for path in (bench, binary):
        if not os.path.exists(path):
            sys.exit(f"{path} not found: configure with -DLAGSIEVE_BUILD_BENCHMARKS=ON and build the "
                     "targets lagsieve and search_benchmark")

    cmd = [bench, "--workdir", args.workdir, "--sample", str(args.sample)]
    if args.skip_single:
        cmd.append("--skip-single")
    run(cmd)
    with open(os.path.join(args.workdir, "search_benchmark.json")) as f:
        bench_out = json.load(f)
    with open(os.path.join(args.workdir, "sample.json")) as f:
        sample = json.load(f)

    print("\npeak memory: the binary on the grid config, 2 threads", flush=True)
    rss, wall, _ = peak_memory(binary, os.path.join(args.workdir, "grid.yaml"),
                               os.path.join(args.workdir, "memory_run"))

    print("statsmodels SARIMAX on the sampled candidates ...", flush=True)
    data = load_grid_csv(sample["data"])
    sm_total, agree = 0.0, []
    for cand in sample["candidates"]:
        secs, llf, first = sarimax_fit(data, cand, sample["start"])
        sm_total += secs
        if all(t["r"] == 0 for t in cand["inputs"]) and first == sample["start"] and cand["loglik"] is not None:
            agree.append((cand["key"], cand["loglik"], llf))

    k = len(sample["candidates"])
    grid_size = sample["grid_size"]
    ls_each = sample["seconds_total"] / k
    sm_each = sm_total / k

    print("\n== lagsieve search throughput ==")
    print("(wall-clock rates; 'per CPU s' = candidates per CPU second of the whole process, the steadier\n"
          " figure on a shared machine; 'busy' = average cores the run actually got)")
    print(f"{'workload':<8} {'rows':>5} {'candidates':>10} {'1 thread/s':>11} {'2 threads/s':>12} "
          f"{'per core':>9} {'speed-up':>9} {'per CPU s 1t':>13} {'per CPU s 2t':>13} {'busy 1t':>8} {'busy 2t':>8}")
    nan = float("nan")
    grid = None
    for w in bench_out["workloads"]:
        one = w.get("threads1", {})
        two = w["threads2"]
        busy1 = one["cpu_seconds"] / one["seconds"] if one else nan
        busy2 = two["cpu_seconds"] / two["seconds"]
        print(f"{w['name']:<8} {w['rows']:>5} {two['candidates']:>10} {one.get('rate', nan):>11.1f} "
              f"{two['rate']:>12.1f} {two['rate'] / 2:>9.1f} {w.get('speedup', nan):>8.2f}x "
              f"{one.get('cpu_rate', nan):>13.1f} {two['cpu_rate']:>13.1f} {busy1:>8.2f} {busy2:>8.2f}")
        if w["name"] == "grid":
            grid = w
    print(f"load average at the end: {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
    print(f"\npeak resident memory of the {grid_size}-candidate grid run (binary, 2 threads): {rss:.1f} MB "
          f"(target < 300 MB); wall {wall:.1f} s")

    print(f"\n== the same {k} grid candidates, one at a time on one core (CPU time) ==")
    print(f"{'':<22} {'total s':>9} {'ms each':>9} {'scaled to grid, s':>18}")
    print(f"{'lagsieve':<22} {sample['seconds_total']:>9.3f} {1e3 * ls_each:>9.2f} {ls_each * grid_size:>18.1f}")
    print(f"{'statsmodels SARIMAX':<22} {sm_total:>9.3f} {1e3 * sm_each:>9.2f} {sm_each * grid_size:>18.1f}")
    print(f"ratio statsmodels / lagsieve per candidate: {sm_each / ls_each:.1f}x")
    if grid is not None:
        measured = grid["threads2"]["seconds"]
        print(f"full grid: lagsieve measured {measured:.1f} s on 2 threads"
              + (f", {grid['threads1']['seconds']:.1f} s on 1" if "threads1" in grid else "")
              + f"; statsmodels scaled {sm_each * grid_size:.1f} s on 1 core "
              f"(~{sm_each * grid_size / 2:.1f} s if spread perfectly over 2)")
    if agree:
        worst = max(abs(a - b) for _, a, b in agree)
        print(f"\nsanity: {len(agree)} sampled candidates with r = 0 are the same model in both; "
              f"largest |loglik difference| = {worst:.2e}")
        for key, a, b in agree[:5]:
            print(f"  {key:<50} lagsieve {a:12.4f}  statsmodels {b:12.4f}")


if __name__ == "__main__":
    main()
