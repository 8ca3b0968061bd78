#!/usr/bin/python3
"""The Python module's cost against the CLI/C++ fit, and against statsmodels SARIMAX.

    PYTHONPATH=build/python /usr/bin/python3 benchmarks/compare_python.py --binary build/lagsieve
    ... --panel 200      # also: a 200-series panel on a 2-worker LocalCluster against the CLI
                         # searching the same series as one run on 2 threads, and the long
                         # frame in one lagsieve.search call (data.series_key) against the
                         # CLI's search of the same long file

Data: simulated with a fixed seed, n = 500, two inputs (x1: b = 1, s = 1, r = 1; x2: b = 2,
s = 1, r = 1), ARMA(2,1) noise and a constant, the model of benchmarks/fit_benchmark.cpp.
Timed, each the median of --repeats runs in this process:

  * python: lagsieve.fit(config dict, DataFrame): config text, DataFrame to table, loading,
    the fit with standard errors and diagnostics, results back to Python;
  * core: the fit's own time as the core measures it (FitResult.seconds, inside the same call);
  * cli: `lagsieve fit config.yaml --json` as a process (start-up, CSV, fit, JSON);
  * statsmodels: SARIMAX(order=(2, 0, 1), trend="c", exog=lags b..b+5 of each input), the
    nearest model it can express (12 lag coefficients for the two rational transfer functions).

Ratios printed: python / core (the module's overhead), cli / python, statsmodels / python.
"""
import argparse
import json
import os
import pathlib
import statistics
import subprocess
import sys
import tempfile
import time
import warnings

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[_var] = "1"

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

import lagsieve  # noqa: E402

CONFIG = {
    "data": {"time": "t"},
    "target": {"column": "y"},
    "inputs": [{"column": "x1", "delay": 1, "numerator": 1, "denominator": 1},
               {"column": "x2", "delay": 2, "numerator": 1, "denominator": 1}],
    "noise": {"ar": 2, "ma": 1, "constant": True},
}


def simulate(n=500, seed=7, burn=100):
    rng = np.random.default_rng(seed)
    m = n + burn
    x1, x2, a = rng.normal(size=m), rng.normal(size=m), rng.normal(size=m)
    for t in range(1, m):
        x1[t] += 0.5 * x1[t - 1]
        x2[t] += 0.3 * x2[t - 1]
    v1, v2, noise = np.zeros(m), np.zeros(m), np.zeros(m)
    for t in range(3, m):
        v1[t] = 0.6 * v1[t - 1] + 2.0 * x1[t - 1] - 0.8 * x1[t - 2]
        v2[t] = 0.4 * v2[t - 1] - 1.5 * x2[t - 2] + 0.5 * x2[t - 3]
        noise[t] = 0.5 * noise[t - 1] + 0.2 * noise[t - 2] + a[t] + 0.3 * a[t - 1]
    y = 10.0 + v1 + v2 + noise
    return pd.DataFrame({"t": np.arange(1, n + 1), "y": y[burn:], "x1": x1[burn:],
                         "x2": x2[burn:]})


def median_time(fn, repeats):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), out


def statsmodels_fit(frame):
    try:
        from statsmodels.tsa.statespace.sarimax import SARIMAX
    except ImportError as e:
        return None, "skipped (%s)" % e
    lags = {}
    for name, b in (("x1", 1), ("x2", 2)):
        for j in range(6):
            lags["%s_l%d" % (name, b + j)] = frame[name].shift(b + j)
    exog = pd.DataFrame(lags).iloc[7:]
    y = frame["y"].iloc[7:]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        res = SARIMAX(y.to_numpy(), exog=exog.to_numpy(), order=(2, 0, 1), trend="c").fit(
            disp=False)
    return res, "loglik %.3f" % res.llf


