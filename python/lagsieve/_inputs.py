"""Configs and DataFrames as the C++ core takes them.

A config is a YAML file path, YAML text or a dict of the same schema; a dict becomes indented
JSON text (which YAML reads), so messages name its line and key path like a file's.
A DataFrame becomes the columns of the table the CSV reader produces: numbers as float64
arrays (NaN is a missing cell), read by the core as they are, time stamps as text in the forms
the loader reads (integers as an integer array). The config is read once per call, into a
handle (_core.Config) that the calls of the core take.
"""

import collections
import json
import os
import threading

import numpy as np
import pandas as pd

from . import _core

DICT_SOURCE = "<dict config>"
TEXT_SOURCE = "<yaml text>"
FRAME_SOURCE = "<DataFrame>"  # data.file of a config whose data are a DataFrame (never read)


def _with_frame_file(config):
    """A dict config whose data come from a DataFrame, with data.file set when it has none (the
    core's config needs one; a model file keeps the text)."""
    data = config.get("data")
    if data is None:
        return {**config, "data": {"file": FRAME_SOURCE}}
    if isinstance(data, dict) and "file" not in data:
        return {**config, "data": {**data, "file": FRAME_SOURCE}}
    return config  # data.file given, or not a mapping (the core names the problem)


# The JSON text of recent dict configs by their repr (equal reprs, equal texts): a loop fitting
# one config to many frames encodes it once (json's indented encoder is pure Python).
_DICT_TEXTS = collections.OrderedDict()
_DICT_TEXTS_KEPT = 16
_DICT_TEXTS_LOCK = threading.Lock()


def _dict_text(config):
    key = repr(config)
    with _DICT_TEXTS_LOCK:
        text = _DICT_TEXTS.get(key)
        if text is not None:
            _DICT_TEXTS.move_to_end(key)
            return text
    text = json.dumps(config, indent=2, default=str) + "\n"
    with _DICT_TEXTS_LOCK:
        _DICT_TEXTS[key] = text
        if len(_DICT_TEXTS) > _DICT_TEXTS_KEPT:
            _DICT_TEXTS.popitem(last=False)
    return text


def config_source(config, frame=False):
    """(YAML text, name used in messages and to resolve relative paths). `frame`: the data come
    from a DataFrame (a dict config then gets its placeholder data.file)."""
    if isinstance(config, dict):
        if frame:
            config = _with_frame_file(config)
        return _dict_text(config), DICT_SOURCE
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
        # An integer array: the core writes each as its decimal text. Nullable integers with
        # <NA> go as text (None for a missing stamp).
        if not isinstance(values.dtype, np.dtype) and values.hasnans:
            return [None if pd.isna(v) else str(int(v)) for v in values]
        return np.asarray(values, dtype=np.int64)
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
        elif col.dtype == np.float64:
            columns.append(col.to_numpy())  # the column's own array, read in place by the core
        elif pd.api.types.is_numeric_dtype(col):
            # Other dtypes are converted once; nullable dtypes give NaN for <NA>.
            columns.append(col.to_numpy(dtype=np.float64, na_value=np.nan))
        else:
            columns.append(_stamp_text(col))
    return header, columns, told


def read_config(config, frame=False):
    """The config as the core's handle, read and checked once (`frame`: the data come from a
    DataFrame, so data.file may be left out)."""
    text, name = config_source(config, frame)
    return _core.config(text, name, frame and not isinstance(config, dict))


def load(config, data=None):
    """The config with its data loaded (from data.file when `data` is None)."""
    handle = read_config(config, data is not None)
    if data is None:
        return _core.load_file(handle)
    return load_frame(handle, data)


def load_frame(handle, data, one_series=False):
    """The data of a DataFrame loaded for a config handle."""
    header, columns, told = frame_columns(data, handle.time_column)
    return _core.load_table(handle, told, header, columns, one_series)


def load_text(text, name, data, one_series=False):
    """load() for a config already read to text (what Dask workers receive); one_series: the
    rows of one series of a panel, without the key column (data.series_key is then ignored)."""
    return load_frame(_core.config(text, name, True), data, one_series)
