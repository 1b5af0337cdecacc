"""Build a project into a site folder without ever leaving a half-written site.

A clean build renders every file in memory, writes them into a sibling
temporary folder and swaps it in by renames; any failure before the swap
leaves the previous site byte-for-byte as it was.

An incremental build (``Builder``, used by ``serve``) keeps the calc results
and figures of the last build, re-runs only calcs whose inputs changed, draws
only figures whose data changed and writes only files whose bytes changed.  Its
site is byte-identical to a clean build's (tested on sequences of edits).
"""

from __future__ import annotations

import os
import shutil
import sys
import tempfile
import time
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

from basisbook.contract.errors import EnvironmentFailure, Problem, ProjectError
from basisbook.reading import project as project_mod
from basisbook.reading.project import Project
from basisbook.rendering.figure_worker import FigurePool, FigureWorker
from basisbook.rendering.site import (
    INCOMPLETE_MARKER,
    SITE_MARKER,
    RenderCache,
    render_files,
    site_listing,
    write_files,
)
from basisbook.revisions import snapshot
from basisbook.revisions.diff import previous_comparison
from basisbook.running import engine
from basisbook.running.engine import CalcRun


def check(root: Path, run_calcs: bool = True) -> list:
    """Validate inputs and links, and (unless ``run_calcs`` is False) run the calcs;
    never renders, so matplotlib and Jinja stay unloaded.  Without running, the
    thermodynamic modules do not load CoolProp either."""
    proj = project_mod.load(root)
    if not run_calcs:
        engine.dependency_order(proj)  # dangling links and cycles
        return []
    return engine.run(proj)


def _refuse(out: Path, message: str) -> ProjectError:
    return ProjectError([Problem(str(out), None, "--out", message)])


def _guard_out(root: Path, out: Path) -> None:
    """Refuse an output folder the build must not replace (nothing is written first).

    The build replaces the whole folder, so it must be one of its own: never the project
    or a folder inside it (its inputs or its template overrides would change the next
    build) other than the project's top-level ``site/``, never a folder inside an issued
    revision's snapshot, and never a folder holding files an earlier build did not write.
    """
    project = Path(root).resolve()
    if out.exists() and not out.is_dir():
        raise _refuse(out, "is a file, not a folder")
    if project == out or project.is_relative_to(out):
        raise _refuse(out, "would replace the project folder itself")
    if out.is_relative_to(project) and out != project / "site":
        raise _refuse(out, f"is inside the project folder {project}; build into the project's own "
                      "site/ folder or a folder outside the project")
    for folder in (out, *out.parents):
        if (folder / "manifest.json").is_file() or (folder.parent.name == "archive"
                                                    and folder.name.startswith("rev-")):
            raise _refuse(out, f"is inside the archived snapshot {folder}; an issued revision is "
                          "never overwritten")
    if not out.exists() or not any(out.iterdir()):
        return
    marker = out / SITE_MARKER
    if not marker.is_file():
        raise _refuse(out, "exists and is not a basisbook site; refusing to replace it "
                      "(choose an empty or new folder)")
    listed = site_listing(marker.read_text(encoding="utf-8", errors="replace"))
    if listed is None:
        return  # a site from before the marker listed its files: it was all ours
    foreign = [rel for rel in _present(out) if rel not in listed and not _ours_in_passing(rel)]
    if foreign:
        more = f" and {len(foreign) - 5} more" if len(foreign) > 5 else ""
        raise _refuse(out, f"holds files no build wrote ({', '.join(foreign[:5])}{more}); refusing to "
                      "replace them: move them out, or build into an empty or new folder")


def _present(out: Path) -> list[str]:
    return sorted(p.relative_to(out).as_posix() for p in out.rglob("*") if p.is_file() or p.is_symlink())


def _ours_in_passing(rel: str) -> bool:
    """Files a build writes for a moment: a half-written file of an interrupted sync and
    the mark of a sync in progress (``serve``); the next build replaces or removes them."""
    name = rel.rsplit("/", 1)[-1]
    return (rel in (INCOMPLETE_MARKER, ".handbook-print.html")  # the latter: `basisbook pdf`'s copy
            or (name.startswith(".") and name.endswith(".part")))


