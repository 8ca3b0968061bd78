"""lagsieve from Python: the C++ engine of the `lagsieve` command on pandas DataFrames.

Every call takes a config as a YAML file path, YAML text or a dict of the same schema, and
optionally the data as a DataFrame (a time column named by data.time, or a DatetimeIndex) in
place of data.file. The numbers are the CLI's: the DataFrame goes through the same loader
(calendar, gaps, missing values) and the same fit, search and backtest code.

    import lagsieve
    fit = lagsieve.fit("configs/demo_single.yaml")
    fit.params, fit.aic, fit.forecast(12)
    run = lagsieve.search(config_dict, frame)
    run.ranking, run.chosen.params, run.write("runs/from_python")
"""

import difflib
import io
import json
import os

import numpy as np
import pandas as pd

from . import _core
from ._inputs import frame_columns, load, load_frame, read_config
from ._panel import PanelRun

InputError = _core.InputError  # bad input: the CLI's message; a subclass of ValueError
NumericalError = _core.NumericalError

__all__ = ["fit", "search", "screen", "backtest", "load_model", "forecast", "revalidate", "Fit", "SearchRun",
           "PanelRun", "Model", "InputError", "NumericalError"]


def _time_index(times, dated=True):
    """Time stamps as an index: integers stay integers, dates become a DatetimeIndex."""
    if all(t.lstrip("-").isdigit() for t in times):
        return pd.Index([int(t) for t in times], dtype="int64", name="time" if dated else "row")
    try:
        return pd.DatetimeIndex(pd.to_datetime(times), name="time")
    except (ValueError, TypeError):
        return pd.Index(times, name="time")


def _forecast_frame(doc, dated):
    """The forecast JSON of the core as a long DataFrame, one row per step."""
    steps = len(doc["median"])
    times = doc["time"] if any(doc["time"]) else [str(doc["origin_rows"] + h + 1)
                                                   for h in range(steps)]
    out = pd.DataFrame({"time": _time_index(times, dated and any(doc["time"])),
                        "horizon": np.arange(1, steps + 1),
                        "point": doc["median"], "mean": doc["mean"]})
    for level in doc["levels"]:
        key = "%g" % level
        pct = "%g" % (100 * level)
        out["lower_" + pct] = doc["lower"][key]
        out["upper_" + pct] = doc["upper"][key]
    for level in doc["levels"]:
        key = "%g" % level
        pct = "%g" % (100 * level)
        out["lower_%s_inputs_known" % pct] = doc["lower_inputs_known"][key]
        out["upper_%s_inputs_known" % pct] = doc["upper_inputs_known"][key]
    out["se_transformed"] = doc["se_transformed"]
    out.attrs["input_treatment"] = doc["input_treatment"]
    out.attrs["parameter_uncertainty"] = doc["parameter_uncertainty"]
    return out


def _future_columns(future):
    if future is None:
        return {}
    if isinstance(future, pd.DataFrame):
        return {str(c): future[c].to_numpy(dtype=np.float64) for c in future.columns
                if pd.api.types.is_numeric_dtype(future[c])}
    return {str(k): np.asarray(v, dtype=np.float64) for k, v in dict(future).items()}


def _read_chart(folder, name):
    """charts/<name>.svg; a name that starts only one chart's name stands for it ("forecast"
    for "forecast_fan")."""
    names = sorted(os.path.splitext(f)[0] for f in os.listdir(folder) if f.endswith(".svg"))
    starting = [n for n in names if n.startswith(str(name) + "_")]
    if name not in names and len(starting) == 1:
        name = starting[0]
    if name not in names:
        close = difflib.get_close_matches(str(name), names, n=1)
        hint = " (did you mean '%s'?)" % close[0] if close else ""
        raise InputError("chart '%s' is not drawn for this object%s; its charts are: %s"
                         % (name, hint, ", ".join(names)))
    with open(os.path.join(folder, name + ".svg"), encoding="utf-8") as f:
        return f.read()


