"""The module gives the CLI's numbers: the same fit, search, run folder and forecasts, on the
bundled demo and on R's Seatbelts and BJsales exported as CSV (tests/reference)."""
import json
import shutil

import numpy as np
import pandas as pd
import pytest

import lagsieve

SEATBELTS_CONFIG = {
    "data": {"file": "seatbelts_monthly.csv", "time": "month"},
    "target": {"column": "drivers", "transform": "log"},
    "differencing": {"regular": 0, "seasonal": 1, "period": 12},
    "inputs": [{"column": "PetrolPrice", "delay": 0}, {"column": "law", "delay": 0}],
    "noise": {"ar": 1, "ma": 0, "seasonal_ma": 1, "constant": True},
}

BJSALES_SEARCH = {
    "data": {"file": "bjsales.csv", "time": "t"},
    "target": {"column": "sales"},
    "differencing": {"regular": 1},
    "inputs": [{"column": "lead", "delay": [2, 4], "numerator": 0, "denominator": [0, 1],
                "future": "forecast"}],
    "noise": {"ma": [0, 1], "constant": True},
    "search": {"strategy": "exhaustive", "criterion": "aicc", "threads": 2},
    "backtest": {"first_origin": 110, "step": 10, "horizon": 5, "shortlist": 3},
}


def write_config(folder, config):
    path = folder / "config.yaml"
    path.write_text(json.dumps(config, indent=2) + "\n")
    return path


def assert_same_params(cli_params, fit, rel=1e-12):
    frame = fit.params
    assert list(frame["name"]) == [p["name"] for p in cli_params]
    for p, value, se in zip(cli_params, frame["value"], frame["std_error"]):
        assert value == pytest.approx(p["value"], rel=rel, abs=1e-300), p["name"]
        if p["std_error"] is not None:
            assert se == pytest.approx(p["std_error"], rel=rel), p["name"]


def assert_same_fit(cli_doc, fit, rel=1e-12):
    assert fit.status == cli_doc["status"]
    for key in ("loglik", "aic", "aicc", "bic", "sigma2"):
        assert getattr(fit, key) == pytest.approx(cli_doc[key], rel=rel), key
    assert fit.n_obs == cli_doc["n_obs"]
    assert_same_params(cli_doc["params"], fit, rel)


def test_demo_fit_from_file_and_from_a_frame_equals_the_cli(cli_json, source_dir):
    config = source_dir / "configs" / "demo_single.yaml"
    expected = cli_json("fit", config)
    assert_same_fit(expected, lagsieve.fit(str(config)))
    frame = pd.read_csv(source_dir / "data" / "heat_demand.csv")
    assert_same_fit(expected, lagsieve.fit(config.read_text(), data=frame))


def test_seatbelts_fit_from_a_frame_equals_the_cli(cli_json, source_dir, tmp_path):
    shutil.copy(source_dir / "tests/reference/calendar/seatbelts_monthly.csv", tmp_path)
    expected = cli_json("fit", write_config(tmp_path, SEATBELTS_CONFIG))
    assert expected["status"] == "ok"
    frame = pd.read_csv(tmp_path / "seatbelts_monthly.csv")
    without_file = {k: v for k, v in SEATBELTS_CONFIG.items()}
    without_file["data"] = {"time": "month"}
    fit = lagsieve.fit(without_file, frame)
    assert_same_fit(expected, fit)
    # A PeriodIndex in place of the time column: the same numbers.
    indexed = frame.set_index(pd.PeriodIndex(frame.pop("month"), freq="M"))
    by_index = lagsieve.fit({**without_file, "data": {}}, indexed)
    assert_same_fit(expected, by_index)
    assert isinstance(by_index.residuals.index, pd.DatetimeIndex)
    assert len(fit.residuals) == fit.n_obs
    # Residuals on the rows they belong to: the last is December 1984; 12 rows go to the
    # seasonal difference.
    assert by_index.residuals.index[-1] == pd.Timestamp("1984-12-01")
    assert by_index.residuals.index[0] >= pd.Timestamp("1970-01-01")
    assert list(fit.residuals.index.strftime("%Y-%m")) == list(
        by_index.residuals.index.strftime("%Y-%m"))
    # One-step predictions on the model's (log) scale, as past.csv has them: within a few
    # residual standard deviations of log(drivers).
    assert fit.fitted.attrs["scale"] == "log(target)"
    observed = np.log(np.asarray(frame["drivers"], dtype=float)[-len(fit.fitted):])
    gap = fit.fitted.to_numpy() - observed
    assert np.all(np.abs(gap) < 5 * np.sqrt(fit.sigma2))
    np.testing.assert_allclose(gap, -fit.past["residual"].to_numpy(), rtol=1e-9, atol=1e-12)


