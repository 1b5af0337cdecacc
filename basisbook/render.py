"""Turn the engine's runs into a static site (pages, figures, results.json).

The renderer knows the contract and formatting, no physics.  It prepares plain
view dictionaries; templates only loop over them and test conditions.
Jinja runs with autoescape on and StrictUndefined, so a missing value is an
error, never a blank cell.
"""

from __future__ import annotations

import json
import math
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any

from markupsafe import Markup

from basisbook import __version__, figures
from basisbook.diff import Change, Comparison
from basisbook.engine import CalcRun
from basisbook.mathfmt import (
    mathml,
    number_text,
    quantity_latex,
    quantity_mathml,
    substitute,
    unit_text,
    values_mathml,
)
from basisbook.project import InputValue, Project
from basisbook.spec import EnergyFlow, Record, SingleLine, SourceRow

SITE_MARKER = ".basisbook-site"


def builtin_templates() -> Path:
    return Path(str(resources.files("templates")))


def environment(project_root: Path) -> Any:
    import jinja2

    loaders: list[jinja2.BaseLoader] = []
    override = project_root / "templates"
    if override.is_dir():
        loaders.append(jinja2.FileSystemLoader(str(override)))
    loaders.append(jinja2.FileSystemLoader(str(builtin_templates())))

    class ViewEnvironment(jinja2.Environment):
        """Our views are plain dicts: ``page.title`` looks the key up first instead of
        trying (and failing) an attribute, which was half of a page's render time.
        Anything else, and a missing key (StrictUndefined), goes the usual way."""

        def getattr(self, obj: Any, attribute: str) -> Any:
            if type(obj) is dict and attribute in obj:
                return obj[attribute]
            return super().getattr(obj, attribute)

    return ViewEnvironment(
        loader=jinja2.ChoiceLoader(loaders),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        keep_trailing_newline=True,
        trim_blocks=True,
        lstrip_blocks=True,
    )


_MD: Any = None


def _safe_link(url: str) -> bool:
    """Links in project notes may only point inside the handbook: an anchor or a
    relative page, never a scheme (http:, javascript:, file:), an absolute path or '..'."""
    import re

    u = url.strip()
    if not u or u.startswith(("/", "\\")) or re.match(r"^[A-Za-z][A-Za-z0-9+.-]*:", u):
        return False
    return ".." not in u.replace("\\", "/").split("/")


@lru_cache(maxsize=1024)
def markdown(text: str) -> Markup:
    global _MD
    if _MD is None:
        from markdown_it import MarkdownIt

        # raw HTML off: project text can never inject markup; links stay inside the site
        _MD = MarkdownIt("commonmark", {"html": False, "linkify": False})
        _MD.validateLink = _safe_link
    return Markup(_MD.render(text or ""))


def source_page(rel: str) -> str:
    return "source/" + rel.replace("/", "__") + ".html"


def _source_view(iv: InputValue, root: str, runs_by_id: dict[str, CalcRun] | None = None) -> dict[str, Any]:
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


def _cite(citation: str, locator: str) -> str:
    """'Book, 5th ed., 2012' + 'eq. 4-1' without a doubled full stop."""
    return f"{citation.rstrip().rstrip('.')}, {locator}" if locator else citation


def _cell(v: Any) -> dict[str, Any]:
    """A result-table cell: numbers formatted, a source row as a link to its line."""
    if isinstance(v, SourceRow):
        return {"text": v.label, "href": f"{source_page(v.file)}#L{v.line}", "num": False}
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        return {"text": number_text(float(v)), "href": "", "num": True}
    return {"text": str(v), "href": "", "num": False}


@lru_cache(maxsize=4096)
def _plain_symbol(latex: str) -> str:
    """LaTeX symbol as searchable text: S_\\mathrm{r} -> S_r, \\cos\\varphi -> cos varphi."""
    import re

    t = re.sub(r"\\(mathrm|text|operatorname)\{([^{}]*)\}", r"\2", latex)
    t = re.sub(r"\\([A-Za-z]+)", r"\1 ", t)
    return re.sub(r"[{}\s]+", " ", t).replace(" _", "_").strip()


