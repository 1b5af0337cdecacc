"""What changed between two revisions: inputs, outputs, check verdicts, table rows.

Both sides are results documents (the ``results.json`` of a snapshot, or of the
current inputs computed now), so a comparison never depends on how a page was
rendered.  Numbers count as moved only past the project's relative tolerance.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from basisbook.contract.errors import Problem, ProjectError
from basisbook.reading import project as project_mod
from basisbook.reading.project import Project
from basisbook.rendering.mathfmt import format_value, unit_text
from basisbook.revisions import snapshot
from basisbook.running import engine
from basisbook.running.engine import CalcRun
from basisbook.running.results import results_document


@dataclass
class Change:
    kind: str  # "input", "output", "check", "row", "site"
    instance: str
    name: str
    old: Any
    new: Any
    unit: str = ""
    what: str = "changed"  # "added", "removed", "changed"

    @property
    def relative(self) -> float | None:
        if isinstance(self.old, (int, float)) and isinstance(self.new, (int, float)) and self.old:
            return (self.new - self.old) / abs(self.old)
        return None


@dataclass
class Comparison:
    old_rev: str
    new_rev: str
    tolerance: float
    changes: list[Change] = field(default_factory=list)

    def of(self, kind: str) -> list[Change]:
        return [c for c in self.changes if c.kind == kind]

    def marks(self, instance: str) -> dict[tuple[str, str], Change]:
        """(kind, name) -> change, for the margin markers on one calc page."""
        # a load-list row "load_list[P-101]" marks its input "load_list"
        return {(c.kind, c.name.split("[")[0]): c for c in self.changes if c.instance == instance}


def _moved(a: Any, b: Any, tol: float) -> bool:
    if isinstance(a, (int, float)) and isinstance(b, (int, float)) and not isinstance(a, bool):
        return abs(b - a) > tol * max(abs(a), abs(b), 1e-300)
    return a != b


def compare(old: dict[str, Any], new: dict[str, Any], tolerance: float) -> Comparison:
    cmp = Comparison(old["revision"]["id"], new["revision"]["id"], tolerance)
    add = cmp.changes.append
    for name in sorted(set(old.get("site", {})) | set(new.get("site", {}))):
        a, b = old["site"].get(name), new["site"].get(name)
        if a and b and _moved(a["value"], b["value"], 0.0):
            add(Change("site", "site", name, a["value"], b["value"], b["unit"]))
    oi, ni = old["instances"], new["instances"]
    for iid in sorted(set(oi) - set(ni)):
        add(Change("instance", iid, "", oi[iid]["calc"], None, what="removed"))
    for iid in sorted(set(ni) - set(oi)):
        add(Change("instance", iid, "", None, ni[iid]["calc"], what="added"))
    for iid in [i for i in ni if i in oi]:  # the new revision's order
        a, b = oi[iid], ni[iid]
        for name in b["inputs"]:
            if "link" in b["inputs"][name].get("source", {}):
                continue  # a linked value is a consequence; the upstream change is reported
            if name not in a["inputs"]:
                add(Change("input", iid, name, None, b["inputs"][name]["value"], b["inputs"][name]["unit"], "added"))
                continue
            va, vb = a["inputs"][name]["value"], b["inputs"][name]["value"]
            if b["inputs"][name].get("unit") == "records":
                _records(cmp, iid, name, va, vb, b["inputs"][name].get("key_field"))
            elif isinstance(va, list) and isinstance(vb, list):
                _rows(cmp, iid, name, va, vb, b["inputs"][name]["unit"])
            elif _moved(va, vb, 0.0):
                add(Change("input", iid, name, va, vb, b["inputs"][name]["unit"]))
        for name in a["inputs"]:
            if name not in b["inputs"]:
                add(Change("input", iid, name, a["inputs"][name]["value"], None, a["inputs"][name]["unit"], "removed"))
        for name, out in b["outputs"].items():
            if name in a["outputs"] and _moved(a["outputs"][name]["value"], out["value"], tolerance):
                add(Change("output", iid, name, a["outputs"][name]["value"], out["value"], out["unit"]))
        old_checks = {c["id"]: c for c in a["checks"]}
        for c in b["checks"]:
            prev = old_checks.get(c["id"])
            if prev and prev["verdict"] != c["verdict"]:
                add(Change("check", iid, c["id"], prev["verdict"], c["verdict"]))
    return cmp


def _records(cmp: Comparison, iid: str, name: str, old: list, new: list, key: str | None) -> None:
    """Load-list rows by their key (the tag): added, removed, or which cells changed."""
    def strip(r: dict) -> dict:
        return {k: v for k, v in r.items() if k != "_source"}

    if key is None:
        _rows(cmp, iid, name, [list(strip(r).values()) for r in old], [list(strip(r).values()) for r in new], "")
        return
    a = {r[key]: strip(r) for r in old}
    b = {r[key]: strip(r) for r in new}
    for tag in [t for t in a if t not in b]:
        cmp.changes.append(Change("row", iid, f"{name}[{tag}]", a[tag], None, "", "removed"))
    for tag in b:
        if tag not in a:
            cmp.changes.append(Change("row", iid, f"{name}[{tag}]", None, b[tag], "", "added"))
        elif a[tag] != b[tag]:
            cells = sorted(k for k in set(a[tag]) | set(b[tag]) if a[tag].get(k) != b[tag].get(k))
            cmp.changes.append(Change("row", iid, f"{name}[{tag}]", {k: a[tag].get(k) for k in cells},
                                      {k: b[tag].get(k) for k in cells}, "", "changed"))


def _rows(cmp: Comparison, iid: str, name: str, old: list, new: list, unit: str) -> None:
    """Table inputs: rows added and removed (a changed row shows as both)."""
    old_t = [tuple(r) if isinstance(r, list) else r for r in old]
    new_t = [tuple(r) if isinstance(r, list) else r for r in new]
    for r in old_t:
        if r not in new_t:
            cmp.changes.append(Change("row", iid, name, list(r), None, unit, "removed"))
    for r in new_t:
        if r not in old_t:
            cmp.changes.append(Change("row", iid, name, None, list(r), unit, "added"))


def current_results(project_root: Path) -> dict[str, Any]:
    """The results model of the current inputs, computed now."""
    proj = project_mod.load(project_root)
    # through JSON, so both sides have the same types (tuples become lists)
    return json.loads(json.dumps(results_document(proj, engine.run(proj))))


def results_for(project_root: Path, rev_id: str) -> dict[str, Any]:
    """An archived revision's results, or the current inputs' if ``rev_id`` is current."""
    if not project_mod.REVISION_ID.fullmatch(rev_id):
        # a revision id names a folder: it is checked before it is used as one
        raise ProjectError([Problem("revisions.toml", None, "revision",
                                    f"{rev_id!r} is not a revision id (letters, digits, '-' and '.', "
                                    "not starting with '.', at most 20 characters)")])
    snap = snapshot.load_results(project_root, rev_id)
    if snap is not None:
        return snap
    proj = project_mod.load(project_root)
    ids = [r.id for r in proj.revisions]
    if rev_id == proj.revision.id:
        return current_results(project_root)
    if rev_id in ids:
        raise ProjectError([Problem("revisions.toml", None, "revision",
                                    f"revision {rev_id!r} was never archived, so its results are unknown; "
                                    f"archived: {', '.join(snapshot.archived_ids(project_root)) or 'none'}")])
    raise ProjectError([Problem("revisions.toml", None, "revision",
                                f"unknown revision {rev_id!r}; revisions: {', '.join(ids)}")])


def previous_comparison(project: Project, runs: list[CalcRun]) -> Comparison | None:
    """Compare the current results with the archived revision before the current one, if
    there is one (the build hands this to the renderer for the changes page and marks)."""
    if len(project.revisions) < 2:
        return None
    prev = project.revisions[-2]
    old = snapshot.load_results(project.root, prev.id)
    if old is None:
        return None
    new = json.loads(json.dumps(results_document(project, runs)))
    return compare(old, new, project.change_tolerance)


def report(cmp: Comparison) -> str:
    """Plain-text report for the terminal."""
    lines = [f"changes from revision {cmp.old_rev} to {cmp.new_rev} "
             f"(outputs past a relative tolerance of {cmp.tolerance:g})"]
    if not cmp.changes:
        lines.append("  no changes")
    titles = {"site": "site conditions", "instance": "calculations", "input": "inputs",
              "row": "table rows", "output": "outputs", "check": "design-check verdicts"}
    for kind, title in titles.items():
        rows = cmp.of(kind)
        if not rows:
            continue
        lines.append(f"{title}:")
        for c in rows:
            where = f"{c.instance}.{c.name}" if c.name else c.instance
            u = f" {unit_text(c.unit)}" if unit_text(c.unit) and kind not in ("check", "row") else ""
            rel = f" ({100 * c.relative:+.3g} %)" if c.relative is not None and kind == "output" else ""
            lines.append(f"  {c.what:8s} {where}: {format_value(c.old)}{u} -> {format_value(c.new)}{u}{rel}")
    return "\n".join(lines)
