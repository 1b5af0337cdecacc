"""Print the one-document view to PDF with headless chromium (Debian's package).

Nothing is fetched: chromium opens the built handbook from file:// with its
network features off, in a throw-away profile.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import tempfile
from pathlib import Path

from basisbook.contract.errors import EnvironmentFailure, Problem, ProjectError

BROWSERS = ("chromium", "chromium-browser", "google-chrome")
FLAGS = ("--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
         "--disable-component-update", "--no-first-run", "--disable-sync", "--no-pdf-header-footer")


def find_browser() -> str:
    for name in BROWSERS:
        path = shutil.which(name)
        if path:
            return path
    raise ProjectError([Problem("chromium", None, "", "printing to PDF needs a headless chromium on PATH "
                                "(Debian: apt-get install chromium)")])


def _print(browser: str, page: Path, target: Path, timeout: float) -> None:
    with tempfile.TemporaryDirectory(prefix="basisbook-chromium-") as profile:
        cmd = [browser, *FLAGS, f"--user-data-dir={profile}", f"--print-to-pdf={target}", page.as_uri()]
        done = subprocess.run(cmd, capture_output=True, text=True, timeout=timeout)
        if done.returncode != 0 or not target.is_file() or target.stat().st_size == 0:
            target.unlink(missing_ok=True)
            raise EnvironmentFailure(f"chromium could not print the handbook: {done.stderr.strip()[-400:]}")


_TOC_PAGE = re.compile(r'<span class="toc-page" data-anchor="([^"]+)">[^<]*</span>')


def section_pages(pdf: Path, anchors: list[str]) -> dict[str, int]:
    """Where each section landed: chromium keeps every link target as a named destination,
    so a section's anchor names its page (counted from 1)."""
    from pypdf import PdfReader

    reader = PdfReader(str(pdf))
    named = reader.named_destinations
    out = {}
    for a in anchors:
        dest = named.get("/" + a) or named.get(a)
        if dest is not None:
            out[a] = reader.get_destination_page_number(dest) + 1
    return out


def _numbered(html: str, pages: dict[str, int]) -> str:
    return _TOC_PAGE.sub(lambda m: f'<span class="toc-page" data-anchor="{m.group(1)}">'
                         f'{pages.get(m.group(1), "")}</span>', html)


PAPERS = {"a4": "A4", "letter": "letter"}


def print_pdf(site: Path, pdf: Path, timeout: float = 180.0, paper: str = "a4") -> Path:
    """Print the one-document view with page numbers in its contents list.

    A first pass prints it as built; the contents list's page numbers are read from where
    each section landed and written into a copy of the page beside it, which is printed
    again (repeated until the numbers stand, at most three times).  The site itself is
    left as built."""
    page = (Path(site) / "handbook.html").resolve()
    if not page.is_file():
        raise ProjectError([Problem(str(site), None, "", "no handbook.html: build the site first")])
    pdf = Path(pdf).resolve()
    pdf.parent.mkdir(parents=True, exist_ok=True)
    browser = find_browser()
    if paper.lower() not in PAPERS:
        raise ProjectError([Problem("--paper", None, "", f"expected one of {', '.join(PAPERS)}, got {paper!r}")])
    html = page.read_text(encoding="utf-8")
    # the page box of the one-document view names its paper (A4 as built)
    html = re.sub(r"@page \{ size: [A-Za-z0-9]+;", f"@page {{ size: {PAPERS[paper.lower()]};", html, count=1)
    anchors = _TOC_PAGE.findall(html)
    tmp = pdf.with_name(f".{pdf.name}.part")
    numbered = page.with_name(".handbook-print.html")  # beside it, so its links and assets resolve
    try:
        numbered.write_text(html, encoding="utf-8")
        _print(browser, numbered, tmp, timeout)
        pages: dict[str, int] = {}
        for _ in range(3):
            found = section_pages(tmp, anchors)
            if found == pages:
                break
            pages = found
            numbered.write_text(_numbered(html, pages), encoding="utf-8")
            _print(browser, numbered, tmp, timeout)
        tmp.replace(pdf)  # never a half-written PDF under the final name
    finally:
        tmp.unlink(missing_ok=True)
        numbered.unlink(missing_ok=True)
    return pdf