def search_index(runs: list[CalcRun]) -> str:
    """The offline search index as a script (file:// pages cannot fetch JSON)."""
    entries: list[dict[str, str]] = []
    for r in runs:
        entries.append({"t": r.instance.title, "k": "calculation", "h": f"{r.id}.html",
                        "s": f"{r.id} {r.spec.title}"})
        for decl in r.spec.inputs:
            iv = r.inputs[decl.name]
            entries.append({"t": f"{r.id}.{decl.name}", "k": "input", "h": f"{r.id}.html#in-{decl.name}",
                            "s": f"{_plain_symbol(decl.symbol)} {decl.meaning}"})
            if decl.kind == "records":
                for rec in iv.value:  # type: ignore[union-attr]
                    words = " ".join(str(v) for v in rec.values() if isinstance(v, str))
                    entries.append({"t": f"{rec.get('tag', rec.source.label)}", "k": "load-list row",
                                    "h": f"{source_page(rec.source.file)}#L{rec.source.line}",
                                    "s": f"{words} {r.id}"})
        for o in r.spec.outputs:
            entries.append({"t": f"{r.id}.{o.name}", "k": "result", "h": f"{r.id}.html#out-{o.name}",
                            "s": f"{_plain_symbol(o.symbol)} {o.meaning}"})
    # \u003c keeps any "<" from project text inert even if this file were inlined
    data = json.dumps(entries, ensure_ascii=True, sort_keys=True, separators=(",", ":")).replace("<", "\\u003c")
    return "window.BASISBOOK_SEARCH = " + data + ";\n"


def table_csv(table: Any) -> str:
    """A result table as CSV (full precision, units in the header) for spreadsheets."""
    import csv
    import io

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow([h + (f" [{u}]" if u and u not in ("text",) else "") for h, u in table.columns])
    for row in table.rows:
        w.writerow([v.label if isinstance(v, SourceRow) else (repr(float(v)) if isinstance(v, float) else v)
                    for v in row])
    return buf.getvalue()


def _math(latex: str, display: bool = False) -> Markup:
    return Markup(mathml(latex, display))


def _mark(marks: dict[tuple[str, str], Change], kind: str, name: str, since: str) -> str:
    """Margin marker text for a value that changed since the previous revision."""
    from basisbook.diff import format_value

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


