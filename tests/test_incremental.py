"""Incremental builds: after any sequence of edits the site is byte-identical to a
clean build, unchanged calcs are not re-run and unchanged files are not rewritten."""

from __future__ import annotations

from pathlib import Path

from basisbook.commands.build import Builder, build

GEN = "inputs/generators.toml"


def _tree(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def _edit(root: Path, rel: str, old: str, new: str) -> None:
    p = root / rel
    text = p.read_text(encoding="utf-8")
    assert old in text, old
    p.write_text(text.replace(old, new, 1), encoding="utf-8")


def test_sequence_of_edits_matches_clean_builds(demo_copy: Path, tmp_path: Path) -> None:
    live = tmp_path / "live"
    builder = Builder(demo_copy, live)
    first = builder.build()
    assert first.calcs_reused == 0 and first.files_written > 0

    # nothing changed: nothing re-run, nothing drawn, nothing written
    again = builder.build()
    assert (again.calcs_run, again.figures_drawn, again.files_written) == (0, 0, 0), again
    assert again.rerun == []

    edits = [
        ('generator_active_power = "1560 kW"', 'generator_active_power = "1500 kW"'),  # one calc
        ('altitude = "145 m"', 'altitude = "300 m"'),                                  # site only
        ("turns_per_phase = 20", "turns_per_phase = 22"),
        ('generator_active_power = "1500 kW"', 'generator_active_power = "1560 kW"'),  # back again
        # no value changes, only where they stand: every input's line number moves on the pages
        ("# Invented demo data", "# A comment line added above.\n# Invented demo data"),
        ('generator_active_power = "12.5 MW"', '# a comment among the inputs\ngenerator_active_power = "12.5 MW"'),
        ("condensing extraction steam turbine.", "condensing extraction steam turbine (notes edited)."),
    ]
    for n, (old, new) in enumerate(edits):
        rel = "project.toml" if "altitude" in old else GEN
        _edit(demo_copy, rel, old, new)
        stats = builder.build()
        clean = tmp_path / f"clean-{n}"
        build(demo_copy, clean)
        assert _tree(live) == _tree(clean), f"after edit {n}: incremental differs from clean"
        if "kW" in old:  # gen2 and what it feeds re-run; the steam unit does not
            assert "gen2" in stats.rerun and "stg1" not in stats.rerun and stats.calcs_reused >= 1, stats
        if "turns_per_phase" in old:
            assert "stg1" in stats.rerun and "gen2" not in stats.rerun, stats
        if "altitude" in old:  # only calcs linked to the altitude re-run; most files stay as they are
            assert "stg1" not in stats.rerun and "gen2" not in stats.rerun, stats
            assert stats.files_written < first.files_written / 2, stats


def test_a_removed_instance_removes_its_files(demo_copy: Path, tmp_path: Path) -> None:
    # a spare generator in a file of its own, then the file is deleted
    text = (demo_copy / GEN).read_text(encoding="utf-8")
    block = text[text.index("[[instance]]"): text.index("[[instance]]", text.index("[[instance]]") + 1)]
    (demo_copy / "inputs" / "spare.toml").write_text(block.replace('id = "stg1"', 'id = "spare3"'), encoding="utf-8")
    live = tmp_path / "live"
    builder = Builder(demo_copy, live)
    builder.build()
    assert (live / "spare3.html").is_file()
    (demo_copy / "inputs" / "spare.toml").unlink()
    stats = builder.build()
    assert not (live / "spare3.html").exists() and not (live / "fig" / "spare3-capability_chart.svg").exists()
    assert stats.files_removed >= 2 and stats.rerun == [], stats
    clean = tmp_path / "clean"
    build(demo_copy, clean)
    assert _tree(live) == _tree(clean)


def test_a_broken_edit_keeps_the_last_good_site(demo_copy: Path, tmp_path: Path) -> None:
    import pytest

    from basisbook.contract.errors import ProjectError

    live = tmp_path / "live"
    builder = Builder(demo_copy, live)
    builder.build()
    before = _tree(live)
    _edit(demo_copy, GEN, "generator_power_factor = 0.8", "generator_power_factor = 8")
    with pytest.raises(ProjectError, match="generator_power_factor"):
        builder.build()
    assert _tree(live) == before
    _edit(demo_copy, GEN, "generator_power_factor = 8", "generator_power_factor = 0.8")
    builder.build()
    assert _tree(live) == before


def test_partial_sync_writes_but_never_removes(tmp_path: Path) -> None:
    from basisbook.commands.build import sync

    out = tmp_path / "site"
    known: dict = {}
    assert sync({"a.html": b"a", "b.html": b"b"}, out, known) == (2, 0)
    assert sync({"a.html": b"A"}, out, known, remove=False) == (1, 0)  # b.html stays
    assert (out / "b.html").read_bytes() == b"b" and set(known) == {"a.html", "b.html"}
    assert sync({"a.html": b"A"}, out, known) == (0, 1)  # the full sync removes it
    assert not (out / "b.html").exists()
