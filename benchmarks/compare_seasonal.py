#!/usr/bin/python3
"""Seasonal noise: lagsieve against R's arima on the same models and data, side by side.

    /usr/bin/python3 benchmarks/compare_seasonal.py --binary BUILD/benchmarks/seasonal_benchmark

seasonal_benchmark simulates n = 240 monthly rows with two inputs (x1 lags 1-2, x2 lags 2-3,
no denominator) and noise MA(1)xSMA(1)_12, AR(1)xSAR(1)_12 and, for comparison, ARMA(2,1). With
r = 0 the transfer functions are plain lags, so R fits exactly the same model by exact ML:

    arima(y, order = c(p, 0, q), seasonal = list(order = c(P, 0, Q), period = 12),
          xreg = lags, method = "ML")

on the same rows (the first 3 dropped, as lagsieve's likelihood starts at max(b + s) = 3). The
script prints the median CPU time of one full fit on each side (lagsieve's with standard errors
and diagnostics), the ratio R / lagsieve, both log-likelihoods, and lagsieve's candidates per
CPU second of a non-seasonal and a seasonal grid on the seasonal data.
"""
import argparse
import json
import os
import shutil
import subprocess
import sys
import tempfile

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[_var] = "1"

CASES = {  # name -> (p, q, P, Q)
    "ma1_sma1": (0, 1, 0, 1),
    "ar1_sar1": (1, 0, 1, 0),
    "arma21": (2, 1, 0, 0),
}

R_SCRIPT = r"""
args <- commandArgs(trailingOnly = TRUE)
d <- read.csv(args[1])
repeats <- as.integer(args[2])
ord <- as.integer(strsplit(args[3], ",")[[1]])
rows <- 4:nrow(d)  # lagsieve's likelihood starts at max(b + s) = 3 (0-based)
x <- cbind(d$x1[rows - 1], d$x1[rows - 2], d$x2[rows - 2], d$x2[rows - 3])
y <- d$y[rows]
cpu <- numeric(repeats)
for (i in seq_len(repeats)) {
  t0 <- proc.time()
  fit <- arima(y, order = c(ord[1], 0, ord[2]),
               seasonal = list(order = c(ord[3], 0, ord[4]), period = 12),
               xreg = x, method = "ML")
  t1 <- proc.time() - t0
  cpu[i] <- t1[["user.self"]] + t1[["sys.self"]]
}
cat(sprintf("%.9f %.9f %d\n", median(cpu), fit$loglik, fit$code))
"""


def time_r(rscript, csv_path, order, repeats):
    with tempfile.NamedTemporaryFile("w", suffix=".R", delete=False) as f:
        f.write(R_SCRIPT)
        script = f.name
    try:
        out = subprocess.run([rscript, "--vanilla", script, csv_path, str(repeats),
                              ",".join(map(str, order))],
                             check=True, capture_output=True, text=True).stdout.split()
    finally:
        os.unlink(script)
    return {"cpu_ms": 1e3 * float(out[0]), "loglik": float(out[1]), "code": int(out[2])}


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--binary", required=True, help="path of the built seasonal_benchmark")
    ap.add_argument("--repeat", type=int, default=7, help="timing repeats per side, default 7")
    args = ap.parse_args()
    rscript = shutil.which("Rscript") or "/usr/bin/Rscript"
    with tempfile.TemporaryDirectory() as tmp:
        json_path = os.path.join(tmp, "seasonal.json")
        run = subprocess.run([args.binary, "--dump", tmp, "--json", json_path,
                              "--repeat", str(args.repeat)],
                             check=True, capture_output=True, text=True)
        print(run.stdout)
        ours = json.load(open(json_path))
        r = {}
        if os.path.exists(rscript):
            for name, order in CASES.items():
                r[name] = time_r(rscript, os.path.join(tmp, f"{name}.csv"), order, args.repeat)
    print(f"{'case (p,q)(P,Q)_12':22s} {'R arima CPU ms':>14s} {'lagsieve CPU ms':>15s} "
          f"{'ratio':>8s} {'R loglik':>12s} {'lagsieve loglik':>15s}")
    for name, order in CASES.items():
        o = ours["cases"][name]
        label = f"{name} {order[:2]}{order[2:]}"
        if name not in r:
            print(f"{label:22s} {'skipped':>14s} {o['fit_ms']:15.3f}")
            continue
        print(f"{label:22s} {r[name]['cpu_ms']:14.2f} {o['fit_ms']:15.3f} "
              f"{r[name]['cpu_ms'] / o['fit_ms']:7.1f}x {r[name]['loglik']:12.4f} "
              f"{o['loglik']:15.4f}")
    print("\nratio = R CPU time / lagsieve CPU time (full fit: standard errors and diagnostics).")
    for label, g in ours["grid"].items():
        print(f"grid {label:12s}: {g['candidates']} candidates, "
              f"{g['per_cpu_second']:.0f} candidates per CPU second")
    return 0


if __name__ == "__main__":
    sys.exit(main())
