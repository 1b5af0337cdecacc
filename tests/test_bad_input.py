"""Bad input: exit code 2 and a message naming file, line, key and what was expected.

Each case edits a copy of the demo project, runs the CLI as a user would and
checks the message; no case may print a traceback or touch an existing site.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from basisbook.commands.cli import main

GEN = "inputs/generators.toml"


def _edit(root: Path, rel: str, old: str, new: str) -> None:
    p = root / rel
    text = p.read_text(encoding="utf-8")
    assert old in text, f"fixture text {old!r} not in {rel}"
    p.write_text(text.replace(old, new, 1), encoding="utf-8")


CORPUS = Path(__file__).resolve().parent / "bad_inputs"
CASES = sorted(CORPUS.glob("*.toml"))


def _apply(root: Path, edit: dict) -> None:
    p = root / edit["file"]
    if edit.get("replace"):
        p.write_text(edit["new"], encoding="utf-8")
    elif "old" not in edit:
        p.write_text((p.read_text(encoding="utf-8") if p.exists() else "") + edit["new"], encoding="utf-8")
    else:
        data = p.read_bytes()
        assert edit["old"].encode() in data, f"corpus edit text {edit['old']!r} not in {edit['file']}"
        p.write_bytes(data.replace(edit["old"].encode(), edit["new"].encode(edit.get("encoding", "utf-8")), 1))


def test_the_corpus_covers_every_module_and_the_load_list() -> None:
    assert len(CASES) >= 60
    names = " ".join(c.stem for c in CASES)
    for topic in ("generator", "excitation", "steam", "chp", "hydro", "gas-turbine", "loadlist", "link",
                  "revision", "site", "toml"):
        assert topic in names, f"no bad-input case for {topic}"


@pytest.mark.parametrize("case", CASES, ids=[c.stem for c in CASES])
def test_bad_input_exit_2_with_the_exact_message(case: Path, demo_copy: Path, tmp_path: Path, capsys) -> None:
    """One file per case in tests/bad_inputs/: the edits to a copy of the demo, and the
    first problem the user must be shown (file, line, key, message), exactly."""
    import tomllib

    spec = tomllib.loads(case.read_text(encoding="utf-8"))
    for edit in spec.get("edit", []):
        _apply(demo_copy, edit)
    command = spec["command"].split()
    archive = demo_copy / "archive"
    before = sorted(p.name for p in archive.iterdir()) if archive.is_dir() else []
    site = tmp_path / "site"
    argv = [command[0], str(demo_copy), *command[1:]]
    if command[0] == "build":
        argv += ["--out", str(site)]
    code = main(argv)
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    exp = spec["expect"]
    where = exp["file"] + (f":{exp['line']}" if "line" in exp else "")
    key = f"[{exp['key']}] " if exp["key"] else ""
    first = err.splitlines()[1].strip()
    assert first == f"{where}: {key}{exp['message']}".replace("PROJECT", str(demo_copy)), err
    assert not site.exists(), "a failed build must write nothing"
    after = sorted(p.name for p in archive.iterdir()) if archive.is_dir() else []
    assert after == before, "a refused archive must write nothing"


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
