"""The source distribution carries the tests, the licence and the docs (MANIFEST.in), and the
package's version comes from one place: ``picker.__version__`` (pyproject.toml reads it)."""

import subprocess
import sys
import tarfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


def test_sdist_holds_the_tests_and_the_licence(tmp_path):
    pytest.importorskip("build", reason="the sdist is built with `build` (pip install build)")
    done = subprocess.run(
        [sys.executable, "-m", "build", "--sdist", "--outdir", str(tmp_path), str(ROOT)],
        capture_output=True,
        text=True,
        check=False,
    )
    assert done.returncode == 0, done.stdout[-2000:] + done.stderr[-2000:]
    (archive,) = tmp_path.glob("picker-*.tar.gz")
    import picker

    assert archive.name == f"picker-{picker.__version__}.tar.gz"
    with tarfile.open(archive) as tar:
        names = {name.split("/", 1)[1] for name in tar.getnames() if "/" in name}
    tracked = subprocess.run(
        ["git", "-C", str(ROOT), "ls-files", "tests", "docs"],
        capture_output=True,
        text=True,
        check=False,
    )
    expected = set(tracked.stdout.split()) if tracked.returncode == 0 else set()
    expected |= {"LICENSE", "README.md", "sample_inventory.toml", "tests/test_sdist.py"}
    missing = sorted(expected - names)
    assert not missing, f"left out of the sdist: {missing[:10]}"
    assert not any("__pycache__" in name for name in names)


def test_one_version():
    """pyproject.toml holds no version of its own; it reads picker.__version__."""
    import tomllib

    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    assert "version" not in project["project"]
    assert "version" in project["project"]["dynamic"]
    attr = project["tool"]["setuptools"]["dynamic"]["version"]["attr"]
    assert attr == "picker.__version__"
