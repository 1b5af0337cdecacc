"""Records files (load lists) in CSV and XLSX: every cell converted at loading,
every problem named by file, row and column."""

from __future__ import annotations

from pathlib import Path

import pytest

from basisbook.contract.errors import Problem
from basisbook.contract.spec import Field, Input, Record
from basisbook.reading.records import display_lines, load_records

DECL = Input(
    "load_list",
    fields=(
        Field("tag", "equipment tag", "text", unique=True),
        Field("description", "what the load is", "text", default=""),
        Field("rated_power", "rated power", "kW", range="(0, 50000]"),
        Field("power_factor", "power factor", "", range="(0, 1]", default=0.85),
        Field("duty", "duty", "choice", choices=("continuous", "intermittent", "standby")),
        Field("essential", "needed for island operation", "choice", choices=("yes", "no"), default="no"),
    ),
    min_rows=1,
    symbol="L", meaning="auxiliary load list", unit="records",
)

GOOD = """# invented test data
tag,description,rated_power,power_factor,duty,essential
P-101A,Boiler feed pump A,250,0.88,continuous,yes
P-101B,"Boiler feed pump B, standby",250 kW,,standby,no
F-201,ID fan,0.18 MW,0.86,continuous,Yes
"""


def _load(tmp_path: Path, text: str | bytes, name: str = "loads.csv"):
    p = tmp_path / name
    p.parent.mkdir(parents=True, exist_ok=True)
    p.write_bytes(text if isinstance(text, bytes) else text.encode("utf-8"))
    problems: list[Problem] = []
    result = load_records(DECL, name, tmp_path, "inputs/aux.toml", 7, "aux.load_list", problems)
    return result, problems


def test_csv_cells_convert_to_declared_units_and_keep_their_row(tmp_path: Path) -> None:
    result, problems = _load(tmp_path, GOOD)
    assert problems == []
    records, file = result
    assert file == "loads.csv"
    assert [r["tag"] for r in records] == ["P-101A", "P-101B", "F-201"]
    assert records[1]["rated_power"] == pytest.approx(250.0)
    assert records[2]["rated_power"] == pytest.approx(180.0)  # "0.18 MW" -> kW at the edge
    assert records[1]["power_factor"] == pytest.approx(0.85)  # empty cell -> declared default
    assert records[2]["essential"] == "yes"  # "Yes" normalised
    assert records[1]["description"] == "Boiler feed pump B, standby"  # quoted comma kept
    assert [r.source.line for r in records] == [3, 4, 5]
    assert isinstance(records[0], Record)


def test_semicolon_csv_and_bom(tmp_path: Path) -> None:
    text = "\ufefftag;rated_power;duty\nP-1;75;continuous\n"
    (records, _), problems = _load(tmp_path, text)
    assert problems == [] and records[0]["rated_power"] == 75.0


@pytest.mark.parametrize(
    ("edit", "line", "key", "message"),
    [
        (("continuous,yes", "contiuous,yes"), 3, "duty", "expected one of continuous, intermittent, standby; got 'contiuous'; did you mean 'continuous'"),
        (("0.88", "1.3"), 3, "power_factor", r"out of range: 1.3 given, allowed (0, 1]"),
        (("F-201", "P-101A"), 5, "tag", "duplicate tag 'P-101A' (first at loads.csv:3)"),
        (("250,0.88", ",0.88"), 3, "rated_power", "missing value: expected rated power in kW"),
        (("250,0.88", "lots,0.88"), 3, "rated_power", "could not read 'lots'"),
        (("250,0.88", "250 kg,0.88"), 3, "rated_power", "is a mass, expected an active power"),
        (("rated_power", "rated_pwer"), 2, "rated_pwer", "unknown column; did you mean 'rated_power'"),
    ],
)
def test_bad_rows_name_file_row_and_column(tmp_path: Path, edit, line: int, key: str, message: str) -> None:
    result, problems = _load(tmp_path, GOOD.replace(*edit, 1))
    texts = [str(p) for p in problems]
    assert any(p.file == "loads.csv" and p.line == line and p.key == key and message in p.message
               for p in problems), texts


def test_empty_list_and_header_only(tmp_path: Path) -> None:
    _, problems = _load(tmp_path, "# nothing yet\n\n")
    assert "the file is empty" in problems[0].message
    _, problems = _load(tmp_path, "tag,rated_power,duty\n")
    assert "expected at least 1 data row, got 0" in problems[0].message


