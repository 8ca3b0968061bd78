"""statsmodels exact-ML optima for the candidates of optimum_grid_r.json (same data, same
columns, same sample). SARIMAX(y, exog=[1, lag columns], order=(p, 0, q), trend='n') with its
default start and optimiser (lbfgs, maxiter 500). Writes optimum_grid_statsmodels.json.
Run from the repository root:
  /usr/bin/python3 tests/reference/optimum_grid/make_optimum_grid.py"""
import json
import os
import sys
import warnings

import numpy as np
from statsmodels.tsa.statespace.sarimax import SARIMAX

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "optimum_grid")
r = json.load(open(os.path.join(here, "optimum_grid_r.json")))
n = r["n"]
x = {name: np.array(r[name]) for name in ("x1", "x2", "x3")}
y = np.array(r["y"])
rows = np.arange(3, n)  # 0-based rows 3..n-1 = R's 4..n


def lag(v, k):
    return v[rows - k]


cases = []
for c in r["cases"]:
    cols = [np.ones(len(rows))]
    cols += [lag(x["x1"], k) for k in range(0, c["s1"] + 1)]
    cols += [lag(x["x2"], k) for k in range(1, 2 + c["s2"])]
    cols += [lag(x["x3"], k) for k in range(2, 3 + c["s3"])]
    exog = np.column_stack(cols)
    model = SARIMAX(y[rows], exog=exog, order=(c["p"], 0, c["q"]), trend="n")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            res = model.fit(disp=False, maxiter=500)
            ll, ok = float(res.llf), True
        except Exception:  # noqa: BLE001
            ll, ok = None, False
    cases.append({"id": c["id"], "ok": ok, "loglik": ll})
    print(c["id"], ll, c["loglik"])

write_fixture({
    "description": "statsmodels exact-ML optimum of every candidate of optimum_grid_r.json",
    "source": "SARIMAX(y, exog=[1, lags], order=(p,0,q), trend='n').fit(disp=False, maxiter=500)",
    "versions": versions(),
    "cases": cases}, os.path.join(here, "optimum_grid_statsmodels.json"))
