#!/usr/bin/env python3
"""Many series in one run: series per CPU-second with and without the backtest, the speed-up from
1 to 2 threads, peak memory at two panel sizes and the size of the run folder. Not a test: it
prints what it measured, ratios side by side.

The panel: N series x ROWS daily rows in long format, two drivers per series (x1 with b in 0..3,
r and s in 0..1 varying by series; x2 with b in 0..1), AR(1) or ARMA(2,1) noise by series; numpy
with a fixed seed.

    benchmarks/many_series.py BUILD/lagsieve [--series 100 300] [--rows 730]
    benchmarks/many_series.py BUILD/lagsieve --baseline OLD/lagsieve --grid small \
        --series 100 1000 --rows 730

--grid small searches 8 candidates per series (x1 b 0..3, x2 b 0..1 or left out, AR(1) noise)
instead of 32. --baseline runs another build on the same panels, side by side: series per second
and per CPU-second, peak memory and the run folder, with the ratios of this build to the
baseline. --memory N ... adds peak memory at those panel sizes (one run each, no backtest).

statsmodels SARIMAX on a sample of the same candidates (--sarimax K, default 20; 0 = off): K
candidate fits spread over a few series of the large panel and over the grid, each the nearest
model SARIMAX can express (as benchmarks/compare_python.py: a rational transfer function, r = 1,
becomes six exog lags b..b+5; r = 0 is exact, lags b..b+s), CPU time (process_time, one BLAS
thread) per fit scaled to the large run's number of candidates, against that run's CPU time.
"""
import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import numpy as np  # noqa: E402


