"""The "changes since the previous revision" page.

The comparison comes from the build (``revisions.diff.compare``) as data; this module reads
its ``changes``, ``of(kind)``, ``old_rev``, ``new_rev`` and ``tolerance`` and imports nothing
of revisions.
"""

from __future__ import annotations

from typing import Any

from basisbook.rendering.mathfmt import format_value, unit_text
from basisbook.running.engine import CalcRun

# a group longer than this (a load list of thousands of new rows) is summarised on the page
CHANGES_SHOWN = 1000


def changes_view(cmp: Any, runs_by_id: dict[str, CalcRun]) -> dict[str, Any]:
    """The "changes since the previous revision" page: every row links to its calc page."""
    def unit_of(c: Any) -> str:
        return unit_text(c.unit) if c.kind in ("input", "output", "site") else ""

    def href(c: Any) -> str:
        if c.kind == "site":
            return f"index.html#site-{c.name}"
        if c.instance not in runs_by_id:
            return ""
        anchor = {"input": f"in-{c.name}", "row": f"in-{c.name.split('[')[0]}", "output": f"out-{c.name}",
                  "check": f"check-{c.name}"}.get(c.kind, "")
        return f"{c.instance}.html" + (f"#{anchor}" if anchor else "")

    groups = []
    titles = [("site", "Site conditions"), ("instance", "Calculations added or removed"),
              ("input", "Inputs"), ("row", "Table rows (load lists, characteristics)"),
              ("output", "Results that moved"), ("check", "Design checks whose verdict changed")]
    for kind, title in titles:
        rows = [{"where": f"{c.instance}.{c.name}" if c.name else c.instance, "href": href(c),
                 "what": c.what, "old": format_value(c.old), "new": format_value(c.new),
                 "unit": unit_of(c),
                 "delta": (format_value(c.new - c.old) if kind == "output" and c.relative is not None else ""),
                 "percent": (f"{100 * c.relative:+.3g} %" if kind == "output" and c.relative is not None else "")}
                for c in cmp.of(kind)[:CHANGES_SHOWN]]
        if rows:
            total = len(cmp.of(kind))
            omitted = (f"The first {len(rows)} of {total} changes are shown; `basisbook diff` lists them all."
                       if total > len(rows) else "")
            groups.append({"title": title, "kind": kind, "rows": rows, "omitted": omitted})
    return {"changes": {"old": cmp.old_rev, "new": cmp.new_rev, "tolerance": f"{cmp.tolerance:g}",
                        "groups": groups, "count": len(cmp.changes)}}

