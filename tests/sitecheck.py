"""Check a built handbook folder: every link and anchor resolves, nothing leaves the machine.

An importable helper (not a test module).  It reads the site the way a browser
on file:// would: relative URLs resolve against the page, ``#frag`` needs an
element with that ``id`` in the target page.  Only the standard library is
used, so the checker cannot share a bug with the renderer's HTML tooling.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field
from html.parser import HTMLParser
from pathlib import Path
from urllib.parse import unquote, urlsplit

# Elements that never have content: the tree builder must not wait for their end tag.
VOID = frozenset({"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta",
                  "param", "source", "track", "wbr"})
URL_ATTRS = ("href", "src")


@dataclass
class Element:
    """A parsed element: enough of a DOM to find rows, cells and equations by id or class."""

    tag: str
    attrs: dict[str, str]
    line: int
    children: list[Element | str] = field(default_factory=list)
    parent: Element | None = None

    @property
    def classes(self) -> set[str]:
        return set(self.attrs.get("class", "").split())

    def text(self) -> str:
        return "".join(c if isinstance(c, str) else c.text() for c in self.children)

    def iter(self) -> list[Element]:
        """This element and every descendant, in document order."""
        found = [self]
        for c in self.children:
            if isinstance(c, Element):
                found.extend(c.iter())
        return found

    def find_all(self, tag: str | None = None, cls: str | None = None) -> list[Element]:
        return [e for e in self.iter()
                if (tag is None or e.tag == tag) and (cls is None or cls in e.classes)]

    def by_id(self, ident: str) -> Element | None:
        return next((e for e in self.iter() if e.attrs.get("id") == ident), None)


class _TreeBuilder(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.root = Element("#document", {}, 0)
        self.stack = [self.root]

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        el = Element(tag, {k: v or "" for k, v in attrs}, self.getpos()[0], parent=self.stack[-1])
        self.stack[-1].children.append(el)
        if tag not in VOID:
            self.stack.append(el)

    def handle_startendtag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        el = Element(tag, {k: v or "" for k, v in attrs}, self.getpos()[0], parent=self.stack[-1])
        self.stack[-1].children.append(el)

    def handle_endtag(self, tag: str) -> None:
        # tolerant: close up to the nearest open element of that name, ignore strays
        for i in range(len(self.stack) - 1, 0, -1):
            if self.stack[i].tag == tag:
                del self.stack[i:]
                return

    def handle_data(self, data: str) -> None:
        self.stack[-1].children.append(data)


def parse(path: Path) -> Element:
    """Parse one HTML file into an Element tree (root tag ``#document``)."""
    b = _TreeBuilder()
    b.feed(path.read_text(encoding="utf-8"))
    b.close()
    return b.root


def html_pages(site: Path, archived: bool = True) -> list[Path]:
    """Every page; ``archived=False`` leaves out the copies of archived revisions
    (site/archive/rev-*/), which show an earlier revision's text, not this build's."""
    pages = sorted(p for p in site.rglob("*.html") if p.is_file())
    if not archived:
        pages = [p for p in pages if p.relative_to(site).parts[0] != "archive"]
    return pages


def _rel(site: Path, path: Path) -> str:
    return path.relative_to(site).as_posix()


def check_links(site: Path) -> list[str]:
    """Every problem with the href/src URLs of every page, as readable lines.

    An external URL (http:, https:, //host) is itself a problem: the handbook
    must open with no network.  ``mailto:`` is allowed; any other scheme
    (javascript:, data:, file:) is reported too, since nothing in the site needs one.
    """
    site = Path(site).resolve()
    pages = html_pages(site)
    trees = {p: parse(p) for p in pages}
    ids = {p: {e.attrs["id"] for e in t.iter() if "id" in e.attrs} for p, t in trees.items()}
    problems: list[str] = []
    for page, tree in trees.items():
        name = _rel(site, page)
        for el in tree.iter():
            for attr in URL_ATTRS:
                if attr not in el.attrs:
                    continue
                url = el.attrs[attr].strip()
                problem = _check_one(site, page, url, ids)
                if problem:
                    problems.append(f"{name}:{el.line}: <{el.tag} {attr}> link to {url}: {problem}")
    return problems


def _check_one(site: Path, page: Path, url: str, ids: dict[Path, set[str]]) -> str | None:
    parts = urlsplit(url)
    scheme = parts.scheme.lower()
    if scheme == "mailto":
        return None
    if scheme in ("http", "https") or url.startswith("//"):
        return "external URL (the handbook must work offline)"
    if scheme:
        return f"unexpected URL scheme {scheme}:"
    if parts.path.startswith("/"):
        return "absolute path (breaks when the site folder is moved)"
    target = page if not parts.path else (page.parent / unquote(parts.path)).resolve()
    if not target.is_relative_to(site):
        return "points outside the site folder"
    if not target.exists():
        return f"no such file {_rel(site, target) if target.is_relative_to(site) else target}"
    if target.is_dir():
        return "points to a folder (file:// shows a listing, not a page)"
    frag = unquote(parts.fragment)
    if frag and target.suffix == ".html":
        if frag not in ids.get(target, set()):
            return f"no id {frag!r} in {_rel(site, target)}"
    return None


def ids_unique(site: Path) -> list[str]:
    """Every id that appears more than once in one page (an anchor would be ambiguous)."""
    site = Path(site).resolve()
    problems: list[str] = []
    for page in html_pages(site):
        seen = Counter(e.attrs["id"] for e in parse(page).iter() if "id" in e.attrs)
        for ident, n in sorted(seen.items()):
            if n > 1:
                problems.append(f"{_rel(site, page)}: id {ident!r} appears {n} times")
    return problems
