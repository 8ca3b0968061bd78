"""statsmodels cross-check of ljung_box_r.json. Writes ljung_box_statsmodels.json.
Run from the repository root: /usr/bin/python3 tests/reference/ljung_box/make_ljung_box.py"""
import json
import os
import sys

import numpy as np
from statsmodels.stats.diagnostic import acorr_ljungbox

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "ljung_box")
r = json.load(open(os.path.join(here, "ljung_box_r.json")))
x = np.array(r["x"])
out = []
maxrel = 0.0
for t in r["tests"]:
    res = acorr_ljungbox(x, lags=[t["lag"]], model_df=t["fitdf"], return_df=True)
    q = float(res["lb_stat"].iloc[0])
    p = float(res["lb_pvalue"].iloc[0])
    maxrel = max(maxrel, abs(q - t["statistic"]) / t["statistic"], abs(p - t["p_value"]) / t["p_value"])
    out.append({"lag": t["lag"], "fitdf": t["fitdf"], "statistic": q, "p_value": p})
print("max rel diff vs R:", maxrel)
write_fixture({
    "description": "statsmodels acorr_ljungbox(x, lags=[k], model_df=fitdf) on the series x of "
                   "ljung_box_r.json.",
    "versions": versions(),
    "max_rel_diff_vs_r": maxrel,
    "tests": out,
}, os.path.join(here, "ljung_box_statsmodels.json"))
