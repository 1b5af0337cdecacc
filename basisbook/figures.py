"""Draw a calc's Chart data as a deterministic SVG.

matplotlib is imported here only, and only when a figure is drawn, so that
``basisbook check`` never pays for it.  Fixed hash salt, no date metadata and
text kept as text make the SVG byte-identical on a rebuild.
"""

from __future__ import annotations

import hashlib
import io
import json
from typing import Any

from basisbook.spec import Chart

_STYLES = {"solid": "-", "dashed": "--", "dotted": ":", "dashdot": "-."}
# A palette that stays readable in print and for common colour-vision deficiencies;
# line styles also differ, so colour is never the only cue.
_COLOURS = ["#1b4f72", "#b03a2e", "#1e8449", "#7d3c98", "#b9770e", "#5d6d7e"]


def chart_key(chart: Chart) -> str:
    """A hash of everything that shapes the picture (for caching)."""
    data: dict[str, Any] = {
        "x": chart.x_label, "y": chart.y_label, "eq": chart.equal_aspect,
        "xr": chart.x_range, "yr": chart.y_range,
        "s": [[s.label, [float(v) for v in s.x], [float(v) for v in s.y], s.style] for s in chart.series],
        "m": [[m.label, float(m.x), float(m.y)] for m in chart.markers],
    }
    return hashlib.sha256(json.dumps(data, sort_keys=True).encode()).hexdigest()


def render_svg(chart: Chart, title: str) -> str:
    import matplotlib

    matplotlib.use("svg", force=True)
    from matplotlib.backends.backend_svg import FigureCanvasSVG
    from matplotlib.figure import Figure

    rc = {
        "svg.hashsalt": "basisbook",
        "svg.fonttype": "none",
        "font.size": 9,
        "font.family": "DejaVu Sans",
        "axes.grid": True,
        "grid.alpha": 0.35,
    }
    with matplotlib.rc_context(rc):
        fig = Figure(figsize=(6.4, 4.6))
        FigureCanvasSVG(fig)
        ax = fig.add_subplot(1, 1, 1)
        for i, s in enumerate(chart.series):
            ax.plot(s.x, s.y, _STYLES.get(s.style, "-"), color=_COLOURS[i % len(_COLOURS)],
                    label=s.label, linewidth=1.6)
        for m in chart.markers:
            ax.plot([m.x], [m.y], "o", color="black", markersize=5)
            ax.annotate(m.label, (m.x, m.y), textcoords="offset points", xytext=(6, 6), fontsize=8)
        ax.set_xlabel(chart.x_label)
        ax.set_ylabel(chart.y_label)
        ax.set_title(title, fontsize=10)
        if chart.x_range:
            ax.set_xlim(*chart.x_range)
        if chart.y_range:
            ax.set_ylim(*chart.y_range)
        if chart.equal_aspect:
            ax.set_aspect("equal", adjustable="datalim")
        ax.axhline(0, color="0.3", linewidth=0.6)
        ax.axvline(0, color="0.3", linewidth=0.6)
        if chart.series:
            ax.legend(loc="best", fontsize=8, framealpha=0.9)
        fig.tight_layout()
        buf = io.StringIO()
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    return buf.getvalue()
