"""statsmodels forecasts for regression with ARMA(1,1) errors and known future regressors.
Writes forecast_regression_statsmodels.json. Run from the repository root (R script first,
only for the comparison fields):
  /usr/bin/python3 tests/reference/forecast_regression/make_forecast_regression.py"""
import json
import os
import sys
import warnings

import numpy as np
from statsmodels.tsa.statespace.sarimax import SARIMAX

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "forecast_regression")
bj = np.genfromtxt(os.path.join("tests", "reference", "data", "bjsales.csv"), delimiter=",",
                   names=True)
dy = np.diff(bj["sales"])
dx = np.diff(bj["lead"])
y_all = dy[3:]
x_all = dx[:-3]
n_fit, h = 130, 10
y = y_all[:n_fit]
exog = np.column_stack([np.ones(n_fit), x_all[:n_fit]])
exog_f = np.column_stack([np.ones(h), x_all[n_fit:n_fit + h]])
r = json.load(open(os.path.join(here, "forecast_regression_r.json")))
assert np.array_equal(y, np.array(r["y"])) and np.array_equal(x_all[n_fit:n_fit + h],
                                                               np.array(r["x_future"]))


def forecast(params):
    """params = [const, beta, ar, ma, sigma2]"""
    mod = SARIMAX(y, exog=exog, order=(1, 0, 1), trend="n")
    res = mod.smooth(params)
    fc = res.get_forecast(steps=h, exog=exog_f)
    return mod, res, np.asarray(fc.predicted_mean), np.asarray(fc.se_mean)


def compare(mean, se, r_entry):
    return (float(np.max(np.abs(mean - r_entry["pred"]) / np.abs(r_entry["pred"]))),
            float(np.max(np.abs(se - r_entry["se"]) / np.array(r_entry["se"]))))


out_fixed = []
with warnings.catch_warnings():
    warnings.simplefilter("ignore")
    for r_entry in r["fixed"]:
        ar, ma, c, beta = r_entry["coef"]
        lin = np.array([c, beta, ar, ma])
        # Concentrated sigma2 at these coefficients, then forecast with it.
        mod_c = SARIMAX(y, exog=exog, order=(1, 0, 1), trend="n", concentrate_scale=True)
        scale = float(mod_c.smooth(lin).scale)
        ll = float(mod_c.loglike(lin))
        mod, res, mean, se = forecast(np.append(lin, scale))
        rm, rs = compare(mean, se, r_entry)
        print("%-8s sigma2=%.10g pred1=%.10f se1=%.10f  rel vs R: mean %.2e se %.2e"
              % (r_entry["id"], scale, mean[0], se[0], rm, rs))
        out_fixed.append({"id": r_entry["id"], "param_names": list(mod.param_names),
                          "params": np.append(lin, scale).tolist(), "loglik": ll,
                          "mean": mean.tolist(), "se": se.tolist(),
                          "max_rel_diff_mean_vs_r": rm, "max_rel_diff_se_vs_r": rs})

    mod = SARIMAX(y, exog=exog, order=(1, 0, 1), trend="n")
    fit = mod.fit(start_params=np.array([0.36, 2.77, 0.6, 0.08, 0.6]), method="bfgs",
                  maxiter=2000, gtol=1e-10, disp=False, cov_type="approx")
    fit = mod.fit(start_params=fit.params, method="bfgs", maxiter=2000, gtol=1e-12,
                  disp=False, cov_type="approx")
    fc = fit.get_forecast(steps=h, exog=exog_f)
    mean, se = np.asarray(fc.predicted_mean), np.asarray(fc.se_mean)
    rm, rs = compare(mean, se, r["ml"])
    print("ml       llf=%.10f (R %.10f) params=%s  rel vs R: mean %.2e se %.2e"
          % (fit.llf, r["ml"]["loglik"], np.array2string(fit.params, precision=6), rm, rs))
    out_ml = {"id": "ml", "param_names": list(mod.param_names), "params": fit.params.tolist(),
              "se_params_approx_hessian": fit.bse.tolist(), "loglik": float(fit.llf),
              "mean": mean.tolist(), "se": se.tolist(),
              "max_rel_diff_mean_vs_r": rm, "max_rel_diff_se_vs_r": rs}

write_fixture({
    "description": "statsmodels forecasts, regression with ARMA(1,1) errors, known future "
                   "regressors; same data and fixed coefficients as forecast_regression_r.json "
                   "(y, x, x_future are stored there).",
    "source": "SARIMAX(y, exog=column_stack([1, x]), order=(1,0,1), trend='n'); "
              ".smooth(params).get_forecast(steps=10, exog=column_stack([1, x_future])) "
              ".predicted_mean / .se_mean; ML by .fit(method='bfgs', gtol=1e-12)",
    "versions": versions(),
    "conventions": "params order: const (= intercept), x1 (= beta of the lag-3 lead), ar.L1, "
                   "ma.L1, sigma2. Fixed cases use sigma2 = concentrated SSR/n at the fixed "
                   "coefficients (from concentrate_scale=True), as R does.",
    "horizon": list(range(1, h + 1)),
    "fixed": out_fixed,
    "ml": out_ml,
}, os.path.join(here, "forecast_regression_statsmodels.json"))
