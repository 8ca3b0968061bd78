"""statsmodels cross-check of likelihood_fixed_r.json: the exact Gaussian log-likelihood at the
same fixed parameters. Writes likelihood_fixed_statsmodels.json.
Run from the repository root (R script first):
  /usr/bin/python3 tests/reference/likelihood_fixed/make_likelihood_fixed.py"""
import json
import os
import sys
import warnings

import numpy as np
from statsmodels.tsa.statespace.sarimax import SARIMAX

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "likelihood_fixed")
r = json.load(open(os.path.join(here, "likelihood_fixed_r.json")))

out_cases = []
for c in r["cases"]:
    m = c["model"]
    y = np.asarray(c["y"], dtype=float)
    n = len(y)
    cols = []
    params = []
    if m["include_mean"]:
        cols.append(np.ones(n))
        params.append(c["params"]["intercept"])
    if m["n_xreg"] > 0:
        cols.append(np.asarray(c["xreg"], dtype=float))
        params.extend(c["params"]["beta"])
    exog = np.column_stack(cols) if cols else None
    params.extend(c["params"]["ar"])
    params.extend(c["params"]["ma"])
    params.extend(c["params"]["sar"])
    params.extend(c["params"]["sma"])
    seasonal = (m["P"], 0, m["Q"], m["period"]) if (m["P"] or m["Q"]) else (0, 0, 0, 0)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        mod_c = SARIMAX(y, exog=exog, order=(m["p"], 0, m["q"]), seasonal_order=seasonal,
                        trend="n", concentrate_scale=True)
        ll_conc = float(mod_c.loglike(np.asarray(params)))
        res_c = mod_c.smooth(np.asarray(params))
        scale = float(res_c.scale)
        mod_s = SARIMAX(y, exog=exog, order=(m["p"], 0, m["q"]), seasonal_order=seasonal,
                        trend="n")
        ll_at_r_sigma2 = float(mod_s.loglike(np.asarray(params + [c["r_sigma2"]])))
    rel = abs(ll_conc - c["r_loglik"]) / abs(c["r_loglik"])
    out_cases.append({
        "id": c["id"],
        "n": n,
        "statsmodels_param_names": list(mod_c.param_names),
        "statsmodels_params": params,
        "statsmodels_loglik": ll_conc,
        "statsmodels_sigma2": scale,
        "statsmodels_loglik_at_r_sigma2": ll_at_r_sigma2,
        "r_loglik": c["r_loglik"],
        "r_sigma2": c["r_sigma2"],
        "rel_diff_loglik": rel,
        "rel_diff_sigma2": abs(scale - c["r_sigma2"]) / abs(c["r_sigma2"]),
    })
    print("%-16s sm=%.10f  R=%.10f  rel=%.2e" % (c["id"], ll_conc, c["r_loglik"], rel))

maxrel = max(c["rel_diff_loglik"] for c in out_cases)
maxrel_s2 = max(c["rel_diff_sigma2"] for c in out_cases)
print("max rel diff loglik statsmodels vs R:", maxrel, " sigma2:", maxrel_s2)
write_fixture({
    "description": "statsmodels exact log-likelihood at the fixed parameters of "
                   "likelihood_fixed_r.json (same case ids, same data: take y/xreg from there).",
    "source": "statsmodels SARIMAX(y, exog=[1, xreg], order=(p,0,q), seasonal_order=(P,0,Q,S), "
              "trend='n', concentrate_scale=True).loglike(params) with the default stationary "
              "initialisation; scale from .smooth(params).scale; also the non-concentrated "
              "loglike(params + [R sigma2]) which must coincide at the concentrated optimum",
    "versions": versions(),
    "max_rel_diff_loglik_vs_r": maxrel,
    "max_rel_diff_sigma2_vs_r": maxrel_s2,
    "cases": out_cases,
}, os.path.join(here, "likelihood_fixed_statsmodels.json"))
