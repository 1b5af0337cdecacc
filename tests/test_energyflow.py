"""The energy-flow (Sankey) diagram, drawn directly as SVG.

The defining property of a Sankey diagram is that each band's width is
proportional to the quantity it carries (Schmidt, "The Sankey diagram in energy
and material flow management, part I", J. Industrial Ecology 12(1), 2008; from
memory).  The tests read the SVG back and check that, plus what a reader needs:
every label present and none overlapping or cut off, losses marked in words.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET

import pytest

from basisbook.contract.spec import EnergyFlow
from basisbook.rendering import energyflow

NS = {"s": "http://www.w3.org/2000/svg"}

FLOW = EnergyFlow(
    unit="MW",
    inflows=[("Fuel", 40.0), ("Pump work", 0.2)],
    outflows=[("Condenser", 22.0, "loss"), ("Net export", 11.5, "product"),
              ("Boiler loss", 5.7, "loss"), ("Auxiliary load", 1.0, "loss")],
)


def _bands(root: ET.Element) -> list[float]:
    """Left-edge height of each band path (its start and its closing point)."""
    out = []
    for p in root.iterfind("s:path", NS):
        nums = [float(v) for v in re.findall(r"-?\d+(?:\.\d+)?", p.get("d", ""))]
        if p.get("d", "").startswith("M") and "C" in p.get("d", ""):
            out.append(nums[-1] - nums[1])  # last point is (x0, lt + h), first (x0, lt)
    return out


def test_band_heights_proportional_to_energy() -> None:
    root = ET.fromstring(energyflow.svg(FLOW, "Test flow"))
    heights = _bands(root)
    outs = sorted(FLOW.outflows, key=lambda o: o[2] != "product")
    scale = energyflow.BAND_H / sum(v for _, v in FLOW.inflows)
    # coordinates are written to 0.01 px, so each height is good to about 0.02 px
    assert heights == pytest.approx([v * scale for _, v, _k in outs], abs=0.02)


def test_products_first_losses_hatched_and_marked_in_words() -> None:
    text = energyflow.svg(FLOW, "Test flow")
    root = ET.fromstring(text)
    labels = [t.text for t in root.iterfind("s:text", NS) if t.text and ":" in t.text]
    assert labels[0].startswith("Net export: 11.50 MW (28.6 %)")  # 4 significant figures; 11.5 / 40.2
    assert [lb.endswith("[loss]") for lb in labels] == [False, True, True, True]
    fills = [p.get("fill") for p in root.iterfind("s:path", NS) if "C" in p.get("d", "")]
    assert fills == ["#c9dbe9", "url(#loss-hatch)", "url(#loss-hatch)", "url(#loss-hatch)"]


def test_labels_never_overlap_nor_leave_the_canvas() -> None:
    # a tiny loss between two big ones: its label would sit on its neighbours'
    flow = EnergyFlow("kW", [("Fuel", 1000.0)], [("Power", 420.0, "product"), ("A", 1.0, "loss"),
                                                 ("B", 1.0, "loss"), ("C", 578.0, "loss")])
    root = ET.fromstring(energyflow.svg(flow, "x" * 300))
    width = float(root.get("width"))
    ys = []
    for t in root.iterfind("s:text", NS):
        x = float(t.get("x"))
        words = "".join(t.itertext())
        if t.get("text-anchor") is None:  # left-aligned outflow labels
            ys.append(float(t.get("y")))
            assert x + energyflow._text_w(words) <= width, words
        elif t.get("text-anchor") == "end":
            assert x - max(energyflow._text_w(s.text or "") for s in t) >= 0, words
    assert all(b - a >= energyflow.LINE for a, b in zip(ys, ys[1:], strict=False)), ys
    # the 300-character title is wrapped onto several lines, all inside the canvas
    titles = [t for t in root.iterfind("s:text", NS) if t.get("font-size") == str(energyflow.TITLE_FONT)]
    assert len(titles) > 1
    assert all(energyflow._text_w(t.text, energyflow.TITLE_FONT) <= width for t in titles)


def test_hostile_label_is_inert_and_output_deterministic() -> None:
    flow = EnergyFlow("MW", [("<script>alert(1)</script>", 1.0)], [("out & \"q\"", 1.0, "product")])
    text = energyflow.svg(flow, "<b>t</b>")
    assert "<script>" not in text and "&lt;script&gt;" in text
    root = ET.fromstring(text)  # still well-formed XML
    assert not [el for el in root.iter() if el.tag.endswith("script")]
    assert energyflow.svg(flow, "<b>t</b>") == text


def test_no_inflow_is_refused() -> None:
    with pytest.raises(ValueError, match="more than zero"):
        energyflow.svg(EnergyFlow("MW", [("Fuel", 0.0)], [("x", 0.0, "loss")]), "t")
