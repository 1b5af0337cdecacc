"""The plumbing under every calc: units at the edge, TOML line numbers, number
formatting, link resolution and the demo projects end to end."""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import pytest

from basisbook.contract.errors import ProjectError
from basisbook.contract.spec import Check, Range, SpecError, evaluate_check
from basisbook.reading.project import InputValue, Source, load
from basisbook.reading.tomlpos import key_lines
from basisbook.reading.units import UnitProblem, to_unit
from basisbook.rendering.mathfmt import number_text, substitute, substitute_values, unit_text
from basisbook.running import engine

ROOT = Path(__file__).resolve().parent.parent


# --- units: parsed and converted once, at loading ---------------------------------------

@pytest.mark.parametrize(
    ("text", "unit", "expected"),
    [
        ("11 kV", "kV", 11.0),
        ("11000 V", "kV", 11.0),
        ("1560 kW", "MW", 1.56),
        ("5000 kvar", "Mvar", 5.0),  # reactive power units are our own definition
        ("85 %", "", 0.85),
        ("180 %", "pu", 1.8),
        ("300 K", "degC", 26.85),  # offset unit: 0 degC = 273.15 K (SI Brochure, 9th ed., 2.3.1)
        ("32 degF", "degC", 0.0),
        ("1 h", "ms", 3.6e6),
        (0.8, "", 0.8),
        ("0.8", "", 0.8),
    ],
)
def test_to_unit_converts_at_the_edge(text: str, unit: str, expected: float) -> None:
    assert to_unit(text, unit) == pytest.approx(expected, rel=1e-12, abs=1e-12)


@pytest.mark.parametrize(
    ("text", "unit", "message"),
    [
        ("11 kg", "kV", "is a mass, expected a voltage"),
        ("5 MVA", "Mvar", "expected a reactive power"),  # VA and var are not interchangeable
        ("3 kV", "", "expected a plain number"),
        ("nan", "kV", "finite"),
        ("-inf", "kV", "finite"),
        (float("nan"), "kV", "finite"),
        ("eleven kV", "kV", "could not read"),
        (True, "kV", "true/false"),
        ([1, 2], "kV", "got list"),
    ],
)
def test_to_unit_rejects_with_a_reason(text: object, unit: str, message: str) -> None:
    with pytest.raises(UnitProblem, match=message):
        to_unit(text, unit)


# --- ranges and checks -------------------------------------------------------------------

def test_range_parsing_and_membership() -> None:
    r = Range.parse("(0, 1]")
    assert not r.contains(0.0) and r.contains(1.0) and r.contains(1e-9) and not r.contains(1.0000001)
    assert Range.parse("[0, inf)").contains(1e300)
    assert r.text() == "(0, 1]"
    with pytest.raises(SpecError, match="not of the form"):
        Range.parse("0..1")


def test_check_verdicts_meets_review_fails() -> None:
    c = Check("x", "value below limit", "v", "<=", 10.0, "src", review_band=0.05)
    assert evaluate_check(c, 5.0, 10.0).verdict == "meets"
    assert evaluate_check(c, 9.8, 10.0).verdict == "review"
    assert evaluate_check(c, 10.2, 10.0).verdict == "fails"
    assert evaluate_check(c, float("nan"), 10.0).verdict == "fails"
    with pytest.raises(SpecError, match="relation"):
        Check("y", "bad", "v", "=<", 1.0, "src")


# --- TOML line numbers --------------------------------------------------------------------

def test_key_lines_tracks_arrays_of_tables_multiline_values_and_inline_tables() -> None:
    text = "\n".join([
        "[project]",                     # 1
        'name = "x"',                    # 2
        'notes = """',                   # 3
        "fake = 1",                      # 4  inside a string: not a key
        '"""',                           # 5
        "[[instance]]",                  # 6
        'id = "a"',                      # 7
        "[instance.inputs]",             # 8
        "arr = [",                       # 9
        "  1,",                          # 10
        "]",                             # 11
        'f = { from = "site.x" }',       # 12
        "[[instance]]",                  # 13
        'id = "b"',                      # 14
        "[instance.inputs]",             # 15
        "'quoted key' = 2",              # 16
    ])
    lines = key_lines(text)
    assert lines[("project", "notes")] == 3
    assert ("project", "fake") not in lines
    assert lines[("instance", 0, "inputs", "arr")] == 9
    assert lines[("instance", 0, "inputs", "f")] == 12
    assert lines[("instance", 0, "inputs", "f", "from")] == 12
    assert lines[("instance", 1, "id")] == 14
    assert lines[("instance", 1, "inputs", "quoted key")] == 16


