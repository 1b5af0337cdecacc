"""Draw a calc's Chart data as a deterministic SVG.

matplotlib is imported here only, and only when a figure is drawn, so that
``basisbook check`` never pays for it.  Fixed hash salt, no date metadata and
text kept as text make the SVG byte-identical on a rebuild.
"""

from __future__ import annotations

import hashlib
import io
import json
import textwrap
from typing import Any

from basisbook.spec import Chart, EnergyFlow

_STYLES = {"solid": "-", "dashed": "--", "dotted": ":", "dashdot": "-."}
# A palette that stays readable in print and for common colour-vision deficiencies;
# line styles also differ, so colour is never the only cue.
_COLOURS = ["#1b4f72", "#b03a2e", "#1e8449", "#7d3c98", "#b9770e", "#5d6d7e"]


def chart_key(chart: Chart | EnergyFlow) -> str:
    """A hash of everything that shapes the picture (for caching)."""
    if isinstance(chart, EnergyFlow):
        flows = {"u": chart.unit, "i": [[a, float(b)] for a, b in chart.inflows],
                 "o": [[a, float(b), c] for a, b, c in chart.outflows]}
        return hashlib.sha256(json.dumps(flows, sort_keys=True).encode()).hexdigest()
    data: dict[str, Any] = {
        "x": chart.x_label, "y": chart.y_label, "eq": chart.equal_aspect,
        "xr": chart.x_range, "yr": chart.y_range,
        "s": [[s.label, [float(v) for v in s.x], [float(v) for v in s.y], s.style] for s in chart.series],
        "m": [[m.label, float(m.x), float(m.y)] for m in chart.markers],
    }
    return hashlib.sha256(json.dumps(data, sort_keys=True).encode()).hexdigest()


def render_svg(chart: Chart | EnergyFlow, title: str) -> str:
    if isinstance(chart, EnergyFlow):
        return _render_energy_flow(chart, title)
    return _render_chart(chart, title)


def _setup() -> tuple[Any, Any, Any]:
    import matplotlib

    matplotlib.use("svg", force=True)
    from matplotlib.backends.backend_svg import FigureCanvasSVG
    from matplotlib.figure import Figure

    return matplotlib, FigureCanvasSVG, Figure


def _svg(fig: Any) -> str:
    # a fixed layout (no "tight" bounding box): one draw instead of two, same bytes every time
    buf = io.StringIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    return buf.getvalue()


def _render_energy_flow(flow: EnergyFlow, title: str) -> str:
    """Energy-flow diagram: the inflows stack into one bar on the left; bands of
    width proportional to energy run to the outflows stacked on the right,
    products above losses (losses hatched, so print and colour-blind readers
    see the difference without colour)."""
    from matplotlib.patches import PathPatch, Rectangle
    from matplotlib.path import Path as MPath

    from basisbook.mathfmt import number_text, unit_text

    matplotlib, FigureCanvasSVG, Figure = _setup()
    total_in = sum(v for _, v in flow.inflows)
    outs = sorted(flow.outflows, key=lambda o: (o[2] != "product",))  # products first, stable
    total_out = sum(v for _, v, _k in outs)
    u = unit_text(flow.unit)
    gap = 0.015 * total_in
    with matplotlib.rc_context({**_RC, "axes.grid": False}):
        fig = Figure(figsize=(7.2, 4.6))
        FigureCanvasSVG(fig)
        ax = fig.add_axes((0.0, 0.0, 1.0, 0.93))
        ax.set_axis_off()
        ax.set_title(textwrap.fill(title, 78), fontsize=10, parse_math=False)
        # left: inflows stacked top-down; labels kept apart like the outflow labels
        y = total_in
        last_in_y = float("inf")
        for i, (label, v) in enumerate(flow.inflows):
            ax.add_patch(Rectangle((0.0, y - v), 0.06, v, facecolor=_COLOURS[i % len(_COLOURS)],
                                   edgecolor="black", linewidth=0.6))
            ly = min(y - v / 2, last_in_y - 0.09 * total_in)
            last_in_y = ly
            ax.text(-0.02, ly, f"{label}\n{number_text(v)} {u}", ha="right", va="center", fontsize=8,
                    parse_math=False)
            y -= v
        # right: outflows stacked top-down with gaps; bands from the left bar
        left_top = total_in
        right_top = total_in + gap * (len(outs) - 1) / 2 + (total_in - total_out) / 2
        last_label_y = float("inf")
        for label, v, kind in outs:
            x0, x1 = 0.06, 0.74
            lt, lb = left_top, left_top - v
            rt, rb = right_top, right_top - v
            verts = [(x0, lt), ((x0 + x1) / 2, lt), ((x0 + x1) / 2, rt), (x1, rt),
                     (x1, rb), ((x0 + x1) / 2, rb), ((x0 + x1) / 2, lb), (x0, lb), (x0, lt)]
            codes = [MPath.MOVETO, MPath.CURVE4, MPath.CURVE4, MPath.CURVE4, MPath.LINETO,
                     MPath.CURVE4, MPath.CURVE4, MPath.CURVE4, MPath.CLOSEPOLY]
            product = kind == "product"
            ax.add_patch(PathPatch(MPath(verts, codes), facecolor="#c9dbe9" if product else "#f1e2cf",
                                   edgecolor="#1b4f72" if product else "#8a5a00", linewidth=0.6,
                                   hatch=None if product else "///", alpha=0.95))
            ax.add_patch(Rectangle((x1, rb), 0.03, v, facecolor="#1b4f72" if product else "#8a5a00",
                                   edgecolor="black", linewidth=0.6))
            # labels never overlap: each sits at least a line below the one above
            ly = min((rt + rb) / 2, last_label_y - 0.055 * total_in)
            last_label_y = ly
            share = 100.0 * v / total_in
            ax.text(0.79, ly, f"{label}: {number_text(v)} {u} ({share:.1f} %)"
                    + ("" if product else "  [loss]"), va="center", fontsize=8, parse_math=False)
            left_top -= v
            right_top -= v + gap
        ax.set_xlim(-0.45, 1.45)
        ax.set_ylim(min(right_top, last_label_y, last_in_y) - 0.05 * total_in, total_in * 1.08)
        return _svg(fig)


