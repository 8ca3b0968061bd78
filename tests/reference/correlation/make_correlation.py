"""statsmodels cross-check of correlation_r.json (acf, pacf, ccf). Writes
correlation_statsmodels.json. Run from the repository root:
  /usr/bin/python3 tests/reference/correlation/make_correlation.py"""
import json
import os
import sys

import numpy as np
from statsmodels.tsa.stattools import acf, ccf, pacf

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "correlation")
r = json.load(open(os.path.join(here, "correlation_r.json")))
bj = np.genfromtxt(os.path.join("tests", "reference", "data", "bjsales.csv"), delimiter=",",
                   names=True)
dy = np.diff(bj["sales"])
dx = np.diff(bj["lead"])

a = acf(dy, nlags=20, adjusted=False, fft=False)
p = pacf(dy, nlags=20, method="ldb")[1:]
# statsmodels ccf(u, v)[k] = cor(u_{t+k}, v_t) for k >= 0 (divisor n). R's lag k >= 0 is
# ccf(dx, dy)[k]; R's lag -k is cor(dx_{t-k}, dy_t) = cor(dy_{t+k}, dx_t) = ccf(dy, dx)[k].
pos = ccf(dx, dy, adjusted=False)[:16]
neg = ccf(dy, dx, adjusted=False)[1:16]
cc = np.concatenate([neg[::-1], pos])
lags = np.arange(-15, 16)


def rel(u, v):
    u, v = np.asarray(u), np.asarray(v)
    return float(np.max(np.abs(u - v)))


diffs = {"acf_max_abs_diff": rel(a, r["acf"]["value"]),
         "pacf_max_abs_diff": rel(p, r["pacf"]["value"]),
         "ccf_max_abs_diff": rel(cc, r["ccf_lead_sales"]["value"])}
print(diffs)
write_fixture({
    "description": "statsmodels acf / pacf / ccf of the series of correlation_r.json.",
    "source": "acf(dy, nlags=20, adjusted=False, fft=False); pacf(dy, nlags=20, method='ldb') "
              "(lags 1..20); ccf assembled to R's lag convention (see correlation_r.json)",
    "versions": versions(),
    "max_abs_diff_vs_r": diffs,
    "acf": a.tolist(), "pacf": p.tolist(),
    "ccf_lag": lags.tolist(), "ccf": cc.tolist(),
}, os.path.join(here, "correlation_statsmodels.json"))
