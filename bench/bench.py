"""Measure what a cold build costs on this machine, against the floor set by imports alone.

Every number is a whole-process wall time of a fresh subprocess (what a user waits for),
taken as the median of --runs runs.  CPU s is user + system time of the command and
its figure helper (more than the wall time when both cores work).  Peak RSS is the
command's own process (os.wait4); "all processes" is the largest sum of PSS over its
whole process tree, sampled every 50 ms (bench/_measure.py).  The bytecode of
basisbook/ and calcs/ is written first, as an installed package has it (the floor's
libraries come precompiled from pip).  Nothing is asserted:
this prints numbers for a human (or --json for a script) to compare over time.

    python bench/bench.py [--runs 5] [--project project] [--json]
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import shutil
import statistics
import sys
import tempfile
from collections.abc import Callable
from dataclasses import asdict, dataclass
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(Path(__file__).resolve().parent))
from _measure import Sample, precompile, run_tree  # noqa: E402

# The libraries a full build cannot avoid; a build can never start faster than this.
IMPORT_FLOOR = (
    "import jinja2, markdown_it, matplotlib, matplotlib.figure, matplotlib.backends.backend_svg, "
    "numpy, pint, latex2mathml.converter, CoolProp.CoolProp; pint.UnitRegistry()"
)


@dataclass
class Measure:
    name: str
    command: list[str]
    samples: list[Sample]

    @property
    def median_s(self) -> float:
        return statistics.median(s.wall_s for s in self.samples)

    @property
    def min_s(self) -> float:
        return min(s.wall_s for s in self.samples)

    @property
    def max_s(self) -> float:
        return max(s.wall_s for s in self.samples)

    @property
    def peak_rss_mb(self) -> float:
        return max(s.max_rss_mb for s in self.samples)

    @property
    def cpu_s(self) -> float:
        return statistics.median(s.cpu_s for s in self.samples)

    @property
    def tree_peak_mb(self) -> float:
        return max(s.tree_peak_mb for s in self.samples)


def measure(commands: dict[str, Callable[[int], list[str]]], runs: int, cwd: Path) -> list[Measure]:
    """Run every command once per round, round after round, so a slow spell on the
    machine spreads over all measures instead of skewing one."""
    samples: dict[str, list[Sample]] = {name: [] for name in commands}
    for i in range(runs):
        for name, make_cmd in commands.items():
            samples[name].append(run_tree(make_cmd(i), cwd))
    return [Measure(name, make_cmd(0), samples[name]) for name, make_cmd in commands.items()]


def basisbook_cmd() -> list[str]:
    """The installed console script (what users run), else the module."""
    exe = shutil.which("basisbook")
    return [exe] if exe else [sys.executable, "-m", "basisbook"]


def bench(project: Path, runs: int) -> dict[str, Any]:
    project = project.resolve()
    if not (project / "project.toml").is_file():
        raise SystemExit(f"{project}: not a project folder (no project.toml)")
    tool = basisbook_cmd()
    precompile(ROOT)
    with tempfile.TemporaryDirectory(prefix="basisbook-bench-") as tmp:
        scratch = Path(tmp)
        # run from an empty folder so nothing in the current directory is picked up;
        # a new output folder each build run: no previous site, no cache left in it
        bare, floor, cold, check = measure({
            "python -c pass": lambda i: [sys.executable, "-c", "pass"],
            "import floor": lambda i: [sys.executable, "-c", IMPORT_FLOOR],
            "cold build": lambda i: tool + ["build", str(project), "--out", str(scratch / f"site{i}")],
            "check": lambda i: tool + ["check", str(project)],
        }, runs, scratch)
    rows = [bare, floor, cold, check]
    return {
        "machine": {"python": platform.python_version(), "platform": platform.platform(),
                    "cpus": os.cpu_count()},
        "project": str(project),
        "runs": runs,
        "results": {
            m.name: {"median_s": round(m.median_s, 4), "min_s": round(m.min_s, 4), "max_s": round(m.max_s, 4),
                     "peak_rss_mb": round(m.peak_rss_mb, 1), "cpu_s": round(m.cpu_s, 4),
                     "tree_peak_pss_mb": round(m.tree_peak_mb, 1), "command": m.command,
                     "samples": [asdict(s) for s in m.samples]}
            for m in rows
        },
        "ratios": {
            "cold_build_over_import_floor": round(cold.median_s / floor.median_s, 3),
            "cold_build_minus_import_floor_s": round(cold.median_s - floor.median_s, 4),
            "check_over_cold_build": round(check.median_s / cold.median_s, 3),
            "check_over_import_floor": round(check.median_s / floor.median_s, 3),
        },
    }


def table(doc: dict[str, Any]) -> str:
    r, q = doc["results"], doc["ratios"]
    lines = [
        f"basisbook bench: {doc['project']}",
        f"python {doc['machine']['python']} on {doc['machine']['platform']}, {doc['machine']['cpus']} CPUs, "
        f"median of {doc['runs']} runs (whole-process wall time)",
        "",
        f"{'measure':<16} {'median s':>9} {'min s':>7} {'max s':>7} {'CPU s':>7} {'peak RSS MB':>12} "
        f"{'all processes MB':>17}",
    ]
    for name in ("python -c pass", "import floor", "cold build", "check"):
        m = r[name]
        lines.append(f"{name:<16} {m['median_s']:>9.3f} {m['min_s']:>7.3f} {m['max_s']:>7.3f} "
                     f"{m['cpu_s']:>7.3f} {m['peak_rss_mb']:>12.1f} {m['tree_peak_pss_mb']:>17.1f}")
    lines += [
        "",
        f"cold build / import floor   {q['cold_build_over_import_floor']:.2f}x",
        f"cold build - import floor   {q['cold_build_minus_import_floor_s']:+.3f} s",
        f"check / cold build          {q['check_over_cold_build']:.2f}x",
        f"check / import floor        {q['check_over_import_floor']:.2f}x",
    ]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description="Time the import floor, a cold build and a check of a project.")
    ap.add_argument("--runs", type=int, default=5, help="runs per measure; the median is reported (default 5)")
    ap.add_argument("--project", type=Path, default=ROOT / "project", help="project folder (default: the demo)")
    ap.add_argument("--json", action="store_true", help="print machine-readable results instead of the table")
    args = ap.parse_args(argv)
    if args.runs < 1:
        ap.error("--runs must be at least 1")
    doc = bench(args.project, args.runs)
    print(json.dumps(doc, indent=1) if args.json else table(doc))
    return 0


if __name__ == "__main__":
    sys.exit(main())
