"""Shared fixtures: the repository, the built CLI, and helpers that run it."""
import json
import os
import pathlib
import subprocess

import pytest

HERE = pathlib.Path(__file__).resolve().parent
SOURCE_DIR = pathlib.Path(os.environ.get("LAGSIEVE_SOURCE_DIR", HERE.parent.parent))


def _binary():
    given = os.environ.get("LAGSIEVE_BINARY")
    if given:
        return pathlib.Path(given)
    return SOURCE_DIR / "build" / "lagsieve"


@pytest.fixture(scope="session")
def source_dir():
    return SOURCE_DIR


@pytest.fixture(scope="session")
def cli():
    """Runs the built `lagsieve` binary: cli(args..., cwd=...) -> CompletedProcess."""
    binary = _binary()
    if not binary.exists():
        pytest.skip("the lagsieve binary is not built (%s); set LAGSIEVE_BINARY" % binary)

    def run(*args, cwd=None, check=True):
        proc = subprocess.run([str(binary), *map(str, args)], cwd=cwd, capture_output=True,
                              text=True)
        if check and proc.returncode != 0:
            raise AssertionError("lagsieve %s exited %d:\n%s" % (" ".join(map(str, args)),
                                                                 proc.returncode, proc.stderr))
        return proc

    return run


@pytest.fixture(scope="session")
def cli_json(cli):
    def run(*args, cwd=None):
        return json.loads(cli(*args, "--json", cwd=cwd).stdout)

    return run


def load_fixture(relative):
    with open(SOURCE_DIR / "tests" / "reference" / relative, encoding="utf-8") as f:
        return json.load(f)
