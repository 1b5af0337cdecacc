"""Records files (load lists): CSV or XLSX in the project folder, one row per item.

Every cell is converted at loading like any other input, and every problem
names the file, the row (the CSV line or the sheet row) and the column.  Each
record keeps its source so a handbook page can link back to the row.

Number conventions (``convention(path)`` says which one a file is read with, for
a page to show): a comma-separated CSV and text cells of a workbook use the
decimal point ("355.5 kW"); a semicolon-separated CSV, the export of spreadsheet
programs where the decimal mark is a comma, uses the decimal comma ("355,5 kW"),
and a point in one of its numbers is refused as ambiguous (a thousands separator
there).  Common practice, no source.
"""

from __future__ import annotations

import csv
import difflib
import io
import os
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from basisbook.contract.errors import Problem
from basisbook.contract.spec import Field, Input, Record, SourceRow
from basisbook.reading.units import UnitProblem, to_unit

MAX_BYTES = 20 * 1024 * 1024  # a load list is kilobytes; refuse what is clearly not one
TRUE_WORDS = {"yes": "yes", "y": "yes", "true": "yes", "1": "yes", "no": "no", "n": "no",
              "false": "no", "0": "no"}


@dataclass(frozen=True)
class Convention:
    """How a records file is read: its cell separator and decimal mark."""

    kind: str  # "csv" or "xlsx"
    separator: str  # "," or ";" for CSV, "" for a workbook
    decimal: str  # "." or ","

    def text(self) -> str:
        if self.kind == "xlsx":
            return "XLSX workbook, first sheet: numbers as stored; numbers typed as text with a decimal point"
        sep = "semicolons" if self.separator == ";" else "commas"
        mark = "a decimal comma (355,5 kW)" if self.decimal == "," else "a decimal point (355.5 kW)"
        return f"CSV, cells separated by {sep}, numbers with {mark}"


