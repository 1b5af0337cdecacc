"""Draw a calc's Chart data as a deterministic SVG.

matplotlib is imported here only, and only when a figure is drawn, so that
``basisbook check`` never pays for it.  Fixed hash salt, no date metadata and
text kept as text make the SVG byte-identical on a rebuild.
"""

from __future__ import annotations

import hashlib
import io
import json
import re
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
        fig.text(x + _HANDLE + 0.012, y, trade_notation(s.label), va="center", fontsize=_LEGEND_FONT)


_SUBSCRIPTED = re.compile(r"(?<![A-Za-z0-9\\])([A-Za-z])('{0,2})_([A-Za-z0-9]+)")


def trade_notation(text: str) -> str:
    """A label in the notation of the trade, as matplotlib mathtext: ``U/U_r`` -> U/U with
    an upright subscript r, ``x''_d`` with a double prime, ``I_f`` -> I with subscript f.  Any
    other ``$`` is kept as a dollar sign.  The calcs write labels in plain text; drawing them
    is the renderer's job."""
    escaped = text.replace("$", r"\$")

    def sub(m: re.Match[str]) -> str:
        prime = {"": "", "'": r"^{\prime}", "''": r"^{\prime\prime}"}[m.group(2)]
        return f"${m.group(1)}{prime}_{{\\mathrm{{{m.group(3)}}}}}$"

    # a ratio of a quantity to its rated value (U/U_r) is one symbol
    escaped = _RATIO.sub(lambda m: f"${m.group(1)}/{m.group(2)}_{{\\mathrm{{{m.group(3)}}}}}$", escaped)
    return _SUBSCRIPTED.sub(sub, escaped)


_RATIO = re.compile(r"(?<![A-Za-z0-9\\$])([A-Za-z])/([A-Za-z])_([A-Za-z0-9]+)")


def _marker_labels(ax: Any, chart: Chart) -> None:
    """Each marker's label beside its point, on the side (up or down, right or left) where
    it covers the fewest points of the lines and no other label, and never past the axes."""
    import numpy as np

    to_px = ax.transData.transform
    lines = [to_px(np.column_stack([np.asarray(s.x, float), np.asarray(s.y, float)]))
             for s in chart.series if len(s.x)]
    points = np.vstack(lines) if lines else np.empty((0, 2))
    box = ax.get_window_extent()
    dpi = ax.figure.dpi
    taken: list[tuple[float, float, float, float]] = []
    for m in chart.markers:
        label = trade_notation(m.label)
        px, py = to_px((m.x, m.y))
        w = 0.55 * 8 * len(m.label) * dpi / 72  # about 0.55 em a character at 8 pt
        h = 11 * dpi / 72
        best = None
        for dx, dy in ((1, 1), (-1, 1), (1, -1), (-1, -1)):
            x0 = px + dx * 6 * dpi / 72 - (w if dx < 0 else 0)
            y0 = py + dy * 6 * dpi / 72 - (h if dy < 0 else 0)
            rect = (x0, y0, x0 + w, y0 + h)
            outside = rect[0] < box.x0 or rect[2] > box.x1 or rect[1] < box.y0 or rect[3] > box.y1
            covered = int(np.count_nonzero((points[:, 0] >= rect[0]) & (points[:, 0] <= rect[2])
                                           & (points[:, 1] >= rect[1]) & (points[:, 1] <= rect[3])))
            clash = sum(1 for o in taken if not (rect[2] < o[0] or rect[0] > o[2] or rect[3] < o[1]
                                                  or rect[1] > o[3]))
            score = (outside, clash, covered)
            if best is None or score < best[0]:
                best = (score, dx, dy, rect)
        assert best is not None
        _, dx, dy, rect = best
        taken.append(rect)
        ax.annotate(label, (m.x, m.y), textcoords="offset points", xytext=(6 * dx, 6 * dy),
                    ha="left" if dx > 0 else "right", va="bottom" if dy > 0 else "top", fontsize=8)


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
        ax.set_xlabel(trade_notation(chart.x_label))
        ax.set_ylabel(trade_notation(chart.y_label))
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
        # last, once the axes have their final place and limits
        ax.get_xlim(), ax.get_ylim()
        if chart.equal_aspect:
            ax.apply_aspect()
        _marker_labels(ax, chart)
        return _svg(fig)
