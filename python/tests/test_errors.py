"""Bad input from Python: the CLI's messages as lagsieve.InputError (a ValueError)."""
import json
import shutil

import pandas as pd
import pytest

import lagsieve

CONFIG = {
    "data": {"time": "t"},
    "target": {"column": "sales"},
    "inputs": [{"column": "lead", "delay": 3}],
}


@pytest.fixture()
def frame(source_dir):
    return pd.read_csv(source_dir / "tests/reference/data/bjsales.csv")


def test_a_misspelt_key_in_a_dict_names_the_key_path_and_suggests(frame):
    bad = {**CONFIG, "inputs": [{"column": "lead", "dealy": 3}]}
    with pytest.raises(lagsieve.InputError) as err:
        lagsieve.fit(bad, frame)
    assert isinstance(err.value, ValueError)
    text = str(err.value)
    assert "inputs[0]" in text and "dealy" in text and "did you mean" in text and "delay" in text
    assert text.startswith("<dict config>:")


def test_the_message_is_the_clis(cli, source_dir, tmp_path):
    shutil.copy(source_dir / "tests/reference/data/bjsales.csv", tmp_path)
    bad = {**CONFIG, "data": {"file": "bjsales.csv", "time": "t"},
           "target": {"column": "sales", "transfrom": "log"}}
    path = tmp_path / "bad.yaml"
    path.write_text(json.dumps(bad, indent=2) + "\n")
    proc = cli("fit", path, check=False)
    assert proc.returncode == 2
    with pytest.raises(lagsieve.InputError) as err:
        lagsieve.fit(str(path))
    assert proc.stderr.strip() == "lagsieve: error: " + str(err.value)


def test_a_column_missing_from_the_frame_is_named(frame):
    with pytest.raises(lagsieve.InputError, match="column 'lead' .* is not in the header"):
        lagsieve.fit(CONFIG, frame.drop(columns=["lead"]))


def test_a_bad_cell_names_the_row(frame):
    frame = frame.astype({"sales": object})
    frame.loc[4, "sales"] = "n/a?"
    with pytest.raises(lagsieve.InputError, match=r"<DataFrame>:5: target column 'sales'"):
        lagsieve.fit(CONFIG, frame)


def test_too_few_rows_for_the_model_is_bad_input(frame):
    # Too few rows is bad input named as such (a numerical failure would be a status instead).
    with pytest.raises(lagsieve.InputError, match="rows"):
        lagsieve.fit(CONFIG, frame.head(8))
