"""statsmodels cross-check of missing_target_r.json: SARIMAX with NaN in the response (the
Kalman filter skips the update there), exact log-likelihood at R's estimates and its own ML fit.
Writes missing_target_statsmodels.json. Run from the repository root (R script first):
  /usr/bin/python3 tests/reference/missing_target/make_missing_target.py"""
import json
import os
import sys
import warnings

import numpy as np
from statsmodels.tsa.statespace.sarimax import SARIMAX

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "missing_target")
r = json.load(open(os.path.join(here, "missing_target_r.json")))

out = []
for c in r["cases"]:
    y = np.array([np.nan if v is None else v for v in c["y"]], dtype=float)
    n = len(y)
    names = c["coef_names"]
    coef = dict(zip(names, c["coef"]))
    cols, params = [], []
    if "intercept" in coef:
        cols.append(np.ones(n))
        params.append(coef["intercept"])
    if c["xreg_name"]:
        cols.append(np.asarray(c["xreg"], dtype=float))
        params.append(coef[c["xreg_name"]])
    exog = np.column_stack(cols) if cols else None
    p, _, q = c["order"]
    params += [coef["ar%d" % (i + 1)] for i in range(p)]
    params += [coef["ma%d" % (i + 1)] for i in range(q)]
    seasonal = (0, 0, 0, 0)
    if "sma1" in coef:
        seasonal = (0, 0, 1, 12)
        params.append(coef["sma1"])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        mod = SARIMAX(y, exog=exog, order=(p, 0, q), seasonal_order=seasonal, trend="n",
                      concentrate_scale=True)
        ll_at_r = float(mod.loglike(np.asarray(params)))
        res = mod.fit(start_params=np.asarray(params), disp=False, maxiter=500)
    out.append({"id": c["id"], "param_names": list(mod.param_names),
                "loglik_at_r_params": ll_at_r, "fit_params": res.params,
                "fit_loglik": float(res.llf), "r_loglik": c["r_loglik"] if "r_loglik" in c else c["loglik"]})
    print("%-22s at R params %.10f  R %.10f  sm fit %.10f" % (c["id"], ll_at_r, c["loglik"], res.llf))

write_fixture({
    "description": "statsmodels SARIMAX with NaN in the response at R's estimates and its own fit",
    "source": "SARIMAX(y, exog=[1, xreg], order=(p,0,q), trend='n', concentrate_scale=True)",
    "versions": versions(),
    "cases": out}, os.path.join(here, "missing_target_statsmodels.json"))
