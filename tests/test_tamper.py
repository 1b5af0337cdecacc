"""Tampered, damaged and half-written snapshots: `verify` says "not verified: <why>" with
exit code 1 (never a traceback, never "verified"), and `archive` tidies what a killed run
left.  One sealed snapshot of the demo's revision A is archived per module; each test
tampers with its own copy."""

from __future__ import annotations

import fcntl
import hashlib
import json
import os
import shutil
import stat
import zipfile
from collections.abc import Callable
from pathlib import Path

import pytest
from conftest import DEMO, reduce_to_first_revision

from basisbook.commands.build import snapshot_site
from basisbook.commands.cli import main
from basisbook.revisions.archive import ZIP_MODE, ZIP_TIME, archive
from basisbook.revisions.snapshot import (
    MANIFEST,
    SEAL_MEMBER,
    fingerprint,
    manifest_bytes,
    seal_member_bytes,
)
from basisbook.revisions.verify import verify

PAGE = "site/gen2.html"
INPUT = "project/inputs/generators.toml"


@pytest.fixture(scope="module")
def sealed_project(tmp_path_factory: pytest.TempPathFactory) -> Path:
    root = tmp_path_factory.mktemp("sealed") / "project"
    shutil.copytree(DEMO, root)
    reduce_to_first_revision(root)
    archive(root, make_site=snapshot_site)
    return root


@pytest.fixture
def project(sealed_project: Path, tmp_path: Path) -> Path:
    """A private copy of a project whose revision A was archived (sealed) a moment ago."""
    dst = tmp_path / "project"
    shutil.copytree(sealed_project, dst, symlinks=True)
    return dst


@pytest.fixture
def arch(project: Path) -> Path:
    return project / "archive"


# --- tampering helpers --------------------------------------------------------------------

def _manifest(arch: Path) -> dict:
    return json.loads((arch / "rev-A" / MANIFEST).read_text(encoding="utf-8"))


def _write_manifest(arch: Path, m: dict, *, recount: bool = True, member: bool = False,
                    seal_file: bool = False) -> str:
    """Write an edited manifest as the archive would (canonical bytes); with ``recount`` its
    count and fingerprint follow the files; ``member`` and ``seal_file`` reseal it there too."""
    if recount and "files" in m:
        m["file_count"] = len(m["files"])
        m["fingerprint"] = fingerprint(m["files"])
    data = manifest_bytes(m)
    (arch / "rev-A" / MANIFEST).write_bytes(data)
    seal = hashlib.sha256(data).hexdigest()
    if member:
        (arch / "rev-A" / SEAL_MEMBER).write_bytes(seal_member_bytes(seal))
    if seal_file:
        doc = json.loads((arch / "seal-rev-A.json").read_text())
        doc["manifest_sha256"] = seal
        (arch / "seal-rev-A.json").write_bytes(manifest_bytes(doc))
    return seal


def _edit_file(arch: Path, rel: str, old: bytes = b"a", new: bytes = b"b") -> str:
    """Change one file of the folder; return its new SHA-256."""
    p = arch / "rev-A" / rel
    data = p.read_bytes()
    assert old in data
    p.write_bytes(data.replace(old, new, 1))
    return hashlib.sha256(p.read_bytes()).hexdigest()


def _members(zpath: Path) -> dict[str, bytes]:
    with zipfile.ZipFile(zpath) as z:
        return {n: z.read(n) for n in z.namelist()}


def _rezip(zpath: Path, members: dict[str, bytes], date_time: tuple = ZIP_TIME,
           mode: dict[str, int] | None = None) -> None:
    """Write the zip again as the archive lays it out, with these members."""
    with zipfile.ZipFile(zpath, "w", compression=zipfile.ZIP_DEFLATED) as z:
        for name, data in members.items():
            info = zipfile.ZipInfo(name, date_time=date_time)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = (mode or {}).get(name, ZIP_MODE)
            z.writestr(info, data)


