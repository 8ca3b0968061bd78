#!/usr/bin/python3
"""Backtest cost of lagsieve beside an estimate for statsmodels SARIMAX, in one run.

    /usr/bin/python3 benchmarks/compare_backtest.py [--build build] [--workdir DIR] [--origins 6]

Steps:
 1. backtest_benchmark (build/benchmarks/backtest_benchmark): the top 20 of a search plus two
    benchmarks, 63 origins (50 with all K = 14 actuals), refit at every origin and never, with
    1 and 2 threads; it writes the data and its numbers to DIR.
 2. statsmodels refits ONE comparable model at a handful of those origins, warm-started from the
    previous origin's estimates as lagsieve does, and forecasts 14 steps twice per origin (the
    forecast input by its own AR(1) model, and with its real future). The mean CPU time per origin
    is scaled to the benchmark's work (models x origins) and set against lagsieve's CPU time.

statsmodels has no rational transfer function: the comparable model is a regression with
ARMA(2,1) errors and a constant whose regressors are lags 1..6 of x1 (a truncated impulse response
in place of (w0 + w1 B) B / (1 - d1 B)), lag 2 of x2 and the step event, i.e. the simulated
truth's structure. One BLAS thread: the comparison is per core.
Must run under Debian's /usr/bin/python3 (statsmodels is installed there).
"""
import argparse
import json
import os
import subprocess
import sys
import time
import warnings

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[_var] = "1"

import numpy as np  # noqa: E402

X1_LAGS = range(1, 7)  # lags 1..6 of x1
X2_LAG = 2


def load_csv(path):
    table = np.genfromtxt(path, delimiter=",", names=True, dtype=None, encoding="utf-8")
    return {name: np.asarray(table[name], dtype=float) for name in ("y", "x1", "x2")}


def design(x1, x2, step, rows):
    """Regressors at target rows `rows`: x1 lags 1..6, x2 lag 2, the step (first row usable: 6)."""
    cols = [x1[rows - j] for j in X1_LAGS] + [x2[rows - X2_LAG], step[rows]]
    return np.column_stack(cols)


def one_origin(data, step, origin, horizon, previous):
    """Fit on rows [6, origin), forecast origin .. origin + horizon - 1 twice. Returns
    (CPU seconds, params, production forecasts, oracle forecasts, converged)."""
    from statsmodels.tsa.statespace.sarimax import SARIMAX
    first = max(X1_LAGS)
    y, x1, x2 = data["y"], data["x1"], data["x2"]
    c0 = time.process_time()
    train = np.arange(first, origin)
    res = SARIMAX(y[train], exog=design(x1, x2, step, train), order=(2, 0, 1), trend="c").fit(
        disp=False, start_params=previous)
    # Production: x1's future from its own AR(1) model with a constant (x2 and the event are known).
    own = SARIMAX(x1[:origin], order=(1, 0, 0), trend="c").fit(disp=False)
    x1_prod = x1.copy()
    x1_prod[origin:origin + horizon] = own.forecast(horizon)
    future = np.arange(origin, origin + horizon)
    prod = res.get_forecast(horizon, exog=design(x1_prod, x2, step, future))
    oracle = res.get_forecast(horizon, exog=design(x1, x2, step, future))
    # Both tools report intervals at two levels.
    for f in (prod, oracle):
        f.conf_int(alpha=0.2)
        f.conf_int(alpha=0.05)
    cpu = time.process_time() - c0
    converged = bool(res.mle_retvals.get("converged", True)) if res.mle_retvals else True
    return cpu, res.params, prod.predicted_mean, oracle.predicted_mean, converged


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--build", default="build", help="build directory with benchmarks/backtest_benchmark")
    ap.add_argument("--workdir", default="/tmp/lagsieve_backtest_bench")
    ap.add_argument("--origins", type=int, default=6, help="origins refitted by statsmodels, default 6")
    ap.add_argument("--no-run", action="store_true",
                    help="reuse WORKDIR/backtest_benchmark.json instead of running the benchmark")
    args = ap.parse_args()

    if not args.no_run:
        binary = os.path.join(args.build, "benchmarks", "backtest_benchmark")
        print(f"$ {binary} --workdir {args.workdir}", flush=True)
        proc = subprocess.run([binary, "--workdir", args.workdir])
        if proc.returncode not in (0, 1):  # 1: runs not identical, still worth comparing
            sys.exit(f"backtest_benchmark failed ({proc.returncode})")
    with open(os.path.join(args.workdir, "backtest_benchmark.json")) as f:
        ours = json.load(f)
    runs = {(r["threads"], r["refit"]): r for r in ours["runs"]}
    ours_cpu = runs.get((1, 1), runs[(2, 1)])["cpu_seconds"]

    try:
        import statsmodels
        # Imported before the warnings are silenced: the import installs its own filters.
        import statsmodels.tsa.statespace.sarimax  # noqa: F401
    except ImportError as exc:  # pragma: no cover - depends on the machine
        print(f"statsmodels not available ({exc}); comparison skipped")
        return
    data = load_csv(ours["data"])
    n = len(data["y"])
    step = (np.arange(n) >= ours["event_row"]).astype(float)
    horizon = ours["horizon"]
    first, full = ours["first_origin"], ours["full_origins"]
    picks = sorted({first + round(k * (full - 1) / max(1, args.origins - 1)) for k in range(args.origins)})

    print(f"\nstatsmodels {statsmodels.__version__}: SARIMAX(2,0,1)+c, exog = x1 lags 1..6, x2 lag 2, step; "
          f"x1 forecast by AR(1)+c; origins {picks}")
    times, previous = [], None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for origin in picks:
            cpu, previous, prod, oracle, converged = one_origin(data, step, origin, horizon, previous)
            times.append(cpu)
            mae = float(np.mean(np.abs(data["y"][origin:origin + horizon] - prod)))
            print(f"  origin {origin}: {1e3 * cpu:8.1f} ms CPU (fit + own model + 2 forecasts); "
                  f"production MAE over {horizon} steps {mae:.3f}{'' if converged else '; optimiser did not converge'}")
    warm = times[1:] if len(times) > 1 else times
    per_origin = sum(warm) / len(warm)
    work = ours["model_candidates"] * ours["origins"]
    theirs = per_origin * work
    ours_per = 1e3 * ours_cpu / work
    print(f"\nper model and origin (warm-started refit, own model of x1, 2 forecasts), CPU:")
    print(f"  statsmodels {1e3 * per_origin:8.1f} ms (mean of {len(warm)} warm origins; cold first "
          f"{1e3 * times[0]:.1f} ms)")
    print(f"  lagsieve    {ours_per:8.2f} ms (whole 1-thread job / {work} model-origins)")
    print(f"scaled to the benchmark's {ours['model_candidates']} models x {ours['origins']} origins: "
          f"statsmodels about {theirs:.0f} CPU s ({theirs / 60:.1f} min on one core, about "
          f"{theirs / 120:.1f} min on two), lagsieve {ours_cpu:.2f} CPU s: ratio {theirs / ours_cpu:.0f}x")
    with open(os.path.join(args.workdir, "compare_backtest.json"), "w") as f:
        json.dump({"statsmodels_version": statsmodels.__version__, "origins": picks, "cpu_seconds": times,
                   "per_origin_seconds": per_origin, "scaled_seconds": theirs,
                   "lagsieve_cpu_seconds": ours_cpu, "ratio": theirs / ours_cpu}, f, indent=1)


if __name__ == "__main__":
    main()
