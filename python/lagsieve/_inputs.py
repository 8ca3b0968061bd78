"""Configs and DataFrames as the C++ core takes them.

A config is a YAML file path, YAML text or a dict of the same schema; a dict becomes indented
JSON text (which YAML reads), so messages name its line and key path like a file's.
A DataFrame becomes the columns of the table the CSV reader produces: numbers as float64
arrays (NaN is a missing cell), time stamps as text in the forms the loader reads.
"""

import json
import os

import numpy as np
import pandas as pd

from . import _core

DICT_SOURCE = "<dict config>"
TEXT_SOURCE = "<yaml text>"


def config_source(config):
    """(YAML text, name used in messages and to resolve relative paths)."""
    if isinstance(config, dict):
        return json.dumps(config, indent=2, default=str) + "\n", DICT_SOURCE
    if isinstance(config, os.PathLike):
        config = os.fspath(config)
    if not isinstance(config, str):
        raise TypeError("config: give a YAML file path, YAML text or a dict, not %s"
                        % type(config).__name__)
    # One line without a mapping colon-space and naming an existing file is a path.
    if "\n" not in config and (os.path.exists(config) or config.endswith((".yaml", ".yml"))):
        if not os.path.isfile(config):
            raise _core.InputError(
                "config file '%s' does not exist; check the path" % config)
        with open(config, encoding="utf-8") as f:
            return f.read(), config
    return config, TEXT_SOURCE


def _stamp_text(values):
    """Time stamps as text: dates as YYYY-MM-DD, times as YYYY-MM-DD HH:MM:SS."""
    if isinstance(values, pd.PeriodIndex):
        values = values.to_timestamp()
    if pd.api.types.is_datetime64_any_dtype(values):
        stamps = pd.DatetimeIndex(values)
        if stamps.tz is not None:
            stamps = stamps.tz_convert("UTC").tz_localize(None)
        whole_days = bool(((stamps - stamps.normalize()) == pd.Timedelta(0)).all())
        fmt = "%Y-%m-%d" if whole_days else "%Y-%m-%d %H:%M:%S"
        return [None if pd.isna(t) else t.strftime(fmt) for t in stamps]
    if pd.api.types.is_integer_dtype(values):
        return [str(int(v)) for v in values]
    return [None if (v is None or (isinstance(v, float) and np.isnan(v))) else str(v)
            for v in values]


def frame_columns(frame, time_column):
    """(header, columns, time column to tell the config or None) of a DataFrame.

    The time is the column `time_column` names (data.time of the config), else a DatetimeIndex
    or PeriodIndex (named after data.time, the index name, or `time`).
    """
    if not isinstance(frame, pd.DataFrame):
        raise TypeError("data: give a pandas DataFrame, not %s" % type(frame).__name__)
    header, columns = [], []
    told = None
    index = frame.index
    if (not time_column or time_column not in frame.columns) and isinstance(
            index, (pd.DatetimeIndex, pd.PeriodIndex)):
        name = time_column or index.name or "time"
        header.append(str(name))
        columns.append(_stamp_text(index))
        if not time_column:
            told = str(name)
    for name in frame.columns:
        col = frame[name]
        header.append(str(name))
        if str(name) == time_column:
            columns.append(_stamp_text(col))
        elif pd.api.types.is_bool_dtype(col):
            columns.append(col.to_numpy(dtype=np.float64))
        elif pd.api.types.is_numeric_dtype(col):
            # float64 columns pass without a copy; nullable dtypes give NaN for <NA>.
            columns.append(col.to_numpy(dtype=np.float64, na_value=np.nan))
        else:
            columns.append(_stamp_text(col))
    return header, columns, told


def load(config, data=None):
    """The config with its data loaded (from data.file when `data` is None)."""
    text, name = config_source(config)
    if data is None:
        return _core.load_file(text, name)
    time_column = _core.config_time_column(text, name)
    header, columns, told = frame_columns(data, time_column)
    return _core.load_table(text, name, told, header, columns)


def load_text(text, name, data, one_series=False):
    """load() for a config already read to text (what Dask workers receive); one_series: the
    rows of one series of a panel, without the key column (data.series_key is then ignored)."""
    time_column = _core.config_time_column(text, name)
    header, columns, told = frame_columns(data, time_column)
    return _core.load_table(text, name, told, header, columns, one_series)