def calc_view(run: CalcRun, runs_by_id: dict[str, CalcRun], cmp: Comparison | None = None) -> dict[str, Any]:
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
                "name": decl.name, "symbol": _math(decl.symbol), "meaning": decl.meaning,
                "value": f"{n} rows", "table": None, "unit": "", "allowed": "",
                "source": _source_view(iv, "", runs_by_id),
                "records_file": {"label": iv.value[0].source.file,  # type: ignore[index]
                                 "href": source_page(iv.value[0].source.file)},  # type: ignore[index]
                "used_by": [], "mark": _mark(marks, "input", decl.name, since),
            })
            continue
        if decl.kind == "table":
            table = {"columns": [c.label + (f" ({unit_text(c.unit)})" if unit_text(c.unit) else "")
                                 for c in decl.columns],
                     "rows": [[number_text(x) for x in row] for row in iv.value]}  # type: ignore[union-attr]
        inputs.append({
            "name": decl.name, "symbol": _math(decl.symbol), "meaning": decl.meaning,
            "value": "" if table else number_text(iv.value),  # type: ignore[arg-type]
            "table": table,
            "unit": "" if table else unit_text(decl.unit),
            "allowed": decl.allowed.text() if decl.kind == "number" else "",
            "source": _source_view(iv, "", runs_by_id),
            "used_by": [{"href": f"{iid}.html#in-{name}", "label": f"{iid}.{name}"}
                        for iid, name in run.used_by.get(decl.name, [])],
            "mark": _mark(marks, "input", decl.name, since),
            "records_file": None,
        })
    steps = []
    for i, s in enumerate(spec.steps, start=1):
        lhs = "{" + symbols[s.output] + "}"
        ref = refs[s.source]
        steps.append({
            "n": i, "output": s.output, "anchor": f"step-{s.output}",
            "symbolic": _math(lhs + " = " + substitute(s.expression, symbols), True),
            "numeric": Markup(values_mathml(lhs + " = ", s.expression, values)),
            "result": Markup(quantity_mathml(symbols[s.output],
                                             quantity_latex(run.outputs[s.output], units[s.output]))),
            "source": _cite(ref.citation, s.locator), "source_key": ref.key, "locator": "", "note": s.note,
        })
    stepped = {s.output for s in spec.steps}
    outputs = []
    for o in spec.outputs:
        used = [{"href": f"{iid}.html#in-{name}", "label": f"{iid}.{name}"}
                for iid, name in run.used_by.get(o.name, [])]
        outputs.append({
            "name": o.name, "symbol": _math(o.symbol), "meaning": o.meaning,
            "value": number_text(run.outputs[o.name]), "unit": unit_text(o.unit),
            "anchor": f"out-{o.name}",
            "step": f"#step-{o.name}" if o.name in stepped else "",
            "used_by": used,
            "mark": _mark(marks, "output", o.name, since),
        })
    checks = []
    for c in run.checks:
        unit = units.get(c.check.value, "")
        checks.append({
            "id": c.check.id, "criterion": c.check.criterion,
            "value": number_text(c.value), "relation": c.check.relation,
            "limit": number_text(c.limit), "unit": unit_text(unit), "verdict": c.verdict,
            "source": _cite(refs[c.check.source].citation, c.check.locator), "locator": "",
            "value_href": f"#step-{c.check.value}" if c.check.value in stepped else f"#out-{c.check.value}",
            "mark": _mark(marks, "check", c.check.id, since),
        })
    figs = []
    for f in spec.figures:
        if f.name not in run.charts:
            continue
        chart = run.charts[f.name]
        inline = ""
        if isinstance(chart, SingleLine):
            from basisbook.singleline import svg as single_line_svg

            inline = Markup(single_line_svg(chart, f.title))  # links need the SVG in the page
        figs.append({"name": f.name, "title": f.title, "caption": f.caption,
                     "src": "" if inline else f"fig/{run.id}-{f.name}.svg", "inline": inline})
    tables = []
    for t in spec.tables:
        if t.name not in run.tables:
            continue
        tab = run.tables[t.name]
        tables.append({
            "name": t.name, "title": t.title, "caption": t.caption,
            "columns": [h + (f" ({unit_text(u)})" if unit_text(u) else "") for h, u in tab.columns],
            "rows": [[_cell(v) for v in row] for row in tab.rows],
            "csv": f"tables/{run.id}-{t.name}.csv",
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


def index_view(project: Project, runs: list[CalcRun]) -> dict[str, Any]:
    summary = []
    for r in runs:
        rows = []
        for o in r.spec.outputs:
            if o.key:
                stepped = any(s.output == o.name for s in r.spec.steps)
                rows.append({"meaning": o.meaning, "symbol": _math(o.symbol),
                             "value": number_text(r.outputs[o.name]), "unit": unit_text(o.unit),
                             "href": f"{r.id}.html#{'step' if stepped else 'out'}-{o.name}"})
        verdicts = {v: sum(1 for c in r.checks if c.verdict == v) for v in ("meets", "review", "fails")}
        summary.append({"id": r.id, "title": r.instance.title, "kind_title": r.spec.title,
                        "href": f"{r.id}.html", "rows": rows, "verdicts": verdicts,
                        "warnings": list(r.warnings)})
    from basisbook.project import SITE_FIELDS

    site = []
    for f in SITE_FIELDS:
        iv = project.site[f.name]
        site.append({"name": f.name, "symbol": _math(f.symbol), "meaning": f.meaning,
                     "value": number_text(iv.value), "unit": unit_text(f.unit),  # type: ignore[arg-type]
                     "source": _source_view(iv, "")})
    return {"summary": summary, "site": site, "notes": markdown(project.notes)}


def depmap_view(runs: list[CalcRun]) -> dict[str, Any]:
    from basisbook import depmap

    links = []
    for r in runs:
        for decl in r.spec.inputs:
            iv = r.inputs[decl.name]
            if iv.source.link:
                view = _source_view(iv, "", {x.id: x for x in runs})
                links.append({"to": f"{r.id}.{decl.name}", "to_href": f"{r.id}.html#in-{decl.name}",
                              "from": view["label"], "from_href": view["href"]})
    return {"map_svg": Markup(depmap.svg(runs)), "links": links}


def verification_view() -> dict[str, Any]:
    from basisbook.engine import run_published_cases

    groups: dict[str, dict[str, Any]] = {}
    for r in run_published_cases():
        g = groups.setdefault(r.kind, {"kind": r.kind, "title": r.title, "rows": []})
        # as many digits as the tolerance needs, so a 1e-6 agreement is visible
        scale = max(abs(r.expected), 1e-300)
        digits = max(4, min(12, 1 + math.ceil(-math.log10(max(r.tolerance, 1e-15) / scale))))
        g["rows"].append({"case": r.case, "source": r.source, "expected": number_text(r.expected, digits),
                          "computed": number_text(r.computed, digits), "unit": unit_text(r.unit),
                          "tolerance": "± " + number_text(r.tolerance), "basis": r.basis,
                          "verdict": "agrees" if r.agrees else "DISAGREES"})
    total = sum(len(g["rows"]) for g in groups.values())
    agree = sum(1 for g in groups.values() for row in g["rows"] if row["verdict"] == "agrees")
    return {"groups": list(groups.values()), "total": total, "agree": agree}


def glossary_view(runs: list[CalcRun]) -> dict[str, Any]:
    """Every name the project's calcs use, with symbol, meaning, unit and where used."""
    terms: dict[str, dict[str, Any]] = {}
    for r in runs:
        for item in list(r.spec.inputs) + list(r.spec.outputs):
            t = terms.setdefault(item.name, {"name": item.name, "symbol": _math(item.symbol),
                                             "meaning": item.meaning, "unit": unit_text(item.unit),
                                             "used": []})
            kind = {"href": f"{r.id}.html", "label": r.id}
            if kind not in t["used"]:
                t["used"].append(kind)
    return {"terms": [terms[k] for k in sorted(terms)]}


def archived_sites(project: Project) -> dict[str, Path]:
    """Revision id -> the ``site/`` folder of its archived snapshot, for those archived."""
    from basisbook.archive import snapshot_dir

    out = {}
    for r in project.revisions:
        site = snapshot_dir(project.root, r.id) / "site"
        if (site / "index.html").is_file():
            out[r.id] = site
    return out


def _snapshot_href(rev_id: str, archived: dict[str, Path], as_snapshot: str | None) -> str:
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
                       "snapshot": _snapshot_href(r.id, archived, as_snapshot)}
                      for r in reversed(project.revisions)],
        "nav": [{"id": r.id, "title": r.instance.title, "href": f"{r.id}.html"} for r in runs],
        "has_changes": has_changes,
        "version": __version__,
    }


