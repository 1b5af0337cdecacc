"""The handbook in a real browser from file://, with the network cut off.

Uses Debian's ``chromium`` through Python playwright.  Without chromium on PATH the
tests skip, unless BASISBOOK_REQUIRE_BROWSER=1 (set by CI), where they fail instead,
so a CI machine that lost its browser cannot pass silently.
Screenshots go to tests/artifacts/ (git-ignored) for a human look.
"""

from __future__ import annotations

import os
import re
import shutil
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import pytest
from conftest import ARTIFACTS

pytestmark = pytest.mark.slow  # the quick loop leaves these out; `--full` runs them

REQUIRED = os.environ.get("BASISBOOK_REQUIRE_BROWSER") == "1"
ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update"]


def _unavailable(reason: str) -> None:
    if REQUIRED:
        pytest.fail(f"{reason}, and BASISBOOK_REQUIRE_BROWSER=1 requires the browser tests")
    pytest.skip(reason)


@dataclass
class Traffic:
    """What the pages did on their own: console errors, failed and non-local requests."""

    console_errors: list[str] = field(default_factory=list)
    page_errors: list[str] = field(default_factory=list)
    failed: list[str] = field(default_factory=list)
    blocked: list[str] = field(default_factory=list)
    requested: list[str] = field(default_factory=list)

    def clear(self) -> None:
        for v in (self.console_errors, self.page_errors, self.failed, self.blocked, self.requested):
            v.clear()


@pytest.fixture(scope="module")
def browser() -> Iterator[Any]:
    exe = shutil.which("chromium")
    if exe is None:
        _unavailable("chromium is not on PATH (apt-get install -y chromium)")
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        _unavailable("python playwright is not installed (pip install -e '.[test]')")
    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=exe, args=ARGS)
        try:
            yield b
        finally:
            b.close()


@pytest.fixture
def page(browser: Any) -> Iterator[tuple[Any, Traffic]]:
    """A fresh page whose every non-file:// request is aborted and recorded."""
    context = browser.new_context(viewport={"width": 1280, "height": 900})
    traffic = Traffic()

    def route(r: Any) -> None:
        url = r.request.url
        if url.startswith("file://"):
            r.continue_()
        else:
            traffic.blocked.append(url)
            r.abort()

    context.route("**/*", route)
    pg = context.new_page()
    pg.on("console", lambda m: traffic.console_errors.append(f"{m.text} @ {m.location}") if m.type == "error" else None)
    pg.on("pageerror", lambda e: traffic.page_errors.append(str(e)))
    pg.on("requestfailed", lambda r: traffic.failed.append(f"{r.url}: {r.failure}"))
    pg.on("request", lambda r: traffic.requested.append(r.url))
    try:
        yield pg, traffic
    finally:
        context.close()


def assert_quiet(traffic: Traffic) -> None:
    assert not traffic.blocked, f"requests that left the machine: {traffic.blocked}"
    assert not traffic.failed, f"failed requests: {traffic.failed}"
    assert not traffic.console_errors, f"console errors: {traffic.console_errors}"
    assert not traffic.page_errors, f"page errors: {traffic.page_errors}"
    assert traffic.requested and all(u.startswith("file://") for u in traffic.requested), traffic.requested


def test_route_blocks_and_records_a_network_request(page: tuple[Any, Traffic]) -> None:
    # the offline proof below is only worth something if a real attempt is caught here
    pg, traffic = page
    pg.set_content('<img src="http://offline-check.invalid/x.png">')
    pg.wait_for_load_state("load")
    assert traffic.blocked == ["http://offline-check.invalid/x.png"]
    with pytest.raises(AssertionError, match="requests that left the machine"):
        assert_quiet(traffic)