class Model:
    """A fitted model (a model file's content): forecasts from any history of its series."""

    def __init__(self, core):
        self._core = core

    @property
    def target(self):
        return self._core.target

    def to_dict(self):
        """The model file's content."""
        return json.loads(self._core.json())

    def save(self, path):
        """Writes the model file `lagsieve forecast` and `revalidate` read."""
        self._core.save(str(path))

    def forecast(self, data, horizon, future=None, levels=None, parameter_uncertainty=True):
        """Forecasts `horizon` steps after the history `data` (a DataFrame with the target and
        the model's inputs; the model is re-filtered, not re-fitted). `future`: a DataFrame or
        dict of future input values (fewer rows than the horizon: known for those steps, then
        forecast by the input's own model)."""
        header, columns, told = frame_columns(data, self._core.time_column)
        doc = json.loads(self._core.forecast_table(told, header, columns, int(horizon),
                                                   _future_columns(future), list(levels or []),
                                                   bool(parameter_uncertainty)))
        return _forecast_frame(doc, True)

    def __repr__(self):
        return "<lagsieve.Model %s>" % self.to_dict().get("label", self.target)


class Fit:
    """One fitted model: estimates, criteria, residuals, diagnostics; save and forecast."""

    def __init__(self, core):
        self._core = core
        self._json = None
        self._rows = None

    @property
    def _doc(self):
        """fit.json's content, made by the core when first asked for (not by the fit)."""
        if self._json is None:
            self._json = json.loads(self._core.json())
        return self._json

    # Numbers of the fit (NaN where the fit failed).
    def _number(self, key):
        v = self._doc.get(key)
        return float("nan") if v is None else float(v)

    status = property(lambda self: self._doc["status"])
    message = property(lambda self: self._doc["message"])
    label = property(lambda self: self._doc["label"])
    series = property(lambda self: self._doc["series"])
    loglik = property(lambda self: self._number("loglik"))
    aic = property(lambda self: self._number("aic"))
    aicc = property(lambda self: self._number("aicc"))
    bic = property(lambda self: self._number("bic"))
    sigma2 = property(lambda self: self._number("sigma2"))
    n_obs = property(lambda self: int(self._doc["n_obs"]))
    n_params = property(lambda self: int(self._doc["n_params"]))
    usable = property(lambda self: self._core.usable)

    @property
    def params(self):
        """DataFrame: name, value, std_error (NaN where the curvature is not usable)."""
        rows = self._doc["params"]
        return pd.DataFrame({"name": [r["name"] for r in rows],
                             "value": [float(r["value"]) for r in rows],
                             "std_error": [np.nan if r["std_error"] is None else
                                           float(r["std_error"]) for r in rows]})

    @property
    def diagnostics(self):
        """Ljung-Box, gains, roots, residual autocorrelation, residual-input checks, warnings;
        plus what was missing in the data and the detected outliers (when enabled)."""
        d = dict(self._doc["diagnostics"])
        d["missing"] = self._doc.get("missing", [])
        if "outliers" in self._doc:
            d["outliers"] = self._doc["outliers"]
        return d

    def _residual_rows(self):
        if self._rows is None:
            resid_times, resid, times, fitted, scale = self._core.residual_rows()
            dated = self._doc.get("frequency", "none") != "none"
            fitted = pd.Series(fitted, index=_time_index(times, dated), name="fitted",
                               dtype="float64")
            fitted.attrs["scale"] = scale
            self._rows = (pd.Series(resid, index=_time_index(resid_times, dated),
                                    name="residual", dtype="float64"), fitted)
        return self._rows

    @property
    def residuals(self):
        """Standardised one-step innovations (variance sigma^2) on the time index."""
        return self._residual_rows()[0]

    @property
    def fitted(self):
        """One-step predictions on the time index of the likelihood sample: past.csv's `fitted`
        column, on the model's scale of the target (after its transform; `.attrs["scale"]`
        says which), NaN where the target is missing."""
        return self._residual_rows()[1]

    @property
    def past(self):
        """The fit's past as past.csv has it: actual, fitted, residual (actual - fitted), one
        column per input's contribution, noise; on the model's scale, on the time index."""
        doc = self.to_dict(past=True).get("past")
        if not doc:
            return pd.DataFrame()
        dated = self._doc.get("frequency", "none") != "none"
        times = [t if t else str(r) for t, r in zip(doc["time"], doc["row"])]
        cols = {k: doc[k] for k in ("actual", "fitted", "residual")}
        for c in doc["contributions"]:
            cols[c["input"]] = c["values"]
        cols["noise"] = doc["noise"]
        frame = pd.DataFrame({k: np.array([np.nan if v is None else v for v in vals],
                                          dtype=np.float64) for k, vals in cols.items()},
                             index=_time_index(times, dated))
        frame.attrs["scale"] = doc["scale"]
        return frame

    def charts(self):
        """Names of the charts the run report draws for this fit (forecast, past, residual
        autocorrelation, impulse responses, ...): the names chart() takes."""
        folder = self._core.chart_dir()
        return sorted(os.path.splitext(f)[0] for f in os.listdir(folder) if f.endswith(".svg"))

    def chart(self, name):
        """The report's chart `name` as SVG text (see charts() for the names; the first word
        suffices when it names one chart: "forecast" for "forecast_fan"); displayed as an
        image in a notebook cell through IPython.display.SVG."""
        return _read_chart(self._core.chart_dir(), name)

    @property
    def model(self):
        return Model(self._core.model())

    def save(self, path):
        """Writes the CLI's model file (what `lagsieve fit --save` writes)."""
        self.model.save(path)

    def forecast(self, horizon, future=None, levels=None, parameter_uncertainty=True):
        """Forecasts `horizon` steps from the end of the fitted data; see Model.forecast."""
        doc = json.loads(self._core.forecast(int(horizon), _future_columns(future),
                                             list(levels or []), bool(parameter_uncertainty)))
        return _forecast_frame(doc, self._doc.get("frequency", "none") != "none")

    def to_dict(self, past=False):
        """Everything `lagsieve fit --json` prints (with `past`, as fit.json of a run folder
        has it, when asked)."""
        if past:
            return json.loads(self._core.json(True))
        return dict(self._doc)

    def __repr__(self):
        return "<lagsieve.Fit %s %s: loglik %.4f, AIC %.4f>" % (
            self.series, self.label, self.loglik, self.aic)

    def _repr_html_(self):
        head = ("<p><b>%s</b> &middot; %s &middot; %s &middot; n = %d, loglik %.4f, "
                "AIC %.4f, BIC %.4f</p>") % (self.series, self.label, self.status, self.n_obs,
                                           self.loglik, self.aic, self.bic)
        return head + self.params.to_html(index=False, float_format=lambda v: "%.6g" % v)