def _csv_convention(text: str) -> Convention:
    # RFC 4180 comma-separated; a semicolon file (common where the decimal mark is a
    # comma) is recognised by its header line
    first = next((ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")), "")
    if ";" in first and "," not in first:
        return Convention("csv", ";", ",")
    return Convention("csv", ",", ".")


def convention(path: Path) -> Convention:
    """The convention ``path`` (a .csv or .xlsx load list) is read with."""
    if path.suffix.lower() == ".xlsx":
        return Convention("xlsx", "", ".")
    return _csv_convention(path.read_bytes().decode("utf-8-sig", errors="replace"))


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


@dataclass(frozen=True)
class _Sheet:
    rows: tuple[tuple[int, tuple[Any, ...]], ...]  # (row number, cell values)
    merged: tuple[tuple[str, int, int], ...]  # (range like "B3:B5", first row, first column)
    formulas: dict[tuple[int, int], str]  # (row, column) -> formula, for formulas with no saved result


_XLSX_CACHE: dict[bytes, _Sheet] = {}


def _sheet(path: Path) -> _Sheet:
    """The first sheet's values, merged ranges and unsaved formulas; cached by the file's
    content hash, since ``serve`` reads an unchanged workbook again on every rebuild."""
    import hashlib

    data = path.read_bytes()
    digest = hashlib.sha256(data).digest()
    if digest not in _XLSX_CACHE:
        import openpyxl

        # not read-only: merged ranges are known only to a fully loaded sheet
        wb = openpyxl.load_workbook(io.BytesIO(data), data_only=True)
        try:
            ws = wb.worksheets[0]
            rows = tuple((i, tuple(r)) for i, r in enumerate(ws.iter_rows(values_only=True), start=1))
            merged = tuple(sorted((str(m), m.min_row, m.min_col) for m in ws.merged_cells.ranges))
        finally:
            wb.close()
        # a formula's result is what a spreadsheet program saved with it; a workbook written by
        # a script has none, and the cell would read as empty
        formulas: dict[tuple[int, int], str] = {}
        wf = openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=False)
        try:
            for i, r in enumerate(wf.worksheets[0].iter_rows(values_only=True), start=1):
                for j, v in enumerate(r, start=1):
                    if isinstance(v, str) and v.startswith("=") and i <= len(rows) \
                            and (j > len(rows[i - 1][1]) or rows[i - 1][1][j - 1] is None):
                        formulas[(i, j)] = v
        finally:
            wf.close()
        if len(_XLSX_CACHE) > 32:  # bounded: a long session edits many versions
            _XLSX_CACHE.clear()
        _XLSX_CACHE[digest] = _Sheet(rows, merged, formulas)
    return _XLSX_CACHE[digest]


def _xlsx_rows(path: Path) -> list[tuple[int, list[Any]]]:
    """The first sheet's rows as (row number, cell values); callers get their own lists."""
    return [(i, list(cells)) for i, cells in _sheet(path).rows]


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
        # a link inside the folder pointing out is named as a link: the path itself looks fine
        inside = Path(os.path.normpath(root.resolve() / raw)).is_relative_to(root.resolve())
        fail(f"{raw!r} is a link to a file outside the project folder ({path}); refused" if inside
             else f"{raw!r} is outside the project folder; refused")
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
    read = _read(path, rel, suffix, problems)
    if read is None:
        return None
    rows, conv, sheet = read
    return _convert(decl, rows, rel, problems, conv, sheet), rel


def _read(path: Path, rel: str, suffix: str, problems: list[Problem]
          ) -> tuple[list[tuple[int, list[Any]]], Convention, _Sheet | None] | None:
    if suffix == ".xlsx":
        try:
            sheet = _sheet(path)
        except Exception as exc:  # openpyxl raises many types for a damaged file
            problems.append(Problem(rel, None, "", f"cannot read the spreadsheet ({type(exc).__name__})"))
            return None
        return [(i, list(cells)) for i, cells in sheet.rows], Convention("xlsx", "", "."), sheet
    data = path.read_bytes()
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        problems.append(Problem(rel, line, "", "the file is not UTF-8 text (save it as UTF-8 CSV)"))
        return None
    conv = _csv_convention(text)
    out = []
    # strict: a quote left open is an error at the end of the file, not one huge last cell
    reader = csv.reader(io.StringIO(text), delimiter=conv.separator, strict=True)
    last = 0  # the line the previous row ended on: a failing row starts after it
    try:
        for cells in reader:
            out.append((reader.line_num, cells))
            last = reader.line_num
    except csv.Error as exc:
        msg = str(exc)
        if "field larger than field limit" in msg:
            why = (f"a cell in the row starting at line {last + 1} is longer than {csv.field_size_limit()} "
                   "characters; a load list cell is a word or a number (is this the right file?)")
        elif "NUL" in msg:
            why = f"line {last + 1} holds a NUL character: is this a text CSV file?"
        elif "end of data" in msg or "EOF" in msg or reader.line_num > last + 1:
            # the quote ran to the end of the file, or on until the next quote of a later line
            why = (f"unclosed quote starting at line {last + 1}: a cell opened with '\"' never ends "
                   "(close it, or write a quote inside a quoted cell as '\"\"')")
        else:
            why = (f"a quote inside a cell at line {last + 1} ({msg}): a quoted cell ends at a separator; "
                   "write a quote inside a quoted cell as '\"\"'")
        problems.append(Problem(rel, last + 1, "", why))
        return None
    return out, conv, None


def _blank(cells: list[Any]) -> bool:
    return all(c is None or (isinstance(c, str) and not c.strip()) for c in cells)


def _column(n: int) -> str:
    """1 -> "A", 27 -> "AA": a spreadsheet column letter."""
    letters = ""
    while n:
        n, r = divmod(n - 1, 26)
        letters = chr(65 + r) + letters
    return letters


def _convert(decl: Input, rows: list[tuple[int, list[Any]]], rel: str, problems: list[Problem],
             conv: Convention | None = None, sheet: _Sheet | None = None) -> tuple[Record, ...]:
    conv = conv or Convention("csv", ",", ".")
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
    if sheet is not None:
        for rng, row, col in sheet.merged:
            # only the first cell of a merged range holds the value; the others read as empty
            # and would silently take defaults
            name = names[col - 1] if row > head_line and col <= len(names) and names[col - 1] else ""
            problems.append(Problem(rel, row, name, f"merged cells {rng}: only the first cell of a merged "
                                    "range holds a value; unmerge them and type the value in every cell"))
    width = max((i + 1 for i, h in enumerate(names) if h), default=0)
    data = body[1:]
    if len(data) < decl.min_rows:
        problems.append(Problem(rel, head_line, "", f"expected at least {decl.min_rows} data row{'s' if decl.min_rows != 1 else ''}, got {len(data)}"))
    seen: dict[str, dict[Any, int]] = {f.key: {} for f in decl.fields if f.unique}
    records = []
    for line, cells in data:
        extra = [c for c in cells[width:] if not _blank([c])]
        if extra or (conv.kind == "csv" and len(cells) < width):
            problems.append(Problem(rel, line, "", _row_width(cells, width, conv)))
            continue
        values: dict[str, Any] = {}
        for f in decl.fields:
            idx = names.index(f.key) if f.key in names else None
            cell = cells[idx] if idx is not None and idx < len(cells) else None
            formula = sheet.formulas.get((line, idx + 1)) if sheet is not None and idx is not None else None
            if formula is not None:
                problems.append(Problem(rel, line, f.key, f"cell {_column(idx + 1)}{line} is a formula ({formula}) "  # type: ignore[operator]
                                        "with no saved result: open the workbook in a spreadsheet program "
                                        "and save it (that stores the results), or type the value"))
                continue
            v = _cell(f, cell, rel, line, problems, conv)
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


def _row_width(cells: list[Any], width: int, conv: Convention) -> str:
    """Why a row's cells do not line up with the header: never dropped or padded silently."""
    if conv.kind == "xlsx":
        col = next(i for i in range(len(cells) - 1, width - 1, -1) if not _blank([cells[i]])) + 1
        return (f"a value in column {_column(col)} ({cells[col - 1]!r}), beyond the header's last column "
                f"{_column(width)}: give the column a header or move the value")
    sep = conv.separator
    if len(cells) > width:
        inside = ("a comma inside a number (write 355.5, not 355,5) or inside text (put the text in "
                  "quotes)") if sep == "," else "a ';' inside text (put the text in quotes)"
        return f"{len(cells)} cells, but the header names {width} columns: {inside}, or a cell too many"
    return (f"{len(cells)} cells, but the header names {width} columns: a cell left out? (an empty cell "
            f"is nothing between two '{sep}')")


_NUMBER_HEAD = re.compile(r"(\s*[+-]?)([\d.,]+)(.*)", re.S)


def _decimal_comma(cell: str) -> str:
    """A number cell of a decimal-comma file in the decimal point the unit reader takes:
    "355,5 kW" -> "355.5 kW"; a point is refused (a thousands separator or a slip)."""
    m = _NUMBER_HEAD.fullmatch(cell)
    if not m:
        return cell
    sign, digits, rest = m.groups()
    if "." in digits or digits.count(",") > 1:
        raise UnitProblem(f"{cell.strip()!r}: this file is read with ';' between cells and a decimal comma, "
                          "so a point or a second comma in a number is ambiguous (a thousands separator?): "
                          "write one decimal comma and no thousands separator, like '355,5 kW'")
    return f"{sign}{digits.replace(',', '.')}{rest}"


def _cell(f: Field, cell: Any, rel: str, line: int, problems: list[Problem],
          conv: Convention | None = None) -> Any:
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
        if isinstance(cell, str) and conv is not None and conv.decimal == ",":
            cell = _decimal_comma(cell)
        x = to_unit(cell.strip() if isinstance(cell, str) else cell, f.unit)
    except UnitProblem as exc:
        problems.append(Problem(rel, line, f.key, str(exc)))
        return None
    if not f.allowed.contains(x):
        u = f" {f.unit}" if f.unit else ""
        problems.append(Problem(rel, line, f.key, f"out of range: {x:g}{u} given, allowed {f.allowed.text()}{u}"))
        return None
    return x
