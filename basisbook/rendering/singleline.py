"""Key single-line diagram as inline SVG (renderer layer: drawing only, no physics).

The diagram is a tree from the grid down (``SingleLine`` in basisbook/contract/spec.py).
Each element is drawn with a hand-made graphical symbol in the manner of
IEC 60617 (generator and motor circles with a letter and a tilde, a two-winding
transformer as two overlapping circles, a busbar as a thick line, a
circuit-breaker as a small square, the grid infeed as a hatched box), its
label beside it, and is wrapped in a link when the element names one:
``{link}.html#{anchor}`` for another page, ``#{anchor}`` on the same page when
only an anchor is given.  The SVG carries no xmlns (it is inlined in HTML5),
no external references, and is byte-identical for the same diagram.
"""

from __future__ import annotations

import html
from dataclasses import dataclass

from basisbook.contract.spec import LineElement, SingleLine

COLUMN = 250        # width given to each leaf of the tree, px
ROW = 78            # vertical pitch of the tree levels, px
MARGIN = 24
LABEL_GAP = 30      # from the element's axis to its label
FONT = 11
SYMBOLS = ("grid", "transformer", "generator", "busbar", "breaker", "motor", "load")
# half-heights of each symbol: where the conductor enters (top) and leaves (bottom)
HALF = {"grid": 14, "transformer": 26, "generator": 18, "busbar": 0, "breaker": 7, "motor": 16, "load": 10}


def svg_text(text: str) -> str:
    """Project text made safe inside SVG text and attributes (also used by energyflow.py)."""
    return html.escape(str(text), quote=True)


def svg_number(x: float, decimals: int = 1) -> str:
    """A coordinate to ``decimals`` places, trailing zeros dropped: deterministic and short."""
    s = f"{x:.{decimals}f}"
    if "." in s:
        s = s.rstrip("0").rstrip(".")
    return "0" if s == "-0" else s




@dataclass
class _Node:
    el: LineElement
    children: list[_Node]
    x: float = 0.0
    y: float = 0.0
    left: float = 0.0   # busbar extent
    right: float = 0.0


def _tree(diagram: SingleLine) -> list[_Node]:
    ids = [e.id for e in diagram.elements]
    if len(set(ids)) != len(ids):
        raise ValueError(f"single-line diagram: element ids repeat: {sorted({i for i in ids if ids.count(i) > 1})}")
    nodes = {e.id: _Node(e, []) for e in diagram.elements}
    roots = []
    for e in diagram.elements:
        if e.symbol not in SYMBOLS:
            raise ValueError(f"single-line diagram: unknown symbol {e.symbol!r} for {e.id!r}")
        if e.parent is None:
            roots.append(nodes[e.id])
        elif e.parent not in nodes:
            raise ValueError(f"single-line diagram: {e.id!r} hangs from unknown {e.parent!r}")
        else:
            nodes[e.parent].children.append(nodes[e.id])
    # every element must be reachable from a root (no cycles)
    seen: set[str] = set()
    stack = list(roots)
    while stack:
        n = stack.pop()
        seen.add(n.el.id)
        stack.extend(n.children)
    if seen != set(nodes):
        raise ValueError("single-line diagram: elements in a cycle: " + ", ".join(sorted(set(nodes) - seen)))
    return roots


def _width(n: _Node) -> float:
    return max(COLUMN, sum(_width(c) for c in n.children))


def _place(n: _Node, left: float, depth: int) -> None:
    n.y = MARGIN + 40 + depth * ROW
    if n.children:
        x = left
        for c in n.children:
            _place(c, x, depth + 1)
            x += _width(c)
        n.x = (n.children[0].x + n.children[-1].x) / 2.0 if len(n.children) > 1 else n.children[0].x
    else:
        n.x = left + COLUMN / 2.0
    if n.el.symbol == "busbar":
        xs = [c.x for c in n.children] or [n.x]
        n.left, n.right = min(xs + [n.x]) - 30, max(xs + [n.x]) + 30


def _walk(roots: list[_Node]) -> list[_Node]:
    out: list[_Node] = []
    stack = list(reversed(roots))
    while stack:
        n = stack.pop()
        out.append(n)
        stack.extend(reversed(n.children))
    return out


