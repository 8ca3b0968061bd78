"""The install target (CTest python_install): `cmake --install BUILD --component python --prefix
TMP` puts the package under TMP/<install dir>, and a fresh interpreter with only that folder on
its path imports it from there and fits the bundled demo model.

    install_check.py CMAKE BUILD_DIR PREFIX INSTALL_DIR SOURCE_DIR

An absolute INSTALL_DIR is staged under DESTDIR=TMP instead. Exits 77 (skipped) when numpy or
pandas is absent."""
import os
import shutil
import subprocess
import sys

CHECK = """
import sys, lagsieve
assert lagsieve.__file__.startswith(sys.argv[1]), lagsieve.__file__
fit = lagsieve.fit(sys.argv[2])
assert fit.status == "ok", fit.status
print("installed module fits:", fit.label, "loglik %.6f" % fit.loglik)
"""


def main(cmake, build, prefix, install_dir, source):
    for name in ("numpy", "pandas"):
        try:
            __import__(name)
        except ImportError:
            print("python_install skipped: %s is not importable by %s" % (name, sys.executable))
            return 77
    shutil.rmtree(prefix, ignore_errors=True)
    env = dict(os.environ)
    if os.path.isabs(install_dir):
        # An absolute folder does not move with the prefix: staged under DESTDIR instead.
        env["DESTDIR"] = prefix
        site = prefix + install_dir
    else:
        env.pop("DESTDIR", None)
        site = os.path.join(prefix, install_dir)
    subprocess.run([cmake, "--install", build, "--component", "python", "--prefix", prefix],
                   check=True, env=env)
    package = os.path.join(site, "lagsieve")
    files = sorted(os.listdir(package))
    assert "__init__.py" in files and any(f.startswith("_core") for f in files), files
    env = dict(os.environ, PYTHONPATH=site)
    subprocess.run([sys.executable, "-c", CHECK, package,
                    os.path.join(source, "configs", "demo_single.yaml")],
                   check=True, env=env, cwd=prefix)
    shutil.rmtree(prefix, ignore_errors=True)
    return 0


if __name__ == "__main__":
    sys.exit(main(*sys.argv[1:6]))
