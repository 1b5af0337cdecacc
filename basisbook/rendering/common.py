"""View pieces every page kind shares: links to sources, citations, table cells, the
revision block and navigation (``common_view``)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from markupsafe import Markup

from basisbook import __version__
from basisbook.contract.spec import SourceRow
from basisbook.reading.project import InputValue, Project
from basisbook.rendering.mathfmt import mathml, number_text
from basisbook.rendering.source_pages import source_page
from basisbook.rendering.templating import markdown
from basisbook.running.engine import CalcRun


def source_view(iv: InputValue, root: str, runs_by_id: dict[str, CalcRun] | None = None) -> dict[str, Any]:
    s = iv.source
    if s.link:
        inst, out = s.link
        if inst == "site":
            href = f"{root}index.html#site-{out}"
        else:
            upstream = (runs_by_id or {}).get(inst)
            kind = "in" if upstream is not None and out not in upstream.outputs else "out"
            href = f"{root}{inst}.html#{kind}-{out}"
        return {"kind": "link", "href": href, "label": f"{inst}.{out}",
                "file": s.file, "line": s.line,
                "file_href": f"{root}{source_page(s.file)}#L{s.line}" if s.file else ""}
    if s.default:
        return {"kind": "default", "href": "", "label": "module default", "file": "", "line": 0,
                "file_href": ""}
    return {"kind": "file", "href": f"{root}{source_page(s.file)}#L{s.line}",  # type: ignore[arg-type]
            "label": f"{s.file}:{s.line}", "file": s.file, "line": s.line, "file_href": ""}


def cite(citation: str, locator: str) -> str:
    """'Book, 5th ed., 2012' + 'eq. 4-1' without a doubled full stop."""
    return f"{citation.rstrip().rstrip('.')}, {locator}" if locator else citation


def table_cell(v: Any) -> dict[str, Any]:
    """A result-table cell: numbers formatted, a source row as a link to its line."""
    if isinstance(v, SourceRow):
        return {"text": v.label, "href": f"{source_page(v.file)}#L{v.line}", "num": False}
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        return {"text": number_text(float(v)), "href": "", "num": True}
    return {"text": str(v), "href": "", "num": False}


def math_markup(latex: str, display: bool = False) -> Markup:
    return Markup(mathml(latex, display))


def snapshot_href(rev_id: str, archived: dict[str, Path], as_snapshot: str | None) -> str:
    """Where the revision history links for a revision's archived handbook.

    The live site carries a copy of every archived handbook under ``archive/``, so the link
    stays inside the site wherever it is moved; a snapshot being written links only to itself.
    """
    if as_snapshot is not None:
        return "index.html" if rev_id == as_snapshot else ""
    return f"archive/rev-{rev_id}/index.html" if rev_id in archived else ""


def common_view(project: Project, runs: list[CalcRun], archived: dict[str, Path] | None = None,
                has_changes: bool = False, as_snapshot: str | None = None) -> dict[str, Any]:
    rev = project.revision
    archived = archived or {}
    return {
        "project": {"name": project.name, "client": project.client, "number": project.number},
        "revision": {"id": rev.id, "date": rev.date, "purpose": rev.purpose, "prepared": rev.prepared,
                     "checked": rev.checked, "approved": rev.approved, "notes": markdown(rev.notes)},
        "revisions": [{"id": r.id, "date": r.date, "purpose": r.purpose, "prepared": r.prepared,
                       "checked": r.checked, "approved": r.approved, "notes": markdown(r.notes),
                       "snapshot": snapshot_href(r.id, archived, as_snapshot)}
                      for r in reversed(project.revisions)],
        "nav": [{"id": r.id, "title": r.instance.title, "href": f"{r.id}.html"} for r in runs],
        "has_changes": has_changes,
        "version": __version__,
    }

