"""Issued revisions: frozen snapshots that can be proven unchanged.

``archive`` freezes the current revision of a project into
``PROJECT/archive/rev-<id>/`` (and ``rev-<id>.zip`` beside it): the built site
(``site/``), the exact input files (``project/``), ``results.json`` and
``manifest.json`` with a SHA-256 of
every file, the tool version and the versions of the libraries that shaped the
numbers.  A snapshot is written into a temporary folder and renamed into place
only when complete, and an existing snapshot is never overwritten.

``verify`` re-hashes a snapshot (folder or zip) against its manifest and, on
request, rebuilds it from its own inputs and reports every result that moved.
"""

from __future__ import annotations

import hashlib
import json
import os
import platform
import shutil
import tempfile
import zipfile
from dataclasses import dataclass, field
from importlib import metadata
from pathlib import Path
from typing import Any

from basisbook import __version__
from basisbook.errors import Problem, ProjectError

MANIFEST = "manifest.json"
ARCHIVE_DIR = "archive"
# libraries whose versions can move a number or a byte of the handbook
LIBRARIES = ("CoolProp", "numpy", "matplotlib", "pint", "Jinja2", "markdown-it-py", "latex2mathml",
             "MarkupSafe")
_ZIP_TIME = (2000, 1, 1, 0, 0, 0)  # fixed, so the zip is byte-identical for the same snapshot


def snapshot_name(rev_id: str) -> str:
    return f"rev-{rev_id}"


def snapshot_dir(project_root: Path, rev_id: str) -> Path:
    return archive_root(project_root) / snapshot_name(rev_id)


def load_snapshot_results(project_root: Path, rev_id: str) -> dict[str, Any] | None:
    """The archived results.json of a revision, or None if it was never archived."""
    p = snapshot_dir(project_root, rev_id) / "results.json"
    if not p.is_file():
        return None
    return json.loads(p.read_text(encoding="utf-8"))


def archive_root(project_root: Path) -> Path:
    return Path(project_root) / ARCHIVE_DIR


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


def _tree(folder: Path) -> list[str]:
    return sorted(p.relative_to(folder).as_posix() for p in folder.rglob("*")
                  if p.is_file() and p.relative_to(folder).as_posix() != MANIFEST)


def archive(project_root: Path) -> Path:
    """Freeze the current revision; return the snapshot folder.

    Refuses (ProjectError, nothing written) when inputs fail validation or the
    revision is already archived.
    """
    from basisbook import engine
    from basisbook import project as project_mod
    from basisbook.render import render_site

    root = Path(project_root)
    proj = project_mod.load(root)
    runs = engine.run(proj)
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
        render_site(proj, runs, tmp / "site", as_snapshot=rev.id)
        for rel in proj.files:
            target = tmp / "project" / rel
            target.parent.mkdir(parents=True, exist_ok=True)
            shutil.copyfile(root / rel, target)
        shutil.copyfile(tmp / "site" / "results.json", tmp / "results.json")
        files = _tree(tmp)
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
        for rel in _tree(folder) + [MANIFEST]:
            info = zipfile.ZipInfo(f"{top}/{rel}", date_time=_ZIP_TIME)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            z.writestr(info, (folder / rel).read_bytes())


@dataclass
class Verification:
    snapshot: str
    revision: str
    added: list[str] = field(default_factory=list)
    missing: list[str] = field(default_factory=list)
    changed: list[str] = field(default_factory=list)
    result_changes: list[str] = field(default_factory=list)
    checked: int = 0

    @property
    def ok(self) -> bool:
        return not (self.added or self.missing or self.changed or self.result_changes)


def _open_snapshot(path: Path, workdir: Path) -> Path:
    """A snapshot folder to read: the folder itself, or a zip unpacked into workdir."""
    path = Path(path)
    if path.is_dir():
        if not (path / MANIFEST).is_file():
            raise ProjectError([Problem(str(path), None, "", f"not a basisbook snapshot: no {MANIFEST}")])
        return path
    if path.is_file():
        if not zipfile.is_zipfile(path):
            raise ProjectError([Problem(str(path), None, "", "not a snapshot folder or snapshot zip file")])
        with zipfile.ZipFile(path) as z:
            names = z.namelist()
            for n in names:
                if n.startswith("/") or ".." in Path(n).parts:
                    raise ProjectError([Problem(str(path), None, "", f"refusing unsafe path {n!r} in the zip")])
            tops = {n.split("/", 1)[0] for n in names}
            if len(tops) != 1 or not any(n.endswith("/" + MANIFEST) for n in names):
                raise ProjectError([Problem(str(path), None, "", f"not a basisbook snapshot zip: no {MANIFEST}")])
            z.extractall(workdir)
        return workdir / tops.pop()
    raise ProjectError([Problem(str(path), None, "", "no such snapshot folder or zip file")])


def _read_manifest(folder: Path) -> dict[str, Any]:
    try:
        m = json.loads((folder / MANIFEST).read_text(encoding="utf-8"))
        assert isinstance(m.get("files"), dict)
        return m
    except (OSError, ValueError, AssertionError):
        raise ProjectError([Problem(str(folder / MANIFEST), None, "", "manifest unreadable or not a "
                                    "basisbook manifest")]) from None


def verify(path: Path, rebuild: bool = False, rel_tol: float = 1e-9) -> Verification:
    with tempfile.TemporaryDirectory(prefix="basisbook-verify-") as work:
        folder = _open_snapshot(Path(path), Path(work))
        manifest = _read_manifest(folder)
        expected: dict[str, str] = manifest["files"]
        present = _tree(folder)
        v = Verification(str(path), manifest.get("revision", {}).get("id", "?"))
        v.added = sorted(set(present) - set(expected))
        v.missing = sorted(set(expected) - set(present))
        v.changed = sorted(rel for rel in set(present) & set(expected) if sha256(folder / rel) != expected[rel])
        v.checked = len(expected)
        if rebuild:
            v.result_changes = _rebuild_and_compare(folder, rel_tol)
        return v


def _rebuild_and_compare(folder: Path, rel_tol: float) -> list[str]:
    """Run the archived inputs again with today's code and libraries."""
    from basisbook import engine
    from basisbook import project as project_mod
    from basisbook.render import results_document

    old = json.loads((folder / "results.json").read_text(encoding="utf-8"))
    proj = project_mod.load(folder / "project")
    new = json.loads(json.dumps(results_document(proj, engine.run(proj))))
    return compare_results(old, new, rel_tol)


def compare_results(old: dict[str, Any], new: dict[str, Any], rel_tol: float) -> list[str]:
    out = []
    for iid in sorted(set(old["instances"]) | set(new["instances"])):
        a = old["instances"].get(iid, {}).get("outputs", {})
        b = new["instances"].get(iid, {}).get("outputs", {})
        for name in sorted(set(a) | set(b)):
            va, vb = a.get(name, {}).get("value"), b.get(name, {}).get("value")
            if isinstance(va, (int, float)) and isinstance(vb, (int, float)):
                scale = max(abs(va), abs(vb), 1e-300)
                if abs(va - vb) > rel_tol * scale:
                    out.append(f"{iid}.{name}: {va!r} -> {vb!r} (change {vb - va:+.3g}, "
                               f"{100 * (vb - va) / scale:+.3g} %)")
            elif va != vb:
                out.append(f"{iid}.{name}: {va!r} -> {vb!r}")
    return out