# --- formatting -----------------------------------------------------------------------

@pytest.mark.parametrize(
    ("x", "text"),
    [(820.0984, "820.1"), (0.8, "0.8000"), (2.0, "2"), (3000.0, "3000"), (15.625, "15.62"),
     (-18.0, "\u221218"), (1.234e-5, "1.234×10⁻⁵"), (2.5e7, "2.500×10⁷"), (0.0, "0")],
)
def test_number_text_four_significant_figures(x: float, text: str) -> None:
    assert number_text(x) == text


def test_three_ways_of_showing_a_step() -> None:
    expr = r"\frac{@p}{@pf}"
    assert substitute(expr, {"p": "P_r", "pf": r"\cos\varphi"}) == r"\frac{{P_r}}{{\cos\varphi}}"
    numeric = substitute_values(expr, {"p": (12.5, "MW"), "pf": (0.8, "")})
    # substituted values as typed (12.5, 0.8), not padded to four figures
    assert "{12.5\\,\\text{MW}}" in numeric and "{0.8}" in numeric and "0.8000" not in numeric
    # juxtaposed numbers get an explicit product sign: "20 0.915" would misread
    assert r"\cdot" in substitute_values(r"@n\,@k", {"n": (20.0, ""), "k": (0.915, "")})
    assert unit_text("m**3/s") == "m³/s" and unit_text("degC") == "°C"


# --- links ------------------------------------------------------------------------------

def test_link_converts_between_compatible_units() -> None:
    iv = InputValue("p", None, "MW", Source("f.toml", 3, link=("a", "b")))
    assert engine._convert_link(1560.0, "kW", iv) == pytest.approx(1.56)
    with pytest.raises(UnitProblem, match="wrong dimension"):
        engine._convert_link(10.0, "A", iv)


def test_linked_value_outside_the_range_is_an_input_problem(demo_copy: Path) -> None:
    # a speed of 3000 rpm is linked into a power-factor input: the range (0, 1] must catch it
    p = demo_copy / "inputs" / "generators.toml"
    text = p.read_text().replace("generator_power_factor = 0.8\ngenerator_voltage = \"0.4 kV\"",
                                 'generator_power_factor = { from = "stg1.pole_count" }\ngenerator_voltage = "0.4 kV"')
    p.write_text(text)
    with pytest.raises(ProjectError, match=r"out of range: 2 .*linked from stg1.pole_count"):
        engine.run(load(demo_copy))


# --- the demo projects end to end ------------------------------------------------------

def test_demo_results_are_the_hand_calculation(built_site: Path) -> None:
    doc = json.loads((built_site / "results.json").read_text())
    stg = doc["instances"]["stg1"]["outputs"]
    # S = P / cos(phi) = 12.5 / 0.8 and I = S / (sqrt(3) U): exact arithmetic, IEC 60034-1 rated output
    assert stg["generator_apparent_power"]["value"] == pytest.approx(15.625, rel=1e-12)
    assert stg["generator_current"]["value"] == pytest.approx(15.625e3 / (math.sqrt(3) * 11), rel=1e-12)
    assert stg["synchronous_speed"]["value"] == pytest.approx(3000.0)
    gen = doc["instances"]["gen2"]
    assert gen["outputs"]["pole_count"]["value"] == pytest.approx(4.0)
    assert gen["inputs"]["rated_frequency"]["source"]["link"] == "site.grid_frequency"
    assert gen["inputs"]["generator_active_power"]["value"] == pytest.approx(1.56)  # "1560 kW" -> MW


