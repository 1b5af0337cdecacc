"""Units at the edge: parse a project value once, convert it to the declared unit.

The registry is built lazily (it costs ~0.5 s) and only when a value carries a
unit string.  Reactive power gets a dimension of its own so that "5 MVA" given
for a reactive input is a dimension error rather than a silent mix-up.
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Any


class UnitProblem(ValueError):
    pass


@lru_cache(maxsize=1)
def registry() -> Any:
    import pint

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    # Reactive power: its own base dimension; prefixes (k, M) come with pint.
    ureg.define("var = [reactive_power] = VAr")
    ureg.define("per_unit = [] = pu")
    return ureg


# convention: a declared "K" is a temperature difference; absolute temperatures are
# declared in degC (or "kelvin", which stays absolute)
_DIFFERENCE_UNITS = {"K", "delta_degC", "delta_degF"}
_OFFSET_UNITS = {"degree_Celsius", "degree_Fahrenheit"}


def _want(unit: str) -> str:
    if _dimensionless(unit):
        return "a plain number" + (" (per unit)" if unit == "pu" else "")
    return f"a number in {unit} or a number with its unit (like '3 {unit}')"


def _dimensionless(unit: str) -> bool:
    return unit in ("", "pu", "1")


def to_unit(value: Any, unit: str) -> float:
    """Return ``value`` as a float in ``unit``.

    value: a number (taken as already in ``unit``) or a string "11 kV".
    Raises UnitProblem with a message naming what was expected.
    """
    if isinstance(value, bool):
        raise UnitProblem(f"expected {_want(unit)}, got a true/false value")
    if isinstance(value, (int, float)):
        x = float(value)
    elif isinstance(value, str):
        x = _parse_string(value, unit)
    else:
        raise UnitProblem(f"expected {_want(unit)}, got {type(value).__name__}")
    if not math.isfinite(x):
        raise UnitProblem(f"expected a finite number, got {value!r}")
    return x


@lru_cache(maxsize=65536)
def _parse_string(text: str, unit: str) -> float:
    # cached: a rebuild in ``serve`` reads the same strings again, and pint parsing
    # is the bulk of loading a project (a failure raises, so is never cached)
    s = text.strip()
    if s.lower() in ("nan", "inf", "+inf", "-inf", "infinity"):
        raise UnitProblem(f"expected a finite number, got {text!r}")
    try:
        return float(s)  # a bare number in a string: declared unit
    except ValueError:
        pass
    ureg = registry()
    try:
        q = ureg.Quantity(s)
    except Exception as exc:  # pint raises several types for unparsable text
        why = str(exc).replace(" in the unit registry", " as a unit") if "not defined" in str(exc) else "not a number"
        raise UnitProblem(f"expected {_want(unit)}, could not read {text!r} ({why})") from None
    if not isinstance(q, ureg.Quantity) or not isinstance(q.magnitude, (int, float)):
        raise UnitProblem(f"expected a number with a unit, could not read {text!r}")
    target = "" if _dimensionless(unit) else unit
    if unit in _DIFFERENCE_UNITS and not q.unitless and str(q.units) in _OFFSET_UNITS:
        # "5 degC" for a temperature difference would silently become 278.15 K
        raise UnitProblem(f"{text!r} reads as a temperature on the Celsius/Fahrenheit scale, but a "
                          f"temperature difference is expected: write it in K (e.g. '{q.magnitude:g} K')")
    try:
        x = q.to(target).magnitude
    except Exception:
        got = _kind(q.dimensionality)
        want = _kind(ureg.Quantity(1, target).dimensionality)
        raise UnitProblem(
            f"wrong dimension: {text!r} is {got}, expected {want} in {unit or 'no unit'}"
        ) from None
    return float(x)


_KINDS = {
    "[mass] * [length] ** 2 / [time] ** 3 / [current]": "a voltage",
    "[current]": "a current",
    "[mass] * [length] ** 2 / [time] ** 3": "a power (W or VA)",
    "[reactive_power]": "a reactive power (var)",
    "1 / [time]": "a frequency or rotational speed",
    "[time]": "a time",
    "[length]": "a length",
    "[mass]": "a mass",
    "[temperature]": "a temperature",
    "[mass] / [length] / [time] ** 2": "a pressure",
    "[mass] * [length] ** 2 / [time] ** 2": "an energy",
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


def _kind(dim: Any) -> str:
    key = str(dim)
    return _KINDS.get(key, f"of dimension {key}")
