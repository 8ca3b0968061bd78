"""statsmodels maximum-likelihood optima for the models of ml_optimum_r.json.
Writes ml_optimum_statsmodels.json. Run from the repository root:
  /usr/bin/python3 tests/reference/ml_optimum/make_ml_optimum.py"""
import json
import os
import sys
import warnings

import numpy as np
from statsmodels.tsa.statespace.sarimax import SARIMAX

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "ml_optimum")
r = json.load(open(os.path.join(here, "ml_optimum_r.json")))
data = os.path.join("tests", "reference", "data")

ap = np.genfromtxt(os.path.join(data, "airpassengers.csv"), delimiter=",", names=True)
bj = np.genfromtxt(os.path.join(data, "bjsales.csv"), delimiter=",", names=True)
logap = np.log(ap["passengers"])
d1 = np.diff(logap)
z = d1[12:] - d1[:-12]
dy = np.diff(bj["sales"])
dx = np.diff(bj["lead"])
y = dy[3:]
x = dx[:-3]


def fit(model, start):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        res = model.fit(start_params=start, method="bfgs", maxiter=2000, disp=False,
                        gtol=1e-10, cov_type="approx")
        # Polish with Nelder-Mead-free Newton steps is not available; a second BFGS from the
        # optimum tightens the last digits.
        res = model.fit(start_params=res.params, method="bfgs", maxiter=2000, disp=False,
                        gtol=1e-12, cov_type="approx")
    return res


def describe(label, call, res, r_fit, notes):
    names = list(res.model.param_names)
    rel_ll = abs(res.llf - r_fit["loglik"]) / abs(r_fit["loglik"])
    print("%-24s llf=%.12f (R %.12f, rel %.2e) params=%s" %
          (label, res.llf, r_fit["loglik"], rel_ll, np.array2string(res.params, precision=8)))
    return {
        "label": label, "call": call, "notes": notes,
        "n_used": int(res.nobs),
        "param_names": names,
        "params": res.params.tolist(),
        "se_approx_hessian": res.bse.tolist(),
        "loglik": float(res.llf),
        "sigma2": float(res.params[names.index("sigma2")]),
        "aic": float(res.aic),
        "r_loglik": r_fit["loglik"],
        "rel_diff_loglik_vs_r": rel_ll,
    }


fits = {}
m_air = SARIMAX(z, order=(0, 0, 1), seasonal_order=(0, 0, 1, 12), trend="n")
res_air = fit(m_air, np.array([-0.3, -0.5, 0.0015]))
fits["airline_differenced"] = describe(
    "airline_differenced",
    "SARIMAX(z, order=(0,0,1), seasonal_order=(0,0,1,12), trend='n').fit(method='bfgs', "
    "gtol=1e-12, cov_type='approx')",
    res_air, r["fits"]["airline_differenced"],
    "z = diff(diff(log(AirPassengers)), 12), n = 131; exact stationary likelihood. sigma2 is a "
    "parameter here (not concentrated), its MLE equals SSR/n.")

m_air_u = SARIMAX(logap, order=(0, 1, 1), seasonal_order=(0, 1, 1, 12), trend="n",
                  use_exact_diffuse=True)
res_air_u = fit(m_air_u, np.array([-0.3, -0.5, 0.0015]))
fits["airline_undifferenced_exact_diffuse"] = describe(
    "airline_undifferenced_exact_diffuse",
    "SARIMAX(log(AirPassengers), order=(0,1,1), seasonal_order=(0,1,1,12), trend='n', "
    "use_exact_diffuse=True).fit(method='bfgs', gtol=1e-12, cov_type='approx')",
    res_air_u, r["fits"]["airline_undifferenced"],
    "Undifferenced series with the differencing states in the state vector and an exact diffuse "
    "initialisation; n_used counts all 144 observations (statsmodels' nobs), the likelihood "
    "excludes the diffuse part. Compared with R's undifferenced (kappa = 1e6) fit.")

offset = float(res_air_u.llf - res_air.llf)
fits["airline_undifferenced_exact_diffuse"]["llf_minus_differenced_llf"] = offset
fits["airline_undifferenced_exact_diffuse"]["minus_13_half_log_2pi"] = -6.5 * np.log(2 * np.pi)
fits["airline_undifferenced_exact_diffuse"]["offset_note"] = (
    "statsmodels' exact-diffuse llf equals the differenced-data exact loglik minus "
    "(d + D*S)/2 * log(2 pi) = 13/2 log(2 pi): the 2 pi constant is counted for all 144 "
    "observations although 13 carry no information. Same optimum (params agree).")
print("exact diffuse offset:", offset, -6.5 * np.log(2 * np.pi))

exog = np.column_stack([np.ones(len(y)), x])
m_reg = SARIMAX(y, exog=exog, order=(0, 0, 1), trend="n")
res_reg = fit(m_reg, np.array([0.4, 2.7, 0.5, 0.6]))
fits["regression_ma1"] = describe(
    "regression_ma1",
    "SARIMAX(y, exog=column_stack([1, x]), order=(0,0,1), trend='n').fit(method='bfgs', "
    "gtol=1e-12, cov_type='approx')",
    res_reg, r["fits"]["regression_ma1"],
    "y = diff(BJsales)[4:149], x = diff(BJsales.lead)[1:146], n = 146; params: const (= R's "
    "intercept), x1 (= R's lead_lag3), ma.L1, sigma2.")

write_fixture({
    "description": "statsmodels maximum-likelihood estimates, companion of ml_optimum_r.json.",
    "versions": versions(),
    "conventions": "ma.L1 / ma.S.L12 have R's sign (theta(B) = 1 + theta_1 B); se from the "
                   "inverse numerical Hessian (cov_type='approx'), including sigma2's.",
    "fits": fits,
}, os.path.join(here, "ml_optimum_statsmodels.json"))
