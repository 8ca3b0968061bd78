"""Runs the Python tests with pytest; exits 77 (CTest: skipped) with the reason when Python's
numpy, pandas or pytest, or the built module, is absent."""
import sys

missing = []
for name in ("numpy", "pandas", "pytest"):
    try:
        __import__(name)
    except ImportError:
        missing.append(name)
if missing:
    print("python tests skipped: %s not importable by %s (scripts/setup-deps installs "
          "python3-numpy python3-pandas python3-pytest)" % (", ".join(missing), sys.executable))
    sys.exit(77)
try:
    import lagsieve  # noqa: F401
except ImportError as e:
    print("python tests skipped: the module lagsieve is not importable (%s); build it and set "
          "PYTHONPATH=build/python" % e)
    sys.exit(77)

import pytest  # noqa: E402

sys.exit(pytest.main(sys.argv[1:]))
