"""Run one command and measure it: wall time, CPU time and memory of its whole process tree.

A build forks a figure helper, so one process's peak RSS is not the whole
story.  While the command runs, a thread samples every process of its tree
every 50 ms and keeps the largest sum of their proportional set sizes (PSS:
pages shared after the fork are split between the processes instead of counted
twice).  CPU time is user + system of the command and every descendant it
waited for, from os.wait4.  Linux only (reads /proc).
"""

from __future__ import annotations

import os
import subprocess
import tempfile
import threading
import time
from dataclasses import dataclass
from pathlib import Path


@dataclass
class Sample:
    wall_s: float
    cpu_s: float
    max_rss_mb: float    # the command's own process
    tree_peak_mb: float  # the whole tree, PSS summed (0 where /proc cannot tell)


def _tree(pid: int) -> list[int]:
    out, todo = [], [pid]
    while todo:
        p = todo.pop()
        out.append(p)
        try:
            for task in os.listdir(f"/proc/{p}/task"):
                with open(f"/proc/{p}/task/{task}/children") as fh:
                    todo.extend(int(c) for c in fh.read().split())
        except OSError:
            pass
    return out


def _pss_kb(pid: int) -> int:
    try:
        with open(f"/proc/{pid}/smaps_rollup") as fh:
            for line in fh:
                if line.startswith("Pss:"):
                    return int(line.split()[1])
    except OSError:
        pass
    return 0


def run_tree(cmd: list[str], cwd: Path | str) -> Sample:
    """Run ``cmd`` to completion; raise SystemExit with its stderr if it fails."""
    peak = [0]
    done = threading.Event()
    with tempfile.TemporaryFile() as err:
        start = time.perf_counter()
        proc = subprocess.Popen(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=err)

        def sample() -> None:
            while not done.is_set():
                peak[0] = max(peak[0], sum(_pss_kb(p) for p in _tree(proc.pid)))
                done.wait(0.05)

        sampler = threading.Thread(target=sample, daemon=True)
        sampler.start()
        # wait4 reaps the child and returns its rusage alone (RUSAGE_CHILDREN would
        # accumulate over every child run so far)
        _, status, usage = os.wait4(proc.pid, 0)
        wall = time.perf_counter() - start
        done.set()
        sampler.join()
        proc.returncode = os.waitstatus_to_exitcode(status)  # tell Popen it is reaped
        if proc.returncode != 0:
            err.seek(0)
            tail = err.read().decode("utf-8", "replace")[-2000:]
            raise SystemExit(f"command failed ({proc.returncode}): {' '.join(cmd)}\n{tail}")
    return Sample(wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss / 1024, peak[0] / 1024)


def precompile(root: Path) -> None:
    """Write the bytecode of basisbook/ and calcs/ (what pip does when it installs a
    package, and Python on a first import unless PYTHONDONTWRITEBYTECODE is set).

    The import floor's libraries come precompiled from pip; without this an
    editable install under PYTHONDONTWRITEBYTECODE would compile our own ~8 000
    lines on every run (about 0.1 s) and the comparison would not be like with like.
    """
    import compileall

    for pkg in ("basisbook", "calcs"):
        compileall.compile_dir(str(root / pkg), quiet=1, force=False)