def test_reader_follows_a_result_to_its_inputs_and_back(built_site: Path, page: tuple[Any, Traffic]) -> None:
    from playwright.sync_api import expect

    pg, traffic = page
    index = built_site / "index.html"
    pg.goto(index.as_uri())
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    pg.screenshot(path=str(ARTIFACTS / "index.png"), full_page=True)

    # summary value of the first generator -> its equation step
    link = pg.locator("#summary a[href$='#step-generator_apparent_power']").first
    href = link.get_attribute("href")
    assert href is not None
    link.click()
    pg.wait_for_url(re.compile(r".*#step-generator_apparent_power$"))
    calc_page = href.split("#")[0]
    assert pg.url == (built_site / calc_page).as_uri() + "#step-generator_apparent_power"
    step = pg.locator("#step-generator_apparent_power")
    expect(step).to_be_visible()
    expect(step).to_be_in_viewport()
    expect(step.locator(".eq-result math")).to_be_visible()
    pg.screenshot(path=str(ARTIFACTS / f"{calc_page.removesuffix('.html')}.png"), full_page=True)

    # every figure loaded from disk and MathML laid out (a broken img has naturalWidth 0)
    widths = pg.eval_on_selector_all("main img", "els => els.map(e => e.naturalWidth)")
    assert widths and all(w > 0 for w in widths), widths
    math_widths = pg.eval_on_selector_all(".eq math", "els => els.map(e => e.getBoundingClientRect().width)")
    assert math_widths and all(w > 0 for w in math_widths)

    # input row -> the line of the project file it was read from
    src = pg.locator("#in-generator_voltage td.source a").first
    src.click()
    pg.wait_for_url(re.compile(r".*/source/.+\.html#L\d+$"))
    n = pg.url.rsplit("#L", 1)[1]
    line = pg.locator(f"#L{n}")
    expect(line).to_have_count(1)
    expect(line).to_contain_text("generator_voltage")
    expect(line).to_be_in_viewport()

    # back on the calc page, a linked input -> the site condition it came from
    pg.go_back()
    pg.wait_for_url(re.compile(re.escape(calc_page) + "#step-generator_apparent_power$"))
    pg.locator("#in-rated_frequency td.source a[href$='#site-grid_frequency']").click()
    pg.wait_for_url(re.compile(r".*/index\.html#site-grid_frequency$"))
    target = pg.locator("#site-grid_frequency")
    expect(target).to_be_visible()
    expect(target).to_be_in_viewport()

    assert_quiet(traffic)


def test_every_page_opens_offline_without_errors(built_site: Path, page: tuple[Any, Traffic]) -> None:
    pg, traffic = page
    pages = sorted(built_site.rglob("*.html"))
    for p in pages:
        pg.goto(p.as_uri())
    assert_quiet(traffic)
    assert len({u for u in traffic.requested if u.endswith(".html")}) == len(pages)


def test_print_hides_the_navigation(built_site: Path, page: tuple[Any, Traffic]) -> None:
    from playwright.sync_api import expect

    pg, traffic = page
    pg.goto((built_site / "stg1.html").as_uri())
    nav = pg.locator("nav.sidebar")
    expect(nav).to_be_visible()
    pg.emulate_media(media="print")
    expect(nav).to_be_hidden()
    expect(pg.locator("main h1")).to_be_visible()
    expect(pg.locator("footer.disclaimer")).to_be_visible()  # the safety text must print
    pdf = pg.pdf(format="A4")
    assert pdf.startswith(b"%PDF")
    (ARTIFACTS / "stg1.pdf").parent.mkdir(parents=True, exist_ok=True)
    (ARTIFACTS / "stg1.pdf").write_bytes(pdf)
    pg.emulate_media(media="screen")
    expect(nav).to_be_visible()
    assert_quiet(traffic)


# --- the search box (built-time index, our own script) ------------------------------

def test_search_box_finds_symbols_names_and_follows_offline(built_site: Path, page: tuple[Any, Traffic]) -> None:
    pg, traffic = page
    pg.goto((built_site / "glossary.html").as_uri())
    pg.fill("#bb-search", "x_d")
    labels = [a.text_content() for a in pg.query_selector_all("#bb-search-results a")]
    assert "stg1.direct_axis_reactance" in labels, labels
    pg.fill("#bb-search", "rated current stg1")
    first = pg.query_selector("#bb-search-results a")
    assert first is not None and "stg1" in (first.text_content() or "")
    pg.press("#bb-search", "Enter")
    pg.wait_for_load_state("load")
    assert "/stg1.html#" in pg.url
    pg.fill("#bb-search", "no-such-thing-anywhere")
    assert pg.text_content("#bb-search-results") == "no match"
    assert_quiet(traffic)


