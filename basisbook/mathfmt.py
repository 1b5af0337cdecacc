"""Numbers and units as text and LaTeX, and LaTeX as MathML.

Pure formatting: no physics, no HTML templates.  A step's expression is shown
three ways by substituting each ``@name`` with its symbol, or with its number
and unit.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from basisbook.spec import PLACEHOLDER

SIGNIFICANT = 4
_SUPERSCRIPT = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")
_MATHRM = re.compile(r"\\mathrm\{([^{}]*)\}")

_UNIT_LATEX = {
    "": "",
    "pu": r"\,\mathrm{p.u.}",
    "degC": r"\,{}^{\circ}\mathrm{C}",
    "delta_degC": r"\,\mathrm{K}",
    "deg": r"^{\circ}",
    "ohm": r"\,\Omega",
    "%": r"\,\%",
    "percent": r"\,\%",
    "text": "",
}
_UNIT_TEXT = {"pu": "p.u.", "degC": "°C", "delta_degC": "K", "deg": "°", "ohm": "Ω",
              "percent": "%", "text": "", "1": ""}


def unit_text(unit: str) -> str:
    if unit in _UNIT_TEXT:
        return _UNIT_TEXT[unit]
    u = re.sub(r"(\*\*|\^)(-?\d+)", lambda m: m.group(2).translate(_SUPERSCRIPT), unit)
    return u.replace("*", "·").replace("ohm", "Ω")


def unit_latex(unit: str) -> str:
    if unit in _UNIT_LATEX:
        return _UNIT_LATEX[unit]
    # \text keeps units upright (a one-letter \mathrm is dropped by the converter)
    return r"\,\text{" + unit_text(unit) + "}"


def number_text(x: float | str, digits: int = SIGNIFICANT) -> str:
    """Four significant figures, no exponent for everyday magnitudes; a true minus
    sign (U+2212), as the equations show it."""
    if isinstance(x, str):
        return x
    return _plain_number(x, digits).replace("-", "\u2212")


def _plain_number(x: float, digits: int) -> str:
    if x == 0:
        return "0"
    if not math.isfinite(x):
        return str(x)
    if x == round(x) and 1 <= abs(x) < 1e6:
        return str(int(round(x)))  # counts and round values read as integers
    mag = math.floor(math.log10(abs(x)))
    if -3 <= mag < 6:
        decimals = max(digits - 1 - mag, 0)
        s = f"{x:.{decimals}f}"
        return s
    m, e = f"{x:.{digits - 1}e}".split("e")
    return f"{m}×10{str(int(e)).translate(_SUPERSCRIPT)}"


def number_latex(x: float | str) -> str:
    if isinstance(x, str):
        return r"\text{" + x + "}"
    t = _plain_number(x, SIGNIFICANT)
    if "×10" in t:
        m, e = f"{x:.{SIGNIFICANT - 1}e}".split("e")
        return f"{m} \\times 10^{{{int(e)}}}"
    return t


def quantity_latex(x: float | str | tuple, unit: str) -> str:
    if isinstance(x, tuple):
        return r"\text{(table)}"
    return number_latex(x) + ("" if isinstance(x, str) else unit_latex(unit))


def substitute(expression: str, symbols: dict[str, str]) -> str:
    return PLACEHOLDER.sub(lambda m: "{" + symbols[m.group(1)] + "}", expression)


_JUXTAPOSED = re.compile(r"(\\[A-Za-z]+|[A-Za-z0-9_)}])((?:\s|\\,|\\;|\\ )*)(?=@)")
# what may stand right before a substituted value as the left factor of a product
_VALUE_COMMANDS = {"pi"}
_OPENING_GROUP = re.compile(r"\\(?:begin|text|mathrm|operatorname)\{[^{}]*\}$")


def _explicit_products(expression: str) -> str:
    """``a\\,@b`` reads as a product in symbols, but "20 0.915" does not: use a dot."""

    def repl(m: re.Match[str]) -> str:
        token = m.group(1)
        if token.startswith("\\") and token[1:] not in _VALUE_COMMANDS:
            return m.group(0)  # an operator or function such as \cdot, \sin, \left
        if token == "}" and _OPENING_GROUP.search(m.string[: m.start(1) + 1]):
            return m.group(0)  # the end of \begin{cases}, \text{...}: not a factor
        return token + r" \cdot "

    return _JUXTAPOSED.sub(repl, expression)


def substitute_values(expression: str, values: dict[str, tuple[float | str, str]]) -> str:
    expression = _explicit_products(expression)

    def repl(m: re.Match[str]) -> str:
        v, unit = values[m.group(1)]
        q = quantity_latex(v, unit)
        if isinstance(v, tuple):
            return "{" + q + "}"
        # a negative number or one with a unit inside a product reads better in brackets,
        # unless the expression already brackets it
        before = m.string[: m.start()].rstrip()
        after = m.string[m.end():].lstrip()
        bracketed = before.endswith(("(", "{", ",")) and after.startswith((")", "}", ","))
        if not isinstance(v, str) and not bracketed and (v < 0 or unit_latex(unit)):
            return r"\left(" + q + r"\right)"
        return "{" + q + "}"

    return PLACEHOLDER.sub(repl, expression)


@lru_cache(maxsize=4096)
def mathml(latex: str, display: bool = False) -> str:
    from latex2mathml.converter import convert

    # upright subscripts and names: the converter italicises a one-letter \mathrm
    latex = _MATHRM.sub(lambda m: r"\text{" + m.group(1) + "}", latex)
    return convert(latex, display="block" if display else "inline")
