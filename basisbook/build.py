"""Build a project into a site folder without ever leaving a half-written site.

The new site is rendered into a sibling temporary folder, then swapped in by
renames; any failure before the swap leaves the previous site byte-for-byte
as it was.
"""

from __future__ import annotations

import os
import shutil
import tempfile
from pathlib import Path

from basisbook import engine
from basisbook import project as project_mod
from basisbook.errors import Problem, ProjectError
from basisbook.render import SITE_MARKER, render_site


def check(root: Path) -> list:
    """Validate inputs and links and run the calcs; no rendering."""
    proj = project_mod.load(root)
    return engine.run(proj)


def build(root: Path, out: Path) -> tuple[int, Path]:
    """Build ``root`` into ``out``; return (page count, out)."""
    out = Path(out).resolve()
    if out.exists() and not out.is_dir():
        raise ProjectError([Problem(str(out), None, "--out", "is a file, not a folder")])
    if out.exists() and any(out.iterdir()) and not (out / SITE_MARKER).exists():
        raise ProjectError([Problem(str(out), None, "--out",
                                    "exists and is not a basisbook site; refusing to replace it "
                                    "(choose an empty or new folder)")])
    if Path(root).resolve() == out or Path(root).resolve().is_relative_to(out):
        raise ProjectError([Problem(str(out), None, "--out", "would replace the project folder itself")])
    proj = project_mod.load(root)
    runs = engine.run(proj)
    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.new-", dir=out.parent))
    try:
        written = render_site(proj, runs, tmp, final_out=out)
        os.chmod(tmp, 0o755)
        _swap(tmp, out)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    return sum(1 for w in written if w.endswith(".html")), out


def _swap(new: Path, out: Path) -> None:
    old = None
    if out.exists():
        old = Path(tempfile.mkdtemp(prefix=f".{out.name}.old-", dir=out.parent))
        os.rmdir(old)
        os.rename(out, old)
    os.rename(new, out)
    if old is not None:
        shutil.rmtree(old, ignore_errors=True)
