"""Energy-flow (Sankey) diagram written directly as SVG (renderer layer: drawing only).

The inflows stack into one bar on the left; bands whose height is proportional to
energy run to the outflows stacked on the right, products above losses.  Losses
are hatched and labelled "[loss]", so print and colour-blind readers see the
difference without colour.  The canvas grows to fit the longest label, so no
label is ever cut off.  Written by hand rather than through matplotlib: the
picture has no axes or ticks, and a direct SVG is about a hundred times faster
to produce (it is redrawn on every rebuild whose energy balance moved).

Standalone SVG (loaded by ``<img>``), no external references, byte-identical
for the same data.
"""

from __future__ import annotations

import textwrap

from basisbook.contract.spec import EnergyFlow
from basisbook.rendering.mathfmt import number_text, unit_text
from basisbook.rendering.singleline import svg_number
from basisbook.rendering.singleline import svg_text as _e

FONT = 13           # label font size, px (the page shows the figure 640 px wide)
TITLE_FONT = 15
CHAR_W = 0.6        # average glyph advance of DejaVu Sans in em (errs wide, so labels fit)
LINE = 16           # label line pitch, px
BAND_H = 330.0      # height of the whole inflow bar, px
GAP = 6.0           # between outflow bars, px
BAR_W = 14.0
BAND_LEN = 240.0    # horizontal run of the bands, px
MARGIN = 12.0
_INFLOW_COLOURS = ["#1b4f72", "#b03a2e", "#1e8449", "#7d3c98", "#b9770e", "#5d6d7e"]
_PRODUCT = ("#c9dbe9", "#1b4f72")  # band fill, bar and edge
_LOSS = ("#f1e2cf", "#8a5a00")


def _n(x: float) -> str:
    return svg_number(x, 2)


def _text_w(text: str, size: float = FONT) -> float:
    return len(text) * CHAR_W * size


def _spread(centres: list[float], pitch: float) -> list[float]:
    """Label positions as near their bands as possible, top-down, each at least
    ``pitch`` below the one above (the diagram's labels never overlap)."""
    out: list[float] = []
    for c in centres:
        out.append(c if not out else max(c, out[-1] + pitch))
    return out