def _edit_zip_manifest(zpath: Path, reseal_member: bool) -> None:
    """Change the approver inside the zip's manifest, keeping it canonical."""
    members = _members(zpath)
    m = json.loads(members[f"rev-A/{MANIFEST}"])
    m["revision"]["approved"] = "A. Forger"
    members[f"rev-A/{MANIFEST}"] = manifest_bytes(m)
    if reseal_member:
        members[f"rev-A/{SEAL_MEMBER}"] = seal_member_bytes(hashlib.sha256(manifest_bytes(m)).hexdigest())
    _rezip(zpath, members)


def _alone(arch: Path, tmp_path: Path) -> Path:
    """The zip copied somewhere on its own, without its seal file."""
    dst = tmp_path / "mailed" / "rev-A.zip"
    dst.parent.mkdir()
    shutil.copyfile(arch / "rev-A.zip", dst)
    return dst


def _member_offset(zpath: Path, name: str) -> tuple[int, zipfile.ZipInfo]:
    """Where the compressed data of a member starts in the file."""
    with zipfile.ZipFile(zpath) as z:
        info = z.getinfo(name)
    data = zpath.read_bytes()
    nlen = int.from_bytes(data[info.header_offset + 26:info.header_offset + 28], "little")
    elen = int.from_bytes(data[info.header_offset + 28:info.header_offset + 30], "little")
    return info.header_offset + 30 + nlen + elen, info


def _flip(path: Path, at: int) -> None:
    data = bytearray(path.read_bytes())
    data[at] ^= 0x5A
    path.write_bytes(bytes(data))


def _not_verified(argv: list[str], capsys: pytest.CaptureFixture[str], *reasons: str) -> str:
    assert main(argv) == 1
    out = capsys.readouterr()
    text = out.out + out.err
    assert "Traceback" not in text and " verified," not in out.out, text
    for reason in reasons:
        assert reason in text, text
    return text


# --- the untampered snapshot verifies (so every case below can fail) ----------------------

def test_a_fresh_sealed_snapshot_verifies_as_folder_zip_and_zip_alone(arch: Path, tmp_path: Path,
                                                                      capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["verify", str(arch / "rev-A")]) == 0
    out = capsys.readouterr().out
    assert "manifest sealed" in out and "its zip verified too" in out
    assert main(["verify", str(arch / "rev-A.zip")]) == 0
    assert main(["verify", str(_alone(arch, tmp_path))]) == 0
    seal = json.loads((arch / "seal-rev-A.json").read_text())
    v = verify(arch / "rev-A")
    assert v.sealed and v.seal == seal["manifest_sha256"] and v.zip_checked
    assert seal["zip_sha256"] == hashlib.sha256((arch / "rev-A.zip").read_bytes()).hexdigest()
    assert (arch / "rev-A" / SEAL_MEMBER).read_bytes() == seal_member_bytes(v.seal)
    m = _manifest(arch)
    assert m["file_count"] == len(m["files"]) == v.checked
    # the fingerprint is one SHA-256 over the sorted "hash  path" lines, as sha256sum writes them
    lines = "".join(f"{m['files'][r]}  {r}\n" for r in sorted(m["files"]))
    assert m["fingerprint"] == hashlib.sha256(lines.encode()).hexdigest()
    assert main(["verify", str(arch / "rev-A"), "--seal", v.seal]) == 0


# --- the manifest itself ------------------------------------------------------------------

def _approver(m: dict) -> None:
    m["revision"]["approved"] = "A. Forger"


def _date(m: dict) -> None:
    m["revision"]["date"] = "2026-10-13"


def _tool(m: dict) -> None:
    m["tool"]["version"] = "9.9.9"


def _library(m: dict) -> None:
    m["libraries"]["CoolProp"] = "0.0.1"


@pytest.mark.parametrize("edit", [_approver, _date, _tool, _library])
def test_an_edited_manifest_field_fails(arch: Path, edit: Callable[[dict], None],
                                        capsys: pytest.CaptureFixture[str]) -> None:
    m = _manifest(arch)
    edit(m)
    _write_manifest(arch, m)
    _not_verified(["verify", str(arch / "rev-A")], capsys,
                  f"not verified: {MANIFEST} does not match its seal in {SEAL_MEMBER}",
                  "does not match its seal in seal-rev-A.json",
                  f"rev-A.zip holds a different {MANIFEST} than the folder")