def changes_view(cmp: Comparison, runs_by_id: dict[str, CalcRun]) -> dict[str, Any]:
    """The "changes since the previous revision" page: every row links to its calc page."""
    from basisbook.diff import format_value

    def unit_of(c: Change) -> str:
        return unit_text(c.unit) if c.kind in ("input", "output", "site") else ""

    def href(c: Change) -> str:
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
                for c in cmp.of(kind)]
        if rows:
            groups.append({"title": title, "kind": kind, "rows": rows})
    return {"changes": {"old": cmp.old_rev, "new": cmp.new_rev, "tolerance": f"{cmp.tolerance:g}",
                        "groups": groups, "count": len(cmp.changes)}}


def previous_comparison(project: Project, runs: list[CalcRun]) -> Comparison | None:
    """Compare with the archived revision before the current one, if there is one."""
    from basisbook.archive import load_snapshot_results
    from basisbook.diff import compare

    if len(project.revisions) < 2:
        return None
    prev = project.revisions[-2]
    old = load_snapshot_results(project.root, prev.id)
    if old is None:
        return None
    new = json.loads(json.dumps(results_document(project, runs)))
    return compare(old, new, project.change_tolerance)


def figure_jobs(run: CalcRun) -> list[tuple[str, Any, str]]:
    """(site path, chart, title) of each drawn figure of a run (single-line diagrams are inline)."""
    return [(f"fig/{run.id}-{f.name}.svg", run.charts[f.name], f"{run.instance.title}: {f.title}")
            for f in run.spec.figures if f.name in run.charts and not isinstance(run.charts[f.name], SingleLine)]