def test_not_utf8_outside_project_missing_and_wrong_type(tmp_path: Path) -> None:
    _, problems = _load(tmp_path, GOOD.encode("utf-8").replace(b"Boiler", b"Chaudi\xe8re"))
    assert problems[0].message.startswith("the file is not UTF-8") and problems[0].line == 3
    problems = []
    assert load_records(DECL, "../elsewhere.csv", tmp_path, "inputs/aux.toml", 7, "k", problems) is None
    assert "outside the project folder" in problems[0].message
    problems = []
    load_records(DECL, "nope.csv", tmp_path, "inputs/aux.toml", 7, "k", problems)
    assert "no such file 'nope.csv'" in problems[0].message
    (tmp_path / "loads.txt").write_text("x")
    problems = []
    load_records(DECL, "loads.txt", tmp_path, "inputs/aux.toml", 7, "k", problems)
    assert "expected a .csv or .xlsx file" in problems[0].message
    problems = []
    load_records(DECL, 42, tmp_path, "inputs/aux.toml", 7, "k", problems)
    assert problems[0].file == "inputs/aux.toml" and problems[0].line == 7


def test_symlink_out_of_the_project_is_refused(tmp_path: Path) -> None:
    outside = tmp_path / "outside.csv"
    outside.write_text(GOOD)
    proj = tmp_path / "proj"
    proj.mkdir()
    (proj / "loads.csv").symlink_to(outside)
    problems: list[Problem] = []
    assert load_records(DECL, "loads.csv", proj, "inputs/aux.toml", 7, "k", problems) is None
    assert "outside the project folder" in problems[0].message


def test_xlsx_reads_like_csv_with_sheet_rows(tmp_path: Path) -> None:
    openpyxl = pytest.importorskip("openpyxl")
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.append(["tag", "rated_power", "duty", "essential"])
    ws.append(["P-101A", 250, "continuous", "yes"])
    ws.append([None, None, None, None])  # a blank row is skipped, numbering follows the sheet
    ws.append(["F-201", "0.18 MW", "standby", "no"])
    wb.save(tmp_path / "loads.xlsx")
    problems: list[Problem] = []
    (records, file) = load_records(DECL, "loads.xlsx", tmp_path, "inputs/aux.toml", 7, "k", problems)
    assert problems == []
    assert [(r["tag"], r["rated_power"], r.source.line) for r in records] == [("P-101A", 250.0, 2), ("F-201", 180.0, 4)]
    lines = display_lines(tmp_path / "loads.xlsx")
    assert lines[0] == "tag | rated_power | duty | essential" and lines[3].startswith("F-201")


# --- conventions, row shapes and workbooks that would read wrongly ------------------------

def test_semicolon_csv_reads_the_decimal_comma_and_says_so(tmp_path: Path) -> None:
    from basisbook.reading.records import convention

    text = "tag;rated_power;power_factor;duty\nP-1;355,5 kW;0,88;continuous\nP-2;-;;standby\n".replace("-;", "75;")
    (records, _), problems = _load(tmp_path, text)
    assert problems == []
    assert records[0]["rated_power"] == pytest.approx(355.5)  # was 3555 kW: the comma dropped
    assert records[0]["power_factor"] == pytest.approx(0.88)
    assert convention(tmp_path / "loads.csv").decimal == ","
    assert "decimal comma" in convention(tmp_path / "loads.csv").text()
    (tmp_path / "comma.csv").write_text(GOOD)
    assert convention(tmp_path / "comma.csv").text() == "CSV, cells separated by commas, numbers with a decimal point (355.5 kW)"


@pytest.mark.parametrize("cell", ["355.5 kW", "1.355,5 kW", "1,355,5"])
def test_semicolon_csv_refuses_a_point_in_a_number(tmp_path: Path, cell: str) -> None:
    _, problems = _load(tmp_path, f"tag;rated_power;duty\nP-1;{cell};continuous\n")
    assert [(p.line, p.key) for p in problems] == [(2, "rated_power")]
    assert "is ambiguous" in problems[0].message and "like '355,5 kW'" in problems[0].message


def test_a_quoted_decimal_comma_in_a_comma_csv_is_refused(tmp_path: Path) -> None:
    _, problems = _load(tmp_path, GOOD.replace("250,0.88", '"250,5",0.88'))
    assert any(p.line == 3 and p.key == "rated_power" and "like '250.5'" in p.message for p in problems), problems


