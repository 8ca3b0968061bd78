"""statsmodels cross-check of psi_weights_r.json with arma2ma. Writes
psi_weights_statsmodels.json. Run from the repository root:
  /usr/bin/python3 tests/reference/psi_weights/make_psi_weights.py"""
import json
import os
import sys

import numpy as np
from statsmodels.tsa.arima_process import arma2ma

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "psi_weights")
r = json.load(open(os.path.join(here, "psi_weights_r.json")))
out = []
worst = 0.0
for m in r["models"]:
    ar_poly = np.r_[1.0, -np.asarray(m["ar_expanded"], dtype=float)]
    ma_poly = np.r_[1.0, np.asarray(m["ma_expanded"], dtype=float)]
    psi = arma2ma(ar_poly, ma_poly, lags=31)[1:]
    d = float(np.max(np.abs(psi - np.asarray(m["psi_1_to_30"]))))
    worst = max(worst, d)
    out.append({"name": m["name"], "psi_1_to_30": psi.tolist(), "max_abs_diff_vs_r": d})
print("max abs diff vs R:", worst)
write_fixture({
    "description": "statsmodels arma2ma(r_[1, -ar_expanded], r_[1, ma_expanded], lags=31)[1:] "
                   "for the models of psi_weights_r.json.",
    "versions": versions(),
    "max_abs_diff_vs_r": worst,
    "models": out,
}, os.path.join(here, "psi_weights_statsmodels.json"))
