"""Numbers and units as text and LaTeX, and LaTeX as MathML.

Pure formatting: no physics, no HTML templates.  A step's expression is shown
three ways by substituting each ``@name`` with its symbol, or with its number
and unit.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from functools import lru_cache
from typing import Any

from basisbook.contract.spec import PLACEHOLDER

SIGNIFICANT = 4
_SUPERSCRIPT = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")
_FROM_SUPERSCRIPT = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-")
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


# A value substituted into a numbers line carries this many significant figures at most
# (fewer when it has fewer, as typed: 0.8, not 0.8000), so that a reviewer who recomputes
# the line from the printed numbers gets the result as printed at SIGNIFICANT figures.
SUBSTITUTED = 6


def substituted_text(x: float) -> str:
    """A value as written into a numbers line: its shortest exact form when that has at
    most SUBSTITUTED significant figures (what the engineer typed), else rounded to them."""
    if x == 0 or not math.isfinite(x):
        return _plain_number(x, SIGNIFICANT)
    s = f"{x:.{SUBSTITUTED - 1}e}"
    rounded = float(s)
    mag = math.floor(math.log10(abs(rounded)))
    if -3 <= mag < 6:
        digits = f"{abs(rounded):.{max(SUBSTITUTED - 1 - mag, 0)}f}"
        if "." in digits:
            digits = digits.rstrip("0").rstrip(".")
        return ("-" if rounded < 0 else "") + digits
    m, e = s.split("e")
    if "." in m:
        m = m.rstrip("0").rstrip(".")
    return f"{m}×10{str(int(e)).translate(_SUPERSCRIPT)}"


def trimmed(x: float, digits: int) -> str:
    """``digits`` significant figures without the trailing zeros that claim more than the
    number has (93.75, not 93.7500000000), with a true minus sign."""
    text = number_text(x, digits)
    if "." in text and "×" not in text:
        text = text.rstrip("0").rstrip(".")
    elif "." in text:
        m, e = text.split("×")
        text = m.rstrip("0").rstrip(".") + "×" + e
    return text


def column_decimals(values: list[float]) -> int | None:
    """The decimals a table column is shown with, the same in every row: enough for four
    significant figures of its largest magnitude and two of its smallest (at most four
    decimals); None (each number on its own) when the column needs an exponent or holds
    only whole numbers."""
    finite = [abs(v) for v in values if math.isfinite(v)]
    if not finite or all(v == round(v) for v in finite):
        return None
    nonzero = [v for v in finite if v > 0]
    if not nonzero:
        return None
    top, low = math.floor(math.log10(max(nonzero))), math.floor(math.log10(min(nonzero)))
    if not -3 <= top < 6:
        return None
    return min(max(SIGNIFICANT - 1 - top, 1 - low, 0), 4)


def fixed_text(x: float, decimals: int) -> str:
    """``x`` with a set number of decimals and a true minus sign."""
    text = f"{x:.{decimals}f}"
    if float(text) == 0:
        text = text.lstrip("-")
    return text.replace("-", "\u2212")


def input_text(x: float | str) -> str:
    """An input as the engineer typed it (0.8, 12.5, 0.915; at most SUBSTITUTED significant
    figures), with a true minus sign."""
    if isinstance(x, str):
        return x
    return substituted_text(x).replace("-", "\u2212")


def number_latex(x: float | str, substituted: bool = False) -> str:
    if isinstance(x, str):
        return r"\text{" + x + "}"
    t = substituted_text(x) if substituted else _plain_number(x, SIGNIFICANT)
    if "×10" in t:
        m, e = t.split("×10")
        return f"{m} \\times 10^{{{int(e.translate(_FROM_SUPERSCRIPT))}}}"
    return t


def quantity_latex(x: float | str | tuple, unit: str, substituted: bool = False) -> str:
    if isinstance(x, tuple):
        return r"\text{(table)}"
    return number_latex(x, substituted) + ("" if isinstance(x, str) else unit_latex(unit))


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


def substitute_values(expression: str, values: dict[str, tuple[float | str, str]],
                      emit: Callable[[str], str] = str) -> str:
    """The expression with each ``@name`` replaced by its number and unit;
    ``emit`` turns each quantity's LaTeX into what is inserted (``values_mathml``
    inserts a slot instead)."""
    expression = _explicit_products(expression)

    def repl(m: re.Match[str]) -> str:
        v, unit = values[m.group(1)]
        q = emit(quantity_latex(v, unit, substituted=True))
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

    # upright subscripts and names: the converter italicises a one-letter \mathrm; inside
    # \text a LaTeX space (\, \; \ ~) would be printed as written, so it becomes a space
    latex = _MATHRM.sub(lambda m: r"\text{" + _TEXT_SPACE.sub(" ", m.group(1)) + "}", latex)
    # operator names the converter does not know (it would print "\arg" as it stands)
    latex = _OPERATORS.sub(lambda m: r"\operatorname{" + m.group(1) + "}", latex)
    return convert(latex, display="block" if display else "inline")


_TEXT_SPACE = re.compile(r"\\[,;: ]|~")
_OPERATORS = re.compile(r"\\(arg)(?![A-Za-z])")


# A slot stands for one quantity while an expression's shape is converted; no
# expression or unit of ours contains the word.
_SLOT = r"\text{zqslot%dqz}"
_SLOT_MATHML = "<mtext>zqslot%dqz</mtext>"
_ROW, _END = "<mrow>", "</mrow>"


def _unwrap(x: str) -> str | None:
    """The content of ``x`` if it is one <mrow> element, else None."""
    if not (x.startswith(_ROW) and x.endswith(_END)):
        return None
    depth, i = 0, 0
    while True:
        o, c = x.find("<mrow", i), x.find(_END, i)
        if c == -1:
            return None  # more rows opened than closed
        if o != -1 and o < c:
            close = x.index(">", o)
            # an empty group is written <mrow />: it opens nothing
            depth, i = depth + (x[close - 1] != "/"), close + 1
        else:
            depth, i = depth - 1, c + len(_END)
            if depth == 0:
                return x[len(_ROW):-len(_END)] if i == len(x) else None


@lru_cache(maxsize=8192)
def _fragment(latex: str) -> str | None:
    """What the converter writes for ``{latex}`` inside a row: the content of the
    group (the <math> element's row and the group's own row taken off), or None
    if the output does not have that shape."""
    m = mathml("{" + latex + "}")
    row = _unwrap(m[m.index(">") + 1: m.rindex("</math>")])
    return _unwrap(row) if row is not None else None


def _assemble(shape: str, quantities: list[str], display: bool) -> str | None:
    out = mathml(shape, display)
    for i, q in enumerate(quantities):
        slot, frag = _SLOT_MATHML % i, _fragment(q)
        if frag is None or out.count(slot) != 1:
            return None  # not the shape expected: convert directly
        out = out.replace(slot, frag)
    return out


def values_mathml(prefix: str, expression: str, values: dict[str, tuple[float | str, str]],
                  display: bool = True) -> str:
    """MathML of ``prefix + substitute_values(expression, values)``, put together from
    cached pieces: the expression's shape with a slot per value (the same for every
    instance of a calc and every rebuild) and each quantity on its own.  Conversion is
    most of a page's rendering time, and in ``serve`` only the numbers change.  The
    result is the converter's own output for the whole line (tested on every step)."""
    quantities: list[str] = []

    def slot(q: str) -> str:
        quantities.append(q)
        return _SLOT % (len(quantities) - 1)

    out = _assemble(prefix + substitute_values(expression, values, slot), quantities, display)
    return out if out is not None else mathml(prefix + substitute_values(expression, values), display)


def quantity_mathml(symbol: str, quantity: str, display: bool = True) -> str:
    """MathML of a result line ``{symbol} = quantity`` from the cached MathML of the
    symbol and of the quantity (the same bytes as converting the line whole)."""
    sym, q = _fragment(symbol), _fragment(quantity)
    if sym is None or q is None:
        return mathml("{" + symbol + "} = " + quantity, display)
    m = mathml("x", display)  # the converter's own <math> element, display attribute included
    return f"{m[: m.index('>') + 1]}<mrow><mrow>{sym}</mrow><mo>&#x0003D;</mo>{q}</mrow></math>"


def format_value(v: Any) -> str:
    """A value from a results model as text: numbers in the one number style, lists and
    records item by item, nothing as a dash."""
    if v is None:
        return "—"
    if isinstance(v, list):
        return "[" + ", ".join(format_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return ", ".join(f"{k} {format_value(x)}" for k, x in v.items())
    if isinstance(v, float):
        return number_text(v)
    return str(v)
