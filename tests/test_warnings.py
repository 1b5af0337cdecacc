"""Plausibility warnings: physically possible but suspicious inputs build the
handbook with a visible warning on the page and in the summary, never silently
(and never as an error)."""

from __future__ import annotations

from pathlib import Path

import pytest

from basisbook.commands.build import build


def _edit(root: Path, rel: str, old: str, new: str) -> None:
    p = root / rel
    text = p.read_text(encoding="utf-8")
    assert old in text, old
    p.write_text(text.replace(old, new, 1), encoding="utf-8")


@pytest.mark.parametrize(
    ("rel", "old", "new", "instance", "words"),
    [
        ("inputs/steam_cycle.toml", "generator_efficiency = 0.975", "generator_efficiency = 0.85", "cycle1",
         "generator efficiency 0.85 is below 0.90"),
        ("inputs/steam_cycle.toml", "exhaust_quality_limit = 0.88", "exhaust_quality_limit = 0.90", "cycle1",
         "turbine exhaust wetness"),
        ("loads/stg1-auxiliaries.csv", "P-101A,Boiler feed pump A,feed water,section_a,355 kW,",
         "P-101A,Boiler feed pump A,feed water,section_a,2355 kW,", "aux1",
         "auxiliary consumption"),
    ],
)
def test_suspicious_input_builds_with_a_visible_warning(demo_copy: Path, tmp_path: Path, rel: str, old: str,
                                                        new: str, instance: str, words: str) -> None:
    _edit(demo_copy, rel, old, new)
    site = tmp_path / "site"
    build(demo_copy, site)  # a warning is not an error: the handbook is built
    page = (site / f"{instance}.html").read_text(encoding="utf-8")
    index = (site / "index.html").read_text(encoding="utf-8")
    for html in (page, index):
        assert '<span class="flag">Warning</span>' in html and words in html
