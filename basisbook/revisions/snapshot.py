"""Where the snapshots of issued revisions live, and what can be read from them.

A snapshot of revision X is the folder ``PROJECT/archive/rev-X/`` (the built site, the
exact input files, ``results.json``, ``manifest.json`` and ``manifest.seal``) with
``rev-X.zip`` (the same files) and ``seal-rev-X.json`` beside it.

The manifest is sealed (format 2, ``basisbook snapshot 2``): it lists the SHA-256 of every
issued file, their count and the revision fingerprint (``fingerprint``), and is written in
one canonical form (``manifest_bytes``).  Its seal is the SHA-256 of those bytes; it is
recorded in ``manifest.seal`` (a ``sha256sum`` line, so ``sha256sum -c manifest.seal`` works
inside the folder) and, with the SHA-256 of the whole zip, in ``seal-rev-X.json`` beside the
snapshot.  Snapshots written before the seal (format 1, no ``file_count``, ``fingerprint``
or seal) are read as they are: an issued revision is never rewritten.
"""

from __future__ import annotations

import hashlib
import json
import platform
from collections.abc import Mapping
from importlib import metadata
from pathlib import Path
from typing import Any

from basisbook.contract.errors import Problem, ProjectError
from basisbook.reading.project import Project

MANIFEST = "manifest.json"
SEAL_MEMBER = "manifest.seal"  # beside the manifest, in the folder and in the zip
FORMAT_1 = "basisbook snapshot 1"  # unsealed (before the seal): read, never written
FORMAT_2 = "basisbook snapshot 2"  # sealed
SEAL_FORMAT = "basisbook seal 1"
ARCHIVE_DIR = "archive"
# libraries whose versions can move a number or a byte of the handbook
LIBRARIES = ("CoolProp", "numpy", "matplotlib", "pint", "Jinja2", "markdown-it-py", "latex2mathml",
             "MarkupSafe")


def snapshot_name(rev_id: str) -> str:
    return f"rev-{rev_id}"


def seal_path(snapshot: Path) -> Path:
    """The seal file beside a snapshot folder ``rev-X`` or its zip ``rev-X.zip``:
    ``seal-rev-X.json`` (named so that it is never taken for a snapshot)."""
    snapshot = Path(snapshot)
    name = snapshot.name[:-4] if snapshot.name.endswith(".zip") else snapshot.name
    return snapshot.parent / f"seal-{name}.json"


def archive_root(project_root: Path) -> Path:
    return Path(project_root) / ARCHIVE_DIR


def snapshot_dir(project_root: Path, rev_id: str) -> Path:
    return archive_root(project_root) / snapshot_name(rev_id)


def load_results(project_root: Path, rev_id: str) -> dict[str, Any] | None:
    """The archived results.json of a revision, or None if it was never archived."""
    p = snapshot_dir(project_root, rev_id) / "results.json"
    if not p.is_file():
        return None
    try:
        doc = json.loads(p.read_text(encoding="utf-8"))
    except (OSError, ValueError) as exc:
        doc = exc
    if not isinstance(doc, dict) or not isinstance(doc.get("instances"), dict):
        raise ProjectError([Problem(str(p), None, "", "the archived results are unreadable or not a "
                                    "basisbook results document; run `basisbook verify` on the snapshot")])
    return doc


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
    """Every file below ``folder`` but the manifest and its seal, as sorted relative paths."""
    return sorted(p.relative_to(folder).as_posix() for p in folder.rglob("*")
                  if p.is_file() and p.relative_to(folder).as_posix() not in (MANIFEST, SEAL_MEMBER))


def manifest_bytes(manifest: Mapping[str, Any]) -> bytes:
    """The one canonical form of a manifest: sorted keys, one-space indent, ASCII, a final
    newline.  A sealed manifest must be exactly these bytes."""
    return (json.dumps(manifest, indent=1, sort_keys=True) + "\n").encode("ascii")


def fingerprint(files: Mapping[str, str]) -> str:
    """The revision fingerprint: one SHA-256 over the sorted (path, SHA-256) list of the
    issued files, each written as a ``sha256sum`` line ``<hash>  <path>\n``."""
    h = hashlib.sha256()
    for rel in sorted(files):
        h.update(f"{files[rel]}  {rel}\n".encode())
    return h.hexdigest()


def seal_member_bytes(seal: str) -> bytes:
    """``manifest.seal``: the manifest's seal as a ``sha256sum`` line."""
    return f"{seal}  {MANIFEST}\n".encode("ascii")


def seal_file_bytes(rev_id: str, snapshot: str, seal: str, zip_sha256: str) -> bytes:
    """``seal-rev-X.json``: the manifest seal and the SHA-256 of the whole zip."""
    doc = {"format": SEAL_FORMAT, "revision": rev_id, "snapshot": snapshot,
           "manifest_sha256": seal, "zip": f"{snapshot}.zip", "zip_sha256": zip_sha256}
    return manifest_bytes(doc)
