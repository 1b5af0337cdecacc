"""Issued revisions: archive, verify, diff, the changes page and its margin markers."""

from __future__ import annotations

import json
import re
import zipfile
from pathlib import Path

import pytest
from sitecheck import check_links

from basisbook.commands.build import snapshot_site
from basisbook.commands.cli import main
from basisbook.revisions.archive import archive
from basisbook.revisions.snapshot import MANIFEST, SEAL_MEMBER
from basisbook.revisions.verify import verify

GEN = "inputs/generators.toml"


def _tree(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def _new_revision(root: Path, rev_id: str, purpose: str = "issued for construction") -> None:
    with open(root / "revisions.toml", "a", encoding="utf-8") as f:
        f.write(f'\n[[revision]]\nid = "{rev_id}"\ndate = 2026-11-20\npurpose = "{purpose}"\n'
                'prepared = "M. Lindqvist"\nchecked = "R. Okafor"\napproved = "S. Varga"\n'
                'notes = "Bigger engine set."\n')


def _edit(root: Path, rel: str, old: str, new: str) -> None:
    p = root / rel
    text = p.read_text(encoding="utf-8")
    assert old in text
    p.write_text(text.replace(old, new, 1), encoding="utf-8")


@pytest.fixture
def archived(single_revision_copy: Path) -> Path:
    """A one-revision demo copy whose revision A has just been archived."""
    archive(single_revision_copy, make_site=snapshot_site)
    return single_revision_copy


def test_archive_holds_site_inputs_results_and_manifest(archived: Path) -> None:
    snap = archived / "archive" / "rev-A"
    manifest = json.loads((snap / MANIFEST).read_text())
    assert (snap / "site" / "index.html").is_file()
    assert (snap / "project" / GEN).read_bytes() == (archived / GEN).read_bytes()
    assert json.loads((snap / "results.json").read_text())["revision"]["id"] == "A"
    assert set(manifest["files"]) == {k for k in _tree(snap) if k not in (MANIFEST, SEAL_MEMBER)}
    assert manifest["file_count"] == len(manifest["files"]) and manifest["format"] == "basisbook snapshot 2"
    for lib in ("CoolProp", "numpy", "matplotlib", "pint", "python"):
        assert manifest["libraries"][lib]
    assert manifest["tool"]["name"] == "basisbook"
    # the archived site opens on its own: every link inside it resolves
    assert check_links(snap / "site") == []
    # the single-file archive holds the same bytes
    with zipfile.ZipFile(archived / "archive" / "rev-A.zip") as z:
        zipped = {n.split("/", 1)[1]: z.read(n) for n in z.namelist()}
    assert zipped == _tree(snap)


def test_verify_passes_on_folder_and_zip_and_rebuild(archived: Path, capsys) -> None:
    assert main(["verify", str(archived / "archive" / "rev-A")]) == 0
    assert main(["verify", str(archived / "archive" / "rev-A.zip"), "--rebuild"]) == 0
    out = capsys.readouterr().out
    assert "16 files unchanged" in out or "files unchanged" in out
    assert "rebuild gives the same results" in out


@pytest.mark.parametrize("rel", ["site/index.html", "site/fig/stg1-capability_chart.svg",
                                 f"project/{GEN}", "results.json", "site/results.json"])
def test_one_changed_byte_fails_verify_naming_the_file(archived: Path, rel: str, capsys) -> None:
    p = archived / "archive" / "rev-A" / rel
    data = bytearray(p.read_bytes())
    data[len(data) // 2] ^= 0x01  # flip one bit of one byte
    p.write_bytes(bytes(data))
    assert main(["verify", str(archived / "archive" / "rev-A")]) == 1
    assert f"changed: {rel}" in capsys.readouterr().out


def test_added_and_missing_files_fail_verify(archived: Path, capsys) -> None:
    snap = archived / "archive" / "rev-A"
    (snap / "site" / "extra.html").write_text("x")
    (snap / "site" / "gen2.html").unlink()
    v = verify(snap)
    assert v.added == ["site/extra.html"] and v.missing == ["site/gen2.html"] and not v.ok


def test_archiving_twice_refuses_and_changes_nothing(archived: Path, capsys) -> None:
    before = _tree(archived / "archive")
    assert main(["archive", str(archived)]) == 2
    assert "already archived" in capsys.readouterr().err
    assert _tree(archived / "archive") == before


def test_archive_refuses_invalid_inputs(single_revision_copy: Path, capsys) -> None:
    root = single_revision_copy
    _edit(root, GEN, "generator_power_factor = 0.8", "generator_power_factor = 1.2")
    assert main(["archive", str(root)]) == 2
    assert "generator_power_factor" in capsys.readouterr().err
    assert not (root / "archive").exists() or not any((root / "archive").iterdir())


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["verify", "{root}/nowhere"], "no such snapshot"),
        (["verify", "{root}/project.toml"], "not a snapshot folder or snapshot zip"),
        (["verify", "{root}/inputs"], "not a basisbook snapshot: no manifest.json"),
        (["diff", "{root}", "A", "Z"], "unknown revision 'Z'"),
    ],
)
def test_bad_revision_arguments_exit_2(demo_copy: Path, args: list[str], message: str, capsys) -> None:
    argv = [a.format(root=demo_copy) for a in args]
    assert main(argv) == 2
    assert message in capsys.readouterr().err


def test_manifest_missing_from_zip_exit_2(tmp_path: Path, capsys) -> None:
    z = tmp_path / "rev-X.zip"
    with zipfile.ZipFile(z, "w") as f:
        f.writestr("rev-X/site/index.html", "<html></html>")
    assert main(["verify", str(z)]) == 2
    assert "no manifest.json" in capsys.readouterr().err