def fit_comparison(args):
    frame = simulate()
    lagsieve.fit(CONFIG, frame)  # warm-up
    # Paired per call: the wall time of lagsieve.fit and the core's own fit time inside it, so
    # the overhead (their difference) is not drowned by the machine's load drifting between runs.
    walls, cores = [], []
    for _ in range(args.repeats):
        t0 = time.perf_counter()
        fit = lagsieve.fit(CONFIG, frame)
        walls.append(time.perf_counter() - t0)
        cores.append(fit.to_dict()["seconds"])
    py_time, core = statistics.median(walls), statistics.median(cores)
    overhead = statistics.median(w - c for w, c in zip(walls, cores))
    print("fit at n = %d, %s (%s): loglik %.6f" % (len(frame), fit.label, fit.status, fit.loglik))
    print("  %-34s %10.3f ms" % ("python lagsieve.fit", 1e3 * py_time))
    print("  %-34s %10.3f ms" % ("core fit (FitResult.seconds)", 1e3 * core))
    print("  %-34s %10.3f ms  (%.1f %% of the core fit)" % (
        "overhead per call (paired median)", 1e3 * overhead, 100 * overhead / core))
    print("  %-34s %10.3f" % ("ratio python / core", py_time / core))
    with tempfile.TemporaryDirectory() as tmp:
        tmp = pathlib.Path(tmp)
        frame.to_csv(tmp / "data.csv", index=False)
        (tmp / "config.yaml").write_text(json.dumps(
            {**CONFIG, "data": {"file": "data.csv", "time": "t"}}, indent=2))
        if args.binary:
            cmd = [args.binary, "fit", str(tmp / "config.yaml"), "--json"]
            cli_time, out = median_time(
                lambda: subprocess.run(cmd, check=True, capture_output=True, text=True).stdout,
                args.repeats)
            cli_loglik = json.loads(out)["loglik"]
            print("  %-34s %10.3f ms  (loglik %.6f, equal: %s)" % (
                "cli `lagsieve fit --json` process", 1e3 * cli_time, cli_loglik,
                cli_loglik == fit.loglik))
            print("  %-34s %10.3f" % ("ratio cli / python", cli_time / py_time))
    sm_repeats = max(1, min(args.repeats, 5))
    sm_time, (res, note) = median_time(lambda: statsmodels_fit(frame), sm_repeats)
    if res is None:
        print("  statsmodels SARIMAX: " + note)
    else:
        print("  %-34s %10.3f ms  (%s, %d repeats)" % ("statsmodels SARIMAX (lags 6 each)",
                                                       1e3 * sm_time, note, sm_repeats))
        print("  %-34s %10.1f" % ("ratio statsmodels / python", sm_time / py_time))


