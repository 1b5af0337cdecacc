"""Freeze an issued revision into a snapshot that can be proven unchanged.

``archive`` writes ``PROJECT/archive/rev-<id>/`` (and ``rev-<id>.zip`` beside it): the
built site (``site/``), the exact input files (``project/``), ``results.json`` and
``manifest.json`` with a SHA-256 of every file, the tool version and the versions of the
libraries that shaped the numbers.  A snapshot is written into a temporary folder and
renamed into place only when complete, and an existing snapshot is never overwritten.
"""

from __future__ import annotations

import json
import os
import shutil
import tempfile
import zipfile
from collections.abc import Callable
from pathlib import Path

from basisbook import __version__
from basisbook.contract.errors import Problem, ProjectError
from basisbook.reading import project as project_mod
from basisbook.reading.project import Project
from basisbook.revisions.snapshot import (
    MANIFEST,
    archive_root,
    library_versions,
    sha256,
    snapshot_name,
    tree,
)

_ZIP_TIME = (2000, 1, 1, 0, 0, 0)  # fixed, so the zip is byte-identical for the same snapshot


def archive(project_root: Path, make_site: Callable[[Project, Path], None]) -> Path:
    """Freeze the current revision; return the snapshot folder.

    ``make_site(project, folder)`` writes the revision's own site into an empty folder
    (the build's ``snapshot_site``: it runs the calcs and renders, so this module needs
    neither the renderer nor the commands).  Refuses (ProjectError, nothing written) when
    inputs fail validation or the revision is already archived.
    """
    root = Path(project_root)
    proj = project_mod.load(root)
    rev = proj.revision
    dest_parent = archive_root(root)
    dest = dest_parent / snapshot_name(rev.id)
    zpath = dest_parent / f"{snapshot_name(rev.id)}.zip"
    strays = sorted(dest_parent.glob(f".{zpath.name}.new-*")) if dest_parent.is_dir() else []
    if dest.exists() and not zpath.exists() and strays:
        os.rename(strays[-1], zpath)  # a kill fell between the two renames: finish it
    if dest.exists() or zpath.exists():
        raise ProjectError([Problem("revisions.toml", rev.line, "revision.id",
                                    f"revision {rev.id!r} is already archived at {dest}; an issued "
                                    "revision is never overwritten (add a new [[revision]])")])
    dest_parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{dest.name}.new-", dir=dest_parent))
    try:
        make_site(proj, tmp / "site")
        for rel in proj.files:
            target = tmp / "project" / rel
            target.parent.mkdir(parents=True, exist_ok=True)
            shutil.copyfile(root / rel, target)
        shutil.copyfile(tmp / "site" / "results.json", tmp / "results.json")
        files = tree(tmp)
        manifest = {
            "format": "basisbook snapshot 1",
            "project": proj.name,
            "revision": {"id": rev.id, "date": rev.date, "purpose": rev.purpose,
                         "prepared": rev.prepared, "checked": rev.checked, "approved": rev.approved},
            "tool": {"name": "basisbook", "version": __version__},
            "libraries": library_versions(),
            "input_files": list(proj.files),
            "files": {rel: sha256(tmp / rel) for rel in files},
        }
        (tmp / MANIFEST).write_text(json.dumps(manifest, indent=1, sort_keys=True) + "\n", encoding="utf-8")
        ztmp = dest_parent / f".{zpath.name}.new-{os.getpid()}"
        _write_zip(tmp, ztmp, dest.name)
        os.chmod(tmp, 0o755)
        os.rename(tmp, dest)
        os.rename(ztmp, zpath)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        for stray in dest_parent.glob(f".{zpath.name}.new-*"):
            stray.unlink(missing_ok=True)
        raise
    return dest


def _write_zip(folder: Path, target: Path, top: str) -> None:
    with zipfile.ZipFile(target, "w", compression=zipfile.ZIP_DEFLATED) as z:
        for rel in tree(folder) + [MANIFEST]:
            info = zipfile.ZipInfo(f"{top}/{rel}", date_time=_ZIP_TIME)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            z.writestr(info, (folder / rel).read_bytes())
