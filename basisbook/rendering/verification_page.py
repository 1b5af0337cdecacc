"""The verification appendix: each module's published cases, expected against computed."""

from __future__ import annotations

import math
from typing import Any

from basisbook.rendering.mathfmt import trimmed, unit_text
from basisbook.running.engine import run_published_cases


def verification_view() -> dict[str, Any]:
    groups: dict[str, dict[str, Any]] = {}
    for r in run_published_cases():
        g = groups.setdefault(r.kind, {"kind": r.kind, "title": r.title, "rows": []})
        # as many digits as the tolerance needs, so a 1e-6 agreement is visible
        scale = max(abs(r.expected), 1e-300)
        digits = max(4, min(12, 1 + math.ceil(-math.log10(max(r.tolerance, 1e-15) / scale))))
        g["rows"].append({"case": r.case, "source": r.source, "expected": trimmed(r.expected, digits),
                          "computed": trimmed(r.computed, digits), "unit": unit_text(r.unit),
                          "tolerance": "± " + trimmed(r.tolerance, 4), "basis": r.basis,
                          "verdict": "agrees" if r.agrees else "DISAGREES"})
    total = sum(len(g["rows"]) for g in groups.values())
    agree = sum(1 for g in groups.values() for row in g["rows"] if row["verdict"] == "agrees")
    return {"groups": list(groups.values()), "total": total, "agree": agree}