@pytest.mark.parametrize(("query", "first_symbol"), [
    ('Ik"', 'I"k'), ("Ik''", 'I"k'), ("I″k", 'I"k'), ("I''k", 'I"k'),  # the subtransient current
    ("x_d", "xd"), ("xd", "xd"), ("x''d", 'x"d'),
    ("η", "eta"), ("eta", "eta"), ("SrT", "SrT"), ("cos φ", "cosphi"),
])
def test_search_ranks_the_symbol_first_in_the_forms_engineers_type(built_site: Path, page: tuple[Any, Traffic],
                                                                   query: str, first_symbol: str) -> None:
    import json

    text = (built_site / "assets" / "search-index.js").read_text(encoding="utf-8")
    entries = json.loads(text.split("window.BASISBOOK_SEARCH = ", 1)[1].split(";\n", 1)[0])
    by_href = {e["h"]: e for e in entries}
    pg, traffic = page
    pg.goto((built_site / "index.html").as_uri())
    pg.fill("#bb-search", query)
    first = pg.query_selector("#bb-search-results li")
    assert first is not None
    href = (first.query_selector("a").get_attribute("href") or "")
    entry = by_href[href]
    assert entry["y"].startswith(first_symbol), (query, entry)
    detail = first.text_content() or ""
    # each hit shows its value with unit and the page it is on, and links to the step
    assert " = " in detail and entry["p"] in detail, detail
    if entry["k"] == "result":
        assert "#step-" in href or "#out-" in href
    assert_quiet(traffic)


def test_search_finds_a_primed_symbol_typed_without_its_primes(built_site: Path, page: tuple[Any, Traffic]) -> None:
    pg, _ = page
    pg.goto((built_site / "index.html").as_uri())
    pg.fill("#bb-search", "Ik")
    labels = [a.text_content() for a in pg.query_selector_all("#bb-search-results a")]
    assert any(label.endswith((".hv_fault_current", ".generator_partial_current", ".network_partial_current"))
               for label in labels[:10]), labels[:10]


def test_search_results_keep_hostile_text_inert(demo_copy: Path, tmp_path: Path, page: tuple[Any, Traffic]) -> None:
    from basisbook.commands.build import build

    gen = demo_copy / "inputs" / "generators.toml"
    gen.write_text(gen.read_text().replace('title = "STG-1 steam turbine generator"',
                                           'title = "STG-1 <img src=x onerror=alert(9)> <b>bold</b>"'))
    site = tmp_path / "site"
    build(demo_copy, site)
    pg, traffic = page
    pg.goto((site / "index.html").as_uri())
    pg.fill("#bb-search", "STG-1 <img")
    results = pg.locator("#bb-search-results")
    assert "<img src=x onerror=alert(9)>" in (results.text_content() or "")
    assert results.locator("img").count() == 0 and results.locator("b").count() == 0
    assert not traffic.page_errors and not traffic.console_errors


# --- print-ready output ---------------------------------------------------------------

def test_one_document_view_in_print(built_site: Path, page: tuple[Any, Traffic]) -> None:
    pg, traffic = page
    pg.goto((built_site / "handbook.html").as_uri())
    pg.emulate_media(media="print")
    # the revision block is on the cover, the table of contents links into the document
    assert pg.locator("#cover .revision-block").is_visible()
    toc = pg.locator(".toc a")
    assert toc.count() >= 5
    for i in range(toc.count()):
        target = toc.nth(i).get_attribute("href")
        assert target and target.startswith("#") and pg.locator(target).count() == 1, target
    # a cross-reference inside the document lands inside the document
    link = pg.locator("a[href='#stg1--step-generator_apparent_power']").first
    assert link.count() == 1
    assert_quiet(traffic)


