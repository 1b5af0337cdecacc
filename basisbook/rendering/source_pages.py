"""The source view: each input file of the project as numbered lines, so that every
input on a calc page links to the very line it came from."""

from __future__ import annotations

from typing import Any

from basisbook.reading.project import Project
from basisbook.reading.records import convention, display_lines


def source_page(rel: str) -> str:
    """The site path of an input file's source page (``inputs/a.toml`` -> ``source/inputs__a.toml.html``)."""
    return "source/" + rel.replace("/", "__") + ".html"


# a file longer than this shows its first lines and every line a page links to; the
# rest is summarised (the file itself is in the project folder and any archive of it)
SOURCE_LINES_SHOWN = 5000


def source_file_view(project: Project, rel: str, linked: set[int] | None = None) -> dict[str, Any]:
    """The numbered lines of an input file; ``linked`` are the line numbers that pages
    of the site link to, which a summarised long file keeps."""
    text = display_lines(project.root / rel)
    keep = set(range(1, SOURCE_LINES_SHOWN + 1)) | (linked or set())
    lines: list[dict[str, Any]] = []
    gap = 0
    for i, t in enumerate(text, start=1):
        if i in keep:
            if gap:
                lines.append({"n": 0, "text": f"({gap} lines not shown)"})
                gap = 0
            lines.append({"n": i, "text": t})
        else:
            gap += 1
    if gap:
        lines.append({"n": 0, "text": f"({gap} lines not shown)"})
    summary = (f"This file has {len(text)} lines: the first {SOURCE_LINES_SHOWN} and every line a "
               "page links to are shown." if len(text) > SOURCE_LINES_SHOWN else "")
    # a load list says how it was read (separator, decimal mark), so a reviewer can tell
    # 355,5 kW from 3555 kW
    read_as = convention(project.root / rel).text() if rel.lower().endswith((".csv", ".xlsx")) else ""
    return {"file": rel, "lines": lines, "summary": summary, "read_as": read_as}
