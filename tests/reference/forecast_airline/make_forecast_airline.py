"""statsmodels forecasts of log(AirPassengers) with the parameters of R's fit held fixed, to
compare R's kappa = 1e6 diffuse treatment with an exact diffuse initialisation.
Writes forecast_airline_statsmodels.json. Run from the repository root (R script first):
  /usr/bin/python3 tests/reference/forecast_airline/make_forecast_airline.py"""
import json
import os
import sys
import warnings

import numpy as np
from statsmodels.tsa.statespace.sarimax import SARIMAX

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "forecast_airline")
r = json.load(open(os.path.join(here, "forecast_airline_r.json")))
ap = np.genfromtxt(os.path.join("tests", "reference", "data", "airpassengers.csv"),
                   delimiter=",", names=True)
logap = np.log(ap["passengers"])

params = np.array(r["coef"] + [r["sigma2"]])
out = {}
for label, exact in (("exact_diffuse", True), ("approximate_diffuse", False)):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        mod = SARIMAX(logap, order=(0, 1, 1), seasonal_order=(0, 1, 1, 12), trend="n",
                      use_exact_diffuse=exact)
        res = mod.smooth(params)
        fc = res.get_forecast(24)
    mean = np.asarray(fc.predicted_mean)
    se = np.asarray(fc.se_mean)
    rel_mean = float(np.max(np.abs(mean - np.array(r["pred"])) / np.abs(np.array(r["pred"]))))
    rel_se = float(np.max(np.abs(se - np.array(r["se"])) / np.array(r["se"])))
    print("%-20s max rel diff vs R: mean %.3e  se %.3e" % (label, rel_mean, rel_se))
    out[label] = {
        "call": "SARIMAX(log(passengers), order=(0,1,1), seasonal_order=(0,1,1,12), trend='n', "
                "use_exact_diffuse=%s).smooth(params).get_forecast(24)" % exact,
        "param_names": list(mod.param_names),
        "params": params.tolist(),
        "mean": mean.tolist(),
        "se": se.tolist(),
        "max_rel_diff_mean_vs_r": rel_mean,
        "max_rel_diff_se_vs_r": rel_se,
    }

write_fixture({
    "description": "statsmodels 24-step forecasts of log(AirPassengers) at R's fitted parameters "
                   "(coef and sigma2 of forecast_airline_r.json), horizons 1..24.",
    "versions": versions(),
    "notes": "exact_diffuse: differencing states with an exact diffuse start (Koopman 1997); "
             "approximate_diffuse: statsmodels' default large-variance start (1e6). R uses "
             "kappa = 1e6 on the differencing states.",
    "horizon": list(range(1, 25)),
    "exact_diffuse": out["exact_diffuse"],
    "approximate_diffuse": out["approximate_diffuse"],
}, os.path.join(here, "forecast_airline_statsmodels.json"))
