"""Records files (load lists): CSV or XLSX in the project folder, one row per item.

Every cell is converted at loading like any other input, and every problem
names the file, the row (the CSV line or the sheet row) and the column.  Each
record keeps its source so a handbook page can link back to the row.
"""

from __future__ import annotations

import csv
import difflib
import io
from pathlib import Path
from typing import Any

from basisbook.contract.errors import Problem
from basisbook.contract.spec import Field, Input, Record, SourceRow
from basisbook.reading.units import UnitProblem, to_unit

MAX_BYTES = 20 * 1024 * 1024  # a load list is kilobytes; refuse what is clearly not one
TRUE_WORDS = {"yes": "yes", "y": "yes", "true": "yes", "1": "yes", "no": "no", "n": "no",
              "false": "no", "0": "no"}


def display_lines(path: Path) -> list[str]:
    """The file as lines for its source page (an XLSX sheet as 'cell | cell' rows)."""
    if path.suffix.lower() == ".xlsx":
        rows = _xlsx_rows(path)
        out: list[str] = []
        for n, cells in rows:
            while len(out) < n - 1:
                out.append("")
            out.append(" | ".join("" if c is None else str(c) for c in cells))
        return out
    return path.read_text(encoding="utf-8-sig").splitlines()


_XLSX_CACHE: dict[bytes, list[tuple[int, list[Any]]]] = {}


def _xlsx_rows(path: Path) -> list[tuple[int, list[Any]]]:
    """The first sheet's rows as (row number, cell values); cached by the file's
    content hash, since ``serve`` reads an unchanged workbook again on every rebuild."""
    import hashlib
    import io

    data = path.read_bytes()
    digest = hashlib.sha256(data).digest()
    if digest not in _XLSX_CACHE:
        import openpyxl

        wb = openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=True)
        try:
            ws = wb.worksheets[0]
            rows = [(i, list(r)) for i, r in enumerate(ws.iter_rows(values_only=True), start=1)]
        finally:
            wb.close()
        if len(_XLSX_CACHE) > 32:  # bounded: a long session edits many versions
            _XLSX_CACHE.clear()
        _XLSX_CACHE[digest] = rows
    return [(i, list(cells)) for i, cells in _XLSX_CACHE[digest]]  # callers get their own lists


def load_records(decl: Input, raw: Any, root: Path, toml_file: str, toml_line: int | None,
                 key: str, problems: list[Problem]) -> tuple[tuple[Record, ...], str] | None:
    """Read the records file named by ``raw``; return (records, file) or None on problems."""
    def fail(msg: str) -> None:
        problems.append(Problem(toml_file, toml_line, key, msg))

    if not isinstance(raw, str) or not raw.strip():
        fail('expected the path of a CSV or XLSX file in the project folder, like "loads/unit1.csv"')
        return None
    path = (root / raw).resolve()
    if not path.is_relative_to(root.resolve()):
        fail(f"{raw!r} is outside the project folder; refused")
        return None
    rel = path.relative_to(root.resolve()).as_posix()
    if not path.is_file():
        fail(f"no such file {rel!r} in the project folder")
        return None
    suffix = path.suffix.lower()
    if suffix not in (".csv", ".xlsx"):
        fail(f"{rel!r}: expected a .csv or .xlsx file")
        return None
    if path.stat().st_size > MAX_BYTES:
        fail(f"{rel!r} is larger than {MAX_BYTES // (1024 * 1024)} MB; not a load list")
        return None
    rows = _read(path, rel, suffix, problems)
    if rows is None:
        return None
    return _convert(decl, rows, rel, problems), rel


