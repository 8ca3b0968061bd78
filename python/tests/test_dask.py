"""Many series on a 2-worker LocalCluster (processes, 127.0.0.1, no dashboard): the panel's
summary and rankings equal the series searched one by one in this process; a bad series is a
row with its status and reason; a worker killed mid-run loses nothing."""
import os
import signal

import numpy as np
import pandas as pd
import pytest

import lagsieve
import lagsieve.dask

distributed = pytest.importorskip("distributed", reason="python3-distributed is not installed")

CONFIG = {
    "data": {"time": "t"},
    "target": {"column": "y"},
    "inputs": [{"column": "x", "delay": [0, 2], "denominator": [0, 1]}],
    "noise": {"ar": [0, 1], "constant": True},
    "search": {"strategy": "exhaustive", "criterion": "aicc"},
}


def simulated_panel(series=22, n=120, seed=20240917):
    """y_t = 10 + k x_{t-1} + AR(1) noise, x an AR(1); series 'bad' has a constant target."""
    rng = np.random.default_rng(seed)
    frames = []
    for i in range(series):
        x = np.zeros(n)
        e = np.zeros(n)
        for t in range(1, n):
            x[t] = 0.6 * x[t - 1] + rng.normal()
            e[t] = 0.5 * e[t - 1] + rng.normal(scale=0.5)
        y = 10 + (1 + 0.1 * i) * np.concatenate([[0.0], x[:-1]]) + e
        frames.append(pd.DataFrame({"store": "s%02d" % i, "t": np.arange(1, n + 1), "y": y,
                                    "x": x}))
    bad = frames[0].copy()
    bad["store"] = "bad"
    bad["y"] = 5.0
    frames.append(bad)
    return pd.concat(frames, ignore_index=True)


@pytest.fixture(scope="module")
def client():
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                       host="127.0.0.1", dashboard_address=None,
                                       silence_logs=40)
    c = distributed.Client(cluster)
    yield c
    c.close()
    cluster.close()


@pytest.fixture(scope="module")
def panel():
    return simulated_panel()


@pytest.fixture(scope="module")
def in_process(panel):
    return lagsieve.dask.search_panel(CONFIG, panel, "store")


def without_timing(frame):
    return frame.drop(columns=[c for c in lagsieve.dask.TIMING_COLUMNS if c in frame.columns])


def test_the_cluster_run_equals_the_in_process_run(client, panel, in_process):
    on_cluster = lagsieve.dask.search_many(CONFIG, panel, "store", client)
    assert len(on_cluster.summary) == 23
    pd.testing.assert_frame_equal(on_cluster.summary, in_process.summary, check_exact=True)
    pd.testing.assert_frame_equal(without_timing(on_cluster.ranking),
                                  without_timing(in_process.ranking), check_exact=True)


def test_each_series_equals_its_own_search(panel, in_process):
    rows = panel[panel["store"] == "s07"].drop(columns=["store"]).reset_index(drop=True)
    alone = lagsieve.search(CONFIG, rows)
    row = in_process.summary.set_index("store").loc["s07"]
    assert row["status"] == "ok"
    assert row["chosen"] == alone.chosen.label
    assert row["aicc"] == alone.chosen.aicc
    # The simulated structure is found: x enters at delay 1.
    assert "b1" in row["chosen"] or "1" in row["chosen"]


def test_a_bad_series_is_a_row_with_its_reason(in_process):
    bad = in_process.summary.set_index("store").loc["bad"]
    assert bad["status"] == "input_error"
    assert "constant" in bad["reason"]
    assert list(in_process.failed["store"]) == ["bad"]
    assert (in_process.summary["status"] == "ok").sum() == 22


def test_a_killed_worker_loses_no_series(client, panel, in_process):
    text, name = lagsieve.dask.config_source(CONFIG)
    groups = lagsieve.dask._split(panel, "store")
    futures = [client.submit(lagsieve.dask.search_one, text, name, value, "store", part,
                             key="kill-test-%d" % i, retries=3, pure=False)
               for i, (value, part) in enumerate(groups)]
    done = 0
    killed = False
    for _ in distributed.as_completed(futures):
        done += 1
        if done == 3 and not killed:
            nanny = next(iter(client.cluster.workers.values()))
            # SIGKILL, as a crash would: the nanny starts a new worker and its tasks run again.
            os.kill(nanny.process.process.pid, signal.SIGKILL)
            killed = True
    assert killed
    rows = [f.result()[0] for f in futures]
    pd.testing.assert_frame_equal(
        pd.DataFrame(rows, columns=lagsieve.dask.SUMMARY_COLUMNS).rename(columns={"key": "store"}),
        in_process.summary, check_exact=True)


def test_a_dask_dataframe_partitioned_by_series_equals_the_in_process_run(client, panel,
                                                                         in_process):
    dd = pytest.importorskip("dask.dataframe", reason="dask.dataframe is not installed")
    by_key = dd.from_pandas(panel.set_index("store"), npartitions=4)
    assert by_key.npartitions > 1
    keyed = {**CONFIG, "data": {"time": "t", "series_key": "store"}}
    on_cluster = lagsieve.dask.search_many(keyed, by_key, client=client)
    pd.testing.assert_frame_equal(on_cluster.summary, in_process.summary, check_exact=True)
    pd.testing.assert_frame_equal(without_timing(on_cluster.ranking),
                                  without_timing(in_process.ranking), check_exact=True)
    # A pandas long frame with the key from the config: the same.
    from_pandas = lagsieve.dask.search_many(keyed, panel, client=client)
    pd.testing.assert_frame_equal(from_pandas.summary, in_process.summary, check_exact=True)


def test_a_series_split_over_partitions_is_refused(client, panel):
    dd = pytest.importorskip("dask.dataframe", reason="dask.dataframe is not installed")
    by_rows = dd.from_pandas(panel, npartitions=5, sort=False)  # 552 rows each: series cut
    with pytest.raises(lagsieve.InputError, match="has rows in partitions .* partition by the key"):
        lagsieve.dask.search_many(CONFIG, by_rows, "store", client)


def test_the_cluster_ranking_equals_the_core_panel_search(panel, in_process):
    # The same panel through the core's batch (lagsieve.search with data.series_key): the
    # candidates of every series are the same rows, only the series column is named by the key.
    keyed = {**CONFIG, "data": {"time": "t", "series_key": "store"}}
    batch = lagsieve.search(keyed, panel)
    assert isinstance(batch, lagsieve.PanelRun)
    ranking = without_timing(batch.ranking)
    ranking.insert(0, "store", ranking["series"])
    expected = without_timing(in_process.ranking)
    pd.testing.assert_frame_equal(ranking[expected.columns], expected, check_exact=True)
    summary = batch.summary.set_index("series")
    assert summary.loc["bad", "status"] == "bad_data"
    ok = in_process.summary[in_process.summary["status"] == "ok"]
    assert list(summary.loc[ok["store"], "chosen"]) == list(ok["chosen"])