def test_sixty_hertz_variant(tmp_path: Path) -> None:
    from basisbook.commands.build import build

    build(ROOT / "examples" / "export-60hz", tmp_path / "site")
    doc = json.loads((tmp_path / "site" / "results.json").read_text())
    # n = 120 f / p at 60 Hz: 2 poles 3600 rpm, 4 poles 1800 rpm (synchronous speed table, exact)
    assert doc["instances"]["stg1"]["outputs"]["synchronous_speed"]["value"] == pytest.approx(3600.0)
    assert doc["instances"]["gen2"]["outputs"]["synchronous_speed"]["value"] == pytest.approx(1800.0)
    assert doc["instances"]["stg1"]["outputs"]["electrical_period"]["value"] == pytest.approx(1000 / 60)


# --- hostile or odd project text ------------------------------------------------------

@pytest.mark.parametrize(
    ("text", "kept_as_link"),
    [("[a](javascript:alert(1))", False), ("[b](../../etc/passwd)", False), ("[c](https://cdn.example/x)", False),
     ("[d](file:///etc/passwd)", False), ("![e](http://example/x.png)", False), ("[f](/etc/passwd)", False),
     ("[g](stg1.html#out-x)", True), ("[h](#site)", True)],
)
def test_note_links_stay_inside_the_handbook(text: str, kept_as_link: bool) -> None:
    from basisbook.rendering.templating import markdown

    html = str(markdown(text))
    assert ("<a " in html or "<img" in html) == kept_as_link, html


def test_empty_and_oversized_input_files(demo_copy: Path) -> None:
    (demo_copy / "inputs" / "empty.toml").write_text("")
    (demo_copy / "inputs" / "huge.toml").write_text("# " + "x" * (3 * 1024 * 1024))
    with pytest.raises(ProjectError) as exc:
        load(demo_copy)
    text = str(exc.value)
    assert "inputs/empty.toml: holds no [[instance]] table" in text
    assert "inputs/huge.toml: is 3072 KiB" in text


def test_symlinked_input_file_outside_the_project_is_refused(demo_copy: Path, tmp_path: Path) -> None:
    outside = tmp_path / "elsewhere.toml"
    outside.write_text((demo_copy / "inputs" / "generators.toml").read_text().replace('"stg1"', '"stg9"')
                       .replace('"gen2"', '"gen9"'))
    (demo_copy / "inputs" / "linked.toml").symlink_to(outside)
    with pytest.raises(ProjectError, match="inputs/linked.toml: is a link to a file outside the project folder"):
        load(demo_copy)


