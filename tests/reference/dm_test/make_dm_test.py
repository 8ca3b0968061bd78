"""Second, independent Diebold-Mariano / HLN computation with numpy + scipy on the error series
stored in dm_test_r.json. Writes dm_test_python.json. Run from the repository root:
  /usr/bin/python3 tests/reference/dm_test/make_dm_test.py"""
import json
import os
import sys

import numpy as np
from scipy import stats

sys.path.insert(0, os.path.join("tests", "reference", "common"))
from json_writer import write_fixture, versions  # noqa: E402

here = os.path.join("tests", "reference", "dm_test")
r = json.load(open(os.path.join(here, "dm_test_r.json")))
e1 = np.array(r["e1"])
e2 = np.array(r["e2"])
losses = {"squared": np.square, "absolute": np.abs}

cases = []
maxrel = 0.0
for rc in r["cases"]:
    h = rc["h"]
    d = losses[rc["loss"]](e1) - losses[rc["loss"]](e2)
    n = d.size
    dc = d - d.mean()
    # Autocovariances via a full correlation, divisor n.
    full = np.correlate(dc, dc, mode="full")[n - 1:] / n
    V = full[0] + 2.0 * full[1:h].sum()
    dm = d.mean() / np.sqrt(V / n)
    hln = dm * np.sqrt((n + 1 - 2 * h + h * (h - 1) / n) / n)
    p = 2.0 * stats.t.sf(abs(hln), df=n - 1)
    c = {"loss": rc["loss"], "h": h, "n": n, "dbar": d.mean(), "V": V, "dm": dm,
         "p_value_normal": 2.0 * stats.norm.sf(abs(dm)), "dm_hln": hln, "p_value_hln_t": p}
    for k in ("dbar", "V", "dm", "dm_hln", "p_value_hln_t", "p_value_normal"):
        maxrel = max(maxrel, abs(c[k] - rc[k]) / abs(rc[k]))
    cases.append(c)
    print("%-8s h=%d DM=%.10f HLN=%.10f p=%.10f" % (rc["loss"], h, dm, hln, p))
print("max rel diff vs R:", maxrel)
write_fixture({
    "description": "numpy/scipy recomputation of dm_test_r.json (same e1, e2 stored there).",
    "versions": versions(),
    "max_rel_diff_vs_r": maxrel,
    "cases": cases,
}, os.path.join(here, "dm_test_python.json"))