class SearchRun:
    """A finished search: ranking, chosen models, shortlist backtest; write() gives the run folder."""

    def __init__(self, core):
        self._core = core
        self._summary = json.loads(core.summary_json())

    @property
    def series(self):
        return [s["series"] for s in self._summary]

    @property
    def summary(self):
        """Per series: candidates, fitted, seconds, chosen model, why it leads, warnings."""
        return [dict(s) for s in self._summary]

    @property
    def ranking(self):
        """The run folder's ranking table (every candidate of every series)."""
        return pd.read_csv(io.StringIO(self._core.ranking_csv()), keep_default_na=False,
                           na_values=[""])

    def chosen_of(self, series):
        k = self.series.index(series)
        core = self._core.chosen(k)
        return None if core is None else Fit(core)

    @property
    def chosen(self):
        """The chosen model's fit (the first series'; chosen_of(name) for the others); None when no
        candidate was usable."""
        return self.chosen_of(self.series[0])

    # The names of chosen and chosen_of before this release (legacy), kept for one release.
    leader = chosen  # legacy
    leader_of = chosen_of  # legacy

    def backtest_table(self, which="accuracy"):
        """The shortlist backtest's table: accuracy, backtest, comparisons or input_value
        (a `series` column added when the run has several)."""
        frames = []
        for k, name in enumerate(self.series):
            text = self._core.backtest_csv(k, which)
            if not text:
                continue
            frame = pd.read_csv(io.StringIO(text))
            if len(self.series) > 1:
                frame.insert(0, "series", name)
            frames.append(frame)
        return pd.concat(frames, ignore_index=True) if frames else pd.DataFrame()

    @property
    def backtest(self):
        """Accuracy of the shortlist backtest (empty when the backtest is off)."""
        return self.backtest_table("accuracy")

    def write(self, path):
        """Writes the run folder `lagsieve search --out path` writes (ranking, model files,
        backtest tables, report). Returns the folder's status: complete or no_usable_candidate."""
        return self._core.write(str(path))

    def charts(self):
        """Names of the charts of the run's report (what write() puts under charts/)."""
        folder = self._core.chart_dir()
        return sorted(os.path.splitext(f)[0] for f in os.listdir(folder) if f.endswith(".svg"))

    def chart(self, name):
        """The run report's chart `name` as SVG text (the file charts/<name>.svg of the run
        folder write() gives)."""
        return _read_chart(self._core.chart_dir(), name)

    def __repr__(self):
        return "<lagsieve.SearchRun %s>" % ", ".join(
            "%s: %s" % (s["series"], s["chosen"] or "no chosen model") for s in self._summary)

    def _repr_html_(self):
        cols = [c for c in ["series", "rank", "model", "status", "aicc", "aic", "bic", "loglik",
                            "backtest_score"] if c in self.ranking.columns]
        return self.ranking[cols].head(10).to_html(index=False,
                                                  float_format=lambda v: "%.6g" % v)


