"""What an adversarial run broke in the commands, the live server and the pages, each
fixed and held here: output folders the build must not replace, builds side by side, a
full or read-only disk, a serve rebuild cut off part-way, a watcher that must survive any
failure, hostile request paths, encoded links in notes, formulas in CSV exports."""

from __future__ import annotations

import errno
import http.client
import os
import socket
import subprocess
import sys
import threading
from pathlib import Path

import pytest
from conftest import DEMO, ROOT

from basisbook.commands import build as build_mod
from basisbook.commands.build import Builder, build
from basisbook.commands.cli import main
from basisbook.contract.errors import EnvironmentFailure
from basisbook.rendering.site import INCOMPLETE_MARKER, SITE_MARKER


def _tree(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


# --- output folders the build must not replace ------------------------------------------------

@pytest.mark.parametrize("inside", ["templates", "inputs/site", "x", "archive/rev-A/site", "archive"])
def test_build_refuses_an_output_folder_inside_the_project(demo_copy: Path, inside: str, capsys) -> None:
    before = _tree(demo_copy)
    assert main(["build", str(demo_copy), "--out", str(demo_copy / inside)]) == 2
    err = capsys.readouterr().err
    assert "[--out] is inside the project folder" in err
    assert _tree(demo_copy) == before  # nothing written


def test_build_into_the_projects_own_site_folder_is_allowed(demo_copy: Path) -> None:
    pages, out = build(demo_copy, demo_copy / "site")
    assert pages > 10 and (out / "index.html").is_file()


def test_build_refuses_a_folder_inside_another_projects_snapshot(demo_copy: Path, tmp_path: Path, capsys) -> None:
    other = tmp_path / "other"
    (other / "archive" / "rev-A" / "site").mkdir(parents=True)
    (other / "archive" / "rev-A" / "manifest.json").write_text("{}")
    assert main(["build", str(demo_copy), "--out", str(other / "archive" / "rev-A" / "site")]) == 2
    assert "is inside the archived snapshot" in capsys.readouterr().err
    assert not any((other / "archive" / "rev-A" / "site").iterdir())


def test_build_refuses_to_replace_files_no_build_wrote(demo_copy: Path, tmp_path: Path, capsys) -> None:
    out = tmp_path / "site"
    build(demo_copy, out)
    (out / "my-notes.txt").write_text("the engineer's own file")
    before = _tree(out)
    assert main(["build", str(demo_copy), "--out", str(out)]) == 2
    assert "holds files no build wrote (my-notes.txt)" in capsys.readouterr().err
    assert _tree(out) == before
    (out / "my-notes.txt").unlink()
    build(demo_copy, out)  # once it is gone the folder is the build's again


def test_the_site_marker_lists_every_file_the_build_wrote(built_site: Path) -> None:
    listed = set((built_site / SITE_MARKER).read_text(encoding="utf-8").splitlines()[2:])
    assert listed | {SITE_MARKER} == set(_tree(built_site))


# --- builds side by side -----------------------------------------------------------------------

def test_two_builds_into_one_folder_take_turns(tmp_path: Path) -> None:
    out = tmp_path / "site"
    cmd = [sys.executable, "-m", "basisbook", "build", str(DEMO), "--out", str(out)]
    procs = [subprocess.Popen(cmd, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
             for _ in range(3)]
    results = [p.communicate(timeout=300) + (p.returncode,) for p in procs]
    for _stdout, stderr, rc in results:
        assert rc == 0 and "Traceback" not in stderr, stderr
    # (whether one had to wait depends on timing; the lock test below forces it)
    clean = tmp_path / "clean"
    build(DEMO, clean)
    assert _tree(out) == _tree(clean)
    assert not [p.name for p in tmp_path.iterdir() if ".new-" in p.name or ".old-" in p.name]


def test_a_build_that_cannot_get_the_folder_gives_up_with_a_message(tmp_path: Path) -> None:
    out = tmp_path / "site"
    with build_mod.output_lock(out):
        done = threading.Event()
        errors: list[BaseException] = []

        def second() -> None:
            try:
                with build_mod.output_lock(out, wait_s=0.3):
                    pass
            except EnvironmentFailure as exc:
                errors.append(exc)
            done.set()

        # fcntl locks belong to the open file, so a second open in this process contends too
        threading.Thread(target=second).start()
        assert done.wait(10)
    assert len(errors) == 1 and "another basisbook build has held" in str(errors[0])


# --- the machine fails, not the input -----------------------------------------------------------

@pytest.mark.parametrize("code", [errno.ENOSPC, errno.EROFS])
def test_a_full_or_read_only_disk_is_one_line_and_exit_1(demo_copy: Path, tmp_path: Path, monkeypatch,
                                                         capsys, code: int) -> None:
    out = tmp_path / "out" / "site"
    build(demo_copy, out)
    before = _tree(out)

    def failing(files: dict[str, bytes], folder: Path) -> None:
        (folder / "index.html").write_bytes(b"half")
        raise OSError(code, os.strerror(code), str(folder / "fig" / "x.svg"))

    monkeypatch.setattr(build_mod, "write_files", failing)
    assert main(["build", str(demo_copy), "--out", str(out)]) == 1
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and os.strerror(code) in err and "previous site is unchanged" in err
    assert _tree(out) == before
    assert sorted(p.name for p in out.parent.iterdir()) == ["site"]  # no temporary folder or lock file left


# --- serve: a rebuild cut off, a watcher that goes on --------------------------------------------

def test_a_serve_rebuild_cut_off_part_way_is_marked_and_made_whole(demo_copy: Path, tmp_path: Path,
                                                                    monkeypatch) -> None:
    live = tmp_path / "live"
    with Builder(demo_copy, live) as builder:
        builder.build()
    gen = demo_copy / "inputs" / "generators.toml"
    gen.write_text(gen.read_text(encoding="utf-8").replace("turns_per_phase = 20", "turns_per_phase = 22"),
                   encoding="utf-8")
    real_replace = os.replace
    calls = {"n": 0}

    def killed(src: str | Path, dst: str | Path) -> None:
        calls["n"] += 1
        if calls["n"] > 3:  # a few files of the rebuild are out, then the process "dies"
            raise KeyboardInterrupt
        real_replace(src, dst)

    monkeypatch.setattr(build_mod.os, "replace", killed)
    with Builder(demo_copy, live) as builder, pytest.raises(KeyboardInterrupt):
        builder.build()
    monkeypatch.setattr(build_mod.os, "replace", real_replace)
    assert (live / INCOMPLETE_MARKER).is_file()  # neither the old site nor the new one, and says so

    with Builder(demo_copy, live) as builder:  # the next start makes it whole
        builder.build()
    clean = tmp_path / "clean"
    build(demo_copy, clean)
    assert _tree(live) == _tree(clean)


def test_the_watcher_survives_a_rebuild_that_fails_unexpectedly(demo_copy: Path, tmp_path: Path) -> None:
    from basisbook.commands.serve import LiveState, rebuild

    state = LiveState()
    log: list[str] = []
    with Builder(demo_copy, tmp_path / "live") as builder:
        assert rebuild(builder, state, log.append)
        good = state.generation
        original = builder._build

        def broken() -> object:
            raise OverflowError("int too large to convert to float")

        builder._build = broken  # type: ignore[method-assign]
        builder._fingerprint = ""
        assert not rebuild(builder, state, log.append)
        assert "OverflowError" in state.snapshot()["error"] and state.generation == good
        builder._build = original  # type: ignore[method-assign]
        assert rebuild(builder, state, log.append)  # the next save builds and clears the banner
        assert state.snapshot()["error"] == "" and state.generation == good + 1


@pytest.mark.parametrize("port", ["65536", "-1", "http"])
def test_serve_refuses_a_port_out_of_range(port: str, capsys) -> None:
    with pytest.raises(SystemExit) as exc:
        main(["serve", str(DEMO), "--port", port])
    assert exc.value.code == 2
    assert "--port" in capsys.readouterr().err


def test_serve_on_a_port_in_use_is_one_line_and_exit_1(demo_copy: Path, tmp_path: Path, capsys) -> None:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        s.listen(1)
        port = s.getsockname()[1]
        assert main(["serve", str(demo_copy), "--out", str(tmp_path / "site"), "--port", str(port)]) == 1
    err = capsys.readouterr().err
    assert f"cannot listen on 127.0.0.1:{port}" in err and "Traceback" not in err


def test_served_requests_with_hostile_paths_get_400_or_404(built_site: Path) -> None:
    from functools import partial
    from http.server import ThreadingHTTPServer

    from basisbook.commands.serve import Handler, LiveState

    handler = partial(type("H", (Handler,), {"state": LiveState()}), directory=str(built_site))
    httpd = ThreadingHTTPServer(("127.0.0.1", 0), handler)
    threading.Thread(target=httpd.serve_forever, daemon=True).start()
    try:
        def status(path: str, method: str = "GET") -> int:
            conn = http.client.HTTPConnection("127.0.0.1", httpd.server_address[1], timeout=10)
            conn.putrequest(method, path, skip_host=False)
            conn.endheaders()
            code = conn.getresponse().status
            conn.close()
            return code

        assert status("/index.html") == 200
        assert status("/a%00b.html") == 400
        assert status("/%00") == 400
        assert status("/a%00b", "HEAD") == 400
        assert status("/archive/") == 404  # no directory listings
        assert status("/fig/") == 404
        assert status("/archive/rev-A/index.html") == 200
    finally:
        httpd.shutdown()
        httpd.server_close()


# --- links in notes, formulas in exports ---------------------------------------------------------

@pytest.mark.parametrize(("text", "kept_as_link"), [
    ("[a](%2e%2e/%2e%2e/etc/passwd)", False), ("[b](..%2f..%2fetc%2fpasswd)", False),
    ("[c](%252e%252e/x.html)", False), ("[d](java%73cript:alert(1))", False), ("[e](%2fetc%2fpasswd)", False),
    ("[f](a%5c..%5cb.html)", False), ("[g](https://example.org/x)", False),
    ("[h](stg1.html#step-rated_current)", True), ("[i](#site)", True),
])
def test_encoded_links_in_notes_are_judged_decoded(text: str, kept_as_link: bool) -> None:
    from basisbook.rendering.templating import markdown

    html = str(markdown(text))
    assert ("<a " in html) == kept_as_link, html


def test_csv_exports_never_carry_a_live_formula() -> None:
    from basisbook.contract.spec import Table
    from basisbook.rendering.calc_page import table_csv

    table = Table(columns=[("tag", "text"), ("P", "kW")],
                  rows=[['=HYPERLINK("http://x","y")', 1.5], ["+cmd|x", -2.0], ["@SUM(A1)", 3.0], ["-x", 4.0],
                        ["pump", 5.0], ["-", 6.0], ["-3.5", 7.0]])
    lines = table_csv(table).splitlines()
    assert lines[1].startswith("\"'=HYPERLINK(")
    assert lines[2] == "'+cmd|x,-2.0"  # a negative number stays a number
    assert lines[3].startswith("'@SUM") and lines[4].startswith("'-x") and lines[5] == "pump,5.0"
    assert lines[6] == "-,6.0" and lines[7] == "-3.5,7.0"  # a dash or a number in text is no formula


def test_the_stylesheet_breaks_long_words_in_navigation_headings_and_tables() -> None:
    css = (ROOT / "templates" / "static" / "style.css").read_text(encoding="utf-8")
    rule = next(line for line in css.splitlines() if "overflow-wrap: anywhere" in line and ".sidebar" in line)
    for selector in (".sidebar a", "h1", "p", ".titleblock"):
        assert selector in rule
    assert "td, th { overflow-wrap: break-word; }" in css


# --- a load list far longer than any plant's -----------------------------------------------------

@pytest.mark.slow
def test_a_very_long_load_list_is_summarised_on_pages_and_kept_whole_in_csv(demo_copy: Path,
                                                                            tmp_path: Path) -> None:
    from sitecheck import check_links

    from basisbook.rendering.calc_page import TABLE_ROWS_SHOWN
    from basisbook.rendering.source_pages import SOURCE_LINES_SHOWN

    csv = demo_copy / "loads" / "stg1-auxiliaries.csv"
    lines = csv.read_text(encoding="utf-8").splitlines()
    rows = [ln for ln in lines[2:] if ln.startswith("P-102A,")]
    extra = [rows[0].replace("P-102A,", f"X-{i:05d},", 1).replace("continuous", "standby", 1)
             for i in range(SOURCE_LINES_SHOWN + 1000)]
    csv.write_text("\n".join(lines + extra) + "\n", encoding="utf-8")
    out = tmp_path / "site"
    build(demo_copy, out)
    page = (out / "aux1.html").read_text(encoding="utf-8")
    assert f"The first {TABLE_ROWS_SHOWN} of" in page
    assert "changes are shown; `basisbook diff` lists them all" in (out / "changes.html").read_text(encoding="utf-8")
    source = (out / "source" / "loads__stg1-auxiliaries.csv.html").read_text(encoding="utf-8")
    assert "lines not shown" in source and f'id="L{SOURCE_LINES_SHOWN + 500}"' not in source
    table_csvs = [p for p in (out / "tables").glob("aux1-*.csv")
                  if f"X-{SOURCE_LINES_SHOWN + 999:05d}" in p.read_text(encoding="utf-8")]
    assert table_csvs, "the full rows stay in the table's CSV"
    assert check_links(out) == []  # every row a page links to is still on its source page


def test_a_load_list_page_says_how_its_file_was_read(demo_copy: Path, tmp_path: Path) -> None:
    csv = demo_copy / "loads" / "stg1-auxiliaries.csv"
    lines = csv.read_text(encoding="utf-8").splitlines()
    # the same list as a semicolon file with decimal commas, as a spreadsheet set to a
    # comma-decimal locale saves it
    converted = [lines[0]] + [ln.replace(",", ";").replace(".", ",") for ln in lines[1:]]
    csv.write_text("\n".join(converted) + "\n", encoding="utf-8")
    out = tmp_path / "site"
    build(demo_copy, out)
    page = (out / "source" / "loads__stg1-auxiliaries.csv.html").read_text(encoding="utf-8")
    assert "semicolon" in page and "decimal comma" in page
