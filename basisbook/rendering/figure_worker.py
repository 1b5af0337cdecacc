"""Draw the matplotlib figures in a helper process while this one renders pages.

Half of a cold build is matplotlib (about 40 ms a chart, plus its import) and the
machines have two cores, so a build forks one helper as early as it can: the
helper imports matplotlib while the main process loads the project and runs the
calcs, then draws the charts it is sent while the main process writes the pages.

Protocol, over one pipe: the main process sends ``(key, chart, title)`` jobs and
then ``FLUSH``; the helper answers with one list of ``(key, svg or None)``.
``STEAL`` (from a main process that has matplotlib loaded, as in ``serve``) is
answered at once with the keys of the later half of the jobs not yet begun,
which the helper then drops.  A reader thread in the helper drains the pipe at
once, so the main process never waits on a send while the helper draws.  ``None`` (the chart failed to draw)
and a dead or missing helper both fall back to drawing in the main process,
which then raises the real error: the site is the same bytes either way.

The helper is used only where fork is safe and useful: Linux, two or more CPUs,
and ``BASISBOOK_PROCESSES`` not set to 1.  It ignores Ctrl-C (the main process
owns the terminal) and exits when its pipe closes, so a killed build never
leaves it behind.
"""

from __future__ import annotations

import os
import sys
from typing import Any

FLUSH = "flush"
STEAL = "steal"


def wanted() -> bool:
    """Whether a build should fork a figure helper on this machine."""
    if os.environ.get("BASISBOOK_PROCESSES", "").strip() == "1":
        return False
    return sys.platform.startswith("linux") and (os.cpu_count() or 1) >= 2


def _serve(conn: Any, parent_end: Any) -> None:
    """The helper's loop (runs in the forked process)."""
    import collections
    import signal
    import threading

    parent_end.close()  # else the pipe never reports the main process gone
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    jobs: collections.deque[Any] = collections.deque()
    ready = threading.Condition()
    send_lock = threading.Lock()
    gone = threading.Event()

    def send(obj: Any) -> None:
        with send_lock:
            conn.send(obj)

    def read() -> None:
        try:
            while True:
                msg = conn.recv()
                if msg == STEAL:
                    # hand back the later half of the charts not yet begun (the main process
                    # has finished its pages and draws them itself)
                    with ready:
                        queued = [i for i, j in enumerate(jobs) if isinstance(j, tuple)]
                        take = queued[len(queued) - (len(queued) + 1) // 2:]
                        stolen = [jobs[i][0] for i in take]
                        for i in reversed(take):
                            del jobs[i]
                    send((STEAL, stolen))
                    continue
                with ready:
                    jobs.append(msg)
                    ready.notify()
        except (EOFError, OSError):
            gone.set()  # the main process is gone or closed the pipe: drop what is queued
            with ready:
                jobs.append(None)
                ready.notify()

    threading.Thread(target=read, daemon=True).start()
    from basisbook.rendering import figures

    figures.warm_up()  # the import, overlapped with the main process's loading
    done: list[tuple[str, str | None]] = []
    while True:
        with ready:
            while not jobs:
                ready.wait()
            job = jobs.popleft()
        if job is None or gone.is_set():
            return
        if job == FLUSH:
            try:
                send(done)
            except (BrokenPipeError, OSError):
                return
            done = []
            continue
        key, chart, title = job
        try:
            done.append((key, figures.render_svg(chart, title)))
        except Exception:  # noqa: BLE001 - the main process redraws it and raises the real error
            done.append((key, None))


class FigureWorker:
    """One forked helper process; ``start()`` returns None where it is not wanted."""

    def __init__(self, proc: Any, conn: Any) -> None:
        self._proc = proc
        self._conn = conn
        self._sent: list[str] = []

    @classmethod
    def start(cls) -> FigureWorker | None:
        if not wanted():
            return None
        import multiprocessing

        try:
            ctx = multiprocessing.get_context("fork")
            mine, theirs = ctx.Pipe(duplex=True)
            proc = ctx.Process(target=_serve, args=(theirs, mine), name="basisbook-figures", daemon=True)
            proc.start()
        except (OSError, ValueError):
            return None
        theirs.close()
        return cls(proc, mine)

    def submit(self, key: str, chart: Any, title: str) -> bool:
        """Queue one chart; False if the helper is gone (draw it here instead)."""
        try:
            self._conn.send((key, chart, title))
        except Exception:  # noqa: BLE001 - a closed pipe, or a chart that does not pickle
            return False
        self._sent.append(key)
        return True

    def steal(self) -> list[str]:
        """Take back the later half of the charts the helper has not begun (keys);
        the caller draws those itself.  Empty if the helper is gone."""
        if not self._sent:
            return []
        try:
            self._conn.send(STEAL)
            tag, keys = self._conn.recv()
        except (EOFError, OSError, ValueError):
            return []
        if tag != STEAL:
            return []
        taken = set(keys)
        self._sent = [k for k in self._sent if k not in taken]
        return list(keys)

    @property
    def outstanding(self) -> int:
        """Charts sent since the last collect."""
        return len(self._sent)

    def collect(self) -> dict[str, str | None]:
        """Every chart submitted since the last collect, by key; a chart the helper
        could not deliver maps to None."""
        return self._receive(self._request())

    def _request(self) -> list[str] | None:
        sent, self._sent = self._sent, []
        if not sent:
            return None
        try:
            self._conn.send(FLUSH)
        except (OSError, ValueError):
            pass  # the receive below then finds the pipe closed: every chart maps to None
        return sent

    def _receive(self, sent: list[str] | None) -> dict[str, str | None]:
        if sent is None:
            return {}
        try:
            got = dict(self._conn.recv())
        except (EOFError, OSError, ValueError):
            got = {}
        return {k: got.get(k) for k in sent}

    def close(self) -> None:
        try:
            self._conn.close()
        finally:
            self._proc.join(timeout=5)
            if self._proc.is_alive():
                self._proc.kill()
                self._proc.join()


class FigurePool:
    """Several helpers behind the interface of one (for a long-lived ``serve``).

    Each chart goes to the helper with the fewest charts outstanding; ``steal``
    asks each of them; ``collect`` asks them all to flush before it waits, so
    they finish side by side.
    """

    def __init__(self, workers: list[FigureWorker]) -> None:
        self.workers = workers

    def submit(self, key: str, chart: Any, title: str) -> bool:
        for w in sorted(self.workers, key=lambda w: w.outstanding):
            if w.submit(key, chart, title):
                return True
        return False

    def steal(self) -> list[str]:
        return [k for w in self.workers for k in w.steal()]

    def collect(self) -> dict[str, str | None]:
        asked = [(w, w._request()) for w in self.workers]
        out: dict[str, str | None] = {}
        for w, sent in asked:
            out.update(w._receive(sent))
        return out

    def close(self) -> None:
        for w in self.workers:
            w.close()