def _symbol(n: _Node) -> list[str]:
    x, y = n.x, n.y
    s = n.el.symbol
    line = 'stroke="#222" stroke-width="1.6" fill="none"'
    if s == "grid":
        w, h = 40, 28
        x0, y0 = x - w / 2, y - h / 2
        parts = [f'<rect x="{svg_number(x0)}" y="{svg_number(y0)}" width="{w}" height="{h}" {line}/>']
        # hatch at 45 degrees, each stroke clipped to the box by hand (no clipPath ids needed)
        for k in range(-h, w, 7):
            ax, ay = x0 + max(k, 0), y0 + max(-k, 0)
            run = min(w - max(k, 0), h - max(-k, 0))
            parts.append(f'<line x1="{svg_number(ax)}" y1="{svg_number(ay + run)}" x2="{svg_number(ax + run)}" y2="{svg_number(ay)}" '
                         'stroke="#222" stroke-width="0.8"/>')
        return parts
    if s == "transformer":
        return [f'<circle cx="{svg_number(x)}" cy="{svg_number(y - 8)}" r="14" {line}/>',
                f'<circle cx="{svg_number(x)}" cy="{svg_number(y + 8)}" r="14" {line}/>']
    if s in ("generator", "motor"):
        r = HALF[s]
        letter = "G" if s == "generator" else "M"
        tilde = (f'<path d="M{svg_number(x - 7)} {svg_number(y + 8)} q3.5 -4 7 0 t7 0" stroke="#222" stroke-width="1.2" '
                 'fill="none"/>')
        return [f'<circle cx="{svg_number(x)}" cy="{svg_number(y)}" r="{r}" {line}/>',
                f'<text x="{svg_number(x)}" y="{svg_number(y + 3)}" text-anchor="middle" font-size="13" '
                f'font-weight="bold">{letter}</text>', tilde]
    if s == "busbar":
        return [f'<line x1="{svg_number(n.left)}" y1="{svg_number(y)}" x2="{svg_number(n.right)}" y2="{svg_number(y)}" stroke="#222" '
                'stroke-width="5" stroke-linecap="butt"/>']
    if s == "breaker":
        return [f'<rect x="{svg_number(x - 7)}" y="{svg_number(y - 7)}" width="14" height="14" {line} fill-opacity="0"/>']
    # load: an arrowhead at the end of its feeder
    return [f'<path d="M{svg_number(x - 7)} {svg_number(y - 6)} L{svg_number(x + 7)} {svg_number(y - 6)} L{svg_number(x)} {svg_number(y + 10)} Z" '
            'fill="#222"/>']


def _label(n: _Node) -> str:
    lines = [part.strip() for part in n.el.label.split(" · ") if part.strip()] or [""]
    if n.el.symbol == "busbar":
        x, anchor = n.right + 8, "start"
    else:
        x, anchor = n.x + LABEL_GAP, "start"
    y0 = n.y - (len(lines) - 1) * (FONT + 2) / 2 + FONT / 3
    spans = "".join(f'<tspan x="{svg_number(x)}" y="{svg_number(y0 + i * (FONT + 2))}">{svg_text(t)}</tspan>'
                    for i, t in enumerate(lines))
    return f'<text font-size="{FONT}" text-anchor="{anchor}">{spans}</text>'


def _wire(parent: _Node, child: _Node) -> str:
    top = child.y - HALF[child.el.symbol]
    if parent.el.symbol == "busbar":
        return f'<line x1="{svg_number(child.x)}" y1="{svg_number(parent.y)}" x2="{svg_number(child.x)}" y2="{svg_number(top)}" stroke="#222" stroke-width="1.6"/>'
    bottom = parent.y + HALF[parent.el.symbol]
    if abs(parent.x - child.x) < 0.05:
        return f'<line x1="{svg_number(child.x)}" y1="{svg_number(bottom)}" x2="{svg_number(child.x)}" y2="{svg_number(top)}" stroke="#222" stroke-width="1.6"/>'
    mid = (bottom + top) / 2.0
    return (f'<path d="M{svg_number(parent.x)} {svg_number(bottom)} V{svg_number(mid)} H{svg_number(child.x)} V{svg_number(top)}" stroke="#222" '
            'stroke-width="1.6" fill="none"/>')


def _label_width(n: _Node) -> float:
    longest = max((len(p) for p in n.el.label.split(" · ")), default=0)
    return longest * FONT * 0.58


def svg(diagram: SingleLine, title: str) -> str:
    """The diagram as an inline <svg> element (no xmlns, no external references)."""
    roots = _tree(diagram)
    x = float(MARGIN)
    for r in roots:
        _place(r, x, 0)
        x += _width(r)
    nodes = _walk(roots)
    width = max([x + MARGIN] + [(n.right if n.el.symbol == "busbar" else n.x) + LABEL_GAP + _label_width(n) + MARGIN
                                for n in nodes])
    height = max(n.y for n in nodes) + ROW / 2 + MARGIN
    out = [f'<svg class="single-line" viewBox="0 0 {svg_number(width)} {svg_number(height)}" width="{svg_number(width)}" '
           f'height="{svg_number(height)}" role="img" aria-label="{svg_text(title)}" font-family="sans-serif">',
           f'<title>{svg_text(title)}</title>',
           f'<text x="{MARGIN}" y="{MARGIN}" font-size="13" font-weight="bold">{svg_text(title)}</text>']
    for n in nodes:  # wires first, so symbols sit on top
        for c in n.children:
            out.append(_wire(n, c))
    for n in nodes:
        body = "".join(_symbol(n)) + _label(n)
        group = f'<g class="sld-{svg_text(n.el.symbol)}" id="sld-{svg_text(n.el.id)}">{body}</g>'
        href = ""
        if n.el.link:
            href = f"{n.el.link}.html" + (f"#{n.el.anchor}" if n.el.anchor else "")
        elif n.el.anchor:
            href = f"#{n.el.anchor}"
        if href:
            group = f'<a href="{svg_text(href)}">{group}</a>'
        out.append(group)
    out.append("</svg>")
    return "\n".join(out)