def panel(path, count, rows, seed=7):
    rng = np.random.default_rng(seed)
    dates = np.arange(np.datetime64("2022-01-01"), np.datetime64("2022-01-01") + rows)
    with open(path, "w") as f:
        f.write("zone,date,y,x1,x2\n")
        for i in range(count):
            b1, s1, r1, b2 = i % 4, (i // 4) % 2, (i // 8) % 2, (i // 16) % 2
            burn = 100
            n = rows + burn
            x = np.zeros((2, n))
            for k in range(2):
                e = rng.normal(size=n)
                for t in range(1, n):
                    x[k, t] = 0.5 * x[k, t - 1] + e[t]
            def tf(u, b, s, r, w0, w1, d):
                v = np.zeros(n)
                for t in range(n):
                    num = w0 * (u[t - b] if t - b >= 0 else 0.0)
                    if s and t - b - 1 >= 0:
                        num += w1 * u[t - b - 1]
                    v[t] = num + (d * v[t - 1] if r and t > 0 else 0.0)
                return v
            a = rng.normal(size=n)
            noise = np.zeros(n)
            arma21 = i % 3 == 0
            for t in range(2, n):
                if arma21:
                    noise[t] = 0.5 * noise[t - 1] + 0.2 * noise[t - 2] + a[t] + 0.3 * a[t - 1]
                else:
                    noise[t] = 0.6 * noise[t - 1] + a[t]
            y = 10 + tf(x[0], b1, s1, r1, 2.0, 1.0, 0.5) + tf(x[1], b2, 0, 0, 1.0, 0, 0) + noise
            for t in range(burn, n):
                f.write(f"z{i:04d},{dates[t - burn]},{y[t]:.6g},{x[0, t]:.6g},{x[1, t]:.6g}\n")


CONFIG = """data:
  file: panel.csv
  time: date
  series_key: zone
target:
  column: y
inputs:
{inputs}noise:
{noise}
  constant: true
{backtest}"""

GRIDS = {
    "full": ("  - column: x1\n    delay: [0, 3]\n    numerator: [0, 1]\n    denominator: [0, 1]\n"
             "  - column: x2\n    delay: [0, 1]\n", "  ar: [1, 2]\n  ma: [0, 1]", 32),
    "small": ("  - column: x1\n    delay: [0, 3]\n  - column: x2\n    delay: [0, 1]\n",
              "  ar: [1, 1]", 8),
}

BACKTEST = """backtest:
  first_origin: 640
  step: 30
  horizon: 7
  shortlist: 3
  refit: 0
"""


def run(binary, folder, threads, backtest, out, grid="full"):
    inputs, noise, _ = GRIDS[grid]
    (folder / "panel.yaml").write_text(
        CONFIG.format(inputs=inputs, noise=noise, backtest=BACKTEST if backtest else ""))
    cmd = ["/usr/bin/time", "-f", "%e %U %S %M", binary, "search", "panel.yaml", "--out", out,
           "--threads", str(threads), "--quiet"]
    p = subprocess.run(cmd, cwd=folder, capture_output=True, text=True)
    wall, user, sys_, rss = p.stderr.strip().splitlines()[-1].split()
    size = sum(f.stat().st_size for f in (folder / out).rglob("*") if f.is_file())
    files = sum(1 for f in (folder / out).rglob("*") if f.is_file())
    return {"code": p.returncode, "wall": float(wall), "cpu": float(user) + float(sys_),
            "rss_mb": int(rss) / 1024, "folder_mb": size / 1e6, "files": files}


def grid_candidates(grid):
    """Every candidate of GRIDS[grid] as (x1 (b, s, r), x2 b or None, (p, q))."""
    if grid == "full":
        return [((b, s, r), b2, (p, q)) for b in range(4) for s in range(2) for r in range(2)
                for b2 in range(2) for p in (1, 2) for q in (0, 1)]
    return [((b, 0, 0), b2, (1, 0)) for b in range(4) for b2 in (0, 1)]


def sarimax_sample(csv, count, grid, sample, seed=11):
    """CPU seconds per SARIMAX fit over `sample` candidates on a few series of the panel file."""
    import warnings
    try:
        import pandas as pd
        from statsmodels.tsa.statespace.sarimax import SARIMAX
    except ImportError as e:
        return None, "skipped (%s)" % e
    frame = pd.read_csv(csv)
    rng = np.random.default_rng(seed)
    cands = grid_candidates(grid)
    keys = ["z%04d" % i for i in sorted(rng.choice(count, size=min(4, count), replace=False))]
    picks = rng.choice(len(cands), size=sample, replace=len(cands) < sample)
    cpu, fits, failed = 0.0, 0, 0
    for k, c in enumerate([picks[0]] + list(picks)):  # the first, a warm-up, is not counted
        warm_up = k == 0
        k = max(k - 1, 0)
        s = frame[frame["zone"] == keys[k % len(keys)]]
        (b, num, r), b2, (p, q) = cands[c]
        lags = {}
        for j in (range(b, b + 6) if r else range(b, b + num + 1)):
            lags["x1_l%d" % j] = s["x1"].shift(j)
        if b2 is not None:
            lags["x2_l%d" % b2] = s["x2"].shift(b2)
        exog = pd.DataFrame(lags).iloc[9:].to_numpy()
        y = s["y"].iloc[9:].to_numpy()
        t0 = time.process_time()
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            try:
                SARIMAX(y, exog=exog, order=(p, 0, q), trend="c").fit(disp=False)
            except Exception:  # noqa: BLE001 - a failed fit still cost its time
                failed += 1
        if warm_up:
            failed = 0
            continue
        cpu += time.process_time() - t0
        fits += 1
    return cpu / fits, "%d fits on %d series, %d failed" % (fits, len(keys), failed)


def print_sarimax(csv, count, grid, sample, run_cpu, threads):
    if sample <= 0:
        return
    per_fit, note = sarimax_sample(csv, count, grid, sample)
    if per_fit is None:
        print("statsmodels SARIMAX: " + note)
        return
    total = count * GRIDS[grid][2]
    scaled = per_fit * total
    print(f"statsmodels SARIMAX, a sample of the same candidates ({note}): "
          f"{1e3 * per_fit:.1f} CPU-ms per fit; scaled to the run's {total} candidates "
          f"{scaled:.1f} CPU-s against lagsieve's {run_cpu:.1f} CPU-s (search, no backtest, "
          f"{threads} threads): ratio statsmodels / lagsieve {scaled / run_cpu:.1f}")


def side_by_side(title, count, new, old):
    print(title)
    rows = [("exit code", "code", "{:.0f}", None),
            ("wall (s)", "wall", "{:.2f}", None),
            ("CPU (s)", "cpu", "{:.2f}", None),
            ("series per second (wall)", None, "{:.2f}", lambda r: count / r["wall"]),
            ("series per CPU-second", None, "{:.2f}", lambda r: count / r["cpu"]),
            ("peak memory (MB)", "rss_mb", "{:.1f}", None),
            ("run folder (MB)", "folder_mb", "{:.1f}", None),
            ("run folder (files)", "files", "{:.0f}", None)]
    print(f"  {'':28s} {'this build':>12s} {'baseline':>12s} {'ratio':>8s}")
    for name, key, fmt, f in rows:
        a = f(new) if f else new[key]
        b = f(old) if f else old[key]
        ratio = f"{a / b:8.2f}" if b else "       -"
        print(f"  {name:28s} {fmt.format(a):>12s} {fmt.format(b):>12s} {ratio}")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("binary")
    ap.add_argument("--series", type=int, nargs=2, default=[100, 300])
    ap.add_argument("--rows", type=int, default=730)
    ap.add_argument("--grid", choices=sorted(GRIDS), default="full")
    ap.add_argument("--baseline", help="another build of lagsieve, run side by side")
    ap.add_argument("--memory", type=int, nargs="*", default=[],
                    help="panel sizes at which to measure peak memory (no backtest)")
    ap.add_argument("--threads", type=int, default=2)
    ap.add_argument("--sarimax", type=int, default=20,
                    help="statsmodels SARIMAX fits of a sample of the candidates (0: off)")
    args = ap.parse_args()
    binary = os.path.abspath(args.binary)
    baseline = os.path.abspath(args.baseline) if args.baseline else None
    per_series = GRIDS[args.grid][2]
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        small, large = args.series
        if baseline:
            for count in (small, large):
                panel(folder / "panel.csv", count, args.rows)
                new = run(binary, folder, args.threads, False, "new", args.grid)
                old = run(baseline, folder, args.threads, False, "old", args.grid)
                side_by_side(f"{count} series x {args.rows} rows, {per_series} candidates per "
                             f"series, {args.threads} threads, no backtest", count, new, old)
                if count == large:  # the panel file is the large one now
                    print_sarimax(folder / "panel.csv", count, args.grid, args.sarimax,
                                  new["cpu"], args.threads)
            for count in args.memory:
                panel(folder / "panel.csv", count, args.rows)
                new = run(binary, folder, args.threads, False, "new", args.grid)
                old = run(baseline, folder, args.threads, False, "old", args.grid)
                print(f"peak memory at {count} series: this build {new['rss_mb']:.1f} MB, "
                      f"baseline {old['rss_mb']:.1f} MB (ratio {new['rss_mb'] / old['rss_mb']:.2f}); "
                      f"csv {os.path.getsize(folder / 'panel.csv') / 1e6:.1f} MB")
            return 0
        panel(folder / "panel.csv", small, args.rows)
        r1 = run(binary, folder, 1, False, "t1", args.grid)
        r2 = run(binary, folder, 2, False, "t2", args.grid)
        rb = run(binary, folder, 2, True, "bt", args.grid)
        print(f"{small} series x {args.rows} rows, {per_series} candidates per series")
        for name, r in (("1 thread, no backtest", r1), ("2 threads, no backtest", r2),
                        ("2 threads, backtest", rb)):
            print(f"  {name:24s} exit {r['code']}  wall {r['wall']:7.2f} s  cpu {r['cpu']:7.2f} s  "
                  f"series/cpu-s {small / r['cpu']:6.2f}  peak {r['rss_mb']:6.1f} MB  "
                  f"folder {r['folder_mb']:6.1f} MB in {r['files']} files")
        print(f"  speed-up 1 -> 2 threads (wall): {r1['wall'] / r2['wall']:.2f}x")
        panel(folder / "panel.csv", large, args.rows)
        rl = run(binary, folder, 2, False, "large", args.grid)
        print(f"{large} series: wall {rl['wall']:.2f} s, peak {rl['rss_mb']:.1f} MB; peak ratio "
              f"{large} / {small} series: {rl['rss_mb'] / r2['rss_mb']:.2f}; "
              f"csv {os.path.getsize(folder / 'panel.csv') / 1e6:.1f} MB; folder "
              f"{rl['folder_mb']:.1f} MB in {rl['files']} files")
        print_sarimax(folder / "panel.csv", large, args.grid, args.sarimax, rl["cpu"], 2)
        for count in args.memory:
            panel(folder / "panel.csv", count, args.rows)
            r = run(binary, folder, 2, False, "mem", args.grid)
            print(f"peak memory at {count} series: {r['rss_mb']:.1f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