def test_search_and_run_folder_equal_the_cli(cli, source_dir, tmp_path):
    shutil.copy(source_dir / "tests/reference/data/bjsales.csv", tmp_path)
    config = write_config(tmp_path, BJSALES_SEARCH)
    cli("search", config, "--out", tmp_path / "by_cli", "--quiet")
    frame = pd.read_csv(tmp_path / "bjsales.csv")
    run = lagsieve.search({**BJSALES_SEARCH, "data": {"time": "t"}}, frame)
    assert run.write(tmp_path / "by_python") == "complete"

    by_cli = pd.read_csv(tmp_path / "by_cli" / "ranking.csv")
    timing = [c for c in by_cli.columns if c.endswith("seconds")]
    pd.testing.assert_frame_equal(run.ranking.drop(columns=timing), by_cli.drop(columns=timing),
                                  check_exact=True)
    by_python = pd.read_csv(tmp_path / "by_python" / "ranking.csv")
    pd.testing.assert_frame_equal(by_python.drop(columns=timing), by_cli.drop(columns=timing),
                                  check_exact=True)
    cli_files = sorted(p.name for p in (tmp_path / "by_cli").iterdir())
    assert sorted(p.name for p in (tmp_path / "by_python").iterdir()) == cli_files
    for name in ("accuracy.csv", "backtest.csv", "comparisons.csv"):
        assert (tmp_path / "by_python" / name).read_text() == \
            (tmp_path / "by_cli" / name).read_text(), name
    pd.testing.assert_frame_equal(run.backtest, pd.read_csv(tmp_path / "by_cli" / "accuracy.csv"))
    cli_fit = json.loads((tmp_path / "by_cli" / "fit.json").read_text())
    assert_same_fit(cli_fit, run.chosen, rel=0)
    assert run.leader.label == run.chosen.label  # the legacy name still answers


def test_a_model_saved_from_python_forecasts_identically_in_the_cli(cli, source_dir, tmp_path):
    shutil.copy(source_dir / "tests/reference/data/bjsales.csv", tmp_path)
    single = {**BJSALES_SEARCH, "data": {"time": "t"},
              "inputs": [{"column": "lead", "delay": 3, "numerator": 0, "denominator": 1,
                          "future": "forecast"}],
              "noise": {"ma": 1, "constant": True}}
    frame = pd.read_csv(tmp_path / "bjsales.csv")
    fit = lagsieve.fit(single, frame)
    fit.save(tmp_path / "model.json")
    doc = json.loads(cli("forecast", tmp_path / "model.json", "--data", tmp_path / "bjsales.csv",
                         "--horizon", 6, "--json").stdout)["scenarios"][0]
    ours = fit.forecast(6)
    assert list(ours["horizon"]) == [1, 2, 3, 4, 5, 6]
    np.testing.assert_array_equal(ours["point"].to_numpy(), np.array(doc["median"]))
    np.testing.assert_array_equal(ours["lower_95"].to_numpy(), np.array(doc["lower"]["0.95"]))
    again = lagsieve.forecast(tmp_path / "model.json", frame, 6)
    pd.testing.assert_frame_equal(again, ours)
    # And a model file of the CLI forecasts the same from Python.
    cli("fit", write_config(tmp_path, {**single, "data": {"file": "bjsales.csv", "time": "t"}}),
        "--save", tmp_path / "cli_model.json")
    from_cli = lagsieve.load_model(tmp_path / "cli_model.json").forecast(frame, 6)
    np.testing.assert_allclose(from_cli["point"], ours["point"], rtol=1e-12)


def test_backtest_of_a_model_file_equals_the_cli(cli, source_dir, tmp_path):
    shutil.copy(source_dir / "tests/reference/data/bjsales.csv", tmp_path)
    single = {**BJSALES_SEARCH, "data": {"file": "bjsales.csv", "time": "t"},
              "inputs": [{"column": "lead", "delay": 3, "denominator": 1, "future": "forecast"}],
              "noise": {"ma": 1, "constant": True}}
    config = write_config(tmp_path, single)
    cli("fit", config, "--save", tmp_path / "deployed.json")
    cli("backtest", config, "--models", tmp_path / "deployed.json", "--out", tmp_path / "bt")
    frame = pd.read_csv(tmp_path / "bjsales.csv")
    tables = lagsieve.backtest({**single, "data": {"time": "t"}}, [tmp_path / "deployed.json"],
                               data=frame)
    for name in ("accuracy", "backtest", "comparisons"):
        pd.testing.assert_frame_equal(tables[name], pd.read_csv(tmp_path / "bt" / (name + ".csv")),
                                      check_exact=True)
    assert len(tables["accuracy"]) >= 2  # the model and the seasonal naive benchmark
