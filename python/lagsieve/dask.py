"""Many series on a Dask cluster: one search per series, mapped over a dask.distributed Client.

The panel is a long pandas DataFrame: a key column naming the series, the config's time column,
target column and inputs. Each series is searched on a worker exactly as
lagsieve.search(config, that_series_rows) would search it in-process, so the summary equals
search_panel(config, frame, key) row for row. A series whose input is bad, or with no usable
candidate, is a row with its status and reason; it never stops the panel. A worker that dies
mid-run has its series retried elsewhere (`retries`), finished series are kept.

    from dask.distributed import Client, LocalCluster
    import lagsieve.dask
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True) as cluster, \\
         Client(cluster) as client:
        panel = lagsieve.dask.search_many(config, frame, "store", client)  # or a Dask DataFrame
    panel.summary     # one row per series: status, reason, chosen model, criteria
    panel.ranking     # every candidate of every series (the ranking with a key column)
"""

import pandas as pd

import lagsieve
from ._inputs import config_source, load_text

# Columns of the summary, in order.
SUMMARY_COLUMNS = ["key", "status", "reason", "rows", "candidates", "chosen", "loglik", "aic",
                   "aicc", "bic", "n_obs", "backtest_score"]
# Ranking columns that measure time, not results (they differ between any two runs).
TIMING_COLUMNS = ["fit_seconds"]


class PanelRun:
    """The searches of a panel: `summary` (one row per series) and `ranking` (every candidate,
    with the series key in the first column)."""

    def __init__(self, key, rows, rankings):
        self.key = key
        self.summary = pd.DataFrame(rows, columns=SUMMARY_COLUMNS).rename(columns={"key": key})
        frames = [r for r in rankings if r is not None and len(r)]
        self.ranking = pd.concat(frames, ignore_index=True) if frames else pd.DataFrame()

    @property
    def failed(self):
        """Series without a chosen model (bad input, no usable candidate, an error)."""
        return self.summary[self.summary["status"] != "ok"]

    def __repr__(self):
        return "<lagsieve.dask.PanelRun %d series, %d failed>" % (len(self.summary),
                                                                   len(self.failed))


def _no_candidate_reason(ranking):
    if ranking is None or not len(ranking) or "message" not in ranking.columns:
        return "no candidate was fitted"
    messages = ranking["message"].dropna()
    messages = messages[messages != ""]
    counts = ranking["status"].value_counts()
    listed = ", ".join("%d %s" % (n, s) for s, n in sorted(counts.items()))
    why = ""
    if len(messages):
        top = messages.value_counts()
        why = "; most often (%d of %d): %s" % (top.iloc[0], len(ranking), top.index[0])
    return "no usable candidate among %d (%s)%s" % (len(ranking), listed, why)


def search_one(config_text, config_name, key_value, key, rows, threads=1, backtest=True):
    """Searches one series (its rows of the panel, without the key column): (summary row,
    ranking with the key column first). Never raises for the series' own problems."""
    row = dict.fromkeys(SUMMARY_COLUMNS)
    row.update(key=key_value, rows=len(rows), candidates=0)
    try:
        run = lagsieve._core.search(load_text(config_text, config_name, rows, True), threads,
                                    backtest)
        result = lagsieve.SearchRun(run)
        ranking = result.ranking
        # The key replaces a ranking column of the same name (`series`, the target column,
        # is the same for every series of a panel).
        ranking = ranking.drop(columns=[key], errors="ignore")
        ranking.insert(0, key, key_value)
        if "series" in ranking.columns and key != "series":
            ranking["series"] = str(key_value)  # as the core's panel names a series: its key
        row["candidates"] = len(ranking)
        chosen = result.chosen
        if chosen is None:
            row.update(status="no_usable_candidate", reason=_no_candidate_reason(ranking))
            return row, ranking
        top = ranking.iloc[0]
        row.update(status="ok", reason="", chosen=chosen.label, loglik=chosen.loglik,
                   aic=chosen.aic, aicc=chosen.aicc, bic=chosen.bic, n_obs=chosen.n_obs,
                   backtest_score=float(top["backtest_score"]) if "backtest_score" in
                   ranking.columns else float("nan"))
        return row, ranking
    except lagsieve.InputError as e:
        row.update(status="input_error", reason=str(e))
        return row, None
    except Exception as e:  # noqa: BLE001 - a failing series is a row, never a crash
        row.update(status="error", reason="%s: %s" % (type(e).__name__, e))
        return row, None


