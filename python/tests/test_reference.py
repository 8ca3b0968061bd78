"""Series M (R's BJsales) from a DataFrame: the CLI's estimates, and base R's as in the C++
reference test (tests/reference/series_m, made by make_series_m.R)."""
import json
import shutil

import pandas as pd
import pytest

import lagsieve
from conftest import load_fixture

SERIES_M = {
    "data": {"time": "t"},
    "target": {"column": "sales"},
    "differencing": {"regular": 1},
    "inputs": [{"column": "lead", "delay": 3, "numerator": 0, "denominator": 1}],
    "noise": {"ma": 1, "constant": True},
    # The fixture's base-R fit filters 1/delta(B) from a zero start (fit.filter_start: zero).
    "fit": {"filter_start": "zero"},
}


@pytest.fixture(scope="module")
def series_m(source_dir):
    frame = pd.read_csv(source_dir / "tests/reference/data/bjsales.csv")
    return lagsieve.fit(SERIES_M, frame)


def value(fit, name):
    params = fit.params.set_index("name")["value"]
    return params[name]


def test_series_m_matches_base_r(series_m):
    ref = load_fixture("series_m/series_m_r.json")
    assert series_m.status == "ok"
    assert series_m.n_obs == ref["n"]
    assert series_m.loglik >= ref["loglik"] - 1e-6
    assert series_m.loglik == pytest.approx(ref["loglik"], abs=1e-4)
    names = list(series_m.params["name"])
    delta = next(n for n in names if "delta" in n)
    omega = next(n for n in names if "omega" in n)
    assert value(series_m, delta) == pytest.approx(ref["delta1"], abs=1e-3)
    assert value(series_m, omega) == pytest.approx(ref["omega0"], abs=1e-3)
    assert value(series_m, "constant") == pytest.approx(ref["intercept"], abs=1e-3)
    assert value(series_m, "theta1") == pytest.approx(ref["theta"], abs=1e-3)
    assert series_m.n_params == 5
    gain = series_m.diagnostics["gains"][0]["gain"]
    assert gain == pytest.approx(ref["steady_state_gain"], abs=1e-2)


def test_series_m_equals_the_cli_to_1e10(series_m, cli_json, source_dir, tmp_path):
    shutil.copy(source_dir / "tests/reference/data/bjsales.csv", tmp_path)
    config = {**SERIES_M, "data": {"file": "bjsales.csv", "time": "t"}}
    (tmp_path / "m.yaml").write_text(json.dumps(config))
    doc = cli_json("fit", tmp_path / "m.yaml")
    assert series_m.loglik == pytest.approx(doc["loglik"], rel=1e-10)
    for p, v in zip(doc["params"], series_m.params["value"]):
        assert v == pytest.approx(p["value"], rel=1e-10), p["name"]
