"""Load and validate a project folder.

Layout (a format of our own, plain text, diff-friendly)::

    project.toml      [project] name, client, number, notes; [site] conditions
    revisions.toml    [[revision]] id, date, purpose, prepared, checked, approved, notes
    inputs/*.toml     [[instance]] id, calc, title, notes and [instance.inputs]
    templates/        optional overrides of the built-in templates

An input value is a number in the declared unit, a string with a unit that
pint reads ("11 kV"), a choice word, or a link ``{ from = "stg.apparent_power" }``
(or ``{ from = "site.grid_frequency" }``).  Every value is converted to its
declared unit here, once; problems are collected, never raised one by one.
"""

from __future__ import annotations

import datetime as _dt
import difflib
import math
import os
import re
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

from basisbook.contract.errors import Problem, ProjectError
from basisbook.contract.spec import CalcSpec, Input, Record
from basisbook.reading import catalog
from basisbook.reading.tomlpos import key_lines, line_of
from basisbook.reading.units import UnitProblem, to_unit

MAX_TOML_BYTES = 2 * 1024 * 1024
# ids are matched whole (fullmatch): "$" would also match before a final newline ("zz\n")
INSTANCE_ID = re.compile(r"[a-z][a-z0-9_-]{0,39}")
# a revision id names a folder (archive/rev-<id>): letters, digits, '-' and '.', not leading
REVISION_ID = re.compile(r"[A-Za-z0-9][A-Za-z0-9.-]{0,19}")
RESERVED_IDS = {"index", "site", "project", "results", "glossary", "source", "assets"}
PURPOSES = (
    "issued for information",
    "issued for review",
    "issued for approval",
    "issued for construction",
    "as built",
)

# Site conditions are declared like calc inputs: symbol, meaning, unit, range.
SITE_FIELDS: tuple[Input, ...] = (
    Input("altitude", range="[-500, 5000]", default=0.0,
          symbol="H", meaning="site altitude above mean sea level", unit="m"),
    Input("ambient_temperature_max", range="[-60, 60]", default=40.0,
          symbol=r"\vartheta_{a,max}", meaning="maximum ambient air temperature", unit="degC"),
    Input("ambient_temperature_min", range="[-60, 60]", default=-5.0,
          symbol=r"\vartheta_{a,min}", meaning="minimum ambient air temperature", unit="degC"),
    Input("grid_voltage", range="(0, 1200]",
          symbol=r"U_{n,grid}", meaning="nominal grid voltage at the connection point", unit="kV"),
    Input("grid_frequency", range="[10, 400]",
          symbol=r"f_{n}", meaning="nominal grid frequency", unit="Hz"),
)
PROJECT_KEYS = ("name", "client", "number", "notes", "change_tolerance")
CHANGE_TOLERANCE = Input("change_tolerance", range="[0, 0.5]", default=1e-6, symbol=r"\epsilon",
                         meaning="relative change below which a result counts as unchanged between revisions",
                         unit="")
REVISION_KEYS = ("id", "date", "purpose", "prepared", "checked", "approved", "notes")
INSTANCE_KEYS = ("id", "calc", "title", "notes", "inputs")


@dataclass(frozen=True)
class Source:
    """Where a value came from: a file and line, a link, or the module default."""

    file: str | None = None
    line: int | None = None
    link: tuple[str, str] | None = None  # (instance id or "site", output name)
    default: bool = False


@dataclass
class InputValue:
    name: str
    value: float | str | tuple | None  # None until a link is resolved; tuple of rows for a table
    unit: str
    source: Source


@dataclass
class Revision:
    id: str
    date: str
    purpose: str
    prepared: str
    checked: str
    approved: str
    notes: str
    line: int | None


@dataclass
class Instance:
    id: str
    calc: str
    title: str
    notes: str
    file: str
    line: int | None
    inputs: dict[str, InputValue]

    @property
    def spec(self) -> CalcSpec:
        return catalog.spec(self.calc)


@dataclass
class Project:
    root: Path
    name: str
    client: str
    number: str
    notes: str
    site: dict[str, InputValue]
    revisions: list[Revision]
    instances: list[Instance]
    files: list[str] = field(default_factory=list)
    change_tolerance: float = 1e-6

    @property
    def revision(self) -> Revision:
        return self.revisions[-1]

    def instance(self, iid: str) -> Instance:
        for i in self.instances:
            if i.id == iid:
                return i
        raise KeyError(iid)


