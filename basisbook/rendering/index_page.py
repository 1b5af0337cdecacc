"""The index page: summary of key results per calc, site conditions, project notes."""

from __future__ import annotations

from typing import Any

from basisbook.reading.project import SITE_FIELDS, Project
from basisbook.rendering.common import math_markup, source_view
from basisbook.rendering.mathfmt import input_text, number_text, unit_text
from basisbook.rendering.templating import markdown
from basisbook.running.engine import CalcRun


def index_view(project: Project, runs: list[CalcRun]) -> dict[str, Any]:
    summary = []
    for r in runs:
        rows = []
        for o in r.spec.outputs:
            if o.key:
                stepped = any(s.output == o.name for s in r.spec.steps)
                rows.append({"meaning": o.meaning, "symbol": math_markup(o.symbol),
                             "value": number_text(r.outputs[o.name]), "unit": unit_text(o.unit),
                             "href": f"{r.id}.html#{'step' if stepped else 'out'}-{o.name}"})
        verdicts = {v: sum(1 for c in r.checks if c.verdict == v) for v in ("meets", "review", "fails")}
        summary.append({"id": r.id, "title": r.instance.title, "kind_title": r.spec.title,
                        "href": f"{r.id}.html", "rows": rows, "verdicts": verdicts,
                        "warnings": list(r.warnings)})
    site = []
    for f in SITE_FIELDS:
        iv = project.site[f.name]
        site.append({"name": f.name, "symbol": math_markup(f.symbol), "meaning": f.meaning,
                     "value": input_text(iv.value), "unit": unit_text(f.unit),  # type: ignore[arg-type]
                     "source": source_view(iv, "")})
    return {"summary": summary, "site": site, "notes": markdown(project.notes)}