def test_pdf_first_page_has_nothing_cut_off(demo_copy: Path, tmp_path: Path) -> None:
    """`basisbook pdf` through Debian chromium; the first page rendered by pdftoppm
    keeps a white margin on every side (nothing runs off the paper)."""
    if shutil.which("chromium") is None:
        _unavailable("chromium is not on PATH")
    if shutil.which("pdftoppm") is None:
        _unavailable("pdftoppm is not on PATH (apt-get install -y poppler-utils)")
    import subprocess

    from PIL import Image

    from basisbook.commands.cli import main

    pdf = tmp_path / "handbook.pdf"
    # US Letter by option (A4, the default, is what the built page names)
    assert main(["pdf", str(demo_copy), "--out", str(tmp_path / "site"), "--pdf", str(pdf), "--paper", "letter"]) == 0
    assert "@page { size: A4;" in (tmp_path / "site" / "handbook.html").read_text(encoding="utf-8")
    assert not (tmp_path / "site" / ".handbook-print.html").exists()  # the print copy is gone
    assert pdf.read_bytes().startswith(b"%PDF")
    subprocess.run(["pdftoppm", "-r", "50", "-png", "-f", "1", "-l", "1", str(pdf), str(tmp_path / "p")], check=True)
    png = next(tmp_path.glob("p*.png"))
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    shutil.copyfile(png, ARTIFACTS / "pdf-page-1.png")
    img = Image.open(png).convert("L")
    w, h = img.size
    band = 6  # pixels at 50 dpi, about 3 mm inside the paper edge
    edges = [img.crop((0, 0, w, band)), img.crop((0, h - band, w, h)),
             img.crop((0, 0, band, h)), img.crop((w - band, 0, w, h))]
    for e in edges:
        assert e.getextrema()[0] > 240, "content touches the paper edge"
    # and the page is not blank: the cover has text
    assert img.getextrema()[0] < 100

    # every page carries the document number, the revision and "page k of n"; the contents
    # list gives each section's page, and that page really holds the section
    from pypdf import PdfReader

    from basisbook.commands.pdf import section_pages

    reader = PdfReader(str(pdf))
    n = len(reader.pages)
    assert n > 20
    box = reader.pages[0].mediabox
    assert (round(float(box.width)), round(float(box.height))) == (612, 792)  # 8.5 in x 11 in at 72 pt/in
    import unicodedata

    # NFKC: the PDF's text uses ligatures (ﬁ) where the page has "fi"
    texts = [unicodedata.normalize("NFKC", pg.extract_text()) for pg in reader.pages]
    for k, text in enumerate(texts, start=1):
        assert f"page {k} of {n}" in text, (k, text[-200:])
        if k > 1:
            assert "OBR-2026-041" in text and "Rev B" in text, (k, text[:200])
    html = (tmp_path / "site" / "handbook.html").read_text(encoding="utf-8")
    anchors = re.findall(r'<span class="toc-page" data-anchor="([^"]+)">', html)
    landed = section_pages(pdf, anchors)
    assert set(landed) == set(anchors)
    import html as html_mod

    # the contents as laid out on paper (poppler's pdftotext keeps a title and its number on a line)
    laid = subprocess.run(["pdftotext", "-layout", "-f", "1", "-l", "3", str(pdf), "-"], check=True,
                          capture_output=True, text=True).stdout
    laid = " ".join(unicodedata.normalize("NFKC", laid).split())
    entries = re.findall(r'<li><span class="secno">([^<]+)</span><a href="#([^"]+)">([^<]+)</a>'
                         r'<span class="toc-page"', html)
    assert len(entries) == len(anchors)
    for number, anchor, title in entries:
        title = html_mod.unescape(title)
        assert f"{number} {title} {landed[anchor]}" in laid, (number, title, landed[anchor])
        heading = "Ostervale" if anchor.startswith("index") else title.split()[0]  # the summary's is the project
        assert heading in texts[landed[anchor] - 1]  # the section is on that page
    assert list(landed.values()) == sorted(landed.values())  # sections in reading order


# --- the serve loop -------------------------------------------------------------------

@pytest.fixture
def served(demo_copy: Path, tmp_path: Path) -> Iterator[tuple[str, Path, Path]]:
    """`basisbook serve` on a free port in its own process; yields (url, project, site)."""
    import subprocess
    import sys
    import time

    root = Path(__file__).resolve().parent.parent
    site = tmp_path / "served-site"
    proc = subprocess.Popen([sys.executable, "-u", "-m", "basisbook", "serve", str(demo_copy), "--out", str(site),
                             "--port", "0"], cwd=root, stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True)
    url = ""
    deadline = time.monotonic() + 30
    lines = []
    while time.monotonic() < deadline and proc.poll() is None:
        line = proc.stdout.readline()  # type: ignore[union-attr]
        lines.append(line)
        m = re.search(r"serving (http://127\.0\.0\.1:\d+/)", line)
        if m:
            url = m.group(1)
            break
    if not url:
        proc.kill()
        pytest.fail("serve did not start: " + "".join(lines))
    try:
        yield url, demo_copy, site
    finally:
        proc.terminate()
        try:
            proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            proc.kill()


