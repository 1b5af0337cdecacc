"""The built handbook as a reader gets it: links, anchors, provenance, escaping, determinism.

These tests read the files in the site folder (HTML, CSS, SVG, results.json) and the
project files they claim to come from; they do not call the renderer's helpers, so a
renderer bug cannot hide behind its own formatting code.

Golden fixtures live in tests/golden/.  After an intended change to the templates or the
demo, regenerate them and review the diff before committing:

    BASISBOOK_UPDATE_GOLDEN=1 python -m pytest tests/test_site.py -k golden
"""

from __future__ import annotations

import datetime as dt
import json
import os
import re
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path
from typing import Any

import pytest
from conftest import DEMO
from sitecheck import Element, check_links, html_pages, ids_unique, parse

from basisbook.commands.build import build
from basisbook.reading import catalog

GOLDEN = Path(__file__).resolve().parent / "golden"
UPDATE_GOLDEN = os.environ.get("BASISBOOK_UPDATE_GOLDEN") == "1"

# Namespace and DTD identifiers are names, never fetched; they are the only "http" allowed.
# Each is allowed only in the exact attribute or declaration where the format requires it.
ALLOWED_HTTP = {
    ".html": [
        r'<math xmlns="http://www\.w3\.org/1998/Math/MathML"',
    ],
    ".svg": [
        r'xmlns="http://www\.w3\.org/2000/svg"',
        r'xmlns:xlink="http://www\.w3\.org/1999/xlink"',
        r'xmlns:dc="http://purl\.org/dc/elements/1\.1/"',
        r'xmlns:cc="http://creativecommons\.org/ns#"',
        r'xmlns:rdf="http://www\.w3\.org/1999/02/22-rdf-syntax-ns#"',
        # Dublin Core type term in matplotlib's metadata block: an identifier, not a link
        r'<dc:type rdf:resource="http://purl\.org/dc/dcmitype/StillImage"/>',
        r'<!DOCTYPE svg PUBLIC "-//W3C//DTD SVG 1\.1//EN"\s+"http://www\.w3\.org/Graphics/SVG/1\.1/DTD/svg11\.dtd">',
    ],
    ".css": [],
}
PROTOCOL_RELATIVE = re.compile(r"""(?:url\(|src=|href=|@import)\s*["']?\s*//""", re.I)

HOSTILE_SCRIPT = "<script>alert(1)</script>"
HOSTILE_IMG = "<img src=x onerror=alert(2)>"


# --------------------------------------------------------------------------- helpers


def tree_files(root: Path) -> dict[str, bytes]:
    """Every file under root (dot-files too), keyed by its posix path."""
    return {p.relative_to(root).as_posix(): p.read_bytes() for p in sorted(root.rglob("*")) if p.is_file()}


def tree_differences(a: Path, b: Path) -> list[str]:
    """What differs between two folders, file by file; empty when byte-identical."""
    fa, fb = tree_files(a), tree_files(b)
    diffs = [f"only in {a.name}: {k}" for k in sorted(fa.keys() - fb.keys())]
    diffs += [f"only in {b.name}: {k}" for k in sorted(fb.keys() - fa.keys())]
    for k in sorted(fa.keys() & fb.keys()):
        if fa[k] != fb[k]:
            diffs.append(f"{k}: {first_difference(fa[k], fb[k])}")
    return diffs


def first_difference(expected: bytes, actual: bytes) -> str:
    """The first differing line, numbered, both sides shown (for readable failures)."""
    el, al = expected.splitlines(), actual.splitlines()
    for n, (e, a) in enumerate(zip(el, al, strict=False), start=1):
        if e != a:
            return f"first difference at line {n}:\n  expected: {e[:300]!r}\n  actual:   {a[:300]!r}"
    if len(el) != len(al):
        n = min(len(el), len(al)) + 1
        return f"first difference at line {n}: expected {len(el)} lines, got {len(al)}"
    return "the line endings or the final newline differ"


