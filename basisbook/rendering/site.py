"""Assemble the whole site in memory: every page, figure, table, asset and results.json.

The renderer knows the contract and formatting, no physics.  It prepares plain
view dictionaries (one module per page kind); templates only loop over them and
test conditions.  ``RenderCache`` is what a long-lived process (serve) keeps
between builds.
"""

from __future__ import annotations

import json
import re
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from markupsafe import Markup

from basisbook.contract.spec import EnergyFlow, SingleLine
from basisbook.reading.project import Project
from basisbook.rendering import figures, one_document
from basisbook.rendering.calc_page import calc_view, table_csv
from basisbook.rendering.changes_page import changes_view
from basisbook.rendering.common import common_view
from basisbook.rendering.dependencies_page import depmap_view
from basisbook.rendering.glossary_page import glossary_view
from basisbook.rendering.index_page import index_view
from basisbook.rendering.search_index import search_index
from basisbook.rendering.source_pages import source_file_view, source_page
from basisbook.rendering.templating import builtin_templates, environment
from basisbook.rendering.verification_page import verification_view
from basisbook.running.engine import CalcRun
from basisbook.running.results import results_document

SITE_MARKER = ".basisbook-site"
# present while ``serve`` syncs a rebuild into the live folder file by file: a site that
# still has it was cut off part-way, and the next build or serve start makes it whole
INCOMPLETE_MARKER = ".basisbook-incomplete"
_MARKER_HEAD = "basisbook site: this folder is replaced on every build\n"
_MARKER_LIST = "files written by the build:\n"


def site_marker(paths: list[str]) -> bytes:
    """The marker file: says the folder is a built site and lists every file the build
    wrote, so a later build can refuse to replace files someone else put there."""
    return (_MARKER_HEAD + _MARKER_LIST
            + "".join(f"{p}\n" for p in sorted(paths))).encode("utf-8")


def site_listing(marker_text: str) -> set[str] | None:
    """The files a marker lists (with the marker itself), or None for an older marker that
    listed none."""
    _, found, rest = marker_text.partition(_MARKER_LIST)
    if not found:
        return None
    return {line for line in rest.splitlines() if line} | {SITE_MARKER}


def figure_jobs(run: CalcRun) -> list[tuple[str, Any, str]]:
    """(site path, chart, title) of each drawn figure of a run (single-line diagrams are inline)."""
    return [(f"fig/{run.id}-{f.name}.svg", run.charts[f.name], f"{run.instance.title}: {f.title}")
            for f in run.spec.figures if f.name in run.charts and not isinstance(run.charts[f.name], SingleLine)]


class RenderCache:
    """What a long-lived process (serve) keeps between builds: the Jinja
    environment, every figure's SVG by a hash of its data, and the figure helper
    process (``figure_worker``) when there is one."""

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
                  cmp: Any) -> tuple[dict[str, Any], str]:
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


def render_files(project: Project, runs: list[CalcRun], cache: RenderCache | None = None, *,
                 comparison: Any = None, archived: Mapping[str, Path] | None = None,
                 as_snapshot: str | None = None, complete: bool = True) -> dict[str, bytes]:
    """Every file of the site as bytes, by relative path (nothing is written here).

    The build hands over what comes from the revisions: ``comparison`` (a
    ``revisions.diff.Comparison`` with the previous archived revision, or None) and
    ``archived`` (revision id -> the site folder of its snapshot), whose handbooks the
    live site carries a copy of under ``archive/rev-<id>/``.  ``as_snapshot`` (the
    revision being archived) marks a snapshot's own site, which carries no archives, so
    snapshots never nest.  With ``complete=False`` the figures a helper is still
    drawing are left out (their paths in ``cache.pending``) for the caller to add with
    ``cache.complete(files)``: a builder writes the pages meanwhile.
    """
    cache = cache or RenderCache()
    cache.start()
    env = cache.environment(project.root)
    cmp = comparison
    archived = {} if as_snapshot is not None or archived is None else dict(archived)
    common = common_view(project, runs, archived, cmp is not None, as_snapshot,
                         cmp.old_rev if cmp is not None else "")
    numbers = {s["href"]: s["n"] for s in common["register"] if s["href"]}
    by_id = {r.id: r for r in runs}
    files: dict[str, bytes] = {}
    rendered: dict[str, str] = {}
    # figures first (if a build has not already sent them while the calcs ran): the
    # helper process draws them while the pages below are rendered
    figure_files = {rel: cache.request(chart, title) for r in runs for rel, chart, title in figure_jobs(r)}

    def page(rel: str, template: str, root: str, stand_ins: dict[str, str] | None = None, **ctx: Any) -> None:
        text = cache.page(env, template, {"root": root, "page": rel, "number": numbers.get(rel, ""), **common, **ctx},
                          stand_ins)
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
    linked = _linked_lines(rendered.values(), [source_page(rel) for rel in project.files])
    for rel in project.files:
        page(source_page(rel), "source.html", "../", **source_file_view(project, rel, linked[source_page(rel)]))
    for folder in (builtin_templates() / "static", project.root / "templates" / "static"):
        if folder.is_dir():  # a project's own static files override the built-in ones
            for f in sorted(folder.iterdir()):
                if f.is_file():
                    files[f"assets/{f.name}"] = f.read_bytes()
    # the one-document view, in reading order, for print and PDF
    order = [(s["href"], s["title"]) for s in common["register"] if s["href"]]
    # the one-document view changes whenever any page does: rendered, never looked up
    rev = project.revision
    # the printed contents: the outline, a group as a heading, each page with its anchor
    contents = [{**s, "anchor": "" if s["group"] else one_document.page_anchor(s["href"])}
                for s in common["register"]]
    files["handbook.html"] = env.get_template("handbook.html").render(
        root="", page="handbook.html", contents=contents, **common,
        print_css=Markup(one_document.print_css(project.number, project.name, rev.id, rev.purpose)), sections=[
            {**sec, "body": Markup(sec["body"]), "n": numbers[sec["page"]]}
            for sec in one_document.sections(rendered, order, cache.sections)]
    ).encode("utf-8")
    files["assets/search-index.js"] = search_index(runs).encode("utf-8")
    doc = results_document(project, runs)
    files["results.json"] = (json.dumps(doc, indent=1, sort_keys=True, ensure_ascii=False) + "\n").encode("utf-8")
    for rev_id, site in archived.items():
        for f in sorted(site.rglob("*")):
            if f.is_file():
                files[f"archive/rev-{rev_id}/{f.relative_to(site).as_posix()}"] = f.read_bytes()
    files[SITE_MARKER] = site_marker([*files, *figure_files])
    cache.pending = figure_files
    if complete:
        cache.complete(files)
    return files


_SOURCE_LINE_LINK = re.compile(r'href="(?:\.\./)?(source/[^"#]+)#L(\d+)"')


def _linked_lines(pages: Any, sources: list[str]) -> dict[str, set[int]]:
    """For each source page, the line numbers the rendered pages link to (a long input file
    is summarised but keeps these, so no link of the site dangles)."""
    out: dict[str, set[int]] = {s: set() for s in sources}
    for text in pages:
        for m in _SOURCE_LINE_LINK.finditer(text):
            if m.group(1) in out:
                out[m.group(1)].add(int(m.group(2)))
    return out


def write_files(files: dict[str, bytes], out: Path) -> None:
    for rel, data in files.items():
        path = out / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(data)