@pytest.mark.parametrize(
    ("old", "new", "message"),
    [("continuous,yes\n", "continuous,yes,extra\n", "7 cells, but the header names 6 columns: a comma inside a number"),
     ("continuous,yes\n", "continuous\n", "5 cells, but the header names 6 columns: a cell left out?")],
)
def test_a_row_wider_or_narrower_than_the_header_is_refused(tmp_path: Path, old: str, new: str, message: str) -> None:
    _, problems = _load(tmp_path, GOOD.replace(old, new, 1))
    assert [(p.line, p.message[: len(message)]) for p in problems] == [(3, message)]


def test_trailing_empty_cells_are_no_extra_column(tmp_path: Path) -> None:
    (records, _), problems = _load(tmp_path, GOOD.replace("continuous,yes\n", "continuous,yes,,\n", 1))
    assert problems == [] and len(records) == 3


def test_an_unclosed_quote_names_the_line_it_starts_on(tmp_path: Path) -> None:
    _, problems = _load(tmp_path, GOOD.replace("P-101A,", 'P-101A,"', 1))
    # the quote swallows the rest of the file; before, that was one cell and "missing values"
    assert [(p.line, p.message[:35]) for p in problems] == [(3, "unclosed quote starting at line 3: ")]


def test_a_cell_over_the_csv_field_limit_is_refused(tmp_path: Path) -> None:
    _, problems = _load(tmp_path, GOOD.replace("ID fan", "x" * 200_000))
    assert [p.line for p in problems] == [5]
    assert "longer than 131072 characters" in problems[0].message


def test_a_load_list_linked_out_of_the_project_is_named_as_a_link(tmp_path: Path) -> None:
    outside = tmp_path / "outside.csv"
    outside.write_text(GOOD)
    proj = tmp_path / "proj"
    (proj / "loads").mkdir(parents=True)
    (proj / "loads" / "list.csv").symlink_to(outside)
    problems: list[Problem] = []
    assert load_records(DECL, "loads/list.csv", proj, "inputs/aux.toml", 7, "k", problems) is None
    assert problems[0].message.startswith("'loads/list.csv' is a link to a file outside the project folder")


def _workbook(tmp_path: Path, rows: list[list[object]], edit=None) -> None:
    openpyxl = pytest.importorskip("openpyxl")
    wb = openpyxl.Workbook()
    ws = wb.active
    for r in rows:
        ws.append(r)
    if edit:
        edit(ws)
    wb.save(tmp_path / "loads.xlsx")


def _load_xlsx(tmp_path: Path) -> list[Problem]:
    problems: list[Problem] = []
    load_records(DECL, "loads.xlsx", tmp_path, "inputs/aux.toml", 7, "k", problems)
    return problems


def test_merged_cells_are_refused_naming_the_range(tmp_path: Path) -> None:
    rows = [["tag", "rated_power", "duty", "power_factor"], ["P-1", 250, "continuous", 0.9],
            ["P-2", 250, "continuous", None], ["P-3", 250, "continuous", None]]
    _workbook(tmp_path, rows, lambda ws: ws.merge_cells("D2:D4"))
    problems = _load_xlsx(tmp_path)
    # merged, P-2 and P-3 would silently take the default power factor 0.85
    assert [(p.line, p.key, p.message[:18]) for p in problems] == [(2, "power_factor", "merged cells D2:D4")]


def test_a_formula_with_no_saved_result_says_so(tmp_path: Path) -> None:
    # openpyxl writes the formula without a result, as any script does
    _workbook(tmp_path, [["tag", "rated_power", "duty"], ["P-1", "=100+150", "continuous"]])
    problems = _load_xlsx(tmp_path)
    assert [(p.line, p.key) for p in problems] == [(2, "rated_power")]
    assert problems[0].message.startswith("cell B2 is a formula (=100+150) with no saved result: open the "
                                          "workbook in a spreadsheet program and save it")


def test_a_workbook_value_beyond_the_header_is_refused(tmp_path: Path) -> None:
    _workbook(tmp_path, [["tag", "rated_power", "duty"], ["P-1", 250, "continuous", "oops"]])
    problems = _load_xlsx(tmp_path)
    assert [(p.line, p.message[:34]) for p in problems] == [(2, "a value in column D ('oops'), beyo")]
