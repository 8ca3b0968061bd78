"""A long-format panel (data.series_key) in one call: lagsieve.search on a DataFrame gives the
CLI's panel run (R's Seatbelts split into four series, configs/seatbelts_panel.yaml, one of them
too short to search): the same summary and ranking, and write() the same run folder."""
import json
import shutil

import pandas as pd
import pytest

import lagsieve

TIMING = ["seconds", "fit_seconds"]


def without_timing(frame):
    return frame.drop(columns=[c for c in TIMING if c in frame.columns])


def relative_files(folder):
    return sorted(str(p.relative_to(folder)) for p in folder.rglob("*") if p.is_file())


@pytest.fixture(scope="module")
def runs(cli, source_dir, tmp_path_factory):
    tmp = tmp_path_factory.mktemp("panel")
    shutil.copy(source_dir / "configs" / "seatbelts_panel.yaml", tmp / "panel.yaml")
    shutil.copy(source_dir / "data" / "seatbelts_long.csv", tmp)
    config = (tmp / "panel.yaml").read_text().replace("../data/seatbelts_long.csv",
                                                      "seatbelts_long.csv")
    (tmp / "panel.yaml").write_text(config)
    proc = cli("search", tmp / "panel.yaml", "--out", tmp / "by_cli", "--quiet", "--threads", 2,
               check=False)
    assert proc.returncode == 5, proc.stderr  # some series failed, the others finished
    frame = pd.read_csv(tmp / "seatbelts_long.csv")
    text = config.replace("  file: seatbelts_long.csv\n", "")
    assert "file:" not in text
    run = lagsieve.search(text, frame, threads=2)
    return tmp, run


def test_a_panel_from_a_frame_is_a_panel_run(runs):
    _, run = runs
    assert isinstance(run, lagsieve.PanelRun)
    assert run.series == ["drivers", "front", "rear", "vans_pre_law"]
    assert run.status == "some_series_failed"
    assert list(run.failed["series"]) == ["vans_pre_law"]
    assert run.failed["status"].iloc[0] == "bad_data"
    model = run.model_of("front")
    assert model is not None and model.target == "front"  # a series is named by its key
    assert run.model_of("vans_pre_law") is None
    assert run.fit_of("front")["status"] in ("ok", "boundary")
    assert set(run.ranking_of("rear")["series"]) == {"rear"}
    assert "<table" in run._repr_html_()
    with pytest.raises(lagsieve.InputError, match="'frnt' is not in this run"):
        run.model_of("frnt")


def test_the_panel_run_equals_the_cli(runs):
    tmp, run = runs
    by_cli = tmp / "by_cli"
    # Equal but for the timing and where a message names its source (`<DataFrame>`, the dict
    # config's lines) in place of the CLI's files.
    ours = without_timing(run.summary)
    theirs = without_timing(pd.read_csv(by_cli / "summary.csv", keep_default_na=False,
                                        na_values=[""]))
    pd.testing.assert_frame_equal(ours.drop(columns=["reason"]), theirs.drop(columns=["reason"]),
                                  check_exact=True)
    assert ours["reason"].isna().tolist() == theirs["reason"].isna().tolist()
    assert "is constant (every value is 0) in <DataFrame>" in ours["reason"].iloc[3]
    pd.testing.assert_frame_equal(without_timing(run.ranking),
                                  without_timing(pd.read_csv(by_cli / "ranking.csv",
                                                             keep_default_na=False,
                                                             na_values=[""])),
                                  check_exact=True)
    assert run.write(tmp / "by_python") == "some_series_failed"
    by_python = tmp / "by_python"
    assert relative_files(by_python) == relative_files(by_cli)
    for series in ("drivers", "front", "rear"):
        for name in ("accuracy.csv", "backtest.csv", "past.csv", "forecast.json"):
            a = by_python / "series" / series / name
            assert a.read_text() == (by_cli / "series" / series / name).read_text(), a
        pd.testing.assert_frame_equal(
            without_timing(pd.read_csv(by_python / "series" / series / "ranking.csv")),
            without_timing(pd.read_csv(by_cli / "series" / series / "ranking.csv")),
            check_exact=True)
        fit_a = json.loads((by_python / "series" / series / "fit.json").read_text())
        fit_b = json.loads((by_cli / "series" / series / "fit.json").read_text())
        assert fit_a["params"] == fit_b["params"]
        assert fit_a["loglik"] == fit_b["loglik"]


def test_fit_of_a_panel_config_says_what_to_do(source_dir):
    frame = pd.read_csv(source_dir / "data" / "seatbelts_long.csv")
    config = {"data": {"time": "month", "series_key": "series"},
              "target": {"column": "casualties"}, "noise": {"ar": 1}}
    with pytest.raises(lagsieve.InputError, match="data.series_key: a long-format panel is "
                                                  "searched by lagsieve.search"):
        lagsieve.fit(config, frame)
