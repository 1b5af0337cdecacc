"""Prove an archived revision unchanged.

``verify`` re-hashes a snapshot (folder or zip) against its manifest, checks the manifest
against its seal, and, on request, rebuilds it from its own inputs with today's code and
libraries and reports every result that moved.

A folder verifies when: nothing in it is a symlink or other non-regular file; every file
the manifest lists is there with its SHA-256 and nothing else is; the manifest is in its
canonical form with the right file count and fingerprint; ``manifest.seal`` and the seal
file beside the folder (``seal-rev-X.json``) both hold the SHA-256 of the manifest; and the
zip beside it, when there is one, verifies too and holds the same manifest.

A zip verifies when: its bytes are exactly a zip as ``archive`` lays it out (no bytes
before, between or after the members, no comment, local headers agreeing with the central
directory); every member has the fixed timestamp, mode and no extra field; every member
reads back with a good CRC; its members are exactly the manifest's files, with their
SHA-256; its manifest checks as above against ``manifest.seal``; and, when the seal file
sits beside it, the SHA-256 of the whole zip and of the manifest match the seal file.

A snapshot written before the seal (format 1) has no seal to check: it verifies when its
files match, and is reported as unsealed, since its manifest (approver, dates, versions)
cannot be proven unchanged on its own.  A format-1 manifest beside a seal, or holding one,
is refused (a sealed manifest replaced by an unsealed one).  ``expect_seal`` (``verify
--seal``) checks the manifest against a seal recorded elsewhere, for either format.

Anything that makes a snapshot fail is a reason in ``Verification.problems`` (exit 1),
never an exception; only a path that is no snapshot at all is a ProjectError (exit 2).
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import stat
import struct
import tempfile
import zipfile
import zlib
from dataclasses import dataclass, field
from pathlib import Path, PurePosixPath
from typing import Any

from basisbook.contract.errors import Problem, ProjectError
from basisbook.reading import project as project_mod
from basisbook.revisions.archive import ZIP_MODE, ZIP_TIME
from basisbook.revisions.snapshot import (
    FORMAT_1,
    FORMAT_2,
    MANIFEST,
    SEAL_FORMAT,
    SEAL_MEMBER,
    fingerprint,
    manifest_bytes,
    seal_member_bytes,
    seal_path,
    sha256,
)
from basisbook.running import engine
from basisbook.running.results import results_document

_HEX = re.compile(r"[0-9a-f]{64}")
_FORMATS = {FORMAT_1: 1, FORMAT_2: 2}
_RESERVED = (MANIFEST, SEAL_MEMBER)


@dataclass
class Verification:
    snapshot: str
    revision: str
    added: list[str] = field(default_factory=list)
    missing: list[str] = field(default_factory=list)
    changed: list[str] = field(default_factory=list)
    result_changes: list[str] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)  # every other reason it does not verify
    checked: int = 0
    format: int = 0  # 1: unsealed (before the seal), 2: sealed
    seal: str = ""  # the SHA-256 of the manifest (for either format)
    zip_checked: bool = False  # a folder's zip beside it was verified too

    @property
    def ok(self) -> bool:
        return not (self.added or self.missing or self.changed or self.result_changes or self.problems)

    @property
    def sealed(self) -> bool:
        return self.ok and self.format == 2


class _Refused(Exception):
    """A reason the snapshot does not verify, found where checking cannot go on."""


@dataclass
class _Contents:
    """What a snapshot holds, read from a folder or a zip."""

    files: dict[str, str] = field(default_factory=dict)  # regular files but the two below: SHA-256
    manifest: bytes | None = None
    seal_member: bytes | None = None
    reported: set[str] = field(default_factory=set)  # symlinks and unreadable members (said already)


def verify(path: Path, rebuild: bool = False, rel_tol: float = 1e-9,
           expect_seal: str | None = None) -> Verification:
    """Verify a snapshot folder or zip (see the module's description of what is checked)."""
    path = Path(path)
    if expect_seal is not None:
        given, expect_seal = expect_seal, expect_seal.strip().lower().removeprefix("sha256:")
        if not _HEX.fullmatch(expect_seal):
            raise ProjectError([Problem("--seal", None, "", f"expected the 64 hexadecimal digits of a "
                                        f"SHA-256, as archive prints them, got {given!r}")])
    if path.is_symlink():
        v = Verification(str(path), "?")
        v.problems.append(f"symlink {path} -> {os.readlink(path)}: a snapshot is verified where it "
                          "lies, never through a link")
        return v
    if path.is_dir():
        if not os.path.lexists(path / MANIFEST):
            raise ProjectError([Problem(str(path), None, "", f"not a basisbook snapshot: no {MANIFEST}")])
        return _verify_folder(path, rebuild, rel_tol, expect_seal)
    if path.is_file():
        if not zipfile.is_zipfile(path):
            raise ProjectError([Problem(str(path), None, "", "not a snapshot folder or snapshot zip file")])
        return _verify_zip(path, rebuild, rel_tol, expect_seal)
    raise ProjectError([Problem(str(path), None, "", "no such snapshot folder or zip file")])


# --- a folder ---------------------------------------------------------------------------

def _verify_folder(folder: Path, rebuild: bool, rel_tol: float, expect_seal: str | None) -> Verification:
    v = Verification(str(folder), "?")
    contents = _read_folder(folder, v)
    manifest, _ = _check(v, contents, seal_path(folder), seal_file_required=True, expect_seal=expect_seal)
    zpath = folder.parent / f"{folder.name}.zip"
    if zpath.is_symlink() or (os.path.lexists(zpath) and not zpath.is_file()):
        v.problems.append(f"{zpath.name} beside the snapshot is a symlink or not a regular file")
    elif zpath.is_file():
        try:
            z = _verify_zip(zpath, False, rel_tol, None)
        except ProjectError as exc:  # not a snapshot zip at all
            z = Verification(str(zpath), "?", problems=[p.message for p in exc.problems])
        v.zip_checked = True
        for label, names in (("added", z.added), ("missing", z.missing), ("changed", z.changed)):
            v.problems.extend(f"{zpath.name}: {label} member {n}" for n in names)
        v.problems.extend(f"{zpath.name}: {p}" for p in z.problems)
        if contents.manifest is not None and z.seal and z.seal != hashlib.sha256(contents.manifest).hexdigest():
            v.problems.append(f"{zpath.name} holds a different {MANIFEST} than the folder")
    if rebuild and manifest is not None and not contents.reported:
        _rebuild(v, folder, rel_tol)
    return v


def _read_folder(folder: Path, v: Verification) -> _Contents:
    """Hash every regular file below ``folder`` without following a link; report links,
    other non-regular files and folders that hold nothing."""
    out = _Contents()
    for here, dirs, names in _walk(folder):
        rel_here = here.relative_to(folder)
        for name in dirs + names:
            p = here / name
            rel = (rel_here / name).as_posix()
            mode = os.lstat(p).st_mode
            if stat.S_ISLNK(mode):
                v.problems.append(f"symlink {rel} -> {os.readlink(p)}: a snapshot holds only its own files")
                out.reported.add(rel)
            elif stat.S_ISDIR(mode):
                with os.scandir(p) as entries:
                    if next(entries, None) is None:
                        v.added.append(f"{rel}/")  # a folder holding nothing: not the archive's
            elif not stat.S_ISREG(mode):
                v.problems.append(f"{rel} is not a regular file")
            elif rel == MANIFEST:
                out.manifest = p.read_bytes()
            elif rel == SEAL_MEMBER:
                out.seal_member = p.read_bytes()
            else:
                out.files[rel] = sha256(p)
    return out


def _walk(folder: Path) -> list[tuple[Path, list[str], list[str]]]:
    return [(Path(here), sorted(dirs), sorted(names))
            for here, dirs, names in os.walk(folder, followlinks=False)]


# --- a zip ------------------------------------------------------------------------------

def _verify_zip(zpath: Path, rebuild: bool, rel_tol: float, expect_seal: str | None) -> Verification:
    v = Verification(str(zpath), "?")
    data = zpath.read_bytes()
    try:
        members, top = _read_zip(zpath, data, v)
    except _Refused as exc:
        v.problems.append(str(exc))
        return v
    contents = _Contents(reported={rel for rel in v.changed})  # unreadable members
    for rel, body in members.items():
        if rel == MANIFEST:
            contents.manifest = body
        elif rel == SEAL_MEMBER:
            contents.seal_member = body
        else:
            contents.files[rel] = hashlib.sha256(body).hexdigest()
    spath = seal_path(zpath)
    manifest, seal_doc = _check(v, contents, spath, seal_file_required=False, expect_seal=expect_seal)
    if seal_doc is not None and hashlib.sha256(data).hexdigest() != seal_doc["zip_sha256"]:
        v.problems.append(f"the SHA-256 of the whole zip does not match the one in {spath.name} "
                          "(the zip was changed after it was sealed)")
    if rebuild and manifest is not None:
        with tempfile.TemporaryDirectory(prefix="basisbook-verify-") as work:
            folder = Path(work) / top
            for rel, body in members.items():
                (folder / rel).parent.mkdir(parents=True, exist_ok=True)
                (folder / rel).write_bytes(body)
            _rebuild(v, folder, rel_tol)
    return v


_EOCD = struct.Struct("<4s4H2LH")  # end of central directory record
_CENTRAL = struct.Struct("<4s6H3L5H2L")  # central directory file header
_LOCAL = struct.Struct("<4s5H3L2H")  # local file header


def _zip_layout(data: bytes) -> str | None:
    """Why ``data`` is not laid out as ``archive`` writes a zip, or None: the end record
    last (nothing appended, no comment), the central directory right before it, and every
    member's local header and data back to back from the first byte, agreeing with its
    central directory entry.  (The library reading a zip tolerates all of these.)"""
    if len(data) < _EOCD.size:
        return "the zip is truncated"
    sig, disk, cd_disk, n_here, n_total, cd_size, cd_off, comment = _EOCD.unpack_from(data, len(data) - _EOCD.size)
    if sig != b"PK\x05\x06":
        at = data.rfind(b"PK\x05\x06")
        if at < 0:
            return "the zip has no end record (truncated)"
        return f"{len(data) - at - _EOCD.size} bytes follow the zip's end record (appended, or a comment)"
    if comment:
        return "the zip's end record announces a comment"
    if disk or cd_disk or n_here != n_total:
        return "the zip is split over several disks"
    if cd_off + cd_size != len(data) - _EOCD.size:
        return (f"{len(data) - _EOCD.size - cd_off - cd_size} bytes lie between the zip's central directory "
                "and its end record, or before its first member")
    pos, entry = 0, cd_off
    for _ in range(n_total):
        if entry + _CENTRAL.size > len(data) or data[entry:entry + 4] != b"PK\x01\x02":
            return "the zip's central directory is damaged"
        c = _CENTRAL.unpack_from(data, entry)
        flags, method, mtime, mdate, crc, csize, usize = c[3:10]
        nlen, elen, clen, offset = c[10], c[11], c[12], c[16]
        name = data[entry + _CENTRAL.size:entry + _CENTRAL.size + nlen]
        entry += _CENTRAL.size + nlen + elen + clen
        if offset != pos:
            return f"{offset - pos} bytes lie before member {name.decode(errors='replace')!r} of the zip"
        if pos + _LOCAL.size > len(data) or data[pos:pos + 4] != b"PK\x03\x04":
            return f"the local header of {name.decode(errors='replace')!r} is damaged"
        lc = _LOCAL.unpack_from(data, pos)
        if lc[2:9] != (flags, method, mtime, mdate, crc, csize, usize) or \
                data[pos + _LOCAL.size:pos + _LOCAL.size + lc[9]] != name:
            return (f"the local header of {name.decode(errors='replace')!r} disagrees with the zip's "
                    "central directory (timestamp, sizes, CRC or name)")
        pos += _LOCAL.size + lc[9] + lc[10] + csize  # (no data descriptors: the archive writes none)
    if entry != cd_off + cd_size:
        return "the zip's central directory is damaged"
    if pos != cd_off:
        return f"{cd_off - pos} bytes lie between the zip's last member and its central directory"
    return None


def _read_zip(zpath: Path, data: bytes, v: Verification) -> tuple[dict[str, bytes], str]:
    """The zip's members below its one top folder, as relative path -> bytes, after checking
    its layout and every member's timestamp, mode and CRC."""
    import io

    layout = _zip_layout(data)
    if layout is not None:
        v.problems.append(layout)
    try:
        z = zipfile.ZipFile(io.BytesIO(data))
    except (zipfile.BadZipFile, ValueError, struct.error, EOFError) as exc:
        raise _Refused(f"the zip is unreadable ({exc})") from None
    with z:
        infos = z.infolist()
        names = [i.filename for i in infos]
        for n in names:
            if not _safe(n):
                raise ProjectError([Problem(str(zpath), None, "", f"refusing unsafe path {n!r} in the zip")])
        tops = {n.split("/", 1)[0] for n in names}
        if len(tops) != 1 or not any(n == f"{t}/{MANIFEST}" for t in tops for n in names):
            raise ProjectError([Problem(str(zpath), None, "", f"not a basisbook snapshot zip: no {MANIFEST}")])
        top = tops.pop()
        if len(set(names)) != len(names):
            v.problems.append("the zip holds the same member twice")
        if z.comment:
            v.problems.append("the zip carries a comment")
        members: dict[str, bytes] = {}
        for info in infos:
            rel = info.filename[len(top) + 1:]
            if info.is_dir() or not rel:
                v.problems.append(f"the zip holds a folder entry {info.filename!r}")
                continue
            if info.date_time != ZIP_TIME:
                v.problems.append(f"{info.filename}: timestamp {_when(info.date_time)} is not the fixed "
                                  f"{_when(ZIP_TIME)} the archive writes")
            if info.external_attr != ZIP_MODE:
                kind = "a symlink" if stat.S_ISLNK(info.external_attr >> 16) else "not a plain file"
                v.problems.append(f"{info.filename}: {kind} (mode {info.external_attr >> 16:o}), not the "
                                  "rw-r--r-- file the archive writes")
            if info.extra or info.comment:
                v.problems.append(f"{info.filename}: carries an extra field or comment the archive never writes")
            try:
                members[rel] = z.read(info)
            except (zipfile.BadZipFile, zlib.error, EOFError, ValueError, NotImplementedError,
                    RuntimeError, OSError) as exc:
                v.problems.append(f"{info.filename}: unreadable ({exc})")
                v.changed.append(rel)
    return members, top


def _when(t: tuple[int, ...]) -> str:
    return "{:04d}-{:02d}-{:02d} {:02d}:{:02d}:{:02d}".format(*t)


# --- the manifest and its seal ----------------------------------------------------------

def _safe(rel: str) -> bool:
    parts = PurePosixPath(rel).parts
    return bool(rel) and not rel.startswith("/") and "\\" not in rel and \
        all(p not in ("", ".", "..") for p in parts) and "\x00" not in rel


def _parse_manifest(data: bytes) -> dict[str, Any]:
    """The manifest, checked for its shape; _Refused says what is wrong."""
    try:
        m = json.loads(data.decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as exc:
        raise _Refused(f"{MANIFEST} is not JSON ({exc})") from None
    if not isinstance(m, dict):
        raise _Refused(f"{MANIFEST} is not a basisbook manifest (a JSON {type(m).__name__}, not an object)")
    fmt = m.get("format")
    if fmt not in _FORMATS:
        raise _Refused(f"{MANIFEST}: unknown snapshot format {fmt!r}")
    files = m.get("files")
    if not isinstance(files, dict) or not files:
        raise _Refused(f"{MANIFEST}: 'files' must map each file's path to its SHA-256")
    for rel, digest in files.items():
        if not _safe(rel) or rel in _RESERVED:
            raise _Refused(f"{MANIFEST}: 'files' lists an impossible path {rel!r}")
        if not isinstance(digest, str) or not _HEX.fullmatch(digest):
            raise _Refused(f"{MANIFEST}: the SHA-256 of {rel} is {digest!r}, not 64 hexadecimal digits")
    rev = m.get("revision")
    if not isinstance(rev, dict) or not isinstance(rev.get("id"), str) or \
            not all(isinstance(x, (str, type(None))) for x in rev.values()):
        raise _Refused(f"{MANIFEST}: 'revision' must hold the revision's id, date and names as text")
    inputs = m.get("input_files", [])
    if not isinstance(inputs, list) or not all(isinstance(r, str) for r in inputs):
        raise _Refused(f"{MANIFEST}: 'input_files' must be a list of paths")
    for key in ("tool", "libraries"):
        if not isinstance(m.get(key, {}), dict):
            raise _Refused(f"{MANIFEST}: {key!r} must be an object")
    if fmt == FORMAT_2:
        for key in ("project", "tool", "libraries", "input_files"):
            if key not in m:
                raise _Refused(f"{MANIFEST}: no {key!r}")
        if manifest_bytes(m) != data:
            raise _Refused(f"{MANIFEST} is not in the canonical form the archive writes (it was rewritten)")
        count = m.get("file_count")
        if type(count) is not int or count != len(files):
            raise _Refused(f"{MANIFEST}: 'file_count' is {count!r} but it lists {len(files)} files")
        if m.get("fingerprint") != fingerprint(files):
            raise _Refused(f"{MANIFEST}: the revision fingerprint does not match the files it lists")
    return m


def _check(v: Verification, c: _Contents, spath: Path, seal_file_required: bool,
           expect_seal: str | None) -> tuple[dict[str, Any] | None, dict[str, str] | None]:
    """Check the contents against the manifest and the manifest against its seals; fill in
    ``v``; return the manifest (None when it could not be read) and the seal file's content
    (None when there is none, or it does not hold)."""
    if c.manifest is None:
        if MANIFEST not in c.reported:
            v.problems.append(f"{MANIFEST} is not a regular file")
        return None, None
    try:
        m = _parse_manifest(c.manifest)
    except _Refused as exc:
        v.problems.append(str(exc))
        return None, None
    expected: dict[str, str] = m["files"]
    v.revision = m["revision"]["id"]
    v.format = _FORMATS[m["format"]]
    v.checked = len(expected)
    v.seal = hashlib.sha256(c.manifest).hexdigest()
    present = c.files
    v.added = sorted(set(v.added) | (set(present) - set(expected)))
    v.missing = sorted(rel for rel in set(expected) - set(present)
                       if not any(rel == r or rel.startswith(f"{r}/") for r in c.reported))
    v.changed = sorted(set(v.changed) | {rel for rel in set(present) & set(expected) if present[rel] != expected[rel]})
    lost = [rel for rel in m.get("input_files", []) if f"project/{rel}" not in expected]
    if lost:
        v.problems.append(f"{MANIFEST}: input files not among its files: {', '.join(lost)}")
    has_seal_file = os.path.lexists(spath)
    doc = None
    if v.format == 1:
        if c.seal_member is not None or SEAL_MEMBER in c.reported:
            v.problems.append(f"{MANIFEST} is of format 1 (unsealed) but {SEAL_MEMBER} lies beside it: "
                              "a sealed manifest was replaced")
        if has_seal_file:
            v.problems.append(f"{MANIFEST} is of format 1 (unsealed) but {spath.name} lies beside the "
                              "snapshot: a sealed manifest was replaced")
    else:
        if c.seal_member is None:
            if SEAL_MEMBER not in c.reported:
                v.problems.append(f"no {SEAL_MEMBER} beside {MANIFEST}")
        elif c.seal_member != seal_member_bytes(v.seal):
            v.problems.append(f"{MANIFEST} does not match its seal in {SEAL_MEMBER} (the manifest was edited)")
        if has_seal_file:
            doc = _seal_file(spath, v)
            if doc is not None:
                if doc["manifest_sha256"] != v.seal:
                    v.problems.append(f"{MANIFEST} does not match its seal in {spath.name} (the manifest "
                                      "was edited)")
                if doc["revision"] != v.revision:
                    v.problems.append(f"{spath.name} seals revision {doc['revision']}, the manifest says "
                                      f"{v.revision}")
        elif seal_file_required:
            v.problems.append(f"no seal file {spath.name} beside the snapshot")
    if expect_seal is not None and expect_seal != v.seal:
        v.problems.append(f"{MANIFEST} does not match the seal given ({expect_seal}); its SHA-256 is {v.seal}")
    return m, doc


def _seal_file(spath: Path, v: Verification) -> dict[str, str] | None:
    """The seal file's content, or None (the reason added to ``v``)."""
    if spath.is_symlink() or not spath.is_file():
        v.problems.append(f"the seal file {spath.name} is a symlink or not a regular file")
        return None
    try:
        doc = json.loads(spath.read_bytes().decode("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError):
        doc = None
    if not isinstance(doc, dict) or doc.get("format") != SEAL_FORMAT or \
            not all(isinstance(doc.get(k), str) and _HEX.fullmatch(doc[k]) for k in ("manifest_sha256", "zip_sha256")) \
            or not isinstance(doc.get("revision"), str):
        v.problems.append(f"the seal file {spath.name} is unreadable or not a basisbook seal")
        return None
    return doc


# --- the rebuild ------------------------------------------------------------------------

def _rebuild(v: Verification, folder: Path, rel_tol: float) -> None:
    """Run the archived inputs again with today's code and libraries; what moved goes to
    ``v.result_changes``, and why it could not be done to ``v.problems``."""
    try:
        old = json.loads((folder / "results.json").read_bytes().decode("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError) as exc:
        v.problems.append(f"rebuild: results.json is missing or not JSON ({exc})")
        return
    if not _results_shape(old):
        v.problems.append("rebuild: results.json is not a basisbook results document")
        return
    try:
        proj = project_mod.load(folder / "project")
        new = json.loads(json.dumps(results_document(proj, engine.run(proj))))
    except ProjectError as exc:
        first = exc.problems[0] if exc.problems else exc
        v.problems.append(f"rebuild: the archived inputs do not run with today's code ({first})")
        return
    v.result_changes = compare_results(old, new, rel_tol)


def _results_shape(doc: Any) -> bool:
    return isinstance(doc, dict) and isinstance(doc.get("instances"), dict) and all(
        isinstance(i, dict) and isinstance(i.get("outputs", {}), dict)
        and all(isinstance(o, dict) for o in i.get("outputs", {}).values())
        for i in doc["instances"].values())


def compare_results(old: dict[str, Any], new: dict[str, Any], rel_tol: float) -> list[str]:
    out = []
    for iid in sorted(set(old["instances"]) | set(new["instances"])):
        a = old["instances"].get(iid, {}).get("outputs", {})
        b = new["instances"].get(iid, {}).get("outputs", {})
        for name in sorted(set(a) | set(b)):
            va, vb = a.get(name, {}).get("value"), b.get(name, {}).get("value")
            if isinstance(va, (int, float)) and isinstance(vb, (int, float)):
                scale = max(abs(va), abs(vb), 1e-300)
                if abs(va - vb) > rel_tol * scale:
                    out.append(f"{iid}.{name}: {va!r} -> {vb!r} (change {vb - va:+.3g}, "
                               f"{100 * (vb - va) / scale:+.3g} %)")
            elif va != vb:
                out.append(f"{iid}.{name}: {va!r} -> {vb!r}")
    return out