@contextmanager
def output_lock(out: Path, wait_s: float = 120.0) -> Iterator[None]:
    """Hold the output folder for one build: a second build into the same folder waits for
    the first (saying so), and gives up after ``wait_s`` with a message, never racing it.

    The lock is an ``fcntl`` lock on the folder's parent directory: the folder itself is
    swapped out by the build, and a lock file would be one more file left beside the site.
    (Builds into sibling folders take turns too; they are short.)"""
    import fcntl

    out.parent.mkdir(parents=True, exist_ok=True)
    fd = os.open(out.parent, os.O_RDONLY | os.O_DIRECTORY)
    try:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            print(f"another basisbook build is writing beside {out}; waiting for it to finish",
                  file=sys.stderr, flush=True)
            deadline = time.monotonic() + wait_s
            while True:
                try:
                    fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
                    break
                except BlockingIOError:
                    if time.monotonic() > deadline:
                        raise EnvironmentFailure(f"another basisbook build has held {out.parent} for over "
                                                 f"{wait_s:.0f} s; try again when it is done") from None
                    time.sleep(0.05)
        try:
            yield
        finally:
            fcntl.flock(fd, fcntl.LOCK_UN)
    finally:
        os.close(fd)


def _environment(out: Path, exc: OSError) -> EnvironmentFailure:
    where = exc.filename or out
    return EnvironmentFailure(f"could not write the site into {out}: {exc.strerror or exc} ({where}); "
                              "the previous site is unchanged")


def build(root: Path, out: Path) -> tuple[int, Path]:
    """Clean build of ``root`` into ``out``; return (page count, out)."""
    out = Path(out).resolve()
    _guard_out(root, out)  # before anything is written, even the lock
    with output_lock(out):
        recover(out)  # under the lock: another build's temporary folder is never touched
        _guard_out(root, out)
        # forked before the project loads, so the helper's matplotlib import overlaps it
        cache = RenderCache(FigureWorker.start())
        try:
            proj = project_mod.load(root)
            cache.start()
            runs = engine.run(proj, on_run=cache.request_run)  # figures go to the helper as they come
            files = site_files(proj, runs, cache)
        finally:
            cache.close()
        tmp: Path | None = None
        try:
            tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.new-", dir=out.parent))
            write_files(files, tmp)
            os.chmod(tmp, 0o755)
            _swap(tmp, out)
        except OSError as exc:
            raise _environment(out, exc) from None
        finally:
            if tmp is not None and tmp.exists():
                shutil.rmtree(tmp, ignore_errors=True)
    return sum(1 for w in files if w.endswith(".html")), out


def site_files(proj: Project, runs: list[CalcRun], cache: RenderCache | None = None,
               complete: bool = True) -> dict[str, bytes]:
    """The live site's files: the build asks revisions for the comparison with the previous
    archived revision and for the archived handbooks, and hands both to the renderer."""
    return render_files(proj, runs, cache, comparison=previous_comparison(proj, runs),
                        archived=snapshot.archived_sites(proj), complete=complete)


def snapshot_site(proj: Project, out: Path) -> None:
    """Write the current revision's own site into the empty folder ``out``, as archived:
    no copies of other snapshots (snapshots never nest), but its changes page."""
    runs = engine.run(proj)
    files = render_files(proj, runs, comparison=previous_comparison(proj, runs),
                         as_snapshot=proj.revision.id)
    write_files(files, out)


_RENAME_EXCHANGE = 2  # linux/fs.h


def _exchange(a: Path, b: Path) -> bool:
    """Swap two directories in one atomic step (Linux renameat2); False if unsupported."""
    import ctypes
    import ctypes.util

    try:
        libc = ctypes.CDLL(ctypes.util.find_library("c") or "libc.so.6", use_errno=True)
        fn = libc.renameat2
    except (OSError, AttributeError):
        return False
    at_fdcwd = -100
    rc = fn(at_fdcwd, os.fsencode(a), at_fdcwd, os.fsencode(b), _RENAME_EXCHANGE)
    return rc == 0


