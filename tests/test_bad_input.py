"""Bad input: exit code 2 and a message naming file, line, key and what was expected.

Each case edits a copy of the demo project, runs the CLI as a user would and
checks the message; no case may print a traceback or touch an existing site.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from basisbook.cli import main

GEN = "inputs/generators.toml"


def _edit(root: Path, rel: str, old: str, new: str) -> None:
    p = root / rel
    text = p.read_text(encoding="utf-8")
    assert old in text, f"fixture text {old!r} not in {rel}"
    p.write_text(text.replace(old, new, 1), encoding="utf-8")


def _line_of(root: Path, rel: str, needle: str) -> int:
    """The last line holding ``needle`` (the edited one, for a duplicate)."""
    hits = [n for n, line in enumerate((root / rel).read_text(encoding="utf-8").splitlines(), start=1)
            if needle in line]
    assert hits, needle
    return hits[-1]


# (id, file, old text, new text, expected message pattern, line needle or None)
CASES = [
    ("malformed-toml", GEN, 'generator_voltage = "11 kV"', 'generator_voltage = "11 kV', r"not valid TOML", 'generator_voltage = "11 kV'),
    ("unknown-key-suggests", GEN, "prime_mover_speed = \"3000 rpm\"", "prime_mover_sped = \"3000 rpm\"",
     r"\[stg1\.prime_mover_sped\] unknown input for synchronous_generator; did you mean 'prime_mover_speed'", "prime_mover_sped"),
    ("missing-input", GEN, 'generator_voltage = "11 kV"\n', "",
     r"\[stg1\.generator_voltage\] missing input: expected rated line-to-line terminal voltage", None),
    ("wrong-dimension", GEN, '"11 kV"', '"11 kg"', r"\[stg1\.generator_voltage\] wrong dimension: '11 kg' is a mass, expected a voltage in kV", "11 kg"),
    ("power-factor-above-one", GEN, "generator_power_factor = 0.8", "generator_power_factor = 1.2",
     r"\[stg1\.generator_power_factor\] out of range: 1\.2 given, allowed \(0, 1\]", "= 1.2"),
    ("negative-power", GEN, '"12.5 MW"', '"-12.5 MW"', r"\[stg1\.generator_active_power\] out of range: -12\.5 MW given", "-12.5 MW"),
    ("nan", GEN, "winding_factor = 0.915", "winding_factor = nan", r"\[stg1\.winding_factor\] expected a finite number", "= nan"),
    ("inf", GEN, "turns_per_phase = 20", "turns_per_phase = inf", r"\[stg1\.turns_per_phase\] expected a finite number", "= inf"),
    ("text-for-number", GEN, "turns_per_phase = 20", 'turns_per_phase = "twenty"',
     r"\[stg1\.turns_per_phase\] expected a number with a unit of no unit .*could not read 'twenty'", "twenty"),
    ("boolean-for-number", GEN, "turns_per_phase = 20", "turns_per_phase = true", r"got a true/false value", "= true"),
    ("bad-choice", GEN, 'rotor_type = "cylindrical"', 'rotor_type = "cylindric"',
     r"\[stg1\.rotor_type\] expected one of .*did you mean 'cylindrical'", "cylindric"),
    ("duplicate-instance-id", GEN, 'id = "gen2"', 'id = "stg1"', r"duplicate instance id 'stg1' \(first defined in inputs/generators.toml:\d+\)", 'id = "stg1"'),
    ("link-missing-instance", GEN, '{ from = "site.grid_frequency" }', '{ from = "stg9.rated_frequency" }',
     r"link to stg9\.rated_frequency: no instance 'stg9'", "stg9"),
    ("link-missing-output", GEN, 'armature_resistance = "0.01 pu"', 'armature_resistance = { from = "stg1.armature_resistanse" }',
     r"link to stg1\.armature_resistanse: synchronous_generator has no output or input 'armature_resistanse'", "armature_resistanse"),
    ("link-missing-site-value", GEN, '{ from = "site.grid_frequency" }', '{ from = "site.grid_frequencies" }',
     r"link to site\.grid_frequencies: the site has no such value", "grid_frequencies"),
    ("link-bad-form", GEN, '{ from = "site.grid_frequency" }', '{ form = "site.grid_frequency" }',
     r"a link has only the key 'from'; unknown 'form'", "form ="),
    ("link-wrong-dimension", GEN, 'armature_resistance = "0.01 pu"', 'armature_resistance = { from = "stg1.generator_current" }',
     r"\[gen2\.armature_resistance\] link to stg1\.generator_current \(A\): wrong dimension", "stg1.generator_current"),
    ("unknown-calc", GEN, 'calc = "synchronous_generator"', 'calc = "synchronous_genrator"',
     r"unknown calc 'synchronous_genrator'.*did you mean 'synchronous_generator'", "synchronous_genrator"),
    ("bad-instance-id", GEN, 'id = "gen2"', 'id = "Gen 2"', r"\[id\] expected an instance id", 'id = "Gen 2"'),
    ("site-unknown-key", "project.toml", 'altitude = "145 m"', 'altitud = "145 m"', r"\[site\.altitud\] unknown key; did you mean 'altitude'", "altitud"),
    ("site-out-of-range", "project.toml", '"36 degC"', '"136 degC"', r"\[site\.ambient_temperature_max\] out of range: 136 degC given", "136 degC"),
    ("revision-bad-purpose", "revisions.toml", '"issued for review"', '"issued for reveiw"',
     r"\[revision\.purpose\] expected one of: .*did you mean 'issued for review'", "reveiw"),
    ("revision-bad-date", "revisions.toml", "date = 2026-10-12", 'date = "12/10/2026"', r"\[revision\.date\] expected a date like", "12/10/2026"),
    ("revision-missing-signoff", "revisions.toml", 'checked = "R. Okafor"\n', "", r"\[revision\.checked\] missing: each revision states its checked", None),
    ("not-utf8", GEN, "Invented demo data", "Invented d\udce9mo data", r"the file is not UTF-8 text", None),
]


@pytest.mark.parametrize("case", CASES, ids=[c[0] for c in CASES])
def test_bad_input_exit_2_with_clear_message(case, demo_copy: Path, tmp_path: Path, capsys) -> None:
    _id, rel, old, new, pattern, needle = case
    if "\udce9" in new:
        p = demo_copy / rel
        p.write_bytes(p.read_bytes().replace(old.encode(), new.encode("utf-8", "surrogateescape"), 1))
    else:
        _edit(demo_copy, rel, old, new)
    site = tmp_path / "site"
    code = main(["build", str(demo_copy), "--out", str(site)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    assert re.search(pattern, err), err
    assert rel.split("/")[-1] in err
    if needle is not None:
        line = _line_of(demo_copy, rel, needle)
        assert f"{rel}:{line}:" in err, err
    assert not site.exists(), "a failed build must write nothing"


def test_check_command_reports_all_problems_at_once(demo_copy: Path, capsys) -> None:
    _edit(demo_copy, GEN, "generator_power_factor = 0.8", "generator_power_factor = 1.2")
    _edit(demo_copy, GEN, '"11 kV"', '"11 kg"')
    code = main(["check", str(demo_copy)])
    err = capsys.readouterr().err
    assert code == 2
    assert "2 problems" in err
    assert "generator_power_factor" in err and "generator_voltage" in err


def test_link_cycle_is_rejected(demo_copy: Path, capsys) -> None:
    # stg1 takes a value from gen2 and gen2 from stg1: the engine must refuse, naming the cycle.
    _edit(demo_copy, GEN, "turns_per_phase = 20", 'turns_per_phase = { from = "gen2.pole_count" }')
    _edit(demo_copy, GEN, "turns_per_phase = 4", 'turns_per_phase = { from = "stg1.pole_count" }')
    code = main(["check", str(demo_copy)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert re.search(r"link cycle: (stg1 -> gen2 -> stg1|gen2 -> stg1 -> gen2)", err), err


def test_missing_project_files(tmp_path: Path, capsys) -> None:
    (tmp_path / "empty").mkdir()
    code = main(["check", str(tmp_path / "empty")])
    err = capsys.readouterr().err
    assert code == 2
    assert "project.toml: missing" in err
    assert "revisions.toml: missing" in err
    assert "no calc inputs" in err


def test_failed_build_leaves_previous_site_intact(demo_copy: Path, tmp_path: Path, capsys) -> None:
    site = tmp_path / "site"
    assert main(["build", str(demo_copy), "--out", str(site)]) == 0
    before = {p.relative_to(site): p.read_bytes() for p in site.rglob("*") if p.is_file()}
    _edit(demo_copy, GEN, "generator_power_factor = 0.8", "generator_power_factor = 1.2")
    assert main(["build", str(demo_copy), "--out", str(site)]) == 2
    after = {p.relative_to(site): p.read_bytes() for p in site.rglob("*") if p.is_file()}
    assert before == after
    leftovers = [p.name for p in tmp_path.iterdir() if p.name.startswith(".site.")]
    assert leftovers == []


def test_refuses_to_replace_a_folder_that_is_not_a_site(demo_copy: Path, tmp_path: Path, capsys) -> None:
    precious = tmp_path / "docs"
    precious.mkdir()
    (precious / "thesis.txt").write_text("do not delete")
    assert main(["build", str(demo_copy), "--out", str(precious)]) == 2
    assert "is not a basisbook site" in capsys.readouterr().err
    assert (precious / "thesis.txt").read_text() == "do not delete"


def test_out_that_is_a_file_is_refused(demo_copy: Path, tmp_path: Path, capsys) -> None:
    target = tmp_path / "site.txt"
    target.write_text("not a folder")
    assert main(["build", str(demo_copy), "--out", str(target)]) == 2
    assert "is a file, not a folder" in capsys.readouterr().err
    assert target.read_text() == "not a folder"
