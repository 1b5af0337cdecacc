"""The installed package: one namespace, and a wheel install builds the same handbook.

A wheel of the project holds only ``basisbook/`` and its dist-info (``calcs/`` and
``templates/`` install as ``basisbook.calcs`` and ``basisbook.templates``), and the demo
built by the wheel's own ``basisbook`` command, outside the source tree, is byte-identical
to the handbook built from the source tree.
"""

from __future__ import annotations

import subprocess
import sys
import zipfile
from pathlib import Path

import pytest
from conftest import DEMO, ROOT

pytestmark = pytest.mark.slow  # builds a wheel and a venv (about 15 s)


def _files(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def test_wheel_holds_one_namespace_and_builds_the_same_demo(tmp_path: Path, built_site: Path) -> None:
    wheels = tmp_path / "wheels"
    # no build isolation: the test extras bring setuptools and wheel, so nothing is fetched
    subprocess.run([sys.executable, "-m", "pip", "wheel", "-q", "--no-deps", "--no-build-isolation",
                    "-w", str(wheels), str(ROOT)], check=True, cwd=tmp_path)
    (wheel,) = wheels.glob("basisbook-*.whl")
    names = zipfile.ZipFile(wheel).namelist()
    tops = {n.split("/", 1)[0] for n in names}
    assert tops == {"basisbook", wheel.name.split("-")[0] + "-" + wheel.name.split("-")[1] + ".dist-info"}
    assert "basisbook/calcs/synchronous_generator.py" in names
    assert "basisbook/templates/calc.html" in names and "basisbook/templates/static/style.css" in names

    venv = tmp_path / "venv"
    # the venv sees the registry packages already installed here; basisbook is its own wheel
    subprocess.run([sys.executable, "-m", "venv", "--system-site-packages", str(venv)], check=True)
    py = venv / "bin" / "python"
    subprocess.run([str(py), "-m", "pip", "install", "-q", "--no-deps", "--no-index", str(wheel)], check=True)
    where = subprocess.run([str(py), "-c", "import basisbook.calcs, basisbook.templates;"
                            "print(basisbook.calcs.__file__); print(basisbook.templates.__file__)"],
                           check=True, capture_output=True, text=True, cwd=tmp_path).stdout.split()
    assert all(Path(w).is_relative_to(venv) for w in where), where

    out = tmp_path / "site"
    subprocess.run([str(venv / "bin" / "basisbook"), "build", str(DEMO), "--out", str(out)],
                   check=True, cwd=tmp_path, capture_output=True)
    assert _files(out) == _files(built_site)
