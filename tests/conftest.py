"""Shared fixtures: the demo project, a scratch copy of it, and a built site."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

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
    from basisbook.build import build

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
