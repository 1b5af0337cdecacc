"""The dependency map page: calc instances as boxes, links as arrows, drawn as SVG,
and the list of every link.

Our own layered layout: a node's column is the length of the longest chain of
links that feeds it, rows keep the project's order.  The SVG is written by
hand (no plotting library) so each box can be a link to its page, and the
output is deterministic.
"""

from __future__ import annotations

from html import escape
from typing import Any

from markupsafe import Markup

from basisbook.rendering.common import source_view
from basisbook.running.engine import CalcRun

BOX_W, BOX_H, COL_GAP, ROW_GAP, PAD = 250, 54, 100, 26, 16


def _short(text: str, n: int) -> str:
    return text if len(text) <= n else text[: n - 1] + "…"


def edges(runs: list[CalcRun]) -> list[tuple[str, str, list[str]]]:
    """(upstream id, downstream id, ["output -> input", ...]) in a stable order."""
    found: dict[tuple[str, str], list[str]] = {}
    for r in runs:
        for iv in r.inputs.values():
            if iv.source.link:
                src, out = iv.source.link
                found.setdefault((src, r.id), []).append(f"{out} → {iv.name}")
    return [(a, b, labels) for (a, b), labels in found.items()]


def layout(runs: list[CalcRun]) -> dict[str, tuple[int, int]]:
    """Node id -> (column, row).  Runs arrive in dependency order."""
    col: dict[str, int] = {}
    ups: dict[str, set[str]] = {}
    for a, b, _ in edges(runs):
        ups.setdefault(b, set()).add(a)
    uses_site = any(a == "site" for a, _, _ in edges(runs))
    if uses_site:
        col["site"] = 0
    for r in runs:
        col[r.id] = 1 + max((col[u] for u in ups.get(r.id, ()) if u in col), default=0 if uses_site else -1)
    rows: dict[int, int] = {}
    place: dict[str, tuple[int, int]] = {}
    for node in (["site"] if uses_site else []) + [r.id for r in runs]:
        c = col[node]
        place[node] = (c, rows.get(c, 0))
        rows[c] = rows.get(c, 0) + 1
    return place


def svg(runs: list[CalcRun]) -> str:
    place = layout(runs)
    titles = {r.id: r.instance.title for r in runs} | {"site": "Site conditions"}
    kinds = {r.id: r.spec.title for r in runs} | {"site": "project.toml [site]"}
    hrefs = {r.id: f"{r.id}.html" for r in runs} | {"site": "index.html#site"}
    ncols = max((c for c, _ in place.values()), default=0) + 1
    nrows = max((r for _, r in place.values()), default=0) + 1
    width = PAD * 2 + ncols * BOX_W + (ncols - 1) * COL_GAP
    height = PAD * 2 + nrows * BOX_H + (nrows - 1) * ROW_GAP

    def xy(node: str) -> tuple[int, int]:
        c, r = place[node]
        return PAD + c * (BOX_W + COL_GAP), PAD + r * (BOX_H + ROW_GAP)

    parts = [
        f'<svg class="depmap" viewBox="0 0 {width} {height}" '
        f'width="{width}" height="{height}" role="img" aria-labelledby="depmap-title">',
        '<title id="depmap-title">Dependency map: which calculation feeds which</title>',
        '<defs><marker id="arrowhead" viewBox="0 0 10 10" refX="10" refY="5" markerWidth="7" '
        'markerHeight="7" orient="auto-start-reverse"><path d="M 0 0 L 10 5 L 0 10 z"/></marker></defs>',
    ]
    for a, b, labels in edges(runs):
        x1, y1 = xy(a)
        x2, y2 = xy(b)
        x1, y1, x2, y2 = x1 + BOX_W, y1 + BOX_H // 2, x2, y2 + BOX_H // 2
        mx = (x1 + x2) // 2
        tip = escape("; ".join(labels))
        parts.append(f'<path class="edge" d="M {x1} {y1} C {mx} {y1}, {mx} {y2}, {x2} {y2}" '
                     f'marker-end="url(#arrowhead)"><title>{tip}</title></path>')
        parts.append(f'<text class="edge-label" x="{x2 - 8}" y="{y2 - 6}" text-anchor="end">'
                     f'{len(labels)} link{"s" if len(labels) != 1 else ""}</text>')
    for node in place:
        x, y = xy(node)
        parts.append(f'<a href="{escape(hrefs[node])}"><g class="node">'
                     f'<rect x="{x}" y="{y}" width="{BOX_W}" height="{BOX_H}" rx="4"/>'
                     f'<text x="{x + 8}" y="{y + 21}" class="node-title">{escape(_short(titles[node], 30))}</text>'
                     f'<text x="{x + 8}" y="{y + 40}" class="node-kind">{escape(node)} · '
                     f'{escape(_short(kinds[node], 30))}</text></g></a>')
    parts.append("</svg>")
    return "\n".join(parts)


def depmap_view(runs: list[CalcRun]) -> dict[str, Any]:
    links = []
    for r in runs:
        for decl in r.spec.inputs:
            iv = r.inputs[decl.name]
            if iv.source.link:
                view = source_view(iv, "", {x.id: x for x in runs})
                links.append({"to": f"{r.id}.{decl.name}", "to_href": f"{r.id}.html#in-{decl.name}",
                              "from": view["label"], "from_href": view["href"]})
    return {"map_svg": Markup(svg(runs)), "links": links}

