#!/usr/bin/python3
"""Per-fit time of lagsieve against general-purpose reference libraries, on the same data.

Run with Debian's interpreter (it has statsmodels):

    /usr/bin/python3 benchmarks/compare_fit.py --binary BUILD/benchmarks/fit_benchmark

The benchmark binary writes its simulated data (n = 500, two inputs with r = 1, s = 1, ARMA(2,1)
noise) with --dump; this script fits the nearest model the reference libraries can express, a
regression with ARMA(2,1) errors whose regressors are lags b..b+5 of each input (a truncated
impulse response in place of each rational transfer function), with a constant, by exact ML:

  * statsmodels SARIMAX(order=(2, 0, 1), trend="c", exog=lags), default optimiser;
  * R stats::arima(order = c(2, 0, 1), xreg = lags, method = "ML"), where Rscript is installed.

Every time is the median over repeats, measured in the same run on the same machine. The
reference fits estimate more parameters (12 lag coefficients instead of 4 omegas and 2 deltas),
so the comparison is "the model each tool can fit for this question", not identical models.
"""
import argparse
import json
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
import warnings

# One BLAS thread, as in the other comparison scripts, so the CPU ratios compare one core with
# one core (R and lagsieve are single-threaded here).
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[_var] = "1"

# Delays of the two simulated inputs (see fit_benchmark.cpp) and the lag window used for them.
DELAYS = {"x1": 1, "x2": 2}
WINDOW = 6  # lags b .. b + 5

R_SCRIPT = r"""
args <- commandArgs(trailingOnly = TRUE)
d <- read.csv(args[1])
repeats <- as.integer(args[2])
delays <- c(x1 = 1L, x2 = 2L)
window <- 6L
first <- max(delays + window - 1L) + 1L
rows <- first:nrow(d)
x <- do.call(cbind, lapply(names(delays), function(v) {
  sapply(seq_len(window) - 1L, function(j) d[[v]][rows - delays[[v]] - j])
}))
y <- d$y[rows]
wall <- numeric(repeats)
cpu <- numeric(repeats)
for (i in seq_len(repeats)) {
  t0 <- proc.time()
  fit <- arima(y, order = c(2, 0, 1), xreg = x, method = "ML")
  t1 <- proc.time() - t0
  wall[i] <- t1[["elapsed"]]
  cpu[i] <- t1[["user.self"]] + t1[["sys.self"]]
}
cat(sprintf("%.9f %.9f %.9f %d\n", median(wall), median(cpu), fit$loglik, fit$code))
"""


def run_ours(binary, repetitions):
    out = subprocess.run(
        [binary, "--benchmark_format=json", f"--benchmark_repetitions={repetitions}",
         "--benchmark_report_aggregates_only=true"],
        check=True, capture_output=True, text=True).stdout
    results = {}
    for b in json.loads(out)["benchmarks"]:
        if b.get("aggregate_name") != "median":
            continue
        results[b["run_name"]] = b
    return results


def to_ms(entry, key="real_time"):
    scale = {"ns": 1e-6, "us": 1e-3, "ms": 1.0, "s": 1e3}[entry["time_unit"]]
    return entry[key] * scale


def read_csv(path):
    import numpy as np
    with open(path) as f:
        header = f.readline().strip().split(",")
    values = np.loadtxt(path, delimiter=",", skiprows=1)
    return {name: values[:, i] for i, name in enumerate(header)}


def lag_design(data):
    import numpy as np
    first = max(b + WINDOW - 1 for b in DELAYS.values()) + 1
    n = len(data["y"])
    rows = np.arange(first, n)
    cols = [data[v][rows - b - j] for v, b in DELAYS.items() for j in range(WINDOW)]
    return data["y"][rows], np.column_stack(cols)


def time_statsmodels(data, repeats):
    try:
        from statsmodels.tsa.statespace.sarimax import SARIMAX
    except ImportError as exc:  # pragma: no cover - depends on the machine
        return None, f"statsmodels not available ({exc}); ratio skipped"
    y, x = lag_design(data)
    wall, cpu = [], []
    res = None
    for _ in range(repeats):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            t0, c0 = time.perf_counter(), time.process_time()
            res = SARIMAX(y, exog=x, order=(2, 0, 1), trend="c").fit(disp=False)
            wall.append(time.perf_counter() - t0)
            cpu.append(time.process_time() - c0)
    return {"ms": 1e3 * statistics.median(wall), "cpu_ms": 1e3 * statistics.median(cpu),
            "loglik": float(res.llf), "repeats": repeats}, None


