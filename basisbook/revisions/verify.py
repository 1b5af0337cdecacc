"""Prove an archived revision unchanged.

``verify`` re-hashes a snapshot (folder or zip) against its manifest and, on request,
rebuilds it from its own inputs with today's code and libraries and reports every result
that moved.
"""

from __future__ import annotations

import json
import tempfile
import zipfile
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from basisbook.contract.errors import Problem, ProjectError
from basisbook.reading import project as project_mod
from basisbook.revisions.snapshot import MANIFEST, sha256, tree
from basisbook.running import engine
from basisbook.running.results import results_document


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
        present = tree(folder)
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