class _Collector:
    def __init__(self) -> None:
        self.problems: list[Problem] = []

    def add(self, file: str, line: int | None, key: str, message: str) -> None:
        self.problems.append(Problem(file, line, key, message))


def _suggest(word: str, options: list[str] | tuple[str, ...]) -> str:
    near = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f"; did you mean {near[0]!r}?" if near else ""


def _read_toml(path: Path, rel: str, out: _Collector) -> tuple[dict[str, Any], dict] | None:
    try:
        if path.stat().st_size > MAX_TOML_BYTES:
            out.add(rel, None, "", f"is {path.stat().st_size // 1024} KiB; an input file is expected "
                    f"to be under {MAX_TOML_BYTES // 1024} KiB (is this the right file?)")
            return None
        raw = path.read_bytes()
    except OSError as exc:
        out.add(rel, None, "", f"cannot read the file ({exc.strerror})")
        return None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        out.add(rel, line, "", "the file is not UTF-8 text (save it as UTF-8)")
        return None
    # a byte-order mark (some Windows editors write one) is accepted, as the CSV reader does
    text = text.removeprefix("\ufeff")
    try:
        return _parse_toml(text)
    except RecursionError:
        out.add(rel, None, "", "arrays or inline tables are nested too deep to read "
                "(an input file nests a few levels at most)")
        return None
    except tomllib.TOMLDecodeError as exc:
        msg = str(exc)
        m = re.search(r"\(at line (\d+), column (\d+)\)", msg)
        line = int(m.group(1)) if m else None
        out.add(rel, line, "", f"not valid TOML: {re.sub(r' *[(]at line.*', '', msg)}")
        return None


@lru_cache(maxsize=256)
def _parse_toml(text: str) -> tuple[dict[str, Any], dict]:
    """Parsed TOML and its key lines, cached by the text (``serve`` reads unchanged
    files again on every rebuild).  The loader only reads what it returns."""
    return tomllib.loads(text), key_lines(text)


def _text(value: Any, rel: str, line: int | None, key: str, out: _Collector) -> str:
    if value is None:
        return ""
    if isinstance(value, (str, int, float)) and not isinstance(value, bool):
        return str(value)
    out.add(rel, line, key, f"expected text, got {type(value).__name__}")
    return ""


def _convert_table(decl: Input, raw: Any, rel: str, line: int | None, key: str,
                   out: _Collector) -> tuple | None:
    """Rows of cells, each cell converted to its column's unit and range-checked."""
    labels = ", ".join(f"{c.label} ({c.unit or 'no unit'})" for c in decl.columns)
    if not isinstance(raw, list) or not all(isinstance(r, list) for r in raw):
        out.add(rel, line, key, f"expected a table: a list of rows [{labels}], got {type(raw).__name__}")
        return None
    if len(raw) < decl.min_rows:
        out.add(rel, line, key, f"expected at least {decl.min_rows} rows [{labels}], got {len(raw)}")
        return None
    rows = []
    ok = True
    for n, row in enumerate(raw, start=1):
        if len(row) != len(decl.columns):
            out.add(rel, line, key, f"row {n}: expected {len(decl.columns)} values [{labels}], got {len(row)}")
            ok = False
            continue
        cells = []
        for col, cell in zip(decl.columns, row, strict=True):
            try:
                x = to_unit(cell, col.unit)
            except UnitProblem as exc:
                out.add(rel, line, key, f"row {n}, {col.label}: {exc}")
                ok = False
                continue
            if not col.allowed.contains(x):
                out.add(rel, line, key, f"row {n}, {col.label}: out of range: {_with_unit(f'{x:g}', col.unit)} "
                        f"given, allowed {_with_unit(col.allowed.text(), col.unit)}")
                ok = False
            cells.append(x)
        rows.append(tuple(cells))
    return tuple(rows) if ok else None


