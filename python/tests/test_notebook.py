"""What a notebook shows: fitted values that agree with past.csv, the report's charts as SVG, and
compact HTML tables. Checked against the run folder the CLI writes for the same model (R's
BJsales, tests/reference/data)."""
import json
import shutil

import numpy as np
import pandas as pd
import pytest

import lagsieve

SINGLE = {
    "data": {"file": "bjsales.csv", "time": "t"},
    "target": {"column": "sales"},
    "differencing": {"regular": 1},
    "inputs": [{"column": "lead", "delay": 3, "denominator": 1, "future": "forecast"}],
    "noise": {"ma": 1, "constant": True},
    "forecast": {"horizon": 8},
}


@pytest.fixture(scope="module")
def cli_run(cli, source_dir, tmp_path_factory):
    """`lagsieve search` of the one model (a grid of one): the run folder with its past.csv and
    charts."""
    tmp = tmp_path_factory.mktemp("notebook")
    shutil.copy(source_dir / "tests/reference/data/bjsales.csv", tmp)
    (tmp / "config.yaml").write_text(json.dumps(SINGLE, indent=2) + "\n")
    cli("search", tmp / "config.yaml", "--out", tmp / "run", "--quiet")
    return tmp


@pytest.fixture(scope="module")
def fit(cli_run):
    frame = pd.read_csv(cli_run / "bjsales.csv")
    return lagsieve.fit({**SINGLE, "data": {"time": "t"}}, frame)


def test_fitted_values_are_past_csv_one_step_predictions(cli_run, fit):
    past = pd.read_csv(cli_run / "run" / "past.csv")
    fitted = fit.fitted
    assert list(fitted.index) == list(past["time"])
    np.testing.assert_allclose(fitted.to_numpy(), past["fitted"].to_numpy(), rtol=1e-10)
    assert fitted.attrs["scale"] == "target"
    # The whole table, contributions included, and actual = fitted + residual.
    ours = fit.past
    assert list(ours.columns) == [c for c in past.columns if c != "time"]
    np.testing.assert_allclose(ours.to_numpy(), past.drop(columns=["time"]).to_numpy(),
                               rtol=1e-10, atol=1e-9)
    np.testing.assert_allclose(ours["actual"], ours["fitted"] + ours["residual"], rtol=1e-12)
    # The first step from the filter's start is not y - standardised innovation: the residuals
    # stay the standardised innovations, the fitted values the one-step predictions.
    assert len(fit.residuals) == fit.n_obs


def test_a_search_chosen_agrees_with_its_run_folder_exactly(cli_run, tmp_path):
    frame = pd.read_csv(cli_run / "bjsales.csv")
    run = lagsieve.search({**SINGLE, "data": {"time": "t"}}, frame)
    run.write(tmp_path / "run")
    past = pd.read_csv(tmp_path / "run" / "past.csv", float_precision="round_trip")
    np.testing.assert_array_equal(run.chosen.fitted.to_numpy(), past["fitted"].to_numpy())
    # The run's report charts are the CLI's.
    names = run.charts()
    assert "forecast_fan" in names
    for name in names:
        assert run.chart(name) == (cli_run / "run" / "charts" / (name + ".svg")).read_text(), name


def test_the_fit_draws_the_report_charts(cli_run, fit):
    names = fit.charts()
    for expected in ("forecast_fan", "past_fitted", "past_contributions", "residual_acf"):
        assert expected in names, names
    assert any(n.startswith("impulse_") for n in names), names
    svg = fit.chart("forecast")  # the first word names forecast_fan
    assert svg == fit.chart("forecast_fan")
    assert svg.startswith("<svg") and svg.rstrip().endswith("</svg>")
    # The same forecast fan as the CLI's report of the same model (the search of a grid of
    # one fits the same model on the same sample).
    cli_svg = (cli_run / "run" / "charts" / "forecast_fan.svg").read_text()
    assert chart_numbers(svg) == pytest.approx(chart_numbers(cli_svg), rel=1e-8)
    with pytest.raises(lagsieve.InputError, match="did you mean 'forecast_fan'"):
        fit.chart("forcast_fan")


def chart_numbers(svg):
    """The plotted numbers a chart carries in its data attributes (svg.h)."""
    import re
    out = []
    for values in re.findall(r'data-(?:values|lower|upper|value)="([^"]*)"', svg):
        out.extend(float(v) for v in values.split())
    return out


def test_html_tables_are_compact(fit, cli_run):
    html = fit._repr_html_()
    assert html.count("<table") == 1 and "loglik" in html and "lead" in html
    frame = pd.read_csv(cli_run / "bjsales.csv")
    run = lagsieve.search({**SINGLE, "data": {"time": "t"}}, frame)
    html = run._repr_html_()
    assert html.count("<table") == 1 and "<tr>" in html