def assert_golden(name: str, actual: bytes) -> None:
    """Compare with tests/golden/<name>; (re)write it when BASISBOOK_UPDATE_GOLDEN=1."""
    path = GOLDEN / name
    if UPDATE_GOLDEN:
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(actual)
        return
    hint = f"if the change is intended: BASISBOOK_UPDATE_GOLDEN=1 python -m pytest {Path(__file__).name} -k golden"
    if not path.exists():
        raise AssertionError(f"golden file {path} is missing; {hint}")
    expected = path.read_bytes()
    if expected != actual:
        raise AssertionError(f"{name} differs from the golden copy; {first_difference(expected, actual)}\n{hint}")


def results(site: Path) -> dict[str, Any]:
    return json.loads((site / "results.json").read_text(encoding="utf-8"))


def project_line(project: Path, file: str, line: int) -> str:
    lines = (project / file).read_text(encoding="utf-8").splitlines()
    assert 1 <= line <= len(lines), f"{file}:{line}: the file has {len(lines)} lines"
    return lines[line - 1]


def toml_key_on(text: str, key: str) -> bool:
    """Whether a TOML line assigns ``key`` (not merely mentions it in a comment or value)."""
    return re.match(rf"\s*{re.escape(key)}\s*=", text) is not None


def links_in(el: Element) -> list[str]:
    return [a.attrs["href"] for a in el.find_all("a") if "href" in a.attrs]


def target_line_text(site: Path, page: Path, href: str) -> str:
    """Follow a ``source/...html#L<n>`` link and return the text of that line element."""
    path, _, frag = href.partition("#")
    tree = parse((page.parent / path).resolve())
    el = tree.by_id(frag)
    assert el is not None, f"{href}: no element #{frag}"
    ln = el.find_all(cls="ln")
    number = ln[0].text() if ln else ""
    return el.text()[len(number):].rstrip("\n")


# --------------------------------------------------------------------------- the checker itself


def _mini_site(tmp_path: Path) -> Path:
    site = tmp_path / "mini"
    (site / "sub").mkdir(parents=True)
    (site / "index.html").write_text(
        '<p id="top"></p><p id="dup"></p><p id="dup"></p>'
        '<a href="sub/page.html#here">ok</a><a href="#top">ok</a><a href="mailto:x@example.org">ok</a>'
        '<a href="sub/page.html#gone">bad anchor</a><a href="missing.html">bad file</a>'
        '<img src="https://cdn.example.org/x.png"><script src="//cdn.example.org/x.js"></script>'
        '<a href="javascript:alert(1)">bad scheme</a><a href="../outside.html">escapes</a>',
        encoding="utf-8")
    (site / "sub" / "page.html").write_text('<h1 id="here">x</h1><a href="../index.html#top">up</a>',
                                            encoding="utf-8")
    (tmp_path / "outside.html").write_text("", encoding="utf-8")
    return site


def test_sitecheck_reports_each_kind_of_broken_link(tmp_path: Path) -> None:
    problems = check_links(_mini_site(tmp_path))
    text = "\n".join(problems)
    assert len(problems) == 6, text
    assert "link to sub/page.html#gone: no id 'gone' in sub/page.html" in text
    assert "link to missing.html: no such file missing.html" in text
    assert "https://cdn.example.org/x.png: external URL" in text
    assert "//cdn.example.org/x.js: external URL" in text
    assert "javascript:alert(1): unexpected URL scheme" in text
    assert "../outside.html: points outside the site folder" in text
    assert "mailto" not in text and "#top" not in text and "#here" not in text


def test_sitecheck_finds_duplicate_ids(tmp_path: Path) -> None:
    assert ids_unique(_mini_site(tmp_path)) == ["index.html: id 'dup' appears 2 times"]