def _swap(new: Path, out: Path) -> None:
    """Put the complete ``new`` folder in place of ``out``.

    With renameat2 the exchange is atomic: a reader (or a kill) sees either the
    old or the new site, never neither.  Elsewhere two renames leave a short
    window, which the next build repairs (``recover``).
    """
    if not out.exists():
        os.rename(new, out)
        return
    if _exchange(new, out):
        shutil.rmtree(new, ignore_errors=True)  # ``new`` now holds the old site
        return
    old = Path(tempfile.mkdtemp(prefix=f".{out.name}.old-", dir=out.parent))
    os.rmdir(old)
    os.rename(out, old)
    os.rename(new, out)
    shutil.rmtree(old, ignore_errors=True)


def recover(out: Path) -> None:
    """Tidy what an interrupted build left beside ``out``: finish an interrupted
    two-rename swap, and remove half-written temporary folders."""
    parent = out.parent
    if not parent.is_dir():
        return
    olds = sorted(parent.glob(f".{out.name}.old-*"))
    if not out.exists() and olds and (olds[-1] / SITE_MARKER).exists():
        os.rename(olds[-1], out)  # the swap was cut between its two renames
        olds = olds[:-1]
    for stale in olds + sorted(parent.glob(f".{out.name}.new-*")):
        shutil.rmtree(stale, ignore_errors=True)


@dataclass
class BuildStats:
    pages: int
    rerun: list[str]
    calcs_run: int
    calcs_reused: int
    figures_drawn: int
    files_written: int
    files_removed: int


class Builder:
    """Incremental builds for a long-lived process."""

    def __init__(self, root: Path, out: Path):
        self.root = Path(root)
        self.out = Path(out).resolve()
        self.compute_cache: dict[str, object] = {}
        first = FigureWorker.start()
        worker: FigureWorker | FigurePool | None = first
        if first is not None:
            # a long-lived process: load matplotlib here too, once (about 0.4 s at start-up),
            # so that this process can take over charts; a second helper forked after that
            # has nothing to import, and a rebuild's few charts are drawn side by side
            from basisbook.rendering import figures

            figures.warm_up()
            second = FigureWorker.start()
            worker = FigurePool([first] + ([second] if second is not None else []))
        self.render_cache = RenderCache(worker, remember_pages=True, share_drawing=worker is not None)
        self._fingerprint = ""
        self._known: dict[str, tuple[bytes, int, int]] = {}  # what the last sync wrote
        self._last: BuildStats | None = None

    def close(self) -> None:
        """Stop the figure helper process (it also stops by itself when this process ends)."""
        self.render_cache.close()

    def __enter__(self) -> Builder:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def fingerprint(self) -> str:
        """A hash of every file that can shape the site: the project folder (not its
        archive) and the built-in templates."""
        import hashlib

        from basisbook import __version__
        from basisbook.rendering.templating import builtin_templates

        h = hashlib.sha256(__version__.encode())
        root = self.root.resolve()
        for base in (root, builtin_templates()):
            for p in sorted(base.rglob("*")):
                rel = p.relative_to(base)
                if rel.parts[0] == "archive" and p.name == "manifest.json":
                    h.update(str(rel).encode() + b"\0" + p.read_bytes() + b"\0")  # a new snapshot
                    continue
                if (not p.is_file() or rel.parts[0] in ("archive", "__pycache__")
                        or any(x.startswith(".") for x in rel.parts) or p.resolve().is_relative_to(self.out)):
                    continue
                h.update(str(rel).encode() + b"\0" + p.read_bytes() + b"\0")
        return h.hexdigest()

    def build(self) -> BuildStats:
        fp = self.fingerprint()
        if (fp == self._fingerprint and self._last is not None and (self.out / SITE_MARKER).is_file()
                and not (self.out / INCOMPLETE_MARKER).exists()):
            # nothing that shapes the site changed: nothing to run, draw or write
            return BuildStats(self._last.pages, [], 0, self._last.calcs_run + self._last.calcs_reused, 0, 0, 0)
        stats = self._build()
        self._fingerprint, self._last = fp, stats
        return stats

    def _build(self) -> BuildStats:
        _guard_out(self.root, self.out)
        proj = project_mod.load(self.root)  # raises ProjectError: nothing written
        before = set(self.compute_cache)
        drawn = self.render_cache.figures_drawn
        self.render_cache.start()
        with output_lock(self.out):
            _guard_out(self.root, self.out)
            try:
                runs = engine.run(proj, self.compute_cache, on_run=self.render_cache.request_run)
                files = site_files(proj, runs, self.render_cache, complete=False)
                # the live folder is written file by file: marked incomplete until the last
                # sync has removed what is gone (it removes the mark too, being no site file)
                self.out.mkdir(parents=True, exist_ok=True)
                (self.out / INCOMPLETE_MARKER).write_bytes(b"a rebuild is being written into this folder\n")
                # the pages go out while the helpers finish the figures; then the rest
                early, _ = sync(files, self.out, self._known, remove=False)
                self.render_cache.complete(files)
                written, removed = sync(files, self.out, self._known)
            except OSError as exc:
                self.render_cache.abort()
                self._known.clear()  # what is on disk is no longer known
                raise _environment(self.out, exc) from None
            except BaseException:
                self.render_cache.abort()
                self._known.clear()
                raise
        rerun = [r.id for r in runs if r.cache_key not in before]
        written += early
        return BuildStats(sum(1 for f in files if f.endswith(".html")), rerun, len(rerun),
                          len(runs) - len(rerun), self.render_cache.figures_drawn - drawn, written, removed)


