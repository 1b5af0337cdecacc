"""Interrupted builds and archives: killed at random moments (SIGKILL, repeated),
site/ always holds the old or the new complete site, and a snapshot is either
absent or complete and verifiable."""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from basisbook.commands.build import build
from basisbook.revisions.verify import verify

pytestmark = pytest.mark.slow  # the quick loop leaves these out; `--full` runs them

ROOT = Path(__file__).resolve().parent.parent
KILLS = int(os.environ.get("BASISBOOK_KILLS", "10"))


def _tree(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


def _start(*args: str) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-m", "basisbook", *args], cwd=ROOT,
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)


def _timed(*args: str) -> float:
    t0 = time.monotonic()
    assert _start(*args).wait(timeout=120) == 0
    return time.monotonic() - t0


def test_killed_builds_leave_the_old_or_the_new_site(demo_copy: Path, tmp_path: Path) -> None:
    site = tmp_path / "site"
    build(demo_copy, site)
    old = _tree(site)
    gen = demo_copy / "inputs" / "generators.toml"
    gen.write_text(gen.read_text().replace('generator_active_power = "12.5 MW"', 'generator_active_power = "13 MW"'))
    ref = tmp_path / "reference-new"
    build(demo_copy, ref)
    new = _tree(ref)
    assert new != old
    duration = _timed("build", str(demo_copy), "--out", str(tmp_path / "timing"))
    rng = random.Random(20261201)  # fixed seed: the same moments on every run
    outcomes = {"old": 0, "new": 0}
    for _ in range(KILLS):
        proc = _start("build", str(demo_copy), "--out", str(site))
        time.sleep(rng.uniform(0.0, duration * 1.1))
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        assert site.is_dir(), "a kill left no site at all"
        now = _tree(site)
        assert now in (old, new), "a kill left a mixed or partial site"
        outcomes["old" if now == old else "new"] += 1
        if now == new:  # start each round from the old site again
            build_old = demo_copy / "inputs" / "generators.toml"
            build_old.write_text(build_old.read_text().replace('"13 MW"', '"12.5 MW"'))
            build(demo_copy, site)
            build_old.write_text(build_old.read_text().replace('"12.5 MW"', '"13 MW"'))
    # the next build tidies what the kills left and completes
    build(demo_copy, site)
    assert _tree(site) == new
    leftovers = [p.name for p in tmp_path.iterdir() if p.name.startswith(".site.")]
    assert leftovers == [], leftovers
    print(f"kills survived: {KILLS} ({outcomes})")


def test_killed_archives_leave_no_half_snapshot(demo_copy: Path, tmp_path: Path) -> None:
    from conftest import reduce_to_first_revision

    reduce_to_first_revision(demo_copy)
    duration = _timed("archive", str(demo_copy))
    snap = demo_copy / "archive" / "rev-A"
    assert verify(snap).ok
    import shutil

    rng = random.Random(7)
    for _ in range(max(KILLS // 2, 3)):
        shutil.rmtree(demo_copy / "archive", ignore_errors=True)
        proc = _start("archive", str(demo_copy))
        time.sleep(rng.uniform(0.0, duration * 1.1))
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        if snap.exists():
            assert verify(snap).ok, "a kill left a snapshot that does not verify"
        # temporary files are hidden (".rev-A.new-*") and never taken for a snapshot
        names = {p.name for p in (demo_copy / "archive").glob("rev-*")}
        assert names in (set(), {"rev-A"}, {"rev-A", "rev-A.zip"}), names