class RenderCache:
    """What a long-lived process (serve) keeps between builds: the Jinja
    environment, every figure's SVG by a hash of its data, and the figure helper
    process (basisbook/figure_worker.py) when there is one."""

    def __init__(self, worker: Any = None, remember_pages: bool = False, share_drawing: bool = False) -> None:
        self.env: Any = None
        self.env_root: Path | None = None
        self.figures: dict[str, str] = {}
        self.figures_drawn = 0
        self.worker = worker
        self._used: set[str] = set()
        self._waiting: dict[str, tuple[Any, str]] = {}
        self.pending: dict[str, str] = {}  # site path -> figure key, not yet in the files
        self._building = False
        self._chart_keys: dict[int, tuple[Any, str]] = {}
        self._pages: dict[str, str] = {}  # rendered pages by a hash of template and context
        self._views: dict[str, dict[str, Any]] = {}  # calc page views by what they read
        self.templates_stamp = ""
        self.remember_pages = remember_pages  # worth its hashing only across builds (serve)
        # this process has matplotlib loaded and takes over charts the helper has not begun
        self.share_drawing = share_drawing
        self.verification: dict[str, Any] | None = None  # depends on the code only
        self.sections: dict[str, tuple[str, str]] = {}  # one-document sections by page

    def environment(self, project_root: Path) -> Any:
        if self.env is None or self.env_root != project_root:
            self.env, self.env_root = environment(project_root), project_root
        if not self.remember_pages:
            return self.env
        # the pages cached below are only as good as the templates they came from
        stamp = []
        for folder in (builtin_templates(), project_root / "templates"):
            if folder.is_dir():
                for f in sorted(folder.rglob("*")):
                    if f.is_file():
                        st = f.stat()
                        stamp.append(f"{f}:{st.st_mtime_ns}:{st.st_size}")
        self.templates_stamp = "\n".join(stamp)
        return self.env

    def figure_key(self, chart: Any, title: str) -> str:
        # a calc reused from the compute cache hands back the very same chart object;
        # hashing its data again is skipped (the object is kept, so its id stays unique)
        hit = self._chart_keys.get(id(chart))
        if hit is None or hit[0] is not chart:
            hit = (chart, figures.chart_key(chart))
        self._next_chart_keys[id(chart)] = hit
        return hit[1] + "|" + title

    def calc_view(self, run: CalcRun, runs_by_id: dict[str, CalcRun],
                  cmp: Comparison | None) -> tuple[dict[str, Any], str]:
        """``calc_view`` and the key it is kept by across builds: everything it reads,
        that is the calc kind and exact inputs (which fix every result, as the compute
        cache relies on), the instance's own text and place, each input's source and
        upstream kind, where its values are used, and this page's margin marks."""
        if not self.remember_pages:
            return calc_view(run, runs_by_id, cmp), ""
        inst = run.instance
        upstream = {iv.source.link[0]: runs_by_id[iv.source.link[0]].instance.calc
                    for iv in run.inputs.values()
                    if iv.source.link and iv.source.link[0] in runs_by_id}
        key = repr((run.cache_key, inst.id, inst.calc, inst.title, inst.notes, inst.file, inst.line,
                    [(n, iv.source) for n, iv in run.inputs.items()], sorted(upstream.items()),
                    sorted(run.used_by.items()),
                    (cmp.old_rev, sorted(cmp.marks(run.id).items())) if cmp is not None else None))
        view = self._views.get(key)
        if view is None:
            view = calc_view(run, runs_by_id, cmp)
        self._next_views[key] = view
        return view, key

    def page(self, env: Any, template: str, context: dict[str, Any],
             stand_ins: dict[str, str] | None = None) -> str:
        """A rendered page, re-rendered only when its context or the templates changed.

        The key is the context's repr: everything a template can see is plain data
        (strings, numbers, lists, dicts), whose repr is exact and complete.  A value
        named in ``stand_ins`` is represented by the key given there (a calc view by
        the key it was made from).
        """
        import hashlib

        if not self.remember_pages:
            return env.get_template(template).render(**context)
        stand_ins = stand_ins or {}
        parts = (f"{k}={stand_ins[k] if k in stand_ins else repr(v)}" for k, v in sorted(context.items()))
        key = hashlib.sha256("\0".join((self.templates_stamp, template, *parts)).encode()).hexdigest()
        text = self._pages.get(key)
        if text is None:
            text = env.get_template(template).render(**context)
        self._next_pages[key] = text
        return text

    def request(self, chart: Any, title: str) -> str:
        """Ask for a figure: drawn at once, or sent to the helper (``fetch`` collects it)."""
        key = self.figure_key(chart, title)
        self._used.add(key)
        if key in self.figures or key in self._waiting:
            return key
        # energy-flow diagrams are written directly (well under a millisecond): never sent
        if self.worker is not None and not isinstance(chart, EnergyFlow) and self.worker.submit(key, chart, title):
            self._waiting[key] = (chart, title)
        else:
            self._keep(key, None, chart, title)
        return key

    def _keep(self, key: str, svg: str | None, chart: Any, title: str) -> None:
        """Store a figure; ``None`` means draw it here (the real error, if any, is raised)."""
        self.figures[key] = svg if svg is not None else figures.render_svg(chart, title)
        self.figures_drawn += 1

    def complete(self, files: dict[str, bytes]) -> None:
        """Add the figures ``render_files(complete=False)`` left pending; end the build."""
        self.fetch()
        for rel, key in self.pending.items():
            files[rel] = self.figures[key].encode("utf-8")
        self.pending = {}
        self.finish()

    def request_run(self, run: CalcRun) -> None:
        """Send a finished run's figures ahead (``engine.run(on_run=...)``)."""
        if self.worker is not None:
            for _rel, chart, title in figure_jobs(run):
                self.request(chart, title)

    def fetch(self) -> None:
        """Collect what the helper drew; draw here whatever it could not deliver
        (which raises the real error if the chart itself is at fault)."""
        if not self._waiting:
            return
        if self.worker is not None and self.share_drawing:
            for key in self.worker.steal():  # the pages are done: both processes draw now
                self._keep(key, None, *self._waiting.pop(key))
        got = self.worker.collect() if self.worker is not None else {}
        for key, (chart, title) in self._waiting.items():
            self._keep(key, got.get(key), chart, title)
        self._waiting = {}

    def start(self) -> None:
        """Begin a build (a no-op if the build already began it to send figures ahead)."""
        if self._building:
            return
        self._building = True
        self._used = set()
        self._waiting = {}
        self._next_chart_keys: dict[int, tuple[Any, str]] = {}
        self._next_pages: dict[str, str] = {}
        self._next_views: dict[str, dict[str, Any]] = {}

    def finish(self) -> None:
        """Forget figures the last build did not use (memory stays bounded)."""
        self.figures = {k: v for k, v in self.figures.items() if k in self._used}
        # keep this build's entries only
        self._chart_keys, self._pages, self._views = self._next_chart_keys, self._next_pages, self._next_views
        self._building = False

    def abort(self) -> None:
        """A build failed part-way: the next one starts afresh."""
        self._building = False

    def close(self) -> None:
        if self.worker is not None:
            self.worker.close()
            self.worker = None

    def verification_view(self) -> dict[str, Any]:
        if self.verification is None:
            self.verification = verification_view()
        return self.verification


