"""Minimal JSON writer for reference fixtures: floats printed with 17 significant digits
("%.17g") so doubles round-trip exactly, matching the R writer in json_writer.R."""
import math
import numpy as np


def _fmt(x, indent):
    pad = "  " * indent
    pad1 = "  " * (indent + 1)
    if x is None:
        return "null"
    if isinstance(x, (bool, np.bool_)):
        return "true" if x else "false"
    if isinstance(x, (int, np.integer)):
        return str(int(x))
    if isinstance(x, (float, np.floating)):
        v = float(x)
        if math.isnan(v):
            return "null"
        if math.isinf(v):
            raise ValueError("infinite value cannot be written to JSON")
        return "%.17g" % v
    if isinstance(x, str):
        return '"' + x.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n") + '"'
    if isinstance(x, np.ndarray):
        return _fmt(x.tolist(), indent)
    if isinstance(x, dict):
        if not x:
            return "{}"
        items = [pad1 + _fmt(str(k), 0) + ": " + _fmt(v, indent + 1) for k, v in x.items()]
        return "{\n" + ",\n".join(items) + "\n" + pad + "}"
    if isinstance(x, (list, tuple)):
        if not x:
            return "[]"
        if all(isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, bool)
               for v in x):
            vals = [_fmt(v, 0) for v in x]
            if len(vals) <= 4:
                return "[" + ", ".join(vals) + "]"
            lines = [pad1 + ", ".join(vals[i:i + 4]) for i in range(0, len(vals), 4)]
            return "[\n" + ",\n".join(lines) + "\n" + pad + "]"
        items = [pad1 + _fmt(v, indent + 1) for v in x]
        return "[\n" + ",\n".join(items) + "\n" + pad + "]"
    raise TypeError("cannot write %r" % type(x))


def write_fixture(obj, path):
    with open(path, "w") as f:
        f.write(_fmt(obj, 0) + "\n")
    print("wrote", path)


def versions():
    import statsmodels, scipy
    return {"statsmodels": statsmodels.__version__, "numpy": np.__version__,
            "scipy": scipy.__version__}
