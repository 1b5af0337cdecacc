"""The source view: each input file of the project as numbered lines, so that every
input on a calc page links to the very line it came from."""

from __future__ import annotations

from typing import Any

from basisbook.reading.project import Project
from basisbook.reading.records import display_lines


def source_page(rel: str) -> str:
    """The site path of an input file's source page (``inputs/a.toml`` -> ``source/inputs__a.toml.html``)."""
    return "source/" + rel.replace("/", "__") + ".html"


def source_file_view(project: Project, rel: str) -> dict[str, Any]:
    lines = [{"n": i, "text": t} for i, t in enumerate(display_lines(project.root / rel), start=1)]
    return {"file": rel, "lines": lines}