def _convert(decl: Input, raw: Any, rel: str, line: int | None, key: str,
             out: _Collector) -> float | str | tuple | None:
    """One value to its declared unit, or a recorded problem."""
    if decl.kind == "table":
        return _convert_table(decl, raw, rel, line, key, out)
    if decl.kind == "choice":
        if not isinstance(raw, str) or raw not in decl.choices:
            out.add(rel, line, key, f"expected one of {', '.join(decl.choices)}; got {raw!r}"
                    + (_suggest(raw, decl.choices) if isinstance(raw, str) else ""))
            return None
        return raw
    try:
        x = to_unit(raw, decl.unit)
    except UnitProblem as exc:
        out.add(rel, line, key, str(exc))
        return None
    msg = check_range(decl, x, "given")
    if msg:
        out.add(rel, line, key, msg)
        return None
    return x


def _with_unit(text: str, unit: str) -> str:
    return f"{text} {unit}" if unit else text


def check_range(decl: Input, x: float, verb: str = "arrives") -> str | None:
    """The out-of-range message for a value, or None when it is allowed."""
    if not math.isfinite(x) or not decl.allowed.contains(x):
        return (f"out of range: {_with_unit(f'{x:g}', decl.unit)} {verb}, allowed "
                f"{_with_unit(decl.allowed.text(), decl.unit)}")
    return None


def _link(raw: Any, rel: str, line: int | None, key: str, out: _Collector) -> tuple[str, str] | None:
    """``{ from = "inst.output" }`` -> ("inst", "output")."""
    extra = sorted(set(raw) - {"from"})
    if extra:
        out.add(rel, line, key, f"a link has only the key 'from'; unknown {extra[0]!r}")
        return None
    target = raw.get("from")
    if not isinstance(target, str) or not re.fullmatch(r"[A-Za-z0-9_-]+\.[A-Za-z0-9_]+", target):
        out.add(rel, line, key, f"a link is written {{ from = \"instance.output\" }}; got {target!r}")
        return None
    a, b = target.split(".")
    return a, b


def _inside(root: Path, rel: str, out: _Collector) -> bool:
    """False (and a problem) when ``root/rel`` is a link that resolves outside the project
    folder: whatever it points at would be read, published and archived."""
    path = root / rel
    try:
        real = path.resolve()
    except (OSError, RuntimeError):  # a link loop
        out.add(rel, None, "", "is a link that cannot be followed (a loop?); refused")
        return False
    if (path.exists() or path.is_symlink()) and not real.is_relative_to(root.resolve()):
        what = "folder" if real.is_dir() else "file"
        out.add(rel, None, "", f"is a link to a {what} outside the project folder ({real}); refused "
                f"(copy the {what} into the project)")
        return False
    return True


def _check_templates(root: Path, out: _Collector) -> None:
    """Every entry of ``templates/`` (links followed) must stay inside the project: the
    renderer reads overrides from there and copies ``templates/static/`` into the site."""
    if not _inside(root, "templates", out) or not (root / "templates").is_dir():
        return
    for n, (folder, dirs, files) in enumerate(os.walk(root / "templates", followlinks=True)):
        if n > 500:  # a few overrides are expected; a link loop must not walk forever
            out.add("templates/", None, "", "holds more than 500 folders; expected a few template overrides")
            return
        base = Path(folder).relative_to(root).as_posix()
        dirs[:] = [d for d in dirs if not (Path(folder, d).is_symlink() and not _inside(root, f"{base}/{d}", out))]
        for f in files:
            if Path(folder, f).is_symlink():
                _inside(root, f"{base}/{f}", out)


def _table(data: dict[str, Any], name: str, rel: str, lines: dict, out: _Collector) -> dict[str, Any]:
    """``data[name]`` when it is a table ([name]); {} and a problem when it is something else."""
    value = data.get(name, {})
    if isinstance(value, dict):
        return value
    out.add(rel, line_of(lines, (name,)), name, f"expected a [{name}] table, got {_what(value)}")
    return {}


def _what(value: Any) -> str:
    """A TOML value's kind and text for a message, shortened."""
    kind = {bool: "true/false", int: "a number", float: "a number", str: "text", list: "an array"}
    text = repr(value)
    other = "a table" if isinstance(value, dict) else "a date or time"
    return f"{kind.get(type(value), other)} {text if len(text) <= 40 else text[:37] + '...'}"


