"""The figure helper process: same bytes as drawing in-process, and never a
problem of its own (a dead helper or a chart it cannot draw falls back to the
main process; a killed build leaves no helper behind)."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from conftest import DEMO

from basisbook.commands.build import build
from basisbook.contract.spec import Chart, EnergyFlow, Series
from basisbook.rendering import figure_worker, figures
from basisbook.rendering.figure_worker import FigureWorker
from basisbook.rendering.site import RenderCache

needs_helper = pytest.mark.skipif(not figure_worker.wanted(), reason="no figure helper on this machine")


def _tree(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


CHART = Chart("x (m)", "y (m)", [Series("line", [0.0, 1.0, 2.0], [0.0, 1.0, 4.0]),
                                 Series("other", [0.0, 2.0], [1.0, 1.0], "dashed")])


def test_processes_setting_turns_the_helper_off(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("BASISBOOK_PROCESSES", "1")
    assert not figure_worker.wanted()
    assert FigureWorker.start() is None


@needs_helper
def test_site_is_the_same_with_and_without_the_helper(built_site: Path, tmp_path: Path,
                                                      monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("BASISBOOK_PROCESSES", "1")
    build(DEMO, tmp_path / "single")
    single, parallel = _tree(tmp_path / "single"), _tree(built_site)
    assert single.keys() == parallel.keys()
    assert [k for k in single if single[k] != parallel[k]] == []


@needs_helper
def test_helper_draws_what_the_main_process_would() -> None:
    cache = RenderCache(FigureWorker.start())
    try:
        cache.start()
        key = cache.request(CHART, "A chart")
        flow_key = cache.request(EnergyFlow("MW", [("in", 1.0)], [("out", 1.0, "product")]), "flow")
        assert key in cache._waiting and flow_key in cache.figures  # energy flows never leave
        cache.fetch()
        assert cache.figures[key] == figures.render_svg(CHART, "A chart")
    finally:
        cache.close()


@needs_helper
def test_a_dead_helper_falls_back_to_drawing_here() -> None:
    worker = FigureWorker.start()
    assert worker is not None
    cache = RenderCache(worker)
    try:
        cache.start()
        worker._proc.kill()
        worker._proc.join()
        key = cache.request(CHART, "After the helper died")
        cache.fetch()
        assert cache.figures[key] == figures.render_svg(CHART, "After the helper died")
    finally:
        cache.close()


@needs_helper
def test_a_chart_the_helper_cannot_draw_raises_the_real_error_here() -> None:
    broken = Chart("x", "y", [Series("mismatch", [0.0, 1.0, 2.0], [0.0, 1.0])])  # x and y lengths differ
    with pytest.raises(ValueError, match="same first dimension"):
        figures.render_svg(broken, "broken")  # what drawing it in-process says
    cache = RenderCache(FigureWorker.start())
    try:
        cache.start()
        cache.request(broken, "broken")
        with pytest.raises(ValueError, match="same first dimension"):
            cache.fetch()
    finally:
        cache.close()


@needs_helper
def test_killed_build_leaves_no_helper_behind(tmp_path: Path) -> None:
    code = ("import os, sys, time; from basisbook.rendering.figure_worker import FigureWorker; "
            "w = FigureWorker.start(); print(w._proc.pid, flush=True); time.sleep(60)")
    proc = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, text=True)
    helper = int(proc.stdout.readline())  # type: ignore[union-attr]
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait()
    deadline = time.monotonic() + 10
    while time.monotonic() < deadline:
        try:
            os.kill(helper, 0)
        except ProcessLookupError:
            return  # gone: its pipe closed with the main process
        # a zombie of an already-dead parent is reaped by init; check it is not running
        stat = Path(f"/proc/{helper}/stat")
        if stat.exists() and stat.read_text().split()[2] == "Z":
            return
        time.sleep(0.05)
    pytest.fail(f"helper process {helper} still running 10 s after its build was killed")


@needs_helper
def test_a_chart_that_cannot_be_sent_is_drawn_here() -> None:
    class LocalList(list):  # a class defined in a function does not pickle
        pass

    chart = Chart("x", "y", [Series("local", LocalList([0.0, 1.0]), LocalList([1.0, 0.0]))])
    cache = RenderCache(FigureWorker.start())
    try:
        cache.start()
        key = cache.request(chart, "unpicklable")
        assert key in cache.figures and key not in cache._waiting  # drawn at once, here
        assert cache.figures[key] == figures.render_svg(chart, "unpicklable")
    finally:
        cache.close()


@needs_helper
def test_stealing_splits_the_charts_without_loss_or_double_drawing() -> None:
    charts = {f"k{i}": Chart("x", "y", [Series(f"s{i}", [0.0, 1.0], [0.0, float(i)])]) for i in range(6)}
    worker = FigureWorker.start()
    assert worker is not None
    try:
        for key, chart in charts.items():
            assert worker.submit(key, chart, key)
        stolen = worker.steal()  # sent at once: the helper has begun one chart at most
        got = worker.collect()
        assert stolen and set(stolen).isdisjoint(got) and set(stolen) | set(got) == set(charts)
        assert all(got[k] == figures.render_svg(charts[k], k) for k in got)
    finally:
        worker.close()


@needs_helper
def test_a_cache_that_shares_drawing_gives_the_same_figures() -> None:
    charts = [Chart("x", "y", [Series(f"s{i}", [0.0, 1.0], [1.0, float(i)])]) for i in range(5)]
    cache = RenderCache(FigureWorker.start(), share_drawing=True)
    try:
        cache.start()
        keys = [cache.request(c, f"t{i}") for i, c in enumerate(charts)]
        cache.fetch()
        assert [cache.figures[k] for k in keys] == [figures.render_svg(c, f"t{i}") for i, c in enumerate(charts)]
    finally:
        cache.close()


@needs_helper
def test_a_pool_of_two_helpers_delivers_every_chart_once() -> None:
    from basisbook.rendering.figure_worker import FigurePool

    first, second = FigureWorker.start(), FigureWorker.start()
    assert first is not None and second is not None
    pool = FigurePool([first, second])
    charts = {f"p{i}": Chart("x", "y", [Series(f"s{i}", [0.0, 2.0], [float(i), 0.0])]) for i in range(5)}
    try:
        for key, chart in charts.items():
            assert pool.submit(key, chart, key)
        assert (first.outstanding, second.outstanding) in ((3, 2), (2, 3))  # shared, not all on one
        got = pool.collect()
        assert got == {k: figures.render_svg(c, k) for k, c in charts.items()}
    finally:
        pool.close()
