"""The page of one calc instance: inputs with their sources, each step in symbols and with
numbers, results, design checks, figures, tables, references and cautions."""

from __future__ import annotations

from typing import Any

from markupsafe import Markup

from basisbook.contract.spec import SingleLine, SourceRow
from basisbook.rendering.common import cite, header_markup, math_markup, source_view, table_rows
from basisbook.rendering.mathfmt import (
    format_value,
    input_text,
    number_text,
    quantity_latex,
    quantity_mathml,
    substitute,
    unit_text,
    values_mathml,
)
from basisbook.rendering.source_pages import source_page
from basisbook.rendering.templating import markdown
from basisbook.running.engine import CalcRun

# relations as typeset (a check's value stands on the left, its limit on the right)
RELATIONS = {"<=": "≤", ">=": "≥", "<": "<", ">": ">", "==": "=", "!=": "≠"}

# a table longer than this is summarised on its page and in the one-document view (the
# full rows stay in its CSV): a 100 000-row load list would otherwise make pages of tens of MB
TABLE_ROWS_SHOWN = 1000


def change_mark(marks: dict[tuple[str, str], Any], kind: str, name: str, since: str) -> str:
    """Margin marker text for a value that changed since the previous revision."""
    c = marks.get((kind, name)) or (marks.get(("row", name)) if kind == "input" else None)
    if c is None:
        return ""
    if c.kind == "row":
        return f"table rows changed since rev {since}"
    if c.kind == "check":
        return f"verdict was {c.old} in rev {since}"
    if c.what == "added":
        return f"new since rev {since}"
    return f"changed since rev {since}: was {format_value(c.old)}"