def load(root: Path | str) -> Project:
    """Read and validate a project folder; raise ProjectError listing every problem."""
    root = Path(root)
    out = _Collector()
    if not root.is_dir():
        raise ProjectError([Problem(str(root), None, "", "is not a project folder")])
    files: list[str] = []

    # --- project.toml -----------------------------------------------------
    name = client = number = notes = ""
    change_tolerance = 1e-6
    site: dict[str, InputValue] = {}
    rel = "project.toml"
    inside = _inside(root, rel, out)
    parsed = _read_toml(root / rel, rel, out) if inside and (root / rel).is_file() else None
    if inside and not (root / rel).is_file():
        out.add(rel, None, "", "missing: every project folder has a project.toml")
    if parsed:
        files.append(rel)
        data, lines = parsed
        for k in data:
            if k not in ("project", "site"):
                out.add(rel, line_of(lines, (k,)), k,
                        f"unknown table; expected [project] or [site]{_suggest(k, ['project', 'site'])}")
        meta = _table(data, "project", rel, lines, out)
        for k in meta:
            if k not in PROJECT_KEYS:
                out.add(rel, line_of(lines, ("project", k)), f"project.{k}",
                        f"unknown key{_suggest(k, PROJECT_KEYS)}")
        get = lambda k: _text(meta.get(k), rel, line_of(lines, ("project", k)), f"project.{k}", out)  # noqa: E731
        name, client, number, notes = get("name"), get("client"), get("number"), get("notes")
        if not name.strip():
            out.add(rel, line_of(lines, ("project", "name")) or line_of(lines, ("project",)), "project.name",
                    "missing: the project needs a name" + (f", got {name!r}" if name else ""))
        if "change_tolerance" in meta:
            tol = _convert(CHANGE_TOLERANCE, meta["change_tolerance"], rel,
                           line_of(lines, ("project", "change_tolerance")), "project.change_tolerance", out)
            change_tolerance = tol if isinstance(tol, float) else 1e-6
        sdata = _table(data, "site", rel, lines, out)
        known = [f.name for f in SITE_FIELDS]
        for k in sdata:
            if k not in known:
                out.add(rel, line_of(lines, ("site", k)), f"site.{k}", f"unknown key{_suggest(k, known)}")
        for f in SITE_FIELDS:
            line = line_of(lines, ("site", f.name))
            if f.name not in sdata:
                if f.required:
                    out.add(rel, line_of(lines, ("site",)), f"site.{f.name}",
                            f"missing: expected {f.meaning} in {f.unit}")
                    continue
                site[f.name] = InputValue(f.name, float(f.default), f.unit, Source(default=True))  # type: ignore[arg-type]
                continue
            x = _convert(f, sdata[f.name], rel, line, f"site.{f.name}", out)
            if x is not None:
                site[f.name] = InputValue(f.name, x, f.unit, Source(rel, line))
        lo, hi = site.get("ambient_temperature_min"), site.get("ambient_temperature_max")
        if lo and hi and lo.value > hi.value:  # type: ignore[operator]
            where = lo if not lo.source.default else hi
            out.add(rel, where.source.line or line_of(lines, ("site",)), f"site.{where.name}",
                    f"the minimum ambient temperature ({lo.value:g} degC) is above the maximum "
                    f"({hi.value:g} degC)")

    # --- revisions.toml ---------------------------------------------------
    revisions = _load_revisions(root, out, files)

    # --- inputs/*.toml ----------------------------------------------------
    instances: list[Instance] = []
    seen: dict[str, str] = {}
    inputs_dir = root / "inputs"
    inputs_inside = _inside(root, "inputs", out)
    paths = sorted(inputs_dir.glob("*.toml")) if inputs_inside and inputs_dir.is_dir() else []
    if not paths and inputs_inside:
        out.add("inputs/", None, "", "no calc inputs: expected one or more inputs/*.toml files")
    for path in paths:
        rel = path.relative_to(root).as_posix()
        if not _inside(root, rel, out):
            continue
        parsed = _read_toml(path, rel, out)
        if not parsed:
            continue
        files.append(rel)
        data, lines = parsed
        for k in data:
            if k != "instance":
                out.add(rel, line_of(lines, (k,)), k, f"unknown key; an inputs file holds [[instance]] tables{_suggest(k, ['instance'])}")
        blocks = data.get("instance", [])
        if not isinstance(blocks, list):
            out.add(rel, line_of(lines, ("instance",)), "instance", "expected [[instance]] tables")
            continue
        if not blocks:
            out.add(rel, None, "", "holds no [[instance]] table (an empty file?); remove it or add one")
            continue
        for idx, block in enumerate(blocks):
            inst = _load_instance(block, idx, rel, lines, out, seen, root)
            if inst is not None:
                instances.append(inst)
                for iv in inst.inputs.values():
                    if isinstance(iv.value, tuple) and iv.value and isinstance(iv.value[0], Record):
                        if iv.value[0].source.file not in files:
                            files.append(iv.value[0].source.file)  # a records file: archived and shown

    _check_templates(root, out)
    if out.problems:
        raise ProjectError(out.problems)
    return Project(root, name, client, number, notes, site, revisions, instances, files, change_tolerance)


