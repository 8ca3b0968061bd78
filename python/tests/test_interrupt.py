"""Ctrl-C stops a long search: a script searching the demo's 864 candidates on one thread (minutes
of work) gets SIGINT shortly after the search starts; the search stops at the next candidate,
KeyboardInterrupt reaches the script, no temporary journal is left, and the module keeps
working."""
import os
import signal
import subprocess
import sys
import textwrap
import threading
import time

import pytest

SCRIPT = textwrap.dedent("""
    import os, sys, time
    import lagsieve
    config, tmp = sys.argv[1], sys.argv[2]
    print("searching", flush=True)
    t0 = time.monotonic()
    try:
        run = lagsieve.search(config, threads=1, backtest=False)
        print("finished", flush=True)
        run.write(os.path.join(tmp, "never"))
    except KeyboardInterrupt:
        print("interrupted after %.1f s" % (time.monotonic() - t0), flush=True)
    print("left in tmp:", sorted(os.listdir(tmp)), flush=True)
    fit = lagsieve.fit(config.replace("demo.yaml", "demo_single.yaml"))
    print("fit afterwards:", fit.status, flush=True)
    # Uncaught, as in a script: the usual traceback and exit status.
    lagsieve.search(config, threads=1, backtest=False)
""")


def interrupt_after(proc, marker, delay):
    line = proc.stdout.readline()
    assert line.strip() == marker, line
    time.sleep(delay)
    proc.send_signal(signal.SIGINT)


@pytest.mark.skipif(sys.platform == "win32", reason="SIGINT to a child is POSIX")
def test_ctrl_c_stops_a_long_search_cleanly(source_dir, tmp_path):
    config = str(source_dir / "configs" / "demo.yaml")
    scratch = tmp_path / "tmp"
    scratch.mkdir()
    env = dict(os.environ, TMPDIR=str(scratch), PYTHONUNBUFFERED="1")
    proc = subprocess.Popen([sys.executable, "-c", SCRIPT, config, str(scratch)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env)
    # A watchdog, so that a search that does not stop fails the test instead of running on.
    watchdog = threading.Timer(180, proc.kill)
    watchdog.start()
    try:
        interrupt_after(proc, "searching", 2.0)
        # The whole search takes minutes; stopping waits only for the running candidate.
        assert proc.stdout.readline().startswith("interrupted after"), proc.stderr.read()
        assert proc.stdout.readline().strip() == "left in tmp: []"
        assert proc.stdout.readline().strip() == "fit afterwards: ok"
        time.sleep(2.0)
        proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=120)
    finally:
        watchdog.cancel()
        if proc.poll() is None:
            proc.kill()
            proc.communicate()
    assert "finished" not in out
    assert proc.returncode != 0
    assert err.rstrip().splitlines()[-1] == "KeyboardInterrupt", err
    assert not (scratch / "never").exists()
    assert os.listdir(scratch) == []


BACKTEST_SCRIPT = textwrap.dedent("""
    import os, sys
    import lagsieve
    long_config, short_config, tmp, call = sys.argv[1:5]
    def run(config):
        if call == "backtest":
            return lagsieve.backtest(config, threads=1)["accuracy"]
        return lagsieve.search(config, threads=1).backtest
    print("running", flush=True)
    try:
        table = run(long_config)
        print("finished", len(table), flush=True)
    except KeyboardInterrupt:
        print("interrupted", flush=True)
    print("left in tmp:", sorted(os.listdir(tmp)), flush=True)
    print("short run afterwards:", len(run(short_config)) > 0, flush=True)
    run(long_config)  # uncaught: the usual traceback and exit status
""")


def backtest_configs(source_dir, folder):
    """The demo's true model (one candidate) with a backtest from row 100 on, refitted at every
    one of its ~1,000 origins (minutes of work on one thread), and a short one of 7 origins."""
    text = (source_dir / "configs" / "demo_single.yaml").read_text()
    text = text.replace("../data/heat_demand.csv", str(source_dir / "data" / "heat_demand.csv"))
    text = text.replace("../runs/demo_single", str(folder / "runs"))
    section = "\nbacktest:\n  first_origin: {}\n  step: {}\n  horizon: 7\n  refit: 1\n  shortlist: 1\n"
    (folder / "long.yaml").write_text(text + section.format(100, 1))
    (folder / "short.yaml").write_text(text + section.format(1040, 7))
    return folder / "long.yaml", folder / "short.yaml"


@pytest.mark.skipif(sys.platform == "win32", reason="SIGINT to a child is POSIX")
@pytest.mark.parametrize("call", ["backtest", "search"])
def test_ctrl_c_stops_a_long_backtest_cleanly(source_dir, tmp_path, call):
    """lagsieve.backtest, and the shortlist backtest of lagsieve.search (the search itself is one
    candidate, a fraction of a second, so the signal arrives during the backtest): both stop at
    the next origin with KeyboardInterrupt instead of running all their origins."""
    long_config, short_config = backtest_configs(source_dir, tmp_path)
    scratch = tmp_path / "tmp"
    scratch.mkdir()
    env = dict(os.environ, TMPDIR=str(scratch), PYTHONUNBUFFERED="1")
    proc = subprocess.Popen([sys.executable, "-c", BACKTEST_SCRIPT, str(long_config),
                             str(short_config), str(scratch), call],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env)
    watchdog = threading.Timer(240, proc.kill)
    watchdog.start()
    try:
        interrupt_after(proc, "running", 3.0)
        assert proc.stdout.readline().strip() == "interrupted", proc.stderr.read()
        assert proc.stdout.readline().strip() == "left in tmp: []"
        assert proc.stdout.readline().strip() == "short run afterwards: True"
        time.sleep(3.0)
        proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=120)
    finally:
        watchdog.cancel()
        if proc.poll() is None:
            proc.kill()
            proc.communicate()
    assert "finished" not in out
    # An uncaught KeyboardInterrupt ends Python by SIGINT (or status 1), not by a crash's signal.
    assert proc.returncode in (1, -signal.SIGINT), proc.returncode
    assert err.rstrip().splitlines()[-1] == "KeyboardInterrupt", err
    assert os.listdir(scratch) == []
    assert not (tmp_path / "runs").exists()
