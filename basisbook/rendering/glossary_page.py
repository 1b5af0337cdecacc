"""The glossary page: every name the project's calcs use, with symbol, meaning and unit."""

from __future__ import annotations

from typing import Any

from basisbook.rendering.common import math_markup
from basisbook.rendering.mathfmt import unit_text
from basisbook.running.engine import CalcRun


def glossary_view(runs: list[CalcRun]) -> dict[str, Any]:
    """Every name the project's calcs use, with symbol, meaning, unit and where used."""
    terms: dict[str, dict[str, Any]] = {}
    for r in runs:
        for item in list(r.spec.inputs) + list(r.spec.outputs):
            t = terms.setdefault(item.name, {"name": item.name, "symbol": math_markup(item.symbol),
                                             "meaning": item.meaning, "unit": unit_text(item.unit),
                                             "used": []})
            kind = {"href": f"{r.id}.html", "label": r.id}
            if kind not in t["used"]:
                t["used"].append(kind)
    return {"terms": [terms[k] for k in sorted(terms)]}