def test_a_rewritten_manifest_with_the_same_content_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    p = arch / "rev-A" / MANIFEST
    p.write_text(json.dumps(json.loads(p.read_text()), indent=2, sort_keys=True) + "\n")
    _not_verified(["verify", str(arch / "rev-A")], capsys, "not in the canonical form")


def test_a_page_removed_with_its_manifest_line_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (arch / "rev-A" / PAGE).unlink()
    m = _manifest(arch)
    del m["files"][PAGE]
    _write_manifest(arch, m, recount=False)
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"'file_count' is {len(m['files']) + 1}")
    _write_manifest(arch, m, recount=True)  # count and fingerprint made to agree: the seal still holds
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"does not match its seal in {SEAL_MEMBER}")


def test_a_fingerprint_that_does_not_follow_the_files_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    m = _manifest(arch)
    m["files"][INPUT] = _edit_file(arch, INPUT)
    _write_manifest(arch, m, recount=False)
    _not_verified(["verify", str(arch / "rev-A")], capsys, "fingerprint does not match")


def test_an_input_edited_with_its_hash_updated_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    m = _manifest(arch)
    m["files"][INPUT] = _edit_file(arch, INPUT, b"generator_power_factor = 0.8", b"generator_power_factor = 0.9")
    _write_manifest(arch, m)
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"does not match its seal in {SEAL_MEMBER}")