def test_diff_reports_exactly_the_changes_and_their_consequences(archived: Path, capsys) -> None:
    # revision B: a bigger engine set (1.56 -> 1.95 MW); nothing else changes
    _new_revision(archived, "B")
    _edit(archived, GEN, 'generator_active_power = "1560 kW"', 'generator_active_power = "1950 kW"')
    _edit(archived, GEN, 'prime_mover_rating = "1.6 MW"', 'prime_mover_rating = "2.0 MW"')
    assert main(["diff", str(archived), "A", "B"]) == 0
    out = capsys.readouterr().out
    changed_inputs = re.findall(r"changed  (\S+): ", out.split("outputs:")[0])
    assert sorted(changed_inputs) == ["gen2.generator_active_power", "gen2.prime_mover_rating"]
    assert "stg1." not in out  # the steam set is untouched
    # consequence: S = P / cos(phi) grows by the same 25 % (IEC 60034-1 rated output, exact)
    assert re.search(r"gen2\.generator_apparent_power: 1\.950 MVA -> 2\.438 MVA \(\+25 %\)", out), out


def test_changes_page_and_margin_markers(archived: Path, tmp_path: Path) -> None:
    from basisbook.commands.build import build

    _new_revision(archived, "B")
    _edit(archived, GEN, 'generator_active_power = "1560 kW"', 'generator_active_power = "1950 kW"')
    _edit(archived, GEN, 'prime_mover_rating = "1.6 MW"', 'prime_mover_rating = "2.0 MW"')
    site = tmp_path / "site"
    build(archived, site)
    changes = (site / "changes.html").read_text()
    assert "Changes since revision A" in changes
    assert 'href="gen2.html#in-generator_active_power"' in changes
    assert 'href="gen2.html#out-generator_apparent_power"' in changes
    gen2 = (site / "gen2.html").read_text()
    # a marker in words, not colour alone
    assert "changed since rev A: was 1.560" in gen2
    assert "changed since rev A" not in (site / "stg1.html").read_text()
    index = (site / "index.html").read_text()
    assert "archived handbook" in index and "not archived" in index
    assert check_links(site) == []  # including the link into the archived revision A


def test_archive_is_byte_identical_for_the_same_inputs(single_revision_copy: Path, tmp_path: Path) -> None:
    import shutil

    root = single_revision_copy
    other = tmp_path / "elsewhere" / "project"
    shutil.copytree(root, other)
    archive(root, make_site=snapshot_site)
    archive(other, make_site=snapshot_site)
    assert (root / "archive" / "rev-A.zip").read_bytes() == (other / "archive" / "rev-A.zip").read_bytes()


# --- the demo's own two revisions --------------------------------------------------------

DEMO = Path(__file__).resolve().parent.parent / "project"


def test_the_shipped_revision_a_is_unchanged() -> None:
    v = verify(DEMO / "archive" / "rev-A")
    assert v.ok and v.checked > 40, (v.added, v.missing, v.changed)
    assert verify(DEMO / "archive" / "rev-A.zip").ok


def test_demo_revision_b_is_a_bigger_feed_pump_and_a_new_fuel_analysis() -> None:
    from basisbook.reading.project import load
    from basisbook.revisions.diff import compare, results_for

    cmp = compare(results_for(DEMO, "A"), results_for(DEMO, "B"), load(DEMO).change_tolerance)
    # exactly the edits: two fuel inputs and the two feed-pump rows of the load list
    assert {(c.instance, c.name) for c in cmp.of("input")} == {("cycle1", "fuel_lhv_dry"), ("cycle1", "fuel_moisture")}
    rows = {c.name: c for c in cmp.of("row")}
    assert set(rows) == {"load_list[P-101A]", "load_list[P-101B]"}
    assert rows["load_list[P-101A]"].old == {"rated_power": 315.0} and rows["load_list[P-101A]"].new == {"rated_power": 355.0}
    assert not cmp.of("site") and not cmp.of("instance")
    moved = {(c.instance, c.name): c for c in cmp.of("output")}
    # consequences: more auxiliary demand, so less net export; wetter fuel, so more fuel per hour
    assert moved[("aux1", "maximum_demand_active")].new > moved[("aux1", "maximum_demand_active")].old
    assert moved[("plant", "plant_net_export")].new < moved[("plant", "plant_net_export")].old
    fuel = moved[("cycle1", "fuel_mass_flow")]
    # ISO 18125 as-received value: 19.0 (1 - 0.45) - 0.02443 * 45 = 9.35065 MJ/kg in A,
    # 18.6 (1 - 0.50) - 0.02443 * 50 = 8.0785 MJ/kg in B (exact arithmetic); the heat input
    # moves only a little, so the mass flow rises by about 9.35065 / 8.0785 = 1.157
    assert moved[("cycle1", "fuel_lhv")].old == pytest.approx(9.35065, rel=1e-9)
    assert moved[("cycle1", "fuel_lhv")].new == pytest.approx(8.0785, rel=1e-9)
    assert 1.15 < fuel.new / fuel.old < 1.17


def test_the_demo_handbook_shows_the_changes_and_links_the_archived_revision(built_site: Path) -> None:
    changes = (built_site / "changes.html").read_text(encoding="utf-8")
    assert "Changes since revision A" in changes and "load_list[P-101A]" in changes
    index = (built_site / "index.html").read_text(encoding="utf-8")
    assert 'href="archive/rev-A/index.html"' in index
    assert (built_site / "archive" / "rev-A" / "index.html").read_bytes() == \
        (DEMO / "archive" / "rev-A" / "site" / "index.html").read_bytes()
    cycle = (built_site / "cycle1.html").read_text(encoding="utf-8")
    assert "changed since rev A: was 45" in cycle  # the margin marker on the moisture input
    assert check_links(built_site) == []
