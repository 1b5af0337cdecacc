"""Freeze an issued revision into a snapshot that can be proven unchanged.

``archive`` writes ``PROJECT/archive/rev-<id>/`` (and ``rev-<id>.zip`` beside it): the
built site (``site/``), the exact input files (``project/``), ``results.json``, the sealed
``manifest.json`` (a SHA-256 of every file, their count and the revision fingerprint, the
tool version and the versions of the libraries that shaped the numbers) and its seal
``manifest.seal``; and ``seal-rev-<id>.json`` beside them (the manifest's seal and the
SHA-256 of the whole zip).

Everything is written under hidden temporary names first and put in place by renames: the
seal file, then the folder (the moment the revision counts as archived), then the zip.  A
kill leaves either nothing, or a seal file alone (removed by the next run), or a complete
folder that verifies (the next run puts the zip in place).  An existing snapshot is never
overwritten.  One archive at a time writes into ``archive/`` (a lock on the folder); the
next run removes the temporary files a killed run left there and says so.
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import sys
import tempfile
import zipfile
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path

from basisbook import __version__
from basisbook.contract.errors import Problem, ProjectError
from basisbook.reading import project as project_mod
from basisbook.reading.project import Project
from basisbook.revisions.snapshot import (
    FORMAT_1,
    FORMAT_2,
    MANIFEST,
    SEAL_MEMBER,
    archive_root,
    fingerprint,
    library_versions,
    manifest_bytes,
    seal_file_bytes,
    seal_member_bytes,
    seal_path,
    sha256,
    snapshot_name,
    tree,
)

ZIP_TIME = (2000, 1, 1, 0, 0, 0)  # fixed, so the zip is byte-identical for the same snapshot
ZIP_MODE = 0o644 << 16  # a regular file, rw-r--r--


def _stderr(message: str) -> None:
    print(message, file=sys.stderr, flush=True)


def archive(project_root: Path, make_site: Callable[[Project, Path], None],
            notify: Callable[[str], None] = _stderr) -> Path:
    """Freeze the current revision; return the snapshot folder.

    ``make_site(project, folder)`` writes the revision's own site into an empty folder
    (the build's ``snapshot_site``: it runs the calcs and renders, so this module needs
    neither the renderer nor the commands).  Refuses (ProjectError, nothing written) when
    inputs fail validation, the revision is already archived or another archive is writing
    into the same ``archive/`` folder.  What it tidies after an interrupted run it reports
    in one line through ``notify`` (standard error by default).
    """
    root = Path(project_root)
    proj = project_mod.load(root)
    rev = proj.revision
    dest_parent = archive_root(root)
    dest = dest_parent / snapshot_name(rev.id)
    zpath = dest_parent / f"{dest.name}.zip"
    spath = seal_path(dest)
    dest_parent.mkdir(parents=True, exist_ok=True)
    with _lock(dest_parent):
        tidied = _recover(dest_parent, dest, zpath, spath)
        if tidied:
            notify(f"{dest_parent}: tidied what an interrupted archive left: {'; '.join(tidied)}")
        if dest.exists() or dest.is_symlink() or zpath.exists():
            raise ProjectError([Problem("revisions.toml", rev.line, "revision.id",
                                        f"revision {rev.id!r} is already archived at {dest}; an issued "
                                        "revision is never overwritten (add a new [[revision]])")])
        _write(root, proj, dest, zpath, spath, make_site)
    return dest


def _write(root: Path, proj: Project, dest: Path, zpath: Path, spath: Path,
           make_site: Callable[[Project, Path], None]) -> None:
    rev = proj.revision
    parent = dest.parent
    tmp = Path(tempfile.mkdtemp(prefix=f".{dest.name}.new-", dir=parent))
    ztmp = parent / f".{zpath.name}.new-{os.getpid()}"
    stmp = parent / f".{spath.name}.new-{os.getpid()}"
    seal_placed = False
    try:
        make_site(proj, tmp / "site")
        for rel in proj.files:
            target = tmp / "project" / rel
            target.parent.mkdir(parents=True, exist_ok=True)
            shutil.copyfile(root / rel, target)
        shutil.copyfile(tmp / "site" / "results.json", tmp / "results.json")
        files = {rel: sha256(tmp / rel) for rel in tree(tmp)}
        manifest = {
            "format": FORMAT_2,
            "project": proj.name,
            "revision": {"id": rev.id, "date": rev.date, "purpose": rev.purpose,
                         "prepared": rev.prepared, "checked": rev.checked, "approved": rev.approved},
            "tool": {"name": "basisbook", "version": __version__},
            "libraries": library_versions(),
            "input_files": list(proj.files),
            "file_count": len(files),
            "fingerprint": fingerprint(files),
            "files": files,
        }
        data = manifest_bytes(manifest)
        seal = hashlib.sha256(data).hexdigest()
        (tmp / MANIFEST).write_bytes(data)
        (tmp / SEAL_MEMBER).write_bytes(seal_member_bytes(seal))
        write_zip(tmp, ztmp, dest.name)
        stmp.write_bytes(seal_file_bytes(rev.id, dest.name, seal, sha256(ztmp)))
        os.chmod(tmp, 0o755)
        os.rename(stmp, spath)
        seal_placed = True
        os.rename(tmp, dest)  # from here on the revision is archived
        os.rename(ztmp, zpath)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        ztmp.unlink(missing_ok=True)
        stmp.unlink(missing_ok=True)
        if seal_placed and not dest.exists():
            spath.unlink(missing_ok=True)
        raise


def write_zip(folder: Path, target: Path, top: str) -> None:
    """The snapshot's zip: every file under ``top/``, in sorted order with the manifest and
    its seal last, fixed timestamps and modes, so the same snapshot gives the same bytes."""
    with zipfile.ZipFile(target, "w", compression=zipfile.ZIP_DEFLATED) as z:
        extra = [name for name in (MANIFEST, SEAL_MEMBER) if (folder / name).is_file()]
        for rel in tree(folder) + extra:
            info = zipfile.ZipInfo(f"{top}/{rel}", date_time=ZIP_TIME)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = ZIP_MODE
            z.writestr(info, (folder / rel).read_bytes())


@contextmanager
def _lock(folder: Path) -> Iterator[None]:
    """One archive at a time in ``folder``: an exclusive lock on the folder itself (released
    by the system when the process ends, even when it is killed)."""
    import fcntl

    fd = os.open(folder, os.O_RDONLY | os.O_DIRECTORY)
    try:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            raise ProjectError([Problem(str(folder), None, "", "another basisbook archive is writing "
                                        "into this folder now; try again when it is done")]) from None
        yield
    finally:
        os.close(fd)  # closing releases the lock


def _is_stray(name: str) -> bool:
    """A temporary name of ours: ``.rev-X.new-*``, ``.rev-X.zip.new-*``, ``.seal-rev-X.json.new-*``."""
    return (name.startswith(".rev-") or name.startswith(".seal-rev-")) and ".new-" in name


def _remove(path: Path) -> None:
    if path.is_dir() and not path.is_symlink():
        shutil.rmtree(path, ignore_errors=True)
    else:
        path.unlink(missing_ok=True)


def _recover(parent: Path, dest: Path, zpath: Path, spath: Path) -> list[str]:
    """Tidy what a killed archive left in ``parent`` (under the lock, so no other archive is
    writing): finish the current revision's archive when only its zip's rename was cut off,
    remove a seal file whose snapshot never got into place, and remove every temporary
    file and folder.  Returns what was done, in words."""
    done = []
    zstrays = sorted(parent.glob(f".{zpath.name}.new-*"))
    if dest.is_dir() and not zpath.exists() and zstrays:
        put = _finish_zip(dest, zstrays, spath)
        if put is not None:
            os.rename(put, zpath)
            done.append(f"put {zpath.name} in place (its rename was cut off)")
    if spath.is_file() and not dest.exists() and not zpath.exists():
        spath.unlink()
        done.append(f"removed {spath.name} (its snapshot was never put in place)")
    strays = sorted(p for p in parent.iterdir() if _is_stray(p.name))
    for stray in strays:
        _remove(stray)
    if strays:
        done.append(f"removed {len(strays)} temporary file{'s' if len(strays) != 1 else ''} "
                    f"({', '.join(p.name for p in strays)})")
    return done


def _finish_zip(dest: Path, zstrays: list[Path], spath: Path) -> Path | None:
    """The temporary zip that belongs to the complete folder ``dest``: the one whose SHA-256
    the seal file records (a sealed snapshot), or the newest one (an unsealed format-1
    snapshot, as the archive before the seal did)."""
    candidates = [p for p in zstrays if p.is_file() and not p.is_symlink()]
    try:
        seal = json.loads(spath.read_bytes()) if spath.is_file() else None
        fmt = json.loads((dest / MANIFEST).read_bytes()).get("format")
    except (OSError, ValueError, AttributeError):
        return None
    if isinstance(seal, dict) and fmt == FORMAT_2:
        return next((p for p in candidates if sha256(p) == seal.get("zip_sha256")), None)
    if seal is None and fmt == FORMAT_1 and candidates:
        return candidates[-1]
    return None
