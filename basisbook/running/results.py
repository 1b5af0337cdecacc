"""The results model: every input and output with value, unit and source (``results.json``).

The renderer writes it, ``diff`` compares two of them and ``verify --rebuild`` recomputes
one; it is plain JSON-ready data.
"""

from __future__ import annotations

from typing import Any

from basisbook import __version__
from basisbook.contract.spec import Record
from basisbook.reading.project import InputValue, Project
from basisbook.running.engine import CalcRun


def results_document(project: Project, runs: list[CalcRun]) -> dict[str, Any]:
    """Every input and output with value, unit and source (results.json)."""

    def src(iv: InputValue) -> dict[str, Any]:
        s = iv.source
        if s.link:
            return {"link": ".".join(s.link), "file": s.file, "line": s.line}
        if s.default:
            return {"default": True}
        return {"file": s.file, "line": s.line}

    def value(r: CalcRun, k: str, v: InputValue) -> dict[str, Any]:
        if isinstance(v.value, tuple) and v.value and isinstance(v.value[0], Record):
            decl = r.spec.input(k)
            key = next((f.key for f in decl.fields if f.unique), None)
            rows = [{**dict(rec), "_source": rec.source.label} for rec in v.value]
            return {"value": rows, "unit": "records", "key_field": key, "source": src(v)}
        return {"value": v.value, "unit": v.unit, "source": src(v)}

    rev = project.revision
    return {
        "tool": {"name": "basisbook", "version": __version__},
        "project": {"name": project.name, "client": project.client, "number": project.number},
        "revision": {"id": rev.id, "date": rev.date, "purpose": rev.purpose},
        "site": {k: {"value": v.value, "unit": v.unit, "source": src(v)} for k, v in project.site.items()},
        "instances": {
            r.id: {
                "calc": r.spec.kind,
                "title": r.instance.title,
                "inputs": {k: value(r, k, v) for k, v in r.inputs.items()},
                "outputs": {o.name: {"value": r.outputs[o.name], "unit": o.unit} for o in r.spec.outputs},
                "checks": [{"id": c.check.id, "value": c.value, "limit": c.limit,
                            "relation": c.check.relation, "verdict": c.verdict} for c in r.checks],
                "warnings": list(r.warnings),
            }
            for r in runs
        },
    }

