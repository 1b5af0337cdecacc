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

from basisbook.contract.spec import Chart, EnergyFlow

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
        from basisbook.rendering.energyflow import svg  # drawn directly: no axes, no matplotlib

        return svg(chart, title)
    return _render_chart(chart, title)


def _setup() -> tuple[Any, Any, Any]:
    import matplotlib

    matplotlib.use("svg", force=True)
    from matplotlib.backends.backend_svg import FigureCanvasSVG
    from matplotlib.figure import Figure

    return matplotlib, FigureCanvasSVG, Figure


def warm_up() -> None:
    """Import matplotlib and draw one throwaway chart, so the font and text caches
    are loaded before the first real figure (a figure helper does this while the
    main process is still loading the project)."""
    from basisbook.contract.spec import Series

    render_svg(Chart(x_label="x", y_label="y", series=[Series("s", [0.0, 1.0], [0.0, 1.0])]), "warm-up")


def _svg(fig: Any) -> str:
    # a fixed layout (no "tight" bounding box): one draw instead of two, same bytes every time
    buf = io.StringIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    return buf.getvalue()


_RC = {
    "svg.hashsalt": "basisbook",
    "svg.fonttype": "none",
    "font.size": 9,
    "font.family": "DejaVu Sans",
    "axes.grid": True,
    "grid.alpha": 0.35,
}


_LEGEND_FONT = 8  # pt
_HANDLE = 0.045    # legend line length, fraction of the figure width
_LEGEND_PITCH = 0.045  # legend row pitch, fraction of the figure height


def _legend_shape(chart: Chart) -> tuple[int, int]:
    """(columns, rows) of the legend: as many columns as the longest label allows."""
    longest = max((len(s.label) for s in chart.series), default=0)
    # 0.6 em a character errs wide for DejaVu Sans; 6.4 in wide figure, 0.35 in handle
    need = 0.35 + longest * 0.6 * _LEGEND_FONT / 72
    ncol = max(1, min(3, int(5.8 // need)))
    return ncol, -(-len(chart.series) // ncol)


def _legend(fig: Any, chart: Chart, ncol: int, rows: int) -> None:
    """The legend below the axes (so it never hides a curve), column by column.

    Drawn as plain lines and texts: matplotlib's own legend lays itself out with
    nested packing boxes, a third of a chart's drawing time.
    """
    from matplotlib.lines import Line2D

    width = 0.91 / ncol
    for i, s in enumerate(chart.series):
        col, row = divmod(i, rows)
        x = 0.06 + col * width
        y = 0.025 + (rows - 1 - row) * _LEGEND_PITCH
        fig.add_artist(Line2D([x, x + _HANDLE], [y, y], transform=fig.transFigure, linewidth=1.6,
                              linestyle=_STYLES.get(s.style, "-"), color=_COLOURS[i % len(_COLOURS)]))
        fig.text(x + _HANDLE + 0.012, y, s.label, va="center", fontsize=_LEGEND_FONT, parse_math=False)


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
        # a fixed title position: matplotlib otherwise measures every tick label to place it
        ax.set_title(textwrap.fill(title, 78), fontsize=10, parse_math=False, y=1.0, pad=6)
        if chart.x_range:
            ax.set_xlim(*chart.x_range)
        if chart.y_range:
            ax.set_ylim(*chart.y_range)
        if chart.equal_aspect:
            ax.set_aspect("equal", adjustable="datalim")
        from matplotlib.ticker import MaxNLocator

        for axis in (ax.xaxis, ax.yaxis):  # about six ticks read well and draw faster than nine
            axis.set_major_locator(MaxNLocator(nbins=6, steps=[1, 2, 2.5, 5, 10]))
        ax.axhline(0, color="0.3", linewidth=0.6)
        ax.axvline(0, color="0.3", linewidth=0.6)
        ncol, rows = _legend_shape(chart)
        bottom = 0.13 + 0.045 * rows
        top = 0.93 if len(title) <= 78 else 0.89
        fig.subplots_adjust(left=0.12, right=0.97, top=top, bottom=bottom + 0.04)
        _legend(fig, chart, ncol, rows)
        return _svg(fig)