def search_comparison(args):
    """A search through the Ctrl-C watcher (the core runs on a worker thread while the caller
    polls for signals every 50 ms): the wall time of lagsieve.search against the search's own
    time (SearchResult.seconds), paired per call."""
    frame = simulate()
    config = {**CONFIG, "inputs": [{**CONFIG["inputs"][0], "delay": [0, 2]},
                                   {**CONFIG["inputs"][1], "delay": [1, 3]}]}
    lagsieve.search(config, frame, threads=1, backtest=False)  # warm-up
    walls, cores = [], []
    for _ in range(max(1, args.repeats // 3)):
        t0 = time.perf_counter()
        run = lagsieve.search(config, frame, threads=1, backtest=False)
        walls.append(time.perf_counter() - t0)
        cores.append(run.summary[0]["seconds"])
    wall, core = statistics.median(walls), statistics.median(cores)
    print("search at n = %d, %d candidates, 1 thread" % (len(frame), run.summary[0]["candidates"]))
    print("  %-34s %10.3f ms" % ("python lagsieve.search", 1e3 * wall))
    print("  %-34s %10.3f ms" % ("core search (SearchResult.seconds)", 1e3 * core))
    print("  %-34s %10.3f" % ("ratio python / core", wall / core))


PANEL_CONFIG = {
    "data": {"time": "t"},
    "target": {"column": "y"},
    "inputs": [{"column": "x", "delay": [0, 2], "denominator": [0, 1]}],
    "noise": {"ar": [0, 1], "constant": True},
    "search": {"strategy": "exhaustive", "criterion": "aicc"},
}


def panel_comparison(args):
    from dask.distributed import Client, LocalCluster

    import lagsieve.dask

    rng = np.random.default_rng(11)
    n = 150
    x = np.zeros(n)
    for t in range(1, n):
        x[t] = 0.6 * x[t - 1] + rng.normal()
    targets = {}
    for i in range(args.panel):
        e = np.zeros(n)
        for t in range(1, n):
            e[t] = 0.5 * e[t - 1] + rng.normal(scale=0.5)
        targets["y%03d" % i] = 10 + (1 + 0.01 * i) * np.concatenate([[0.0], x[:-1]]) + e
    wide = pd.concat([pd.DataFrame({"t": np.arange(1, n + 1), "x": x}), pd.DataFrame(targets)],
                     axis=1)
    names = ["y%03d" % i for i in range(args.panel)]
    long = pd.concat([pd.DataFrame({"series": name, "t": wide["t"], "y": wide[name],
                                    "x": wide["x"]}) for name in names], ignore_index=True)
    with tempfile.TemporaryDirectory() as tmp:
        tmp = pathlib.Path(tmp)
        wide.to_csv(tmp / "wide.csv", index=False)
        (tmp / "panel.yaml").write_text(json.dumps(
            {**PANEL_CONFIG, "data": {"file": "wide.csv", "time": "t"},
             "target": {"columns": names}, "search": {**PANEL_CONFIG["search"], "threads": 2}},
            indent=2))
        t0 = time.perf_counter()
        subprocess.run([args.binary, "search", str(tmp / "panel.yaml"), "--out",
                        str(tmp / "run"), "--quiet"], check=True, capture_output=True)
        cli_time = time.perf_counter() - t0
        # The long file as one panel run (data.series_key): the CLI's batch.
        long.to_csv(tmp / "long.csv", index=False)
        (tmp / "long.yaml").write_text(json.dumps(
            {**PANEL_CONFIG, "data": {"file": "long.csv", "time": "t", "series_key": "series"},
             "search": {**PANEL_CONFIG["search"], "threads": 2}}, indent=2))
        t0 = time.perf_counter()
        subprocess.run([args.binary, "search", str(tmp / "long.yaml"), "--out",
                        str(tmp / "long_run"), "--quiet"], check=True, capture_output=True)
        cli_batch_time = time.perf_counter() - t0
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                      dashboard_address=None, silence_logs=40) as cluster, \
            Client(cluster) as client:
        client.submit(lambda: 0).result()  # workers up before the clock starts
        t0 = time.perf_counter()
        result = lagsieve.dask.search_many(PANEL_CONFIG, long, "series", client)
        dask_time = time.perf_counter() - t0
    # The same long frame in one call in this process (the core's batch, 2 threads).
    t0 = time.perf_counter()
    in_process = lagsieve.search({**PANEL_CONFIG, "data": {"time": "t", "series_key": "series"}},
                                 long, threads=2)
    one_call = time.perf_counter() - t0
    print("panel of %d series (n = %d, %d candidates each)" % (
        args.panel, n, int(result.summary["candidates"].iloc[0])))
    print("  %-34s %10.3f s" % ("cli search, 2 threads", cli_time))
    print("  %-34s %10.3f s" % ("cli search of the long file, 2 thr", cli_batch_time))
    print("  %-34s %10.3f s  (%d ok)" % ("dask search_many, 2 workers", dask_time,
                                         int((result.summary["status"] == "ok").sum())))
    print("  %-34s %10.3f s  (%d ok)" % ("lagsieve.search (series_key), 2 thr", one_call,
                                         int((in_process.summary["status"] == "ok").sum())))
    print("  %-34s %10.3f" % ("ratio dask / cli", dask_time / cli_time))
    print("  %-34s %10.3f" % ("ratio lagsieve.search / cli long", one_call / cli_batch_time))


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--binary", help="the built lagsieve CLI (build/lagsieve)")
    parser.add_argument("--repeats", type=int, default=21)
    parser.add_argument("--panel", type=int, default=0, help="series of the Dask panel (0: off)")
    args = parser.parse_args()
    fit_comparison(args)
    search_comparison(args)
    if args.panel:
        if not args.binary:
            sys.exit("--panel needs --binary")
        panel_comparison(args)


if __name__ == "__main__":
    main()
