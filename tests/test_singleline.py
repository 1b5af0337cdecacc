"""The key single-line diagram renderer: well-formed SVG, links, escaping, determinism."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest

from basisbook.contract.spec import LineElement, SingleLine
from basisbook.rendering.singleline import svg

NS = "{http://www.w3.org/2000/svg}"


def _diagram(label: str = "Grid 33 kV · 750 MVA") -> SingleLine:
    return SingleLine([
        LineElement("grid", "grid", label, None, "", "in-grid_fault_level"),
        LineElement("cb", "breaker", "HV breaker", "grid"),
        LineElement("gsu", "transformer", "GSU 16 MVA · 33/11 kV", "cb", "gsu1", "out-transformer_rated_power"),
        LineElement("bus", "busbar", "Generator bus 11 kV", "gsu", "net1", ""),
        LineElement("gen", "generator", "G 15.6 MVA", "bus", "stg1", "out-generator_apparent_power"),
        LineElement("uat", "transformer", "UAT 1.6 MVA", "bus", "uat1", "in-load_loss"),
        LineElement("aux", "busbar", "Aux board 0.69 kV", "uat", "aux1", "table-bus_summary"),
        LineElement("m", "motor", "Motors", "aux"),
        LineElement("l", "load", "Other loads", "aux"),
    ])


def _parse(text: str) -> ET.Element:
    # inline SVG has no xmlns; add it to parse as a standalone SVG document
    assert "xmlns" not in text
    return ET.fromstring(text.replace("<svg ", '<svg xmlns="http://www.w3.org/2000/svg" ', 1))


def test_well_formed_with_title_and_every_element() -> None:
    root = _parse(svg(_diagram(), "Key single-line diagram"))
    assert root.tag == NS + "svg" and root.find(NS + "title").text == "Key single-line diagram"
    groups = {g.get("id") for g in root.iter(NS + "g")}
    assert groups == {f"sld-{i}" for i in ("grid", "cb", "gsu", "bus", "gen", "uat", "aux", "m", "l")}
    # symbols: two circles for each transformer, a circle with G and with M, a thick bus line
    gsu = next(g for g in root.iter(NS + "g") if g.get("id") == "sld-gsu")
    assert len(gsu.findall(NS + "circle")) == 2
    texts = "".join(t.text or "" for t in root.iter(NS + "text"))
    assert "G" in texts and "M" in texts


def test_every_linked_element_has_an_href() -> None:
    d = _diagram()
    root = _parse(svg(d, "t"))
    hrefs = {}
    for a in root.iter(NS + "a"):
        g = a.find(NS + "g")
        hrefs[g.get("id")[4:]] = a.get("href")
    assert hrefs["gsu"] == "gsu1.html#out-transformer_rated_power"
    assert hrefs["bus"] == "net1.html"            # a link without anchor opens the page
    assert hrefs["grid"] == "#in-grid_fault_level"  # an anchor alone stays on this page
    assert "cb" not in hrefs and "m" not in hrefs   # neither link nor anchor: no <a>
    for e in d.elements:
        assert (e.id in hrefs) == bool(e.link or e.anchor)
    assert "http" not in svg(d, "t").replace('xmlns="http', "")  # no external references


def test_hostile_labels_are_escaped() -> None:
    evil = '<script>alert(1)</script> & "x" · </svg><img src=x onerror=alert(1)>'
    d = _diagram(evil)
    d.elements.append(LineElement("x", "load", "ok", "aux", 'a"><script>', '"onmouseover="x'))
    text = svg(d, '<b>title</b> & "q"')
    assert "<script>" not in text and "<img" not in text and "<b>" not in text
    root = _parse(text)
    joined = " ".join("".join(t.itertext()) for t in root.iter(NS + "text"))
    assert "<script>alert(1)</script> & \"x\"" in joined  # shown as text, not markup
    assert any(a.get("href") == 'a"><script>.html#"onmouseover="x' for a in root.iter(NS + "a"))


def test_deterministic() -> None:
    assert svg(_diagram(), "t") == svg(_diagram(), "t")


@pytest.mark.parametrize(("elements", "message"), [
    ([LineElement("a", "grid", "a"), LineElement("a", "load", "b", "a")], "ids repeat"),
    ([LineElement("a", "grid", "a"), LineElement("b", "capacitor", "b", "a")], "unknown symbol 'capacitor'"),
    ([LineElement("a", "grid", "a"), LineElement("b", "load", "b", "zz")], "hangs from unknown 'zz'"),
    ([LineElement("a", "load", "a", "b"), LineElement("b", "load", "b", "a")], "cycle"),
])
def test_bad_diagrams_are_refused(elements, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        svg(SingleLine(elements), "t")