def test_an_input_edited_and_resealed_inside_the_folder_fails_on_the_seal_file(
        arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    m = _manifest(arch)
    m["files"][INPUT] = _edit_file(arch, INPUT, b"generator_power_factor = 0.8", b"generator_power_factor = 0.9")
    _write_manifest(arch, m, member=True)
    text = _not_verified(["verify", str(arch / "rev-A")], capsys, "does not match its seal in seal-rev-A.json")
    assert f"in {SEAL_MEMBER}" not in text


def test_resealed_folder_and_seal_file_fail_on_the_zip_beside(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    m = _manifest(arch)
    m["files"][INPUT] = _edit_file(arch, INPUT, b"generator_power_factor = 0.8", b"generator_power_factor = 0.9")
    _write_manifest(arch, m, member=True, seal_file=True)
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"rev-A.zip holds a different {MANIFEST}",
                  f"rev-A.zip: {MANIFEST} does not match its seal in seal-rev-A.json")


def test_a_complete_reseal_is_caught_only_by_the_seal_recorded_at_issue(
        arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    """Whoever rewrites every seal and deletes the zip has rewritten the whole record: only a
    seal kept elsewhere (printed by `archive`) tells; `verify --seal` checks it."""
    issued = verify(arch / "rev-A").seal
    m = _manifest(arch)
    m["files"][INPUT] = _edit_file(arch, INPUT, b"generator_power_factor = 0.8", b"generator_power_factor = 0.9")
    _write_manifest(arch, m, member=True, seal_file=True)
    (arch / "rev-A.zip").unlink()
    assert main(["verify", str(arch / "rev-A")]) == 0  # self-consistent, as far as it goes
    capsys.readouterr()
    _not_verified(["verify", str(arch / "rev-A"), "--seal", issued], capsys,
                  f"does not match the seal given ({issued})")


def test_missing_seals_fail(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (arch / "seal-rev-A.json").unlink()
    _not_verified(["verify", str(arch / "rev-A")], capsys, "not verified: no seal file seal-rev-A.json")
    (arch / "rev-A" / SEAL_MEMBER).unlink()
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"no {SEAL_MEMBER} beside {MANIFEST}")


def test_a_sealed_manifest_downgraded_to_format_1_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    m = _manifest(arch)
    _approver(m)
    m["format"] = "basisbook snapshot 1"
    del m["file_count"], m["fingerprint"]
    _write_manifest(arch, m, recount=False)
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"format 1 (unsealed) but {SEAL_MEMBER}",
                  "format 1 (unsealed) but seal-rev-A.json")


def test_a_fully_downgraded_snapshot_is_never_called_sealed(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    """The limit of a self-contained check: removing every seal makes it look like a snapshot
    from before the seal; it is then reported as unsealed, never as sealed."""
    m = _manifest(arch)
    _approver(m)
    m["format"] = "basisbook snapshot 1"
    del m["file_count"], m["fingerprint"]
    _write_manifest(arch, m, recount=False)
    for p in (arch / "rev-A" / SEAL_MEMBER, arch / "seal-rev-A.json", arch / "rev-A.zip"):
        p.unlink()
    assert main(["verify", str(arch / "rev-A")]) == 0
    out = capsys.readouterr().out
    assert "format 1, unsealed" in out and "cannot be proven unchanged" in out and "sealed (seal" not in out


# --- links and other non-files --------------------------------------------------------------

def test_a_file_replaced_by_a_symlink_to_an_identical_copy_fails(arch: Path, tmp_path: Path,
                                                                 capsys: pytest.CaptureFixture[str]) -> None:
    copy = tmp_path / "copy.html"
    shutil.copyfile(arch / "rev-A" / PAGE, copy)
    (arch / "rev-A" / PAGE).unlink()
    (arch / "rev-A" / PAGE).symlink_to(copy)
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"not verified: symlink {PAGE} -> {copy}")


def test_a_folder_replaced_by_a_symlink_to_an_identical_copy_fails(arch: Path, tmp_path: Path,
                                                                   capsys: pytest.CaptureFixture[str]) -> None:
    shutil.move(arch / "rev-A" / "site" / "fig", tmp_path / "fig")
    (arch / "rev-A" / "site" / "fig").symlink_to(tmp_path / "fig")
    text = _not_verified(["verify", str(arch / "rev-A"), "--rebuild"], capsys, "not verified: symlink site/fig ->")
    assert "missing:" not in text  # the link is the reason, not a list of its files


def test_the_manifest_as_a_symlink_fails(arch: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    shutil.move(arch / "rev-A" / MANIFEST, tmp_path / MANIFEST)
    (arch / "rev-A" / MANIFEST).symlink_to(tmp_path / MANIFEST)
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"not verified: symlink {MANIFEST} ->")


def test_the_snapshot_folder_as_a_symlink_fails(arch: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    shutil.move(arch / "rev-A", tmp_path / "rev-A")
    (arch / "rev-A").symlink_to(tmp_path / "rev-A")
    _not_verified(["verify", str(arch / "rev-A")], capsys, "not verified: symlink")


def test_an_added_empty_folder_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (arch / "rev-A" / "site" / "later").mkdir()
    _not_verified(["verify", str(arch / "rev-A")], capsys, "added: site/later/")


# --- the zip ------------------------------------------------------------------------------

def test_the_approver_edited_inside_the_zip_fails(arch: Path, tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    _edit_zip_manifest(arch / "rev-A.zip", reseal_member=False)
    alone = _alone(arch, tmp_path)
    _not_verified(["verify", str(arch / "rev-A.zip")], capsys, "SHA-256 of the whole zip does not match",
                  f"{MANIFEST} does not match its seal in {SEAL_MEMBER}")
    _not_verified(["verify", str(alone)], capsys, f"{MANIFEST} does not match its seal in {SEAL_MEMBER}")
    _not_verified(["verify", str(arch / "rev-A")], capsys, f"rev-A.zip holds a different {MANIFEST}")


def test_the_approver_edited_and_resealed_inside_the_zip_fails_on_the_seal_file(
        arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    _edit_zip_manifest(arch / "rev-A.zip", reseal_member=True)
    _not_verified(["verify", str(arch / "rev-A.zip")], capsys, "SHA-256 of the whole zip does not match",
                  f"{MANIFEST} does not match its seal in seal-rev-A.json")


@pytest.mark.parametrize("beside", [True, False], ids=["beside-its-seal", "alone"])
def test_bytes_appended_to_the_zip_fail(arch: Path, tmp_path: Path, beside: bool,
                                        capsys: pytest.CaptureFixture[str]) -> None:
    zpath = arch / "rev-A.zip" if beside else _alone(arch, tmp_path)
    with open(zpath, "ab") as f:
        f.write(b"hidden payload")
    assert zipfile.is_zipfile(zpath)  # the zip library still reads it
    reasons = ["14 bytes follow the zip's end record"] + (["SHA-256 of the whole zip"] if beside else [])
    _not_verified(["verify", str(zpath)], capsys, *reasons)


def test_bytes_prepended_to_the_zip_fail(arch: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    zpath.write_bytes(b"#!/bin/sh\n" + zpath.read_bytes())
    _not_verified(["verify", str(zpath)], capsys, "before its first member")


def test_a_comment_added_to_the_zip_fails(arch: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    with zipfile.ZipFile(zpath, "a") as z:
        z.comment = b"approved by nobody"
    _not_verified(["verify", str(zpath)], capsys, "not verified:")


@pytest.mark.parametrize("beside", [True, False], ids=["beside-its-seal", "alone"])
def test_changed_member_timestamps_fail(arch: Path, tmp_path: Path, beside: bool,
                                        capsys: pytest.CaptureFixture[str]) -> None:
    zpath = arch / "rev-A.zip" if beside else _alone(arch, tmp_path)
    _rezip(zpath, _members(zpath), date_time=(2026, 10, 12, 9, 30, 0))
    reasons = ["timestamp 2026-10-12 09:30:00 is not the fixed 2000-01-01 00:00:00"]
    _not_verified(["verify", str(zpath)], capsys, *reasons + (["SHA-256 of the whole zip"] if beside else []))


def test_a_timestamp_changed_in_a_local_header_only_fails(arch: Path, tmp_path: Path,
                                                          capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    start, info = _member_offset(zpath, f"rev-A/{PAGE}")
    data = bytearray(zpath.read_bytes())
    data[info.header_offset + 12] ^= 0x01  # the local header's date field
    zpath.write_bytes(bytes(data))
    _not_verified(["verify", str(zpath)], capsys, "disagrees with the zip's central directory")


def test_a_zip_with_a_bad_crc_fails_without_a_traceback(arch: Path, tmp_path: Path,
                                                        capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    start, info = _member_offset(zpath, f"rev-A/{PAGE}")
    _flip(zpath, start + info.compress_size // 2)
    _not_verified(["verify", str(zpath), "--rebuild"], capsys, f"not verified: rev-A/{PAGE}: unreadable",
                  f"changed: {PAGE}")


def test_a_zip_whose_recorded_crc_was_changed_fails(arch: Path, tmp_path: Path,
                                                    capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    with zipfile.ZipFile(zpath) as z:
        info = z.getinfo(f"rev-A/{PAGE}")
        start_dir = z.start_dir
    data = zpath.read_bytes()
    # the CRC in both headers: the local one, and the central directory's entry (whose fields
    # from "version needed" on repeat the local header's)
    same = data.index(data[info.header_offset + 4:info.header_offset + 26], start_dir)
    for at in (info.header_offset + 14, same + 10):
        _flip(zpath, at)
    _not_verified(["verify", str(zpath)], capsys, "Bad CRC-32")


def test_a_member_added_to_or_removed_from_the_zip_fails(arch: Path, tmp_path: Path,
                                                         capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    members = _members(zpath)
    members["rev-A/site/extra.html"] = b"<p>approved</p>"
    del members[f"rev-A/{PAGE}"]
    _rezip(zpath, members)
    _not_verified(["verify", str(zpath)], capsys, "added: site/extra.html", f"missing: {PAGE}")


def test_a_symlink_member_in_the_zip_fails(arch: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    members = _members(zpath)
    _rezip(zpath, members, mode={f"rev-A/{PAGE}": (stat.S_IFLNK | 0o777) << 16})
    _not_verified(["verify", str(zpath)], capsys, f"rev-A/{PAGE}: a symlink")


def test_a_junk_zip_beside_the_folder_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (arch / "rev-A.zip").write_bytes(b"not a zip at all")
    _not_verified(["verify", str(arch / "rev-A")], capsys, "not verified: rev-A.zip: ")


# --- wrong shapes: a reason, never a traceback ------------------------------------------------

@pytest.mark.parametrize(
    ("text", "reason"),
    [
        ("[1, 2, 3]", "not a basisbook manifest (a JSON list"),
        ("{}", "unknown snapshot format None"),
        ('{"format": "basisbook snapshot 2", "files": ["site/index.html"]}', "'files' must map"),
        ('{"format": "basisbook snapshot 2", "files": {"results.json": 7}}', "the SHA-256 of results.json is 7"),
        ('{"format": "basisbook snapshot 2", "files": {"../../etc/passwd": "' + "0" * 64 + '"}}',
         "impossible path '../../etc/passwd'"),
        ('{"format": "basisbook snapshot 1", "files": {"results.json": "' + "0" * 64 + '"}, "revision": "A"}',
         "'revision' must hold"),
        ("{not json", f"{MANIFEST} is not JSON"),
        ("\xff\xfe", f"{MANIFEST} is not JSON"),
    ],
    ids=["a-list", "no-format", "files-a-list", "hash-a-number", "path-outside", "revision-a-string",
         "not-json", "not-utf8"],
)
def test_a_manifest_of_the_wrong_shape_fails(arch: Path, text: str, reason: str,
                                             capsys: pytest.CaptureFixture[str]) -> None:
    (arch / "rev-A" / MANIFEST).write_bytes(text.encode("latin-1"))
    _not_verified(["verify", str(arch / "rev-A"), "--rebuild"], capsys, "not verified: ", reason)


def test_a_zip_manifest_of_the_wrong_shape_fails(arch: Path, tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    zpath = _alone(arch, tmp_path)
    members = _members(zpath)
    members[f"rev-A/{MANIFEST}"] = b'{"format": "basisbook snapshot 2", "files": []}'
    _rezip(zpath, members)
    _not_verified(["verify", str(zpath), "--rebuild"], capsys, "'files' must map")


def test_a_seal_file_of_the_wrong_shape_fails(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (arch / "seal-rev-A.json").write_text('["sealed"]')
    _not_verified(["verify", str(arch / "rev-A")], capsys, "seal file seal-rev-A.json is unreadable")


@pytest.mark.parametrize(("results", "reason"), [(b"{ not json", "results.json is missing or not JSON"),
                                                 (b"[]", "results.json is not a basisbook results document")],
                         ids=["not-json", "a-list"])
def test_a_resealed_results_file_that_is_not_results_fails_the_rebuild(
        arch: Path, results: bytes, reason: str, capsys: pytest.CaptureFixture[str]) -> None:
    (arch / "rev-A" / "results.json").write_bytes(results)
    m = _manifest(arch)
    m["files"]["results.json"] = hashlib.sha256(results).hexdigest()
    _write_manifest(arch, m, member=True, seal_file=True)
    (arch / "rev-A.zip").unlink()
    assert main(["verify", str(arch / "rev-A")]) == 0  # resealed: the hashes hold
    capsys.readouterr()
    _not_verified(["verify", str(arch / "rev-A"), "--rebuild"], capsys, f"not verified: rebuild: {reason}")


def test_archived_inputs_that_no_longer_load_fail_the_rebuild(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    m = _manifest(arch)
    m["files"][INPUT] = _edit_file(arch, INPUT, b"generator_power_factor = 0.8", b"generator_power_factor = 1.8")
    _write_manifest(arch, m, member=True, seal_file=True)
    (arch / "rev-A.zip").unlink()
    _not_verified(["verify", str(arch / "rev-A"), "--rebuild"], capsys,
                  "not verified: rebuild: the archived inputs do not run", "generator_power_factor")


# --- the shipped revision A, written before the seal (format 1) ----------------------------

def test_the_shipped_unsealed_revision_verifies_and_says_so(capsys: pytest.CaptureFixture[str]) -> None:
    for target in ("rev-A", "rev-A.zip"):
        assert main(["verify", str(DEMO / "archive" / target)]) == 0
        out = capsys.readouterr().out
        assert "verified (format 1, unsealed:" in out and "cannot be proven unchanged" in out
    v = verify(DEMO / "archive" / "rev-A")
    assert v.ok and v.format == 1 and not v.sealed
    assert main(["verify", str(DEMO / "archive" / "rev-A"), "--seal", v.seal]) == 0
    assert "matches the seal given" in capsys.readouterr().out


@pytest.fixture
def legacy(tmp_path: Path) -> Path:
    dst = tmp_path / "archive"
    shutil.copytree(DEMO / "archive", dst)
    return dst


def test_an_unsealed_manifest_edited_in_the_folder_only_fails_on_its_zip(
        legacy: Path, capsys: pytest.CaptureFixture[str]) -> None:
    p = legacy / "rev-A" / MANIFEST
    p.write_text(p.read_text().replace('"approved": "S. Varga"', '"approved": "A. Forger"'))
    _not_verified(["verify", str(legacy / "rev-A")], capsys, f"rev-A.zip holds a different {MANIFEST}")


def test_an_unsealed_manifest_checked_against_a_recorded_seal(legacy: Path, capsys: pytest.CaptureFixture[str]) -> None:
    issued = verify(legacy / "rev-A").seal
    for target in ("rev-A", "rev-A.zip"):
        members = legacy / target
        if target == "rev-A":
            p = members / MANIFEST
            p.write_text(p.read_text().replace('"approved": "S. Varga"', '"approved": "A. Forger"'))
        else:
            m = _members(members)
            name = f"rev-A/{MANIFEST}"
            m[name] = m[name].replace(b'"approved": "S. Varga"', b'"approved": "A. Forger"')
            _rezip(members, m)
    assert main(["verify", str(legacy / "rev-A")]) == 0  # both edited alike: unsealed, it cannot tell
    capsys.readouterr()
    _not_verified(["verify", str(legacy / "rev-A"), "--seal", issued], capsys, "does not match the seal given")
    _not_verified(["verify", str(legacy / "rev-A.zip"), "--seal", f"sha256:{issued.upper()}"], capsys,
                  "does not match the seal given")


def test_an_unsealed_snapshot_with_a_planted_seal_member_fails(legacy: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (legacy / "rev-A" / SEAL_MEMBER).write_bytes(seal_member_bytes("0" * 64))
    _not_verified(["verify", str(legacy / "rev-A")], capsys, f"format 1 (unsealed) but {SEAL_MEMBER}")


# --- what a killed archive leaves, tidied by the next run -------------------------------------

def test_archive_removes_temporaries_of_a_killed_run_and_says_so(single_revision_copy: Path,
                                                                 capsys: pytest.CaptureFixture[str]) -> None:
    arch = single_revision_copy / "archive"
    (arch / ".rev-A.new-k3j2x9" / "site").mkdir(parents=True)
    (arch / ".rev-A.new-k3j2x9" / "site" / "index.html").write_text("half")
    (arch / ".rev-A.zip.new-4242").write_bytes(b"PK half")
    (arch / ".seal-rev-A.json.new-4242").write_text("{")
    (arch / ".rev-0.new-old").mkdir()
    keep = arch / ".notes"  # not ours: never touched
    keep.write_text("mine")
    assert main(["archive", str(single_revision_copy)]) == 0
    out = capsys.readouterr()
    assert out.out.startswith("archived revision A into ")
    tidied = [line for line in out.err.splitlines() if "tidied" in line]
    assert len(tidied) == 1 and "removed 4 temporary files" in tidied[0], out.err
    assert ".rev-A.zip.new-4242" in tidied[0]
    assert sorted(p.name for p in arch.iterdir()) == [".notes", "rev-A", "rev-A.zip", "seal-rev-A.json"]
    assert verify(arch / "rev-A").sealed


def test_a_seal_left_without_its_snapshot_is_removed_and_the_revision_archived(
        single_revision_copy: Path, capsys: pytest.CaptureFixture[str]) -> None:
    arch = single_revision_copy / "archive"
    arch.mkdir()
    (arch / "seal-rev-A.json").write_text('{"format": "basisbook seal 1"}')  # killed before the folder's rename
    assert main(["archive", str(single_revision_copy)]) == 0
    assert "removed seal-rev-A.json (its snapshot was never put in place)" in capsys.readouterr().err
    assert verify(arch / "rev-A").sealed


def test_a_zip_whose_rename_was_cut_off_is_put_in_place(project: Path, capsys: pytest.CaptureFixture[str]) -> None:
    arch = project / "archive"
    os.rename(arch / "rev-A.zip", arch / ".rev-A.zip.new-31337")
    (arch / ".rev-A.zip.new-1").write_bytes(b"another run's half zip")
    assert verify(arch / "rev-A").ok  # the folder verifies meanwhile (its seal file was first)
    assert main(["archive", str(project)]) == 2  # and revision A is archived, so never again
    err = capsys.readouterr().err
    assert "put rev-A.zip in place" in err and "removed 1 temporary file (.rev-A.zip.new-1)" in err
    assert "already archived" in err
    assert sorted(p.name for p in arch.iterdir()) == ["rev-A", "rev-A.zip", "seal-rev-A.json"]
    assert verify(arch / "rev-A").sealed and verify(arch / "rev-A").zip_checked


def test_a_second_archive_at_the_same_time_is_refused(single_revision_copy: Path,
                                                      capsys: pytest.CaptureFixture[str]) -> None:
    arch = single_revision_copy / "archive"
    arch.mkdir()
    (arch / ".rev-A.new-busy").mkdir()  # the running archive's own temporary folder
    fd = os.open(arch, os.O_RDONLY)
    try:
        fcntl.flock(fd, fcntl.LOCK_EX)
        assert main(["archive", str(single_revision_copy)]) == 2
    finally:
        os.close(fd)
    assert "another basisbook archive is writing" in capsys.readouterr().err
    assert [p.name for p in arch.iterdir()] == [".rev-A.new-busy"]  # left alone


def test_a_seal_that_is_no_sha256_is_bad_input(arch: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["verify", str(arch / "rev-A"), "--seal", "12ab"]) == 2
    assert "--seal: expected the 64 hexadecimal digits of a SHA-256" in capsys.readouterr().err


@pytest.mark.slow
def test_the_run_after_a_killed_archive_completes_it_and_leaves_nothing_hidden(single_revision_copy: Path) -> None:
    import random
    import signal
    import subprocess
    import sys
    import time

    from conftest import ROOT

    root = single_revision_copy
    arch = root / "archive"

    def start() -> subprocess.Popen:
        return subprocess.Popen([sys.executable, "-m", "basisbook", "archive", str(root)], cwd=ROOT,
                                stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)

    t0 = time.monotonic()
    first = start()
    _, err = first.communicate(timeout=120)
    assert first.returncode == 0, err
    duration = time.monotonic() - t0
    rng = random.Random(20261202)  # fixed seed: the same moments on every run
    for _ in range(4):
        shutil.rmtree(arch)
        proc = start()
        time.sleep(rng.uniform(0.3, 1.0) * duration)  # mostly while the site is written
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        again = start()
        _, err = again.communicate(timeout=120)
        assert again.returncode in (0, 2), err
        assert again.returncode == 0 or "already archived" in err, err
        assert sorted(p.name for p in arch.iterdir()) == ["rev-A", "rev-A.zip", "seal-rev-A.json"], err
        assert verify(arch / "rev-A").sealed and verify(arch / "rev-A").zip_checked