def _with_key_column(frame, key):
    """The frame with the key as a column (a frame indexed by the key, as a Dask DataFrame
    partitioned with set_index(key) is, gets it back as a column)."""
    if key not in frame.columns and frame.index.name == key:
        return frame.reset_index()
    return frame


def _split(frame, key):
    frame = _with_key_column(frame, key)
    if key not in frame.columns:
        raise lagsieve.InputError(
            "panel: key column '%s' is not in the frame; its columns are: %s"
            % (key, ", ".join(map(str, frame.columns))))
    groups = []
    for value, rows in frame.groupby(key, sort=True):
        groups.append((value, rows.drop(columns=[key]).reset_index(drop=True)))
    return groups


def _key_of(config_text, config_name, key):
    if key:
        return key
    key = lagsieve._core.config_series_key(config_text, config_name)
    if not key:
        raise lagsieve.InputError(
            "panel: name the series key column (key=...) or set data.series_key in the config")
    return key


def _is_dask_frame(frame):
    try:
        import dask.dataframe as dd
    except ImportError:
        return False
    return isinstance(frame, dd.DataFrame)


def search_panel(config, frame, key=None, threads=1, backtest=True):
    """The panel searched series by series in this process (the reference for search_many).
    key=None: the config's data.series_key."""
    text, name = config_source(config)
    key = _key_of(text, name, key)
    rows, rankings = [], []
    for value, part in _split(frame, key):
        row, ranking = search_one(text, name, value, key, part, threads, backtest)
        rows.append(row)
        rankings.append(ranking)
    return PanelRun(key, rows, rankings)


def search_partition(config_text, config_name, key, partition, threads=1, backtest=True):
    """Every series of one partition of a Dask DataFrame: [(key value, summary row, ranking)].
    Partitioning by the key (set_index) does not keep the order of the rows within a series, so
    each series' rows are put back in time order (a stable sort on the config's data.time)."""
    time = lagsieve._core.config_time_column(config_text, config_name)
    out = []
    for value, part in _split(partition, key):
        if time and time in part.columns:
            part = part.sort_values(time, kind="mergesort").reset_index(drop=True)
        out.append((value,) + search_one(config_text, config_name, value, key, part, threads,
                                         backtest))
    return out


def _gather_partitions(results, key):
    seen = {}
    for k, found in enumerate(results):
        for value, row, ranking in found:
            if value in seen:
                raise lagsieve.InputError(
                    "panel: series '%s' has rows in partitions %d and %d of the Dask DataFrame; "
                    "partition by the key (frame.set_index('%s') or "
                    "frame.shuffle('%s')) so that each series lies in one partition"
                    % (value, seen[value][0], k, key, key))
            seen[value] = (k, row, ranking)
    ordered = [seen[v] for v in sorted(seen)]
    return PanelRun(key, [r for _, r, _ in ordered], [g for _, _, g in ordered])


def search_many(config, frame, key=None, client=None, threads=1, backtest=True, retries=3):
    """Searches every series of a long panel on the workers of a dask.distributed Client.

    `frame`: a pandas DataFrame (one task per series) or a Dask DataFrame partitioned by the
    series key (one task per partition; each series must lie in one partition, as
    set_index(key) leaves it). key=None: the config's data.series_key. Threads per search:
    `threads`, 1 by default since the cluster runs series side by side. Results come back in
    key order, equal to search_panel's. A task lost with its worker is run again up to
    `retries` times; finished series are kept."""
    if client is None:
        from distributed import get_client
        client = get_client()
    text, name = config_source(config)  # read here: the workers need not see the config file
    key = _key_of(text, name, key)
    if _is_dask_frame(frame):
        import dask
        tasks = [dask.delayed(search_partition, pure=False)(text, name, key, part, threads,
                                                            backtest)
                 for part in frame.to_delayed()]
        futures = client.compute(tasks, retries=retries)
        return _gather_partitions(client.gather(futures), key)
    groups = _split(frame, key)
    futures = [client.submit(search_one, text, name, value, key, part, threads, backtest,
                             key="lagsieve-%s-%d" % (str(value), i), retries=retries, pure=False)
               for i, (value, part) in enumerate(groups)]
    results = client.gather(futures)
    return PanelRun(key, [r[0] for r in results], [r[1] for r in results])