def test_serve_reloads_the_page_after_an_edit_and_shows_broken_input(browser: Any, served: tuple[str, Path, Path]) -> None:
    from playwright.sync_api import expect

    url, project, site = served
    context = browser.new_context(viewport={"width": 1280, "height": 900})
    outside: list[str] = []

    def route(r: Any) -> None:
        if r.request.url.startswith(url):
            r.continue_()
        else:
            outside.append(r.request.url)
            r.abort()

    context.route("**/*", route)
    pg = context.new_page()
    errors: list[str] = []
    pg.on("pageerror", lambda e: errors.append(str(e)))
    pg.goto(url + "stg1.html")
    cell = pg.locator("#out-generator_current td.num")
    expect(cell).to_have_text("820.1")  # 15.625 MVA at 11 kV

    gen = project / "inputs" / "generators.toml"
    gen.write_text(gen.read_text().replace('generator_active_power = "12.5 MW"', 'generator_active_power = "13 MW"'))
    # no manual reload: the page's own script notices the new build
    expect(pg.locator("#out-generator_current td.num")).to_have_text("852.9", timeout=20_000)  # 16.25 MVA / (sqrt3 11 kV)

    gen.write_text(gen.read_text().replace("generator_power_factor = 0.8\n", "generator_power_factor = 1.2\n", 1))
    banner = pg.locator("#bb-live-problems")
    expect(banner).to_contain_text("stg1.generator_power_factor", timeout=20_000)
    expect(pg.locator("#out-generator_current td.num")).to_have_text("852.9")  # last good site stays

    gen.write_text(gen.read_text().replace("generator_power_factor = 1.2\n", "generator_power_factor = 0.8\n", 1))
    expect(banner).to_have_count(0, timeout=20_000)
    pg.screenshot(path=str(ARTIFACTS / "serve.png"))
    assert not errors and not outside, (errors, outside)
    # the live script is added only while serving, never written into the site
    assert all("__basisbook" not in p.read_text(encoding="utf-8") for p in site.rglob("*.html"))
    context.close()


def test_an_unbroken_300_character_title_stays_in_its_column(demo_copy: Path, tmp_path: Path,
                                                             page: tuple[Any, Traffic]) -> None:
    from basisbook.commands.build import build

    long_word = "Generator" + "X" * 291
    gen = demo_copy / "inputs" / "generators.toml"
    text = gen.read_text(encoding="utf-8")
    first = re.search(r'^title = "([^"]*)"', text, flags=re.M)
    assert first is not None
    gen.write_text(text.replace(first.group(0), f'title = "{long_word}"', 1), encoding="utf-8")
    out = tmp_path / "site"
    build(demo_copy, out)
    pg, _ = page
    for name in ("index.html", "stg1.html"):
        pg.goto((out / name).as_uri())
        spill = pg.evaluate("""() => {
            const width = document.documentElement.clientWidth;
            const bad = [];
            for (const el of document.querySelectorAll('body *')) {
                const r = el.getBoundingClientRect();
                if (r.width > 0 && r.right > width + 1 && getComputedStyle(el).position !== 'fixed') {
                    bad.push(el.tagName + '.' + el.className + ' right=' + Math.round(r.right));
                }
            }
            return {scroll: document.documentElement.scrollWidth, width, bad: bad.slice(0, 5)};
        }""")
        assert spill["scroll"] <= spill["width"], f"{name}: the page scrolls sideways: {spill}"
        main_box = pg.evaluate("() => { const r = document.querySelector('main').getBoundingClientRect();"
                               " return [r.left, r.right]; }")
        h1 = pg.evaluate("() => { const r = document.querySelector('main h1').getBoundingClientRect();"
                         " return [r.left, r.right]; }")
        assert main_box[0] - 1 <= h1[0] and h1[1] <= main_box[1] + 1, (name, main_box, h1)
    pg.screenshot(path=str(ARTIFACTS / "long-title.png"))
