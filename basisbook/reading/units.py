"""Units at the edge: parse a project value once, convert it to the declared unit.

A value is a plain number in the declared unit, or a string ``<number> <unit>``
("11 kV", "-18 degC", "610 m**3/h").  The text is checked against that grammar
before pint sees it, so pint never evaluates arithmetic ("11 kV + 1 kV") or a
power tower ("9**9**9 MW", which never returns):

- number: an optional sign, digits, an optional fraction and an optional
  exponent of at most three digits (``1.5e3``); no comma (a decimal comma is
  refused with a hint), no thousands separator, no ``**`` on numbers;
- unit: names (pint's, with prefixes: ``kW``, ``Mvar``, ``degC``, ``%``),
  joined by ``*`` or ``/``, each with an optional small integer power
  ``^2``/``**2`` (-4 to 4), one level of parentheses (``kJ/(kg*K)``), a
  leading ``1/`` (``1/min``); ``r/min`` is read as rpm;
- magnitude: at most ``MAX_MAGNITUDE`` as written and after conversion to the
  declared unit (a bound of our own, common practice, no source: far beyond any
  plant quantity, far below float overflow).

The registry is built lazily (it costs ~0.5 s) and only when a value carries a
unit string.  Quantities that pint would convert into each other but which are
different things are kept apart: reactive power (var) and apparent power (VA)
get dimensions of their own, so "12.5 MVA" for an active power in MW is refused
(and the energies VAh and varh follow); a frequency (Hz, 1/s) and a rotational
speed (rpm, r/min, rad/s) share pint's dimension 1/time, and an angle shares
"no dimension" with a ratio, so those two pairs are told apart by the unit
names (``_kind``).
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from typing import Any

MAX_MAGNITUDE = 1e15
MAX_TEXT = 64  # a value with its unit is a few characters; refuse before any parsing


class UnitProblem(ValueError):
    pass


@lru_cache(maxsize=1)
def registry() -> Any:
    import pint

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, on_redefinition="ignore")
    # Reactive and apparent power: base dimensions of their own, so that neither converts
    # into watts (pint's VA is V*A, a watt); prefixes (k, M) come with pint.  Nothing in
    # pint's definitions is built on volt_ampere, so redefining it changes nothing else.
    ureg.define("var = [reactive_power] = VAr")
    ureg.define("volt_ampere = [apparent_power] = VA")
    ureg.define("volt_ampere_hour = volt_ampere * hour = VAh")
    ureg.define("var_hour = var * hour = varh")
    ureg.define("per_unit = [] = pu")
    return ureg


# convention: a declared "K" is a temperature difference; absolute temperatures are
# declared in degC (or "kelvin", which stays absolute)
_DIFFERENCE_UNITS = {"K", "delta_degC", "delta_degF"}
_OFFSET_UNITS = {"degree_Celsius", "degree_Fahrenheit"}

_NUMBER = r"[+-]?(?:\d{1,20}(?:\.\d{0,20})?|\.\d{1,20})(?:[eE][+-]?\d{1,3})?"
_NAME = r"(?:%|[A-Za-z_µμΩ°][A-Za-z_µμΩ°]{0,30})"
_POWER = r"(?:(?:\^|\*\*)[+-]?[1-4]|[²³])"
_FACTOR = rf"{_NAME}{_POWER}?"
_TERM = rf"(?:{_FACTOR}|\(\s*{_FACTOR}(?:\s*[*/]\s*{_FACTOR})*\s*\){_POWER}?)"
_UNIT = rf"(?:1\s*/\s*)?{_TERM}(?:\s*[*/]\s*{_TERM})*"
_VALUE = re.compile(rf"\s*({_NUMBER})\s*({_UNIT})?\s*")
_UNIT_ONLY = re.compile(rf"\s*{_UNIT}\s*")
_UNIT_FIRST = re.compile(rf"\s*({_UNIT})\s+({_NUMBER})\s*")
_COMMA_NUMBER = re.compile(r"\s*([+-]?\d*),(\d+)\s*(.*)")
_R_PER = re.compile(r"(?<![A-Za-z_µμΩ°])r(?=\s*/)")  # "r/min": revolutions, not a unit of pint's


def _want(unit: str) -> str:
    if _dimensionless(unit):
        return "a plain number" + (" (per unit)" if unit == "pu" else "")
    return f"a number in {unit} or a number with its unit (like '3 {unit}')"


def _dimensionless(unit: str) -> bool:
    return unit in ("", "pu", "1")


def _too_large(what: str) -> UnitProblem:
    return UnitProblem(f"too large: {what}; numbers up to {MAX_MAGNITUDE:.0e} in size are read "
                       "(is a digit or an exponent mistyped?)")


def _bounded(x: float, text: Any, converted_to: str = "") -> float:
    if not math.isfinite(x):
        raise UnitProblem(f"expected a finite number, got {text!r}")
    if abs(x) > MAX_MAGNITUDE:
        raise _too_large(f"{text!r}" + (f" is {x:.3g} {converted_to}" if converted_to else ""))
    return x


def _unit_error(s: str) -> str | None:
    """Why pint cannot read the unit text ``s``, or None when it can."""
    try:
        registry().parse_units(_R_PER.sub("revolution", s))
    except Exception as exc:  # pint raises several types for unparsable text
        return str(exc).replace(" in the unit registry", " as a unit") if "not defined" in str(exc) else "not a unit"
    return None


def to_unit(value: Any, unit: str) -> float:
    """Return ``value`` as a float in ``unit``.

    value: a number (taken as already in ``unit``) or a string "11 kV".
    Raises UnitProblem with a message naming what was expected.
    """
    if isinstance(value, bool):
        raise UnitProblem(f"expected {_want(unit)}, got a true/false value")
    if isinstance(value, int):
        # compared as an int: float() of a 400-digit TOML integer raises OverflowError
        if abs(value) > MAX_MAGNITUDE:
            digits = len(str(abs(value))) if abs(value) < 10**4000 else "over 4000"
            raise _too_large(f"an integer of {digits} digits")
        return float(value)
    if isinstance(value, float):
        return _bounded(value, value)
    if isinstance(value, str):
        return _parse_string(value, unit)
    raise UnitProblem(f"expected {_want(unit)}, got {type(value).__name__}")


def split_value(text: str, unit: str) -> tuple[float, str]:
    """``"11 kV"`` -> (11.0, "kV"); ``"0.8"`` -> (0.8, ""): the number and the unit text,
    checked against the grammar above (UnitProblem otherwise).  No pint involved."""
    s = text.strip()
    if s.lower() in ("nan", "+nan", "-nan", "inf", "+inf", "-inf", "infinity", "+infinity", "-infinity"):
        raise UnitProblem(f"expected a finite number, got {text!r}")
    if len(s) > MAX_TEXT:
        raise UnitProblem(f"expected {_want(unit)}, could not read {text[:MAX_TEXT]!r}... "
                          f"(longer than {MAX_TEXT} characters)")
    m = _VALUE.fullmatch(s)
    if m:
        return _bounded(float(m.group(1)), text), _R_PER.sub("revolution", m.group(2) or "")
    c = _COMMA_NUMBER.fullmatch(s)
    if c and c.group(1).lstrip("+-"):
        tail = f" {c.group(3)}" if c.group(3) else ""
        point = f"{c.group(1)}.{c.group(2)}{tail}"
        if len(c.group(2)) == 3:  # "1,000": a thousands separator or a decimal comma
            raise UnitProblem(f"a comma inside the number {text!r}: write {point!r} if the comma is a "
                              f"decimal mark, or '{c.group(1)}{c.group(2)}{tail}' if it separates thousands")
        raise UnitProblem(f"a comma inside the number {text!r}: write the decimal mark as a point, "
                          f"like {point!r}")
    if _UNIT_ONLY.fullmatch(s):
        why = _unit_error(s)
        if why is None:
            raise UnitProblem(f"expected {_want(unit)}, got a unit without a number: {text!r} "
                              f"(write it like '1 {s}')")
        raise UnitProblem(f"expected {_want(unit)}, could not read {text!r} ({why})")
    f = _UNIT_FIRST.fullmatch(s)
    if f:
        raise UnitProblem(f"expected {_want(unit)}: the number comes first, like "
                          f"'{f.group(2)} {f.group(1)}'; got {text!r}")
    if re.search(r"\d\s*(\*\*|\^)|[+]|\s-\s*[\d.]|\)\s*\(|\d\s*[*/]\s*[\d.]", s):
        raise UnitProblem(f"expected {_want(unit)}, could not read {text!r}: write one number and its "
                          "unit (no arithmetic and no powers of numbers)")
    word = re.match(r"[A-Za-z_]+", s)
    why = (_unit_error(word.group(0)) if word else None) or "not a number"
    raise UnitProblem(f"expected {_want(unit)}, could not read {text!r} ({why})")


@lru_cache(maxsize=65536)
def _parse_string(text: str, unit: str) -> float:
    # cached: a rebuild in ``serve`` reads the same strings again, and pint parsing
    # is the bulk of loading a project (a failure raises, so is never cached)
    x, unit_text = split_value(text, unit)
    if not unit_text:
        return x  # a bare number in a string: declared unit
    ureg = registry()
    why = _unit_error(unit_text)
    if why is not None:
        raise UnitProblem(f"expected {_want(unit)}, could not read {text!r} ({why})")
    units = ureg.parse_units(unit_text)
    q = ureg.Quantity(x, units)
    target = "" if _dimensionless(unit) else unit
    if unit in _DIFFERENCE_UNITS and not q.unitless and str(q.units) in _OFFSET_UNITS:
        # "5 degC" for a temperature difference would silently become 278.15 K
        raise UnitProblem(f"{text!r} reads as a temperature on the Celsius/Fahrenheit scale, but a "
                          f"temperature difference is expected: write it in K (e.g. '{q.magnitude:g} K')")
    want_q = ureg.Quantity(1, _R_PER.sub("revolution", target))
    got, want = _kind(q), _kind(want_q)
    if got != want and q.dimensionality == want_q.dimensionality:
        # the same dimension to pint, a different quantity to an engineer (Hz and rpm)
        raise UnitProblem(f"wrong kind of quantity: {text!r} is {got}, expected {want} in {unit or 'no unit'}"
                          + _HINTS.get((got, want), "").format(x=f"{x:g}"))
    try:
        y = q.to(want_q.units).magnitude
    except Exception:
        family = {_FAMILY.get(got), _FAMILY.get(want)}
        what = "wrong kind of quantity" if len(family) == 1 and None not in family else "wrong dimension"
        raise UnitProblem(f"{what}: {text!r} is {got}, expected {want} in {unit or 'no unit'}") from None
    return _bounded(float(y), text, unit)


_KINDS = {
    "[mass] * [length] ** 2 / [time] ** 3 / [current]": "a voltage",
    "[current]": "a current",
    "[mass] * [length] ** 2 / [time] ** 3": "an active power (W)",
    "[apparent_power]": "an apparent power (VA)",
    "[reactive_power]": "a reactive power (var)",
    "1 / [time]": "a frequency",
    "[time]": "a time",
    "[length]": "a length",
    "[mass]": "a mass",
    "[temperature]": "a temperature",
    "[mass] / [length] / [time] ** 2": "a pressure",
    "[mass] * [length] ** 2 / [time] ** 2": "an energy (J, Wh)",
    "[apparent_power] * [time]": "an apparent energy (VAh)",
    "[reactive_power] * [time]": "a reactive energy (varh)",
    "[mass] / [time]": "a mass flow",
    "[mass] * [length] ** 2 / [time] ** 2 / [current]": "a magnetic flux",
    "[mass] * [length] ** 2 / [time] ** 3 / [current] ** 2": "a resistance",
    "dimensionless": "a plain number",
    "[length] ** 3 / [time]": "a volume flow",
    "[length] ** 3": "a volume",
    "[mass] / [length] ** 3": "a density",
    "[length] / [time]": "a speed",
    "[length] ** 2": "an area",
}
_FAMILY = {
    "an active power (W)": "power", "an apparent power (VA)": "power", "a reactive power (var)": "power",
    "an energy (J, Wh)": "energy", "an apparent energy (VAh)": "energy", "a reactive energy (varh)": "energy",
}
# pint's angle units: radian is dimensionless, so rpm (revolutions a minute) and Hz (per
# second) share a dimension; an angle unit among the parts is what makes a rotation
_ANGLES = {"radian", "degree", "turn", "revolutions_per_minute", "revolutions_per_second",
           "arcminute", "arcsecond", "grade"}
_HINTS = {
    ("a frequency", "a rotational speed"): " (write a speed as '{x} rpm' or '{x} r/min')",
}


def _kind(q: Any) -> str:
    key = str(q.dimensionality)
    if key in ("1 / [time]", "dimensionless"):
        ureg = registry()
        names = {ureg.parse_unit_name(n)[0][1] for n in q._units} if q._units else set()
        if names & _ANGLES:
            return "a rotational speed" if key == "1 / [time]" else "an angle"
    return _KINDS.get(key, f"of dimension {key}")