def calc_view(run: CalcRun, runs_by_id: dict[str, CalcRun], cmp: Any = None) -> dict[str, Any]:
    spec = run.spec
    marks = cmp.marks(run.id) if cmp is not None else {}
    since = cmp.old_rev if cmp is not None else ""
    symbols = {i.name: i.symbol for i in spec.inputs} | {o.name: o.symbol for o in spec.outputs}
    units = {i.name: i.unit for i in spec.inputs} | {o.name: o.unit for o in spec.outputs}
    values: dict[str, tuple[float | str, str]] = {
        k: (v.value, units[k]) for k, v in run.inputs.items()  # type: ignore[misc]
    } | {k: (v, units[k]) for k, v in run.outputs.items()}
    refs = {r.key: r for r in spec.references}

    inputs = []
    for decl in spec.inputs:
        iv = run.inputs[decl.name]
        table = None
        if decl.kind == "records":
            n = len(iv.value)  # type: ignore[arg-type]
            inputs.append({
                "name": decl.name, "symbol": math_markup(decl.symbol), "meaning": decl.meaning,
                "value": f"{n} rows", "table": None, "unit": "", "allowed": "",
                "source": source_view(iv, "", runs_by_id),
                "records_file": {"label": iv.value[0].source.file,  # type: ignore[index]
                                 "href": source_page(iv.value[0].source.file)},  # type: ignore[index]
                "used_by": [], "mark": change_mark(marks, "input", decl.name, since),
            })
            continue
        if decl.kind == "table":
            table = {"columns": [c.label + (f" ({unit_text(c.unit)})" if unit_text(c.unit) else "")
                                 for c in decl.columns],
                     "rows": [[input_text(x) for x in row] for row in iv.value]}  # type: ignore[union-attr]
        inputs.append({
            "name": decl.name, "symbol": math_markup(decl.symbol), "meaning": decl.meaning,
            "value": "" if table else input_text(iv.value),  # type: ignore[arg-type]
            "table": table,
            "unit": "" if table else unit_text(decl.unit),
            "allowed": decl.allowed.text() if decl.kind == "number" else "",
            "source": source_view(iv, "", runs_by_id),
            "used_by": [{"href": f"{iid}.html#in-{name}", "label": f"{iid}.{name}"}
                        for iid, name in run.used_by.get(decl.name, [])],
            "mark": change_mark(marks, "input", decl.name, since),
            "records_file": None,
        })
    steps = []
    for i, s in enumerate(spec.steps, start=1):
        lhs = "{" + symbols[s.output] + "}"
        ref = refs[s.source]
        steps.append({
            "n": i, "output": s.output, "anchor": f"step-{s.output}",
            "symbolic": math_markup(lhs + " = " + substitute(s.expression, symbols), True),
            "numeric": Markup(values_mathml(lhs + " = ", s.expression, values)),
            "result": Markup(quantity_mathml(symbols[s.output],
                                             quantity_latex(run.outputs[s.output], units[s.output]))),
            "source": cite(ref.citation, s.locator), "source_key": ref.key, "locator": "", "note": s.note,
        })
    stepped = {s.output for s in spec.steps}
    outputs = []
    for o in spec.outputs:
        used = [{"href": f"{iid}.html#in-{name}", "label": f"{iid}.{name}"}
                for iid, name in run.used_by.get(o.name, [])]
        outputs.append({
            "name": o.name, "symbol": math_markup(o.symbol), "meaning": o.meaning,
            "value": number_text(run.outputs[o.name]), "unit": unit_text(o.unit),
            "anchor": f"out-{o.name}",
            "step": f"#step-{o.name}" if o.name in stepped else "",
            "used_by": used,
            "mark": change_mark(marks, "output", o.name, since),
        })
    checks = []
    for c in run.checks:
        unit = units.get(c.check.value, "")
        checks.append({
            "id": c.check.id, "criterion": c.check.criterion,
            "value": number_text(c.value), "relation": RELATIONS.get(c.check.relation, c.check.relation),
            "limit": number_text(c.limit), "unit": unit_text(unit), "verdict": c.verdict,
            "source": cite(refs[c.check.source].citation, c.check.locator), "locator": "",
            "value_href": f"#step-{c.check.value}" if c.check.value in stepped else f"#out-{c.check.value}",
            "mark": change_mark(marks, "check", c.check.id, since),
        })
    figs = []
    for f in spec.figures:
        if f.name not in run.charts:
            continue
        chart = run.charts[f.name]
        inline = ""
        if isinstance(chart, SingleLine):
            from basisbook.rendering.singleline import svg as single_line_svg

            inline = Markup(single_line_svg(chart, f.title))  # links need the SVG in the page
        figs.append({"name": f.name, "title": f.title, "caption": f.caption,
                     "src": "" if inline else f"fig/{run.id}-{f.name}.svg", "inline": inline})
    tables = []
    for t in spec.tables:
        if t.name not in run.tables:
            continue
        tab = run.tables[t.name]
        shown = tab.rows[:TABLE_ROWS_SHOWN]
        omitted = len(tab.rows) - len(shown)
        tables.append({
            "name": t.name, "title": t.title, "caption": t.caption,
            "columns": [header_markup(h + (f" ({unit_text(u)})" if unit_text(u) else "")) for h, u in tab.columns],
            "rows": table_rows(shown),
            "csv": f"tables/{run.id}-{t.name}.csv",
            "omitted": (f"The first {len(shown)} of {len(tab.rows)} rows are shown; all {len(tab.rows)} "
                        "are in the CSV file." if omitted else ""),
        })
    inst = run.instance
    return {
        "id": run.id, "title": inst.title, "kind": spec.kind, "kind_title": spec.title,
        "purpose": spec.purpose, "notes": markdown(inst.notes),
        "defined_at": {"label": f"{inst.file}:{inst.line}", "href": f"{source_page(inst.file)}#L{inst.line}"},
        "inputs": inputs, "steps": steps, "outputs": outputs, "checks": checks,
        "figures": figs, "tables": tables, "warnings": list(run.warnings),
        "references": [{"key": r.key, "citation": r.citation, "note": r.note} for r in spec.references],
        "cautions": list(spec.cautions),
    }


def table_csv(table: Any) -> str:
    """A result table as CSV (full precision, units in the header) for spreadsheets."""
    import csv
    import io

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow([h + (f" [{u}]" if u and u not in ("text",) else "") for h, u in table.columns])
    for row in table.rows:
        w.writerow([csv_safe(v.label) if isinstance(v, SourceRow)
                    else (repr(float(v)) if isinstance(v, float) else csv_safe(v)) for v in row])
    return buf.getvalue()


def csv_safe(v: Any) -> Any:
    """Text a spreadsheet would run as a formula (``=HYPERLINK(...)``, ``+``, ``-``, ``@``,
    or a leading tab or carriage return) gets a leading apostrophe, as the OWASP guidance on
    CSV injection advises; numbers are written as numbers and never touched, and a lone dash
    (a table's "no value") is no formula."""
    if isinstance(v, str) and v[:1] in ("=", "+", "-", "@", "\t", "\r") and v not in ("-", "+"):
        try:
            float(v)
        except ValueError:
            return "'" + v
    return v

