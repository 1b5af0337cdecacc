"""View pieces every page kind shares: links to sources, citations, table cells, the
revision block and navigation (``common_view``)."""

from __future__ import annotations

import html
import re
from pathlib import Path
from typing import Any

from markupsafe import Markup

from basisbook import __version__
from basisbook.contract.spec import DISCIPLINES, SourceRow
from basisbook.reading.project import InputValue, Project
from basisbook.rendering.mathfmt import column_decimals, fixed_text, mathml, number_text
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


def table_cell(v: Any, decimals: int | None = None) -> dict[str, Any]:
    """A result-table cell: numbers formatted (with the column's decimals when it has a set
    number), a source row as a link to its line."""
    if isinstance(v, SourceRow):
        return {"text": v.label, "href": f"{source_page(v.file)}#L{v.line}", "num": False}
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        text = fixed_text(float(v), decimals) if decimals is not None else number_text(float(v))
        return {"text": text, "href": "", "num": True}
    return {"text": str(v), "href": "", "num": False}


def table_rows(rows: list[list[Any]] | tuple[Any, ...]) -> list[list[dict[str, Any]]]:
    """Every cell of a result table, each numeric column with one number of decimals."""
    width = max((len(r) for r in rows), default=0)
    decimals = []
    for col in range(width):
        nums = [float(r[col]) for r in rows if col < len(r) and isinstance(r[col], (int, float))
                and not isinstance(r[col], bool)]
        decimals.append(column_decimals(nums))
    return [[table_cell(v, decimals[i]) for i, v in enumerate(r)] for r in rows]


_SUBSCRIPTED = re.compile(r"(?<![A-Za-z0-9&#;])([A-Za-z])_([A-Za-z0-9]+(?:,[A-Za-z0-9]+)*)")


def header_markup(text: str) -> Markup:
    """A table header in the trade's notation: ``P_in`` -> P with a real subscript "in"
    (the calcs write headers in plain text).  The text is escaped before any tag is added."""
    escaped = html.escape(text, quote=False)
    return Markup(_SUBSCRIPTED.sub(r"<i>\1</i><sub>\2</sub>", escaped))


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


def register(project: Project, runs: list[CalcRun], changes_since: str = "") -> list[dict[str, Any]]:
    """The document's outline in reading order, numbered: the summary, the changes since the
    previous revision (when there are any), the calculations grouped by discipline (in the
    order of ``DISCIPLINES``, each group's in the order the project lists them), then the
    appendices lettered.  The same numbers stand in the navigation, the headings and the
    printed contents, so a comment can cite "section 3.2, step 4".  A group is an entry
    without a page (``href`` empty)."""
    out: list[dict[str, Any]] = [{"n": "1", "title": "Summary", "href": "index.html", "group": False}]
    if changes_since:
        out.append({"n": "2", "title": f"Changes since revision {changes_since}", "href": "changes.html",
                    "group": False})
    place = {inst.id: i for i, inst in enumerate(project.instances)}
    number = len(out)
    for discipline in DISCIPLINES:
        members = sorted((r for r in runs if r.spec.discipline == discipline), key=lambda r: place.get(r.id, 0))
        if not members:
            continue
        number += 1
        out.append({"n": str(number), "title": discipline[0].upper() + discipline[1:], "href": "", "group": True})
        out += [{"n": f"{number}.{k}", "title": r.instance.title, "href": f"{r.id}.html", "group": False}
                for k, r in enumerate(members, start=1)]
    for letter, (title, href) in zip("ABC", (("Dependency map", "dependencies.html"), ("Glossary", "glossary.html"),
                                             ("Verification appendix", "verification.html")), strict=True):
        out.append({"n": letter, "title": title, "href": href, "group": False})
    return out


def common_view(project: Project, runs: list[CalcRun], archived: dict[str, Path] | None = None,
                has_changes: bool = False, as_snapshot: str | None = None,
                changes_since: str = "") -> dict[str, Any]:
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
        "register": register(project, runs, changes_since if has_changes else ""),
        "has_changes": has_changes,
        "version": __version__,
    }