def render_files(project: Project, runs: list[CalcRun], cache: RenderCache | None = None,
                 as_snapshot: str | None = None, complete: bool = True) -> dict[str, bytes]:
    """Every file of the site as bytes, by relative path (nothing is written here).

    The live site includes a copy of each archived revision's handbook under
    ``archive/rev-<id>/``; ``as_snapshot`` (the revision being archived) leaves them out,
    so snapshots never nest.  With ``complete=False`` the figures a helper is still
    drawing are left out (their paths in ``cache.pending``) for the caller to add with
    ``cache.complete(files)``: a builder writes the pages meanwhile.
    """
    cache = cache or RenderCache()
    cache.start()
    env = cache.environment(project.root)
    cmp = previous_comparison(project, runs)
    archived = {} if as_snapshot is not None else archived_sites(project)
    common = common_view(project, runs, archived, cmp is not None, as_snapshot)
    by_id = {r.id: r for r in runs}
    files: dict[str, bytes] = {}
    rendered: dict[str, str] = {}
    # figures first (if a build has not already sent them while the calcs ran): the
    # helper process draws them while the pages below are rendered
    figure_files = {rel: cache.request(chart, title) for r in runs for rel, chart, title in figure_jobs(r)}

    def page(rel: str, template: str, root: str, stand_ins: dict[str, str] | None = None, **ctx: Any) -> None:
        text = cache.page(env, template, {"root": root, "page": rel, **common, **ctx}, stand_ins)
        files[rel] = text.encode("utf-8")
        rendered[rel] = text

    page("index.html", "index.html", "", **index_view(project, runs))
    page("glossary.html", "glossary.html", "", **glossary_view(runs))
    page("dependencies.html", "dependencies.html", "", **depmap_view(runs))
    page("verification.html", "verification.html", "", **cache.verification_view())
    if cmp is not None:
        page("changes.html", "changes.html", "", **changes_view(cmp, by_id))
    for r in runs:
        view, view_key = cache.calc_view(r, by_id, cmp)
        page(f"{r.id}.html", "calc.html", "", {"calc": "view:" + view_key} if view_key else None, calc=view)
        for t in r.spec.tables:
            if t.name in r.tables:
                files[f"tables/{r.id}-{t.name}.csv"] = table_csv(r.tables[t.name]).encode("utf-8")
    from basisbook.records import display_lines

    for rel in project.files:
        lines = [{"n": i, "text": t} for i, t in enumerate(display_lines(project.root / rel), start=1)]
        page(source_page(rel), "source.html", "../", file=rel, lines=lines)
    for folder in (builtin_templates() / "static", project.root / "templates" / "static"):
        if folder.is_dir():  # a project's own static files override the built-in ones
            for f in sorted(folder.iterdir()):
                if f.is_file():
                    files[f"assets/{f.name}"] = f.read_bytes()
    # the one-document view, in reading order, for print and PDF
    from basisbook import onedoc

    order = [("index.html", "Summary")]
    if cmp is not None:
        order.append(("changes.html", f"Changes since revision {cmp.old_rev}"))
    order += [(f"{r.id}.html", r.instance.title) for r in runs]
    order += [("dependencies.html", "Dependency map"), ("glossary.html", "Glossary"),
              ("verification.html", "Verification appendix")]
    # the one-document view changes whenever any page does: rendered, never looked up
    files["handbook.html"] = env.get_template("handbook.html").render(
        root="", page="handbook.html", **common, sections=[
            {**sec, "body": Markup(sec["body"])} for sec in onedoc.sections(rendered, order, cache.sections)]
    ).encode("utf-8")
    files["assets/search-index.js"] = search_index(runs).encode("utf-8")
    doc = results_document(project, runs)
    files["results.json"] = (json.dumps(doc, indent=1, sort_keys=True, ensure_ascii=False) + "\n").encode("utf-8")
    for rev_id, site in archived.items():
        for f in sorted(site.rglob("*")):
            if f.is_file():
                files[f"archive/rev-{rev_id}/{f.relative_to(site).as_posix()}"] = f.read_bytes()
    files[SITE_MARKER] = b"basisbook site: this folder is replaced on every build\n"
    cache.pending = figure_files
    if complete:
        cache.complete(files)
    return files


def write_files(files: dict[str, bytes], out: Path) -> None:
    for rel, data in files.items():
        path = out / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(data)


def render_site(project: Project, runs: list[CalcRun], out: Path,
                as_snapshot: str | None = None) -> list[str]:
    """Write the whole site into ``out`` (an empty directory); return the files written."""
    files = render_files(project, runs, as_snapshot=as_snapshot)
    write_files(files, out)
    return list(files)


