"""Runs the Python tests with pytest; exits 77 (CTest: skipped) with the reason when Python's
numpy, pandas or pytest, or the built module, is absent. (Guarded by __main__: Dask's worker
processes import the main module again.)"""
import sys


def main():
    missing = []
    for name in ("numpy", "pandas", "pytest"):
        try:
            __import__(name)
        except ImportError:
            missing.append(name)
    if missing:
        print("python tests skipped: %s not importable by %s (scripts/setup-deps installs "
              "python3-numpy python3-pandas python3-pytest)" % (", ".join(missing),
                                                                sys.executable))
        return 77
    try:
        import lagsieve  # noqa: F401
    except ImportError as e:
        print("python tests skipped: the module lagsieve is not importable (%s); build it and "
              "set PYTHONPATH=build/python" % e)
        return 77
    import pytest

    return pytest.main(sys.argv[1:])


if __name__ == "__main__":
    sys.exit(main())