def fit(config, data=None, series=None):
    """Fits the one model the config describes (every range a single value) by exact ML.

    A fit that fails numerically is a Fit with status numerical_failure, not an exception;
    bad input raises InputError with the CLI's message."""
    return Fit(_core.fit(load(config, data), series or ""))


def search(config, data=None, threads=None, backtest=True):
    """Searches the candidates of the config (and backtests the shortlist when the config's
    backtest is on and `backtest` is true). threads=None: the config's search.threads.

    With data.series_key in the config, the data are a long-format panel (the key column naming
    each series): every series is searched as `lagsieve search` does, and the result is a
    PanelRun. Ctrl-C stops a search between candidates, and its shortlist backtest between
    origins (KeyboardInterrupt, nothing written)."""
    handle = read_config(config, data is not None)
    if handle.series_key:
        if data is None:
            core = _core.search_panel_file(handle, threads, bool(backtest))
        else:
            header, columns, told = frame_columns(data, handle.time_column)
            core = _core.search_panel_table(handle, told, header, columns, threads,
                                            bool(backtest))
        return PanelRun(core)
    run = _core.load_file(handle) if data is None else load_frame(handle, data)
    return SearchRun(_core.search(run, threads, bool(backtest)))


def screen(config, data=None):
    """The input screen of every series: {series: screen result as in screen.json}."""
    run = load(config, data)
    return {name: json.loads(run.screen_json(k)) for k, name in enumerate(run.targets)}


def backtest(config, models=(), data=None, threads=None):
    """The rolling-origin backtest of `lagsieve backtest CONFIG --models ...`: model files (paths
    or Model objects; none: the config's one model) beside the seasonal naive benchmark, on the
    config's backtest settings. {accuracy, backtest, comparisons, input_value} as DataFrames.
    Ctrl-C stops it before the next origin (KeyboardInterrupt)."""
    named = []
    for k, m in enumerate(models):
        if isinstance(m, Model):
            named.append(("model%d" % (k + 1), m._core))
        else:
            named.append((os.path.splitext(os.path.basename(str(m)))[0], load_model(m)._core))
    tables = _core.backtest(load(config, data), named, threads)
    return {name: pd.read_csv(io.StringIO(text)) if text.strip() else pd.DataFrame()
            for name, text in tables.items()}


def load_model(path):
    """Reads a model file written by fit --save, search or Fit.save."""
    return Model(_core.load_model(str(path)))


def forecast(model, data, horizon, future=None, levels=None, parameter_uncertainty=True):
    """Forecasts from a Model (or a model file path) on the history `data`: a long DataFrame
    (time, horizon, point, mean, bounds per level with inputs as treated and with inputs
    known)."""
    if not isinstance(model, Model):
        model = load_model(model)
    return model.forecast(data, horizon, future, levels, parameter_uncertainty)


def revalidate(model, config, data=None, threads=None, alpha=0.05):
    """Re-checks a deployed model on the rows after its training data (what
    `lagsieve revalidate` decides): the revalidation document as a dict."""
    if not isinstance(model, Model):
        model = load_model(model)
    return json.loads(model._core.revalidate_json(load(config, data), threads, float(alpha)))