def _load_revisions(root: Path, out: _Collector, files: list[str]) -> list[Revision]:
    rel = "revisions.toml"
    if not _inside(root, rel, out):
        return []
    if not (root / rel).is_file():
        out.add(rel, None, "", "missing: every project folder has a revisions.toml with one [[revision]] at least")
        return []
    parsed = _read_toml(root / rel, rel, out)
    if not parsed:
        return []
    files.append(rel)
    data, lines = parsed
    revs = data.get("revision", [])
    for k in data:
        if k != "revision":
            out.add(rel, line_of(lines, (k,)), k, f"unknown key; expected [[revision]] tables{_suggest(k, ['revision'])}")
    if not isinstance(revs, list) or not revs:
        out.add(rel, line_of(lines, ("revision",)), "revision", "expected one [[revision]] table at least"
                + (f", got {_what(revs)}" if revs else ""))
        return []
    result: list[Revision] = []
    ids: dict[str, str] = {}  # case-folded id -> id as written
    previous: tuple[str, _dt.date] | None = None  # (id, date) of the revision before
    for i, r in enumerate(revs):
        base = ("revision", i)
        line = line_of(lines, base)
        if not isinstance(r, dict):
            # "revision = [1, 2]": an array of values, not of tables
            out.add(rel, line_of(lines, ("revision",)), "revision",
                    f"expected [[revision]] tables, got {_what(r)} in the array")
            return []
        for k in r:
            if k not in REVISION_KEYS:
                out.add(rel, line_of(lines, base + (k,)), f"revision.{k}", f"unknown key{_suggest(k, REVISION_KEYS)}")
        vals = {}
        for k in REVISION_KEYS:
            v = r.get(k)
            kl = line_of(lines, base + (k,))
            if k == "date":
                if isinstance(v, _dt.date) and not isinstance(v, _dt.datetime):
                    v = v.isoformat()
                elif isinstance(v, str) and re.fullmatch(r"\d{4}-\d{2}-\d{2}", v):
                    try:
                        _dt.date.fromisoformat(v)
                    except ValueError:
                        out.add(rel, kl, "revision.date", f"expected a date like 2026-11-30, got {v!r}, which is not a day of the calendar")
                        v = ""
                else:
                    out.add(rel, kl if v is not None else line, "revision.date",
                            f"expected a date like 2026-11-30, got {v!r}")
                    v = ""
            elif k in ("notes",):
                v = _text(v, rel, kl, f"revision.{k}", out)
            else:
                if v is None or v == "":
                    what = {"prepared": "who prepared it", "checked": "who checked it",
                            "approved": "who approved it"}.get(k, f"its {k}")
                    out.add(rel, line, f"revision.{k}", f"missing: each revision states {what}")
                v = _text(v, rel, kl, f"revision.{k}", out)
            vals[k] = v
        if vals["purpose"] and vals["purpose"] not in PURPOSES:
            out.add(rel, line_of(lines, base + ("purpose",)), "revision.purpose",
                    f"expected one of: {', '.join(PURPOSES)}; got {vals['purpose']!r}"
                    + _suggest(vals["purpose"], PURPOSES))
        rid = vals["id"]
        idl = line_of(lines, base + ("id",)) or line
        if rid and not REVISION_ID.fullmatch(rid):
            # the id names the archive folder: "A/../../X" would write outside the project
            out.add(rel, idl, "revision.id", "expected a revision id: letters, digits, '-' or '.', not "
                    f"starting with '.', at most 20 characters (like 'A', 'B.1', 'P-02'); got {rid!r}")
        elif rid.casefold() in ids:
            first = ids[rid.casefold()]
            out.add(rel, idl, "revision.id", f"revision {rid!r} is listed twice" + (f" (as {first!r}; ids that "
                    "differ only in case would share one archive folder on a case-insensitive disk)" if first != rid else ""))
        ids.setdefault(rid.casefold(), rid)
        if vals["date"]:
            day = _dt.date.fromisoformat(vals["date"])
            if previous and day < previous[1]:
                out.add(rel, line_of(lines, base + ("date",)) or line, "revision.date",
                        f"revision {rid!r} is dated {vals['date']}, before revision {previous[0]!r} "
                        f"({previous[1].isoformat()}); list revisions oldest first")
            previous = (rid, day)
        result.append(Revision(line=line, **vals))
    return result