@pytest.mark.parametrize("failure", ["divide", "infinite"])
def test_a_calc_that_overflows_gives_a_message_not_a_traceback(demo_copy: Path, capsys, monkeypatch,
                                                                failure: str) -> None:
    # the engine's safety net: values at the far edge of their ranges may still overflow in
    # some module; the user gets file, instance and a hint, never a traceback
    from basisbook.commands.cli import main
    from basisbook.reading import catalog

    mod = catalog.module("synchronous_generator")
    real = mod.compute

    def broken(v):  # noqa: ANN001, ANN202
        result = real(v)
        if v["generator_voltage"] > 10:  # stg1 only
            if failure == "divide":
                raise ZeroDivisionError("float division by zero")
            result.outputs["flux_per_pole"] = float("inf")
        return result

    monkeypatch.setattr(mod, "compute", broken)
    assert main(["check", str(demo_copy)]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err
    expected = ("lead to ZeroDivisionError (float division by zero) in synchronous_generator"
                if failure == "divide" else "give no finite value for flux_per_pole")
    assert re.search(r"inputs/generators\.toml:\d+: \[stg1\] the inputs of stg1 " + re.escape(expected), err), err


def test_assembled_equations_read_the_same_as_direct_conversion() -> None:
    """Every step of the demo, numbers and result lines: the MathML put together
    from cached pieces (basisbook.rendering.mathfmt.values_mathml) is byte for byte the
    converter's own output for the whole line (self-consistency, no outside source)."""
    from basisbook.rendering import mathfmt
    from basisbook.rendering.mathfmt import mathml, quantity_latex, quantity_mathml, values_mathml

    runs = engine.run(load(Path(__file__).resolve().parent.parent / "project"))
    compared = 0
    for r in runs:
        spec = r.spec
        symbols = {i.name: i.symbol for i in spec.inputs} | {o.name: o.symbol for o in spec.outputs}
        units = {i.name: i.unit for i in spec.inputs} | {o.name: o.unit for o in spec.outputs}
        values = ({k: (v.value, units[k]) for k, v in r.inputs.items()}
                  | {k: (v, units[k]) for k, v in r.outputs.items()})
        for s in spec.steps:
            lhs = "{" + symbols[s.output] + "} = "
            direct = mathml(lhs + substitute_values(s.expression, values), True)
            assert values_mathml(lhs, s.expression, values) == direct, s.output
            quantities: list[str] = []
            shape = lhs + substitute_values(s.expression, values,
                                            lambda q, qs=quantities: qs.append(q) or mathfmt._SLOT % (len(qs) - 1))
            assert mathfmt._assemble(shape, quantities, True) is not None, s.output  # not the fallback
            q = quantity_latex(r.outputs[s.output], units[s.output])
            assert quantity_mathml(symbols[s.output], q) == mathml(lhs + q, True), s.output
            compared += 1
    assert compared > 300  # every module's steps took part


@pytest.mark.parametrize(("text", "content"), [
    ("<mrow>a</mrow>", "a"),
    ("<mrow><mrow>a</mrow></mrow>", "<mrow>a</mrow>"),
    ("<mrow><mrow />a</mrow>", "<mrow />a"),          # an empty group opens nothing
    ("<mrow>a</mrow><mrow>b</mrow>", None),            # two rows, not one
    ("<mrow><mrow>a</mrow>", None),                    # unbalanced
    ("<mi>a</mi>", None),
])
def test_unwrap_takes_off_exactly_one_row(text: str, content: str | None) -> None:
    from basisbook.rendering.mathfmt import _unwrap

    assert _unwrap(text) == content


# --- hardened reading: the grammar of a value, kinds of quantity, shapes and links --------

@pytest.mark.parametrize(
    ("text", "unit", "message"),
    [
        ("9**9**9 MW", "MW", "no arithmetic and no powers of numbers"),  # never returned in pint
        ("10**400 MW", "MW", "no arithmetic and no powers of numbers"),  # OverflowError in pint
        ("11 kV + 1 kV", "kV", "no arithmetic"),  # pint added it up to 12 kV
        ("2*6 kV", "kV", "no arithmetic"),
        ("kV", "kV", "a unit without a number"),  # pint read it as 1 kV
        ("kV 11", "kV", "the number comes first, like '11 kV'"),  # pint read it as 11 kV
        ("13,2 MW", "MW", r"write the decimal mark as a point, like '13.2 MW'"),  # pint read 132 MW
        ("1,000 kW", "kW", "if it separates thousands"),
        ("1e300 kW", "MW", "too large"),
        ("1e15 TW", "MW", r"too large: '1e15 TW' is 1e\+21 MW"),  # bound in the declared unit
        ("1 m**9", "m", "could not read"),  # powers of units are small integers only
        ("x" * 100, "kV", "longer than 64 characters"),
        ("12.5 MVA", "MW", r"'12.5 MVA' is an apparent power \(VA\), expected an active power \(W\) in MW"),
        ("12.5 MW", "MVA", "is an active power"),
        ("1 MVAh", "MWh", "is an apparent energy"),
        ("5 Mvarh", "MWh", "is a reactive energy"),
        ("50 Hz", "rpm", "'50 Hz' is a frequency, expected a rotational speed in rpm"),
        ("3000 rpm", "Hz", "'3000 rpm' is a rotational speed, expected a frequency in Hz"),
        ("1500 1/min", "rpm", "write a speed as '1500 rpm' or '1500 r/min'"),  # pint: 2 pi off
        ("314 rad/s", "Hz", "is a rotational speed"),  # angular frequency is not f
        ("60 %", "deg", "is a plain number, expected an angle"),
        ("0.5 rad", "", "is an angle, expected a plain number"),
    ],
)
def test_values_outside_the_grammar_or_of_the_wrong_kind_are_refused(text: str, unit: str, message: str) -> None:
    with pytest.raises(UnitProblem, match=message):
        to_unit(text, unit)


@pytest.mark.parametrize(
    ("text", "unit", "expected"),
    [
        ("1500 r/min", "rpm", 1500.0),  # r/min is the IEC way of writing rpm
        ("157.07963267948966 rad/s", "rpm", 1500.0),  # omega = 2 pi n / 60, exact
        ("2 kJ/(kg*K)", "kJ/(kg*K)", 2.0),
        ("14 m^3/s", "m**3/s", 14.0),
        ("1.5e3 kW", "MW", 1.5),
        ("-.5 MW", "kW", -500.0),
        ("5 MVA", "kVA", 5000.0),
        ("1 GWh", "MWh", 1000.0),
        ("1 MVAh", "kVAh", 1000.0),
        ("36 °C", "degC", 36.0),
        ("1e15", "", 1e15),  # the bound itself is read
    ],
)
def test_values_inside_the_grammar_still_convert(text: str, unit: str, expected: float) -> None:
    assert to_unit(text, unit) == pytest.approx(expected, rel=1e-12)


def test_hostile_values_return_at_once() -> None:
    import time

    start = time.perf_counter()
    for text in ("9**9**9 MW", "10**400 MW", "9^9^9 MW", "(" * 60 + "kV", "1" * 60 + " kV", "1e999 kV"):
        with pytest.raises(UnitProblem):
            to_unit(text, "MW")
    with pytest.raises(UnitProblem, match="an integer of 401 digits"):
        to_unit(10**400, "MW")  # float() of it raises OverflowError
    with pytest.raises(UnitProblem, match="over 4000 digits"):
        to_unit(10**5000, "MW")  # str() of it raises ValueError (the int digit limit)
    assert time.perf_counter() - start < 1.0


def test_a_link_from_apparent_into_active_power_is_refused() -> None:
    iv = InputValue("p", None, "MW", Source("f.toml", 3, link=("stg1", "generator_apparent_power")))
    with pytest.raises(UnitProblem, match="is an apparent power"):
        engine._convert_link(15.625, "MVA", iv)
    speed = InputValue("n", None, "rpm", Source("f.toml", 3, link=("site", "grid_frequency")))
    with pytest.raises(UnitProblem, match="is a frequency, expected a rotational speed"):
        engine._convert_link(50.0, "Hz", speed)


@pytest.mark.parametrize(
    ("value", "later"),
    [
        ('"""a \\" b"""', 2),  # an escaped quote inside a one-line multi-line string
        ('"""\n\\"""\n[[instance]]\nid = "x"\n"""', 6),  # an escaped quote before two more
        ('"""a \\""" b\n[[instance]]\n"""', 4),  # the same on the opening line
        ('"""a\n\\\\"""', 3),  # an escaped backslash: the quotes close the string
        ('"""x """" ', 2),  # a quote of the content touching the delimiter
        ("'''\n[[instance]]\nid = 'x'\n'''", 5),  # a literal multi-line string holds no keys
        ("'''x \\'''", 2),  # no escapes in a literal string: the backslash is text
        ('[ """\n]\n""" ]', 4),  # a bracket inside a string is not one of the array
    ],
)
def test_key_lines_after_multiline_strings(value: str, later: int) -> None:
    import tomllib

    text = f"a = {value}\nb = 1\n[[instance]]\nid = \"real\"\n"
    tomllib.loads(text)  # the fixture is valid TOML
    lines = key_lines(text)
    assert lines[("b",)] == later
    assert lines[("instance", 0, "id")] == later + 2
    assert ("instance", 1) not in lines


def test_key_lines_give_an_array_of_tables_its_first_line() -> None:
    lines = key_lines("x = 1\n[[instanse]]\nid = 'a'\n[[instanse]]\nid = 'b'\n")
    assert lines[("instanse",)] == 2 and lines[("instanse", 1, "id")] == 5


def test_a_byte_order_mark_is_accepted(demo_copy: Path) -> None:
    p = demo_copy / "inputs" / "generators.toml"
    p.write_bytes(b"\xef\xbb\xbf" + p.read_bytes())
    project = load(demo_copy)
    assert project.instance("stg1").inputs["generator_voltage"].source.line == 14


@pytest.mark.parametrize("opening", ["[", "{a = "])
def test_values_nested_100000_deep_are_refused_not_a_traceback(demo_copy: Path, opening: str) -> None:
    closing = "]" if opening == "[" else "}"
    with (demo_copy / "inputs" / "generators.toml").open("a", encoding="utf-8") as f:
        f.write("\n[deep]\nx = " + opening * 100_000 + "1" + closing * 100_000 + "\n")
    with pytest.raises(ProjectError, match="inputs/generators.toml: arrays or inline tables are nested too deep"):
        load(demo_copy)


def test_a_revision_id_must_be_one_identifier(demo_copy: Path) -> None:
    p = demo_copy / "revisions.toml"
    for bad in ("B\\n", ".B", "B/C", "B C", "B" * 21):
        p.write_text((ROOT / "project" / "revisions.toml").read_text().replace('id = "B"', f'id = "{bad}"'))
        with pytest.raises(ProjectError, match=r"\[revision.id\] expected a revision id"):
            load(demo_copy)
    p.write_text((ROOT / "project" / "revisions.toml").read_text().replace('id = "B"', 'id = "B.1-x"'))
    assert load(demo_copy).revision.id == "B.1-x"


def _outside(tmp_path: Path, demo_copy: Path, name: str) -> Path:
    """Move ``name`` of the demo copy out of the project and leave a link in its place."""
    target = tmp_path / f"outside-{Path(name).name}"
    (demo_copy / name).rename(target)
    (demo_copy / name).symlink_to(target, target_is_directory=target.is_dir())
    return target


@pytest.mark.parametrize("name", ["inputs", "project.toml", "revisions.toml", "inputs/generators.toml"])
def test_a_link_out_of_the_project_is_refused(demo_copy: Path, tmp_path: Path, name: str) -> None:
    _outside(tmp_path, demo_copy, name)
    with pytest.raises(ProjectError, match=rf"{re.escape(name)}: is a link to a (file|folder) outside the project"):
        load(demo_copy)


def test_templates_linked_out_of_the_project_are_refused(demo_copy: Path, tmp_path: Path) -> None:
    elsewhere = tmp_path / "elsewhere"
    (elsewhere / "static").mkdir(parents=True)
    (elsewhere / "static" / "style.css").write_text("body {}")
    (demo_copy / "templates").symlink_to(elsewhere, target_is_directory=True)
    with pytest.raises(ProjectError, match="templates: is a link to a folder outside the project"):
        load(demo_copy)
    (demo_copy / "templates").unlink()
    (demo_copy / "templates" / "static").mkdir(parents=True)
    (demo_copy / "templates" / "static" / "style.css").symlink_to(elsewhere / "static" / "style.css")
    with pytest.raises(ProjectError, match="templates/static/style.css: is a link to a file outside"):
        load(demo_copy)
    (demo_copy / "templates" / "static" / "style.css").unlink()
    (demo_copy / "templates" / "static" / "style.css").write_text("body {}")
    load(demo_copy)  # a real override inside the project is fine


@pytest.mark.parametrize(
    ("x", "text"),
    [(15.625, "15.625"), (0.8, "0.8"), (11.0, "11"), (6350.852961085884, "6350.85"), (0.915, "0.915"),
     (1.5625e-05, "1.5625×10⁻⁵"), (-3.25, "-3.25"), (123456789.0, "1.23457×10⁸")],
)
def test_substituted_values_carry_up_to_six_significant_figures(x: float, text: str) -> None:
    from basisbook.rendering.mathfmt import substituted_text

    assert substituted_text(x) == text


def test_a_numbers_line_recomputes_to_the_result_as_printed() -> None:
    # the reviewer's check: I_r = S_r 10^3 / (sqrt(3) U_r) with S_r = 15.625 MVA, U_r = 11 kV;
    # printed at four figures the inputs would give 15.62e3/(sqrt(3)*11) = 819.8 A, not 820.1 A
    import math

    from basisbook.rendering.mathfmt import number_text, substituted_text

    s_r, u_r = 12.5 / 0.8, 11.0
    result = s_r * 1e3 / (math.sqrt(3) * u_r)
    shown = float(substituted_text(s_r)) * 1e3 / (math.sqrt(3) * float(substituted_text(u_r)))
    assert number_text(shown) == number_text(result) == "820.1"
    four = float(number_text(s_r)) * 1e3 / (math.sqrt(3) * u_r)
    assert number_text(four) == "819.8"  # why four figures in a numbers line would not do
