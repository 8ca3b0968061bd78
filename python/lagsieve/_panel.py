"""The search of a long-format panel (a config with data.series_key) in this process: the batch
of `lagsieve search` on the C++ core, so its tables are the CLI's run folder's."""

import io
import json
import os

import pandas as pd


def _table(path):
    if not os.path.exists(path):
        return pd.DataFrame()
    with open(path, encoding="utf-8") as f:
        text = f.read()
    if not text.strip():
        return pd.DataFrame()
    return pd.read_csv(io.StringIO(text), keep_default_na=False, na_values=[""])


class PanelRun:
    """A finished search of many series: `summary` (one row per series: status, reason, the
    chosen model, its criteria and backtest score), `ranking` (every candidate of every series)
    and each series' model; write() gives the run folder `lagsieve search` writes."""

    def __init__(self, core):
        self._core = core
        self._summary = None
        self._ranking = None

    @property
    def series(self):
        """The series keys, sorted as in the summary."""
        return list(self._core.keys)

    @property
    def status(self):
        """complete, some_series_failed or no_usable_candidate."""
        return self._core.status

    @property
    def summary(self):
        """summary.csv of the run folder as a DataFrame."""
        if self._summary is None:
            self._summary = _table(self._core.file("summary.csv"))
        return self._summary.copy()

    @property
    def ranking(self):
        """The run folder's table of every candidate of every series."""
        if self._ranking is None:
            self._ranking = _table(self._core.file("ranking.csv"))
        return self._ranking.copy()

    @property
    def failed(self):
        """Summary rows of the series without a model (bad data, no usable candidate, ...)."""
        s = self.summary
        return s[s["status"] != "ok"] if len(s) else s

    def _folder(self, key):
        keys = self.series
        if key not in keys:
            from . import InputError
            raise InputError("series '%s' is not in this run (%d series, e.g. %s)"
                             % (key, len(keys), ", ".join(keys[:5])))
        return self._core.folders[keys.index(key)]

    def model_of(self, key):
        """The model of series `key` (a Model: forecast, save); None when it has none."""
        from . import load_model
        path = self._core.file(os.path.join(self._folder(key), "model.json"))
        return load_model(path) if os.path.exists(path) else None

    def fit_of(self, key):
        """fit.json of series `key` as a dict (estimates, criteria, diagnostics, past); None
        when the series has no model."""
        path = self._core.file(os.path.join(self._folder(key), "fit.json"))
        if not os.path.exists(path):
            return None
        with open(path, encoding="utf-8") as f:
            return json.load(f)

    def ranking_of(self, key):
        """The ranking rows of series `key`."""
        r = self.ranking
        return r[r["series"].astype(str) == str(key)].reset_index(drop=True)

    def write(self, path):
        """Writes the run folder `lagsieve search` writes for the panel (series/<name>/ per
        series, summary.csv/json, the ranking, the report). Returns its status."""
        return self._core.write(os.fspath(path))

    def __repr__(self):
        s = self.summary
        ok = int((s["status"] == "ok").sum()) if len(s) else 0
        return "<lagsieve.PanelRun %d series, %d with a model>" % (len(s), ok)

    def _repr_html_(self):
        s = self.summary
        cols = [c for c in ["series", "status", "chosen", "chosen", "criterion", "ljung_box_p",
                            "backtest_score", "benchmark_score", "reason"] if c in s.columns]
        head = "<p><b>%d series</b> &middot; %s</p>" % (len(s), self.status)
        return head + s[cols].head(20).to_html(index=False, float_format=lambda v: "%.6g" % v)