def sync(files: dict[str, bytes], out: Path,
         known: dict[str, tuple[bytes, int, int]] | None = None, remove: bool = True) -> tuple[int, int]:
    """Make ``out`` hold exactly ``files``: write changed bytes only, remove the rest.

    Each file is replaced by rename, so a reader never sees half a file.  ``known``
    (kept by a long-lived builder) remembers what the last sync wrote, as (bytes,
    size, mtime): a file whose size and mtime are still those is compared in memory
    instead of being read back; it is updated to this sync's files.  ``remove=False``
    writes part of a site: nothing is removed and ``known`` keeps its other entries.
    """
    out.mkdir(parents=True, exist_ok=True)
    # a full sync rebuilds ``known`` from this sync's files; a partial one updates it
    previous = dict(known) if known is not None and remove else (known or {})
    if known is not None and remove:
        known.clear()
    written = 0
    for rel, data in files.items():
        path = out / rel
        try:
            st = path.stat()
            was = previous.get(rel)
            if was is not None and (was[1], was[2]) == (st.st_size, st.st_mtime_ns):
                same = was[0] == data
            else:
                same = st.st_size == len(data) and path.read_bytes() == data
            if same:
                if known is not None:
                    known[rel] = (data, st.st_size, st.st_mtime_ns)
                continue
        except OSError:
            pass
        path.parent.mkdir(parents=True, exist_ok=True)
        tmp = path.with_name(f".{path.name}.part")
        tmp.write_bytes(data)
        os.replace(tmp, path)
        if known is not None:
            st = path.stat()
            known[rel] = (data, st.st_size, st.st_mtime_ns)
        written += 1
    removed = 0
    if not remove:
        return written, removed
    for path in sorted(out.rglob("*"), reverse=True):
        rel = path.relative_to(out).as_posix()
        if rel == INCOMPLETE_MARKER:
            continue
        if (path.is_file() or path.is_symlink()) and rel not in files:
            path.unlink()
            removed += 1
        elif path.is_dir() and not any(path.iterdir()):
            path.rmdir()
    # last: the folder now holds exactly the site, so it is no longer marked incomplete
    (out / INCOMPLETE_MARKER).unlink(missing_ok=True)
    return written, removed