_RC = {
    "svg.hashsalt": "basisbook",
    "svg.fonttype": "none",
    "font.size": 9,
    "font.family": "DejaVu Sans",
    "axes.grid": True,
    "grid.alpha": 0.35,
}


def _render_chart(chart: Chart, title: str) -> str:
    matplotlib, FigureCanvasSVG, Figure = _setup()
    with matplotlib.rc_context(_RC):
        fig = Figure(figsize=(6.4, 5.0))
        FigureCanvasSVG(fig)
        ax = fig.add_subplot(1, 1, 1)
        for i, s in enumerate(chart.series):
            ax.plot(s.x, s.y, _STYLES.get(s.style, "-"), color=_COLOURS[i % len(_COLOURS)],
                    label=s.label, linewidth=1.6)
        for m in chart.markers:
            ax.plot([m.x], [m.y], "o", color="black", markersize=5)
        x0, x1 = ax.get_xlim()
        for m in chart.markers:
            # labels near the right edge go to the left of their point, so none is cut off
            right = m.x > x0 + 0.72 * (x1 - x0)
            ax.annotate(m.label, (m.x, m.y), textcoords="offset points", xytext=(-6 if right else 6, 6),
                        ha="right" if right else "left", fontsize=8, parse_math=False)
        ax.set_xlabel(chart.x_label)
        ax.set_ylabel(chart.y_label)
        ax.set_title(textwrap.fill(title, 78), fontsize=10, parse_math=False)
        if chart.x_range:
            ax.set_xlim(*chart.x_range)
        if chart.y_range:
            ax.set_ylim(*chart.y_range)
        if chart.equal_aspect:
            ax.set_aspect("equal", adjustable="datalim")
        ax.axhline(0, color="0.3", linewidth=0.6)
        ax.axvline(0, color="0.3", linewidth=0.6)
        ncol = 3 if max((len(x.label) for x in chart.series), default=0) <= 26 else 2
        rows = -(-len(chart.series) // ncol)  # legend rows
        bottom = 0.13 + 0.045 * rows
        top = 0.93 if len(title) <= 78 else 0.89
        fig.subplots_adjust(left=0.12, right=0.97, top=top, bottom=bottom + 0.04)
        if chart.series:
            # below the axes, so the legend never hides a curve
            fig.legend(loc="lower center", ncol=ncol, fontsize=8, frameon=False,
                       bbox_to_anchor=(0.5, 0.005))
        return _svg(fig)