def time_r(csv_path, repeats):
    rscript = shutil.which("Rscript") or ("/usr/bin/Rscript" if os.path.exists("/usr/bin/Rscript") else None)
    if rscript is None:
        return None, "Rscript not found; R comparison skipped"
    with tempfile.NamedTemporaryFile("w", suffix=".R", delete=False) as f:
        f.write(R_SCRIPT)
        script = f.name
    try:
        out = subprocess.run([rscript, "--vanilla", script, csv_path, str(repeats)],
                             check=True, capture_output=True, text=True).stdout.split()
    except subprocess.CalledProcessError as exc:
        return None, f"R failed ({exc.stderr.strip()[:200]}); R comparison skipped"
    finally:
        os.unlink(script)
    return {"ms": 1e3 * float(out[0]), "cpu_ms": 1e3 * float(out[1]), "loglik": float(out[2]),
            "code": int(out[3]), "repeats": repeats}, None


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--binary", required=True, help="path of the built fit_benchmark")
    ap.add_argument("--repetitions", type=int, default=10,
                    help="benchmark repetitions for lagsieve (median taken), default 10")
    ap.add_argument("--repeats", type=int, default=7,
                    help="fits per reference library (median taken), default 7")
    ap.add_argument("--keep-csv", help="also keep the simulated data at this path")
    args = ap.parse_args()

    with tempfile.TemporaryDirectory() as tmp:
        csv_path = args.keep_csv or os.path.join(tmp, "fit_benchmark_data.csv")
        subprocess.run([args.binary, "--dump", csv_path], check=True)
        data = read_csv(csv_path)
        ours = run_ours(args.binary, args.repetitions)
        sm, sm_note = time_statsmodels(data, args.repeats)
        r, r_note = time_r(csv_path, args.repeats)

    full = ours["BM_Fit"]
    bare = ours["BM_FitWithoutStandardErrors"]
    evaluation = ours["BM_ProfileLoglik"]
    ours_ms, ours_cpu = to_ms(full), to_ms(full, "cpu_time")
    print(f"data: n = {len(data['y'])}, two inputs (b = 1, 2; s = 1, r = 1), ARMA(2,1) noise, constant")
    print(f"lagsieve exact ML, median of {args.repetitions} repetitions (wall / CPU):")
    print(f"  fit with standard errors and diagnostics : {ours_ms:7.2f} / {ours_cpu:6.2f} ms "
          f"(loglik {full['loglik']:.4f}, {full['evaluations']:.0f} optimiser evaluations)")
    print(f"  fit without standard errors              : {to_ms(bare):7.2f} / "
          f"{to_ms(bare, 'cpu_time'):6.2f} ms")
    print(f"  one profile likelihood evaluation        : {to_ms(evaluation) * 1e3:7.1f} / "
          f"{to_ms(evaluation, 'cpu_time') * 1e3:6.1f} us")
    print()
    print("Times are medians; a machine shared with other work inflates wall time, so both are shown.")
    header = f"{'fit (same data)':44s} {'wall ms':>9s} {'CPU ms':>9s} {'loglik':>10s} " \
             f"{'wall ratio':>10s} {'CPU ratio':>10s}"
    print(header)
    rows = [("statsmodels SARIMAX, lag window", sm, sm_note),
            ("R stats::arima ML, lag window", r, r_note)]
    for name, res, note in rows:
        if res is None:
            print(f"{name:44s} skipped: {note}")
            continue
        label = f"{name} (x{res['repeats']})"
        print(f"{label:44s} {res['ms']:9.2f} {res['cpu_ms']:9.2f} {res['loglik']:10.3f} "
              f"{res['ms'] / ours_ms:9.1f}x {res['cpu_ms'] / ours_cpu:9.1f}x")
    print(f"{'lagsieve, rational transfer functions':44s} {ours_ms:9.2f} {ours_cpu:9.2f} "
          f"{full['loglik']:10.3f} {1.0:9.1f}x {1.0:9.1f}x")
    print("\nratio = baseline time / lagsieve time. The log-likelihoods belong to different models "
          f"and samples (the lag window drops {max(b + WINDOW - 1 for b in DELAYS.values()) + 1} "
          "rows, lagsieve 3); they only show that each fit converged.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
