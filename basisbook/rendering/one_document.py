"""The one-document view: every page of the handbook in order, for print and PDF.

Built from the pages already rendered: each page's <main> becomes a section,
its ids get the page's prefix ("stg1--out-x") and links between pages become
links inside the document, so a printed copy keeps its cross-references.  We
only rewrite attributes of HTML we generated ourselves (always double-quoted;
project text is escaped, so it never holds a raw quote).
"""

from __future__ import annotations

import re

# one pass over the attributes we rewrite: ids, links, and url(#...) references in SVG
_ATTR = re.compile(r'\b(id|href)="([^"]*)"|url\(#([^)]*)\)')


def _prefix(page: str) -> str:
    return page.removesuffix(".html").replace("/", "__") + "--"


def main_of(html: str) -> str:
    start = html.index("<main>") + len("<main>")
    return html[start: html.index("</main>")]


def localise(body: str, page: str, pages: set[str]) -> str:
    """Prefix ids and turn links to pages in the document into in-document anchors."""
    p = _prefix(page)

    def repl(m: re.Match[str]) -> str:
        attr, url = m.group(1), m.group(2)
        if attr is None:
            return f"url(#{p}{m.group(3)})"
        if attr == "id":
            return f'id="{p}{url}"'
        if url.startswith("#"):
            return f'href="#{p}{url[1:]}"'
        target, _, frag = url.partition("#")
        if target in pages:
            q = _prefix(target)
            return f'href="#{q}{frag}"' if frag else f'href="#{q}top"'
        return m.group(0)  # source pages, figures, CSV: stay separate files

    return _ATTR.sub(repl, body)


def page_anchor(page: str) -> str:
    """The anchor of a page's section in the one-document view."""
    return f"{_prefix(page)}top"


def sections(rendered: dict[str, str], order: list[tuple[str, str]],
             cache: dict[str, tuple[str, str]] | None = None) -> list[dict[str, str]]:
    """[(page, title)] -> sections with an anchor, a title and the localised body.

    ``cache`` (page -> (page text, body)), kept by a long-lived process, re-makes a
    section only when its page's text changed; it is left holding this build's pages.
    """
    pages = {page for page, _ in order}
    previous = dict(cache or {})
    if cache is not None:
        cache.clear()
    out = []
    for page, title in order:
        text = rendered[page]
        hit = previous.get(page)
        body = hit[1] if hit is not None and hit[0] == text else localise(main_of(text), page, pages)
        if cache is not None:
            cache[page] = (text, body)
        out.append({"anchor": f"{_prefix(page)}top", "title": title, "body": body, "page": page})
    return out


def css_string(text: str) -> str:
    """``text`` as a quoted CSS string that cannot end the string or the style element."""
    out = []
    for ch in text:
        if ch in '\\"<>&' or ord(ch) < 32:
            out.append(f"\\{ord(ch):x} ")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def print_css(number: str, name: str, rev_id: str, purpose: str, paper: str = "A4") -> str:
    """The printed page's running header and footer (CSS paged media margin boxes, which
    chromium prints): document number and title top left, revision and status top right,
    "page k of n" bottom right, on every page of the one-document view."""
    left = " · ".join(x for x in (number, name) if x)
    return (f"@page {{ size: {paper}; margin: 18mm 14mm 16mm 14mm;\n"
            f"  @top-left {{ content: {css_string(left)}; font: 8.5pt sans-serif; color: #444; }}\n"
            f"  @top-right {{ content: {css_string(f'Rev {rev_id} · {purpose}')}; font: 8.5pt sans-serif; "
            "color: #444; }\n"
            f"  @bottom-left {{ content: {css_string('Electrical and energy design basis')}; "
            "font: 8.5pt sans-serif; color: #444; }\n"
            '  @bottom-right { content: "page " counter(page) " of " counter(pages); font: 8.5pt sans-serif; }\n'
            "}\n"
            # the cover carries the title block itself
            "@page :first { @top-left { content: none; } @top-right { content: none; } }\n")