def svg(flow: EnergyFlow, title: str) -> str:
    """The diagram as an SVG document."""
    total_in = sum(v for _, v in flow.inflows)
    if not total_in > 0:
        raise ValueError("energy-flow figure: the inflows must add up to more than zero")
    outs = sorted(flow.outflows, key=lambda o: o[2] != "product")  # products first, stable
    total_out = sum(v for _, v, _k in outs)
    u = unit_text(flow.unit)
    scale = BAND_H / total_in  # px per unit of energy
    in_labels = [(label, f"{number_text(v)} {u}") for label, v in flow.inflows]
    out_labels = [f"{label}: {number_text(v)} {u} ({100.0 * v / total_in:.1f} %)"
                  + ("" if kind == "product" else " [loss]") for label, v, kind in outs]
    left_w = max((_text_w(t) for pair in in_labels for t in pair), default=0.0) + 10
    right_w = max((_text_w(t) for t in out_labels), default=0.0) + 10
    x_in = MARGIN + left_w                  # left edge of the inflow bar
    x0 = x_in + BAR_W                       # bands start
    x1 = x0 + BAND_LEN                      # outflow bars start
    width = x1 + BAR_W + right_w + MARGIN
    title_lines = textwrap.wrap(title, max(40, int((width - 2 * MARGIN) / (CHAR_W * TITLE_FONT)))) or [""]
    top = MARGIN + TITLE_FONT * 1.3 * len(title_lines) + 16
    # the right column is as tall as the left plus the gaps; an imbalance is split evenly
    right_h = total_out * scale + GAP * (len(outs) - 1)
    right_top = top + (BAND_H - right_h) / 2

    parts: list[str] = []
    # inflow bar: one coloured segment per inflow, labels beside it
    y = top
    in_centres = []
    for i, (_label, v) in enumerate(flow.inflows):
        h = v * scale
        parts.append(f'<rect x="{_n(x_in)}" y="{_n(y)}" width="{_n(BAR_W)}" height="{_n(h)}" '
                     f'fill="{_INFLOW_COLOURS[i % len(_INFLOW_COLOURS)]}" stroke="#000" stroke-width="0.6"/>')
        in_centres.append(y + h / 2 - LINE / 2)
        y += h
    in_label_ys = _spread(in_centres, 2 * LINE + 2)
    for (label, value), ly in zip(in_labels, in_label_ys, strict=True):
        parts.append(f'<text x="{_n(x_in - 6)}" y="{_n(ly + 4)}" text-anchor="end">'
                     f'<tspan>{_e(label)}</tspan><tspan x="{_n(x_in - 6)}" dy="{LINE}">{_e(value)}</tspan></text>')
    # bands and outflow bars
    lt, rt = top, right_top
    out_centres = []
    bars = []
    for (_label, v, kind), _text in zip(outs, out_labels, strict=True):
        h = v * scale
        fill, edge = _PRODUCT if kind == "product" else _LOSS
        xm = (x0 + x1) / 2
        d = (f"M{_n(x0)} {_n(lt)} C{_n(xm)} {_n(lt)} {_n(xm)} {_n(rt)} {_n(x1)} {_n(rt)} "
             f"L{_n(x1)} {_n(rt + h)} C{_n(xm)} {_n(rt + h)} {_n(xm)} {_n(lt + h)} {_n(x0)} {_n(lt + h)} Z")
        paint = fill if kind == "product" else "url(#loss-hatch)"
        parts.append(f'<path d="{d}" fill="{paint}" stroke="{edge}" stroke-width="0.6"/>')
        bars.append(f'<rect x="{_n(x1)}" y="{_n(rt)}" width="{_n(BAR_W)}" height="{_n(max(h, 0.8))}" '
                    f'fill="{edge}" stroke="#000" stroke-width="0.6"/>')
        out_centres.append(rt + h / 2)
        lt += h
        rt += h + GAP
    parts += bars
    label_ys = _spread(out_centres, LINE + 1)
    x_label = x1 + BAR_W + 8
    for text, centre, ly in zip(out_labels, out_centres, label_ys, strict=True):
        if ly - centre > 2:  # pushed away from its band: a leader line shows which bar it names
            parts.append(f'<path d="M{_n(x1 + BAR_W)} {_n(centre)} L{_n(x_label - 2)} {_n(ly)}" '
                         'stroke="#555" stroke-width="0.6" fill="none"/>')
        parts.append(f'<text x="{_n(x_label)}" y="{_n(ly + 4)}">{_e(text)}</text>')
    bottom = max(top + BAND_H, rt - GAP, (label_ys[-1] if label_ys else 0) + LINE,
                 (in_label_ys[-1] + 2 * LINE) if in_label_ys else 0) + MARGIN
    head = [f'<text x="{_n(width / 2)}" y="{_n(MARGIN + TITLE_FONT * (1.3 * i + 1))}" text-anchor="middle" '
            f'font-size="{TITLE_FONT}">{_e(line)}</text>' for i, line in enumerate(title_lines)]
    return (
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{_n(width)}" height="{_n(bottom)}" '
        f'viewBox="0 0 {_n(width)} {_n(bottom)}" font-family="DejaVu Sans, Verdana, sans-serif" '
        f'font-size="{FONT}" role="img">\n'
        f"<title>{_e(title)}</title>\n"
        '<defs><pattern id="loss-hatch" patternUnits="userSpaceOnUse" width="6" height="6" '
        'patternTransform="rotate(45)">'
        f'<rect width="6" height="6" fill="{_LOSS[0]}"/>'
        f'<line x1="0" y1="0" x2="0" y2="6" stroke="{_LOSS[1]}" stroke-width="1"/></pattern></defs>\n'
        f'<rect width="100%" height="100%" fill="#fff"/>\n'
        + "\n".join(head + parts) + "\n</svg>\n"
    )
