"""Shared fixtures: the demo project, a scratch copy of it, and a built site; the quick loop.

``python -m pytest`` is the developer's quick loop: tests marked ``slow`` (generated
property examples, killed builds, the browser, the installed wheel) are left out.
``python -m pytest --full`` (what CI runs) runs every test.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest


def pytest_addoption(parser: pytest.Parser) -> None:
    parser.addoption("--full", action="store_true", default=False,
                     help="basisbook: run every test, the slow ones too (CI runs this)")


def pytest_report_header(config: pytest.Config) -> str:
    if config.getoption("--full"):
        return "basisbook: full run (slow tests included)"
    return "basisbook: quick loop; slow tests (properties, kills, browser, wheel) left out, `--full` runs them"


def pytest_collection_modifyitems(config: pytest.Config, items: list[pytest.Item]) -> None:
    if config.getoption("--full"):
        return
    slow = [i for i in items if i.get_closest_marker("slow")]
    if slow:
        config.hook.pytest_deselected(items=slow)
        items[:] = [i for i in items if not i.get_closest_marker("slow")]

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "project"
VARIANT_60HZ = ROOT / "examples" / "export-60hz"
ARTIFACTS = ROOT / "tests" / "artifacts"


@pytest.fixture
def demo_copy(tmp_path: Path) -> Path:
    """A private copy of the demo project that a test may edit."""
    dst = tmp_path / "project"
    shutil.copytree(DEMO, dst)
    return dst


@pytest.fixture(scope="session")
def built_site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo handbook, built once per test session."""
    from basisbook.commands.build import build

    out = tmp_path_factory.mktemp("built") / "site"
    build(DEMO, out)
    return out


def reduce_to_first_revision(root: Path) -> Path:
    """Make a demo copy look as it did before anything was archived: only revision A
    listed, no archive folder (the inputs stay as they are)."""
    shutil.rmtree(root / "archive", ignore_errors=True)
    rev = root / "revisions.toml"
    text = rev.read_text(encoding="utf-8")
    second = text.find("[[revision]]", text.find("[[revision]]") + 1)
    if second > 0:
        rev.write_text(text[:second], encoding="utf-8")
    return root


@pytest.fixture
def single_revision_copy(demo_copy: Path) -> Path:
    """A demo copy with one revision and no archive, for archiving tests."""
    return reduce_to_first_revision(demo_copy)