def test_golden_comparison_names_the_first_differing_line(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(sys.modules[__name__], "GOLDEN", tmp_path)
    monkeypatch.setattr(sys.modules[__name__], "UPDATE_GOLDEN", False)
    (tmp_path / "g.html").write_bytes(b"one\ntwo\nthree\n")
    assert_golden("g.html", b"one\ntwo\nthree\n")
    with pytest.raises(AssertionError, match=r"first difference at line 2:\n  expected: b'two'\n  actual:   b'TWO'"):
        assert_golden("g.html", b"one\nTWO\nthree\n")
    with pytest.raises(AssertionError, match="golden file .* is missing; if the change is intended"):
        assert_golden("absent.html", b"")


# --------------------------------------------------------------------------- links and offline


def test_every_link_and_anchor_resolves(built_site: Path) -> None:
    problems = check_links(built_site)
    assert not problems, "\n".join(problems)


def test_ids_are_unique_in_every_page(built_site: Path) -> None:
    problems = ids_unique(built_site)
    assert not problems, "\n".join(problems)


def test_the_site_has_the_pages_it_should(built_site: Path) -> None:
    doc = results(built_site)
    pages = {p.relative_to(built_site).as_posix() for p in html_pages(built_site)}
    expected = {"index.html"} | {f"{iid}.html" for iid in doc["instances"]}
    assert expected <= pages, f"missing pages: {sorted(expected - pages)}"
    assert any(p.startswith("source/") for p in pages), "no source pages"


@pytest.mark.parametrize("suffix", sorted(ALLOWED_HTTP))
def test_no_external_url_in_html_css_svg(built_site: Path, suffix: str) -> None:
    files = sorted(built_site.rglob(f"*{suffix}"))
    assert files, f"no {suffix} files in the site"
    bad = []
    for f in files:
        text = f.read_text(encoding="utf-8")
        for allowed in ALLOWED_HTTP[suffix]:
            text = re.sub(allowed, "", text)
        for m in re.finditer(r"https?:", text, re.I):
            bad.append(f"{f.relative_to(built_site)}: ...{text[max(m.start() - 60, 0):m.end() + 60]}...")
        for m in PROTOCOL_RELATIVE.finditer(text):
            bad.append(f"{f.relative_to(built_site)}: protocol-relative URL ...{text[m.start():m.end() + 60]}...")
    assert not bad, "\n".join(bad)


def test_css_is_local_and_has_a_print_stylesheet(built_site: Path) -> None:
    css = (built_site / "assets" / "style.css").read_text(encoding="utf-8")
    assert "@media print" in css, "style.css has no print stylesheet"
    # a print block that hides the navigation (the browser test checks it takes effect)
    block = css[css.index("@media print"):]
    assert re.search(r"\.sidebar\s*\{[^}]*display:\s*none", block), "print CSS does not hide the sidebar"
    assert "@import" not in css, "style.css imports another stylesheet"
    for url in re.findall(r"url\(\s*['\"]?([^'\")]+)", css):
        assert (built_site / "assets" / url).is_file(), f"style.css: url({url}) is not a file in assets/"
    for page in html_pages(built_site, archived=False):  # archived copies carry their own assets
        tree = parse(page)
        sheets = [e for e in tree.find_all("link") if "stylesheet" in e.attrs.get("rel", "").split()]
        assert sheets, f"{page.name}: no stylesheet"
        for s in sheets:
            target = (page.parent / s.attrs["href"]).resolve()
            assert target.is_relative_to(built_site.resolve() / "assets") and target.is_file(), \
                f"{page.relative_to(built_site)}: stylesheet {s.attrs['href']!r} is not a local asset"
        # inline CSS could still fetch: no <style> @import, no url() in style attributes
        for el in tree.iter():
            assert "url(" not in el.attrs.get("style", ""), f"{page.name}:{el.line}: url() in a style attribute"
        for st in tree.find_all("style"):
            assert "@import" not in st.text() and "url(" not in st.text(), f"{page.name}: <style> loads something"


# --------------------------------------------------------------------------- determinism


def test_rebuilding_the_demo_gives_identical_bytes(tmp_path: Path) -> None:
    # different folder names on purpose: an output path leaking into a page shows up
    a = tmp_path / "first" / "site"
    b = tmp_path / "second" / "handbook"
    build(DEMO, a)
    build(DEMO, b)
    diffs = tree_differences(a, b)
    assert not diffs, "\n".join(diffs)
    assert (a / "index.html").is_file()


def test_a_fresh_process_elsewhere_gives_identical_bytes(built_site: Path, demo_copy: Path, tmp_path: Path) -> None:
    # Another interpreter has another str-hash salt (set order), another time zone, and the
    # copied project sits at another path with other file times: none may reach the site.
    for f in demo_copy.rglob("*"):
        os.utime(f, (946684800, 946684800))  # 2000-01-01
    out = tmp_path / "elsewhere"
    env = dict(os.environ, TZ="Pacific/Kiritimati", LC_ALL="C.UTF-8")
    proc = subprocess.run([sys.executable, "-m", "basisbook", "build", str(demo_copy), "--out", str(out)],
                          capture_output=True, text=True, env=env, cwd=tmp_path, timeout=300)
    assert proc.returncode == 0, proc.stderr
    diffs = tree_differences(built_site, out)
    assert not diffs, "\n".join(diffs)


def test_no_build_date_or_time_in_any_file(built_site: Path) -> None:
    today = dt.date.today()
    forms = {today.isoformat(), today.strftime("%Y%m%d"), today.strftime("%d.%m.%Y"),
             today.strftime("%d/%m/%Y"), today.strftime("%m/%d/%Y"), today.strftime("%d %b %Y"),
             today.strftime("%b %d, %Y"), today.strftime("%d %B %Y"), today.strftime("%B %d, %Y")}
    # a date written in the inputs (a revision dated today) is content, not build time
    inputs = "".join(p.read_text(encoding="utf-8") for p in DEMO.rglob("*.toml"))
    forms = {f for f in forms if f not in inputs}
    stamp = re.compile(rb"\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}")
    for rel, data in tree_files(built_site).items():
        for f in forms:
            assert f.encode() not in data, f"{rel} contains today's date {f!r}"
        m = stamp.search(data)
        assert m is None, f"{rel} contains a timestamp {m.group().decode() if m else ''!r}"


# --------------------------------------------------------------------------- results.json


def test_results_json_gives_every_input_a_value_unit_and_source(built_site: Path) -> None:
    doc = results(built_site)
    assert doc["instances"], "no instances in results.json"
    for iid, inst in doc["instances"].items():
        spec = catalog.spec(inst["calc"])
        assert set(inst["inputs"]) == set(spec.input_names), f"{iid}: inputs differ from the spec"
        for name, iv in inst["inputs"].items():
            where = f"{iid}.{name}"
            assert {"value", "unit", "source"} <= iv.keys(), where
            assert iv["value"] is not None, f"{where}: no value"
            assert isinstance(iv["unit"], str), f"{where}: unit is not text"
            src = iv["source"]
            if "link" in src:
                target, _, out = src["link"].partition(".")
                if target == "site":
                    upstream = doc["site"][out]
                else:  # a link may take an upstream output or an upstream input
                    up = doc["instances"][target]
                    side = "outputs" if out in up["outputs"] else "inputs"
                    upstream = {"value": up[side][out]["value"], "unit": up[side][out]["unit"]}
                if upstream["unit"] == iv["unit"]:
                    assert iv["value"] == upstream["value"], f"{where}: differs from its link {src['link']}"
            elif src.get("default") is True:
                decl = next(i for i in spec.inputs if i.name == name)
                assert iv["value"] == decl.default, f"{where}: says default but is not the module default"
            else:
                assert isinstance(src.get("file"), str) and isinstance(src.get("line"), int), \
                    f"{where}: source is neither file+line, link nor default: {src}"
            if "file" in src:
                line = project_line(DEMO, src["file"], src["line"])
                assert toml_key_on(line, name), f"{where}: {src['file']}:{src['line']} is {line!r}"


def test_results_json_has_every_declared_output(built_site: Path) -> None:
    doc = results(built_site)
    for iid, inst in doc["instances"].items():
        names = catalog.spec(inst["calc"]).output_names
        missing = [n for n in names if n not in inst["outputs"]]
        assert not missing, f"{iid}: outputs missing from results.json: {missing}"
        for n in names:
            out = inst["outputs"][n]
            assert out["value"] is not None and isinstance(out["unit"], str), f"{iid}.{n}: {out}"


def test_results_json_records_the_site_conditions(built_site: Path) -> None:
    site = results(built_site)["site"]
    assert site["grid_frequency"]["value"] == 50.0 and site["grid_frequency"]["unit"] == "Hz"
    for name, v in site.items():
        if "file" in v["source"]:
            assert toml_key_on(project_line(DEMO, v["source"]["file"], v["source"]["line"]), name), name


# --------------------------------------------------------------------------- calc pages


def _instances(site: Path) -> list[tuple[str, dict[str, Any]]]:
    return sorted(results(site)["instances"].items())


def test_each_step_shows_symbolic_numeric_and_result_equations(built_site: Path) -> None:
    for iid, inst in _instances(built_site):
        tree = parse(built_site / f"{iid}.html")
        spec = catalog.spec(inst["calc"])
        assert spec.steps, f"{inst['calc']}: no steps"
        for step in spec.steps:
            li = tree.by_id(f"step-{step.output}")
            assert li is not None, f"{iid}.html: no step for {step.output}"
            for cls in ("eq-symbolic", "eq-numeric", "eq-result"):
                boxes = li.find_all("div", cls)
                assert len(boxes) == 1, f"{iid}.html#step-{step.output}: {len(boxes)} .{cls}"
                assert boxes[0].find_all("math"), f"{iid}.html#step-{step.output} .{cls}: no MathML"
            numeric = li.find_all("div", "eq-numeric")[0]
            assert numeric.find_all("mn"), f"{iid}.html#step-{step.output}: numeric form has no numbers"
            # the result equation shows the same number as the results table
            row = tree.by_id(f"out-{step.output}")
            assert row is not None, f"{iid}.html: no results row for {step.output}"
            shown = row.find_all("td", "num")[0].text().strip().split("×")[0]
            result_text = li.find_all("div", "eq-result")[0].text()
            assert shown and shown in result_text, f"{iid}.{step.output}: table {shown!r}, equation {result_text!r}"


def test_each_declared_output_has_a_row(built_site: Path) -> None:
    for iid, inst in _instances(built_site):
        tree = parse(built_site / f"{iid}.html")
        missing = [n for n in catalog.spec(inst["calc"]).output_names if tree.by_id(f"out-{n}") is None]
        assert not missing, f"{iid}.html: no results row for {missing}"


def _downstream(doc: dict, iid: str, name: str) -> list[tuple[str, str]]:
    """Inputs of other instances linked to this instance's input ``name``."""
    return [(other, n) for other, inst in doc["instances"].items() for n, iv in inst["inputs"].items()
            if iv["source"].get("link") == f"{iid}.{name}"]


def test_each_input_row_links_to_where_its_value_came_from(built_site: Path) -> None:
    kinds_seen = set()
    doc = json.loads((built_site / "results.json").read_text(encoding="utf-8"))
    for iid, inst in _instances(built_site):
        page = built_site / f"{iid}.html"
        tree = parse(page)
        for name, iv in inst["inputs"].items():
            row = tree.by_id(f"in-{name}")
            assert row is not None, f"{iid}.html: no row for input {name}"
            cells = row.find_all("td", "source")
            assert len(cells) == 1, f"{iid}.html#in-{name}: {len(cells)} source cells"
            # "shared with" links name downstream users of this input; they are not its source
            hrefs = [h for h in links_in(cells[0]) if not any(
                h == f"{u}.html#in-{n}" for u, n in _downstream(doc, iid, name))]
            src = iv["source"]
            where = f"{iid}.html#in-{name}"
            if "link" in src:
                kinds_seen.add("link")
                target, _, out = src["link"].partition(".")
                if target == "site":
                    want = f"index.html#site-{out}"
                else:
                    side = "out" if out in doc["instances"][target]["outputs"] else "in"
                    want = f"{target}.html#{side}-{out}"
                assert hrefs and hrefs[0] == want, f"{where}: links {hrefs}, expected {want} first"
                # the link was written somewhere: that line too is linked and holds the key
                file_links = [h for h in hrefs[1:] if h.startswith("source/")]
                assert file_links, f"{where}: no link to the line that declares the link"
                line = target_line_text(built_site, page, file_links[0])
                assert toml_key_on(line, name) and "from" in line, f"{where}: {file_links[0]} shows {line!r}"
            elif src.get("default"):
                kinds_seen.add("default")
                assert not hrefs, f"{where}: a module default links to {hrefs}"
                assert "default" in cells[0].text(), f"{where}: does not say it is the module default"
            else:
                kinds_seen.add("file")
                assert len(hrefs) == 1 and re.fullmatch(r"source/[^#]+\.html#L\d+", hrefs[0]), f"{where}: {hrefs}"
                assert hrefs[0].endswith(f"#L{src['line']}"), f"{where}: {hrefs[0]} vs line {src['line']}"
                shown = target_line_text(built_site, page, hrefs[0])
                real = project_line(DEMO, src["file"], src["line"])
                assert shown == real, f"{where}: source page shows {shown!r}, the file has {real!r}"
                assert toml_key_on(real, name), f"{where}: {src['file']}:{src['line']} is {real!r}"
    # the demo exercises all three provenances; if it stops doing so this test weakens
    assert kinds_seen == {"file", "link", "default"}, kinds_seen


# --------------------------------------------------------------------------- escaping


def _replace_once(path: Path, pattern: str, repl: str) -> None:
    text = path.read_text(encoding="utf-8")
    new, n = re.subn(pattern, lambda _m: repl, text, count=1, flags=re.M)
    assert n == 1, f"{path.name}: {pattern!r} not found (the demo changed; update this test)"
    path.write_text(new, encoding="utf-8")


def make_hostile(project: Path) -> None:
    """Put markup and script into every free-text field a project author controls."""
    payload = f"{HOSTILE_SCRIPT} {HOSTILE_IMG}"
    # TOML basic strings: the payload has no quote or backslash, the attribute breaker is escaped
    _replace_once(project / "project.toml", r'^name = ".*"$', f'name = "Ostervale {payload}"')
    _replace_once(project / "project.toml", r'^notes = """$',
                  f'notes = """\n{payload} [click](javascript:alert(4))\n')
    _replace_once(project / "revisions.toml", r'^prepared = ".*"$', f'prepared = "{HOSTILE_IMG}"')
    gens = project / "inputs" / "generators.toml"
    _replace_once(gens, r'^title = "STG-1 .*"$',
                  f'title = "STG-1 {payload} x\\" onmouseover=\\"alert(3)"')
    _replace_once(gens, r'^notes = """$', f'notes = """\n{payload}\n')


# the only scripts a page may carry: our own search index and search box, from assets/
OWN_SCRIPTS = re.compile(r'<script src="(?:\.\./)?assets/(?:search-index|search)\.js"></script>')


def _elements_with_script(tree: Element) -> list[str]:
    bad = []
    for el in tree.iter():
        if el.tag == "script" and not re.fullmatch(r"(\.\./)?assets/(search-index|search)\.js",
                                                    el.attrs.get("src", "")):
            bad.append(f"line {el.line}: <script>")
        for attr in el.attrs:
            if attr.startswith("on"):
                bad.append(f"line {el.line}: <{el.tag} {attr}=...>")
        if el.tag == "img" and el.attrs.get("src") == "x":
            bad.append(f"line {el.line}: injected <img>")
    return bad


@pytest.fixture
def hostile_site(demo_copy: Path, tmp_path: Path) -> Path:
    make_hostile(demo_copy)
    out = tmp_path / "hostile-site"
    build(demo_copy, out)
    return out


def test_project_text_cannot_inject_markup(hostile_site: Path) -> None:
    pages = html_pages(hostile_site, archived=False)
    for page in pages:
        raw = page.read_text(encoding="utf-8")
        rel = page.relative_to(hostile_site)
        assert "<script" not in OWN_SCRIPTS.sub("", raw).lower(), f"{rel}: raw <script"
        assert "<img src=x" not in raw, f"{rel}: raw injected <img"
        bad = _elements_with_script(parse(page))
        assert not bad, f"{rel}: {bad}"
        # the project name is on every page, so every page shows the escaped form
        assert "&lt;script&gt;alert(1)&lt;/script&gt;" in raw, f"{rel}: escaped text missing"
    stg1 = (hostile_site / "stg1.html").read_text(encoding="utf-8")
    assert stg1.count("&lt;img src=x onerror=alert(2)&gt;") >= 3, "title, notes and name all appear escaped"
    problems = check_links(hostile_site)  # the javascript: link in the notes must not become a link
    assert not problems, "\n".join(problems)


def test_project_text_cannot_inject_markup_into_figures(hostile_site: Path) -> None:
    svgs = sorted((hostile_site / "fig").glob("*.svg"))
    assert svgs, "no figures"
    for svg in svgs:
        root = ET.parse(svg).getroot()  # well-formed XML, so the title did not break the file
        for el in root.iter():
            assert not el.tag.endswith("script"), f"{svg.name}: script element"
            assert not [a for a in el.attrib if a.startswith("on")], f"{svg.name}: event attribute"


# matplotlib reads $...$ as mathtext unless told not to: project text must show verbatim
def test_a_title_with_dollar_signs_builds_and_shows_verbatim(demo_copy: Path, tmp_path: Path) -> None:
    _replace_once(demo_copy / "inputs" / "generators.toml", r'^title = "STG-1 .*"$',
                  'title = "STG-1 spare budget $5 or \\\\frac{ $6"')
    out = tmp_path / "site"
    build(demo_copy, out)
    svg = next((out / "fig").glob("stg1-*.svg")).read_text(encoding="utf-8")
    assert "spare budget $5 or \\frac{ $6" in svg


def test_golden_hostile_instance_page(hostile_site: Path) -> None:
    assert_golden("hostile_stg1.html", (hostile_site / "stg1.html").read_bytes())


def test_golden_demo_index(built_site: Path) -> None:
    assert_golden("index.html", (built_site / "index.html").read_bytes())


# --------------------------------------------------------------------------- template override


def test_a_project_can_override_a_builtin_template(demo_copy: Path, tmp_path: Path) -> None:
    marker = "project-override-marker-4711"
    (demo_copy / "templates").mkdir()
    (demo_copy / "templates" / "index.html").write_text(
        '{% extends "base.html" %}\n{% block content %}<p id="override">' + marker
        + " {{ project.name }}</p>{% endblock %}\n", encoding="utf-8")
    out = tmp_path / "site"
    build(demo_copy, out)
    index = (out / "index.html").read_text(encoding="utf-8")
    assert marker in index
    tree = parse(out / "index.html")
    assert tree.find_all("nav", "sidebar"), "the override lost the built-in base layout"
    assert "Summary of key results" not in index, "the built-in index was rendered instead"
    assert marker not in (out / "stg1.html").read_text(encoding="utf-8"), "override leaked to calc pages"


def test_no_raw_latex_on_any_page(built_site: Path) -> None:
    # a LaTeX command the converter did not understand is printed as it stands (\arg, \,):
    # no MathML token of any page may hold a backslash
    import re

    token = re.compile(r"<(mi|mo|mn|mtext|ms)\b[^>]*>([^<]*)</\1>")
    raw = sorted({f"{p.name}: {m.group(2)}" for p in built_site.rglob("*.html")
                  if "archive" not in p.relative_to(built_site).parts
                  for m in token.finditer(p.read_text(encoding="utf-8")) if "\\" in m.group(2)})
    assert not raw, raw[:10]
    assert token.search((built_site / "stg1.html").read_text(encoding="utf-8"))  # the scan sees tokens