def _read(path: Path, rel: str, suffix: str, problems: list[Problem]) -> list[tuple[int, list[Any]]] | None:
    if suffix == ".xlsx":
        try:
            return _xlsx_rows(path)
        except Exception as exc:  # openpyxl raises many types for a damaged file
            problems.append(Problem(rel, None, "", f"cannot read the spreadsheet ({type(exc).__name__})"))
            return None
    data = path.read_bytes()
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        problems.append(Problem(rel, line, "", "the file is not UTF-8 text (save it as UTF-8 CSV)"))
        return None
    # RFC 4180 comma-separated; a semicolon file (common where the decimal mark is a
    # comma) is recognised by its header line
    first = next((ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")), "")
    delimiter = ";" if ";" in first and "," not in first else ","
    out = []
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    for cells in reader:
        out.append((reader.line_num, cells))
    return out


def _blank(cells: list[Any]) -> bool:
    return all(c is None or (isinstance(c, str) and not c.strip()) for c in cells)


def _convert(decl: Input, rows: list[tuple[int, list[Any]]], rel: str,
             problems: list[Problem]) -> tuple[Record, ...]:
    fields = {f.key: f for f in decl.fields}
    body = [(n, c) for n, c in rows if not _blank(c)
            and not (isinstance(c[0], str) and c[0].lstrip().startswith("#"))]
    if not body:
        problems.append(Problem(rel, None, "", "the file is empty: expected a header row "
                                f"({', '.join(fields)}) and one row at least"))
        return ()
    head_line, header = body[0]
    names = ["" if h is None else str(h).strip() for h in header]
    for i, h in enumerate(names):
        if h and h not in fields:
            near = difflib.get_close_matches(h, list(fields), n=1, cutoff=0.6)
            problems.append(Problem(rel, head_line, h, "unknown column" + (f"; did you mean {near[0]!r}?" if near
                                    else f"; expected columns: {', '.join(fields)}")))
        if h and names.count(h) > 1 and names.index(h) == i:
            problems.append(Problem(rel, head_line, h, "column appears twice in the header"))
    for f in decl.fields:
        if f.key not in names and f.default is None:
            problems.append(Problem(rel, head_line, f.key, f"missing column: {f.meaning}"))
    data = body[1:]
    if len(data) < decl.min_rows:
        problems.append(Problem(rel, head_line, "", f"expected at least {decl.min_rows} data row{'s' if decl.min_rows != 1 else ''}, got {len(data)}"))
    seen: dict[str, dict[Any, int]] = {f.key: {} for f in decl.fields if f.unique}
    records = []
    for line, cells in data:
        values: dict[str, Any] = {}
        for f in decl.fields:
            idx = names.index(f.key) if f.key in names else None
            cell = cells[idx] if idx is not None and idx < len(cells) else None
            v = _cell(f, cell, rel, line, problems)
            if v is None:
                continue
            if f.unique:
                if v in seen[f.key]:
                    problems.append(Problem(rel, line, f.key, f"duplicate {f.key} {v!r} "
                                            f"(first at {rel}:{seen[f.key][v]})"))
                seen[f.key].setdefault(v, line)
            values[f.key] = v
        records.append(Record(values, SourceRow(rel, line)))
    return tuple(records)


def _cell(f: Field, cell: Any, rel: str, line: int, problems: list[Problem]) -> Any:
    empty = cell is None or (isinstance(cell, str) and not cell.strip())
    if empty:
        if f.default is None:
            problems.append(Problem(rel, line, f.key, f"missing value: expected {f.meaning}"
                                    + (f" in {f.unit}" if f.unit not in ("", "text", "choice") else "")))
            return None
        return f.default
    if f.unit == "text":
        return str(cell).strip()
    if f.unit == "choice":
        word = str(cell).strip().lower()
        if set(f.choices) <= {"yes", "no"}:
            word = TRUE_WORDS.get(word, word)
        if word not in f.choices:
            near = difflib.get_close_matches(word, list(f.choices), n=1, cutoff=0.6)
            problems.append(Problem(rel, line, f.key, f"expected one of {', '.join(f.choices)}; got {cell!r}"
                                    + (f"; did you mean {near[0]!r}?" if near else "")))
            return None
        return word
    try:
        x = to_unit(cell.strip() if isinstance(cell, str) else cell, f.unit)
    except UnitProblem as exc:
        problems.append(Problem(rel, line, f.key, str(exc)))
        return None
    if not f.allowed.contains(x):
        u = f" {f.unit}" if f.unit else ""
        problems.append(Problem(rel, line, f.key, f"out of range: {x:g}{u} given, allowed {f.allowed.text()}{u}"))
        return None
    return x