def _load_instance(block: Any, idx: int, rel: str, lines: dict, out: _Collector,
                   seen: dict[str, str], root: Path) -> Instance | None:
    base = ("instance", idx)
    line = line_of(lines, base)
    if not isinstance(block, dict):
        out.add(rel, line, "instance", "expected a table")
        return None
    for k in block:
        if k not in INSTANCE_KEYS:
            out.add(rel, line_of(lines, base + (k,)), k, f"unknown key{_suggest(k, INSTANCE_KEYS)}")
    iid = block.get("id")
    if not isinstance(iid, str) or not INSTANCE_ID.fullmatch(iid) or iid in RESERVED_IDS:
        out.add(rel, line_of(lines, base + ("id",)) or line, "id",
                "expected an instance id: lower-case letters, digits, '-' or '_', starting with a "
                f"letter, at most 40 characters, not one of {sorted(RESERVED_IDS)}; got {iid!r}")
        return None
    if iid in seen:
        out.add(rel, line_of(lines, base + ("id",)), "id", f"duplicate instance id {iid!r} (first defined in {seen[iid]})")
        return None
    seen[iid] = f"{rel}:{line_of(lines, base + ('id',))}"
    kind = block.get("calc")
    kinds = catalog.kinds()
    if kind not in kinds:
        out.add(rel, line_of(lines, base + ("calc",)) or line, f"{iid}.calc",
                f"unknown calc {kind!r}; available: {', '.join(kinds)}"
                + (_suggest(kind, kinds) if isinstance(kind, str) else ""))
        return None
    spec = catalog.spec(kind)
    title = _text(block.get("title"), rel, line_of(lines, base + ("title",)), f"{iid}.title", out) or spec.title
    notes = _text(block.get("notes"), rel, line_of(lines, base + ("notes",)), f"{iid}.notes", out)
    given = block.get("inputs", {})
    ib = base + ("inputs",)
    if not isinstance(given, dict):
        out.add(rel, line_of(lines, ib), f"{iid}.inputs", "expected a table of inputs")
        given = {}
    for k in given:
        if k not in spec.input_names:
            out.add(rel, line_of(lines, ib + (k,)), f"{iid}.{k}",
                    f"unknown input for {kind}{_suggest(k, spec.input_names)}")
    values: dict[str, InputValue] = {}
    for decl in spec.inputs:
        key = f"{iid}.{decl.name}"
        kl = line_of(lines, ib + (decl.name,))
        if decl.name not in given:
            if decl.required:
                out.add(rel, line_of(lines, ib) or line, key,
                        f"missing input: expected {decl.meaning} in {decl.unit or 'no unit'}"
                        + (f" (one of {', '.join(decl.choices)})" if decl.choices else ""))
                continue
            values[decl.name] = InputValue(decl.name, decl.default, decl.unit, Source(default=True))
            continue
        raw = given[decl.name]
        if decl.kind == "records":
            from basisbook.reading.records import load_records

            loaded = load_records(decl, raw, root, rel, kl, key, out.problems)
            if loaded is not None:
                records, _file = loaded
                # the source is the line naming the file; each record knows its own row
                values[decl.name] = InputValue(decl.name, records, decl.unit, Source(rel, kl))
            continue
        if isinstance(raw, dict) and decl.kind == "table":
            out.add(rel, kl, key, "a table input is written out here, not linked")
            continue
        if isinstance(raw, dict):
            target = _link(raw, rel, kl, key, out)
            if target:
                values[decl.name] = InputValue(decl.name, None, decl.unit, Source(rel, kl, link=target))
            continue
        x = _convert(decl, raw, rel, kl, key, out)
        if x is not None:
            values[decl.name] = InputValue(decl.name, x, decl.unit, Source(rel, kl))
    return Instance(iid, kind, title, notes, rel, line, values)
