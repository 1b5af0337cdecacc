"""Print the one-document view to PDF with headless chromium (Debian's package).

Nothing is fetched: chromium opens the built handbook from file:// with its
network features off, in a throw-away profile.
"""

from __future__ import annotations

import shutil
import subprocess
import tempfile
from pathlib import Path

from basisbook.contract.errors import Problem, ProjectError

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


def print_pdf(site: Path, pdf: Path, timeout: float = 180.0) -> Path:
    page = (Path(site) / "handbook.html").resolve()
    if not page.is_file():
        raise ProjectError([Problem(str(site), None, "", "no handbook.html: build the site first")])
    pdf = Path(pdf).resolve()
    pdf.parent.mkdir(parents=True, exist_ok=True)
    browser = find_browser()
    with tempfile.TemporaryDirectory(prefix="basisbook-chromium-") as profile:
        tmp = pdf.with_name(f".{pdf.name}.part")
        cmd = [browser, *FLAGS, f"--user-data-dir={profile}", f"--print-to-pdf={tmp}", page.as_uri()]
        done = subprocess.run(cmd, capture_output=True, text=True, timeout=timeout)
        if done.returncode != 0 or not tmp.is_file() or tmp.stat().st_size == 0:
            tmp.unlink(missing_ok=True)
            raise RuntimeError(f"chromium could not print the handbook: {done.stderr.strip()[-400:]}")
        tmp.replace(pdf)  # never a half-written PDF under the final name
    return pdf
