"""Where the snapshots of issued revisions live, and what can be read from them.

A snapshot of revision X is the folder ``PROJECT/archive/rev-X/`` (the built site, the
exact input files, ``results.json`` and ``manifest.json``) with ``rev-X.zip`` beside it.
"""

from __future__ import annotations

import hashlib
import json
import platform
from importlib import metadata
from pathlib import Path
from typing import Any

from basisbook.reading.project import Project

MANIFEST = "manifest.json"
ARCHIVE_DIR = "archive"
# libraries whose versions can move a number or a byte of the handbook
LIBRARIES = ("CoolProp", "numpy", "matplotlib", "pint", "Jinja2", "markdown-it-py", "latex2mathml",
             "MarkupSafe")


def snapshot_name(rev_id: str) -> str:
    return f"rev-{rev_id}"


def archive_root(project_root: Path) -> Path:
    return Path(project_root) / ARCHIVE_DIR


def snapshot_dir(project_root: Path, rev_id: str) -> Path:
    return archive_root(project_root) / snapshot_name(rev_id)


def load_results(project_root: Path, rev_id: str) -> dict[str, Any] | None:
    """The archived results.json of a revision, or None if it was never archived."""
    p = snapshot_dir(project_root, rev_id) / "results.json"
    if not p.is_file():
        return None
    return json.loads(p.read_text(encoding="utf-8"))


def archived_sites(project: Project) -> dict[str, Path]:
    """Revision id -> the ``site/`` folder of its archived snapshot, for those archived."""
    out = {}
    for r in project.revisions:
        site = snapshot_dir(project.root, r.id) / "site"
        if (site / "index.html").is_file():
            out[r.id] = site
    return out


def archived_ids(project_root: Path) -> list[str]:
    root = archive_root(project_root)
    if not root.is_dir():
        return []
    return sorted(p.name[4:] for p in root.iterdir() if p.is_dir() and p.name.startswith("rev-"))


def library_versions() -> dict[str, str]:
    out = {"python": platform.python_version()}
    for lib in LIBRARIES:
        try:
            out[lib] = metadata.version(lib)
        except metadata.PackageNotFoundError:
            out[lib] = "not installed"
    return out


def sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for block in iter(lambda: f.read(1 << 16), b""):
            h.update(block)
    return h.hexdigest()


def tree(folder: Path) -> list[str]:
    """Every file below ``folder`` but the manifest, as sorted relative paths."""
    return sorted(p.relative_to(folder).as_posix() for p in folder.rglob("*")
                  if p.is_file() and p.relative_to(folder).as_posix() != MANIFEST)
