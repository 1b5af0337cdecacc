"""Jinja set-up (autoescape, StrictUndefined, project overrides) and project notes as markdown.

Templates come from the project's own ``templates/`` folder first, then the built-in
``basisbook.templates``; a missing value is an error, never a blank cell.
"""

from __future__ import annotations

from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any

from markupsafe import Markup


def builtin_templates() -> Path:
    return Path(str(resources.files("basisbook.templates")))


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


def safe_link(url: str) -> bool:
    """Links in project notes may only point inside the handbook: an anchor or a
    relative page, never a scheme (http:, https:, javascript:, file:: the handbook opens
    with no network), an absolute path or '..'.  The URL is judged as a browser reads it:
    percent-encoding is decoded first (``%2e%2e/`` is ``../``), repeatedly, since a
    doubly encoded one is decoded again by some readers."""
    import re
    from urllib.parse import unquote

    u = url.strip()
    for _ in range(5):
        decoded = unquote(u)
        if decoded == u:
            break
        u = decoded
    else:
        return False  # encoded deeper than any real link is
    if not u or any(ord(ch) < 32 or ch == "\x7f" for ch in u):
        return False
    u = u.replace("\\", "/")
    if u.startswith("/") or re.match(r"^[A-Za-z][A-Za-z0-9+.-]*:", u):
        return False
    return ".." not in u.split("#", 1)[0].split("?", 1)[0].split("/")


@lru_cache(maxsize=1024)
def markdown(text: str) -> Markup:
    global _MD
    if _MD is None:
        from markdown_it import MarkdownIt

        # raw HTML off: project text can never inject markup; links stay inside the site
        _MD = MarkdownIt("commonmark", {"html": False, "linkify": False})
        _MD.validateLink = safe_link
    return Markup(_MD.render(text or ""))

