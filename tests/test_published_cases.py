"""Every module's PUBLISHED_CASES agree with their published numbers.

The same cases are run at build time for the handbook's verification appendix,
so what a reviewer reads there is exactly what this test asserts.
"""

from __future__ import annotations

import pytest

from basisbook.reading import catalog

CASES = catalog.published_cases()


def test_every_calc_module_has_published_cases() -> None:
    kinds = {k for k, _ in CASES}
    assert set(catalog.kinds()) <= kinds, f"modules without published cases: {set(catalog.kinds()) - kinds}"


@pytest.mark.parametrize(("kind", "case"), CASES, ids=[f"{k}: {c.case}" for k, c in CASES])
def test_published_case(kind: str, case) -> None:
    value, ok = case.run()
    assert case.source and case.basis
    assert ok, f"{case.case}: computed {value} vs published {case.expected} ± {case.tolerance} {case.unit}"


def test_appendix_shows_every_case(built_site) -> None:
    page = (built_site / "verification.html").read_text(encoding="utf-8")
    for _kind, case in CASES:
        assert case.case in page
    assert "DISAGREES" not in page and "✗ disagrees" not in page
