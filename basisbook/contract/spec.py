"""The calc contract: what a module in ``calcs/`` declares and returns.

A calc module declares one ``SPEC = CalcSpec(...)`` and one function
``compute(v: Values) -> Result``.  Everything a page, a table or a test needs to
know about the module's inputs and outputs is read from ``SPEC``; nothing is
copied by hand.  ``compute`` receives plain floats (and strings for choice
inputs) already converted to the declared units, and returns plain floats in
the declared output units.  Nothing in here knows about HTML.

Equations are LaTeX in which ``@name`` stands for a declared input or output.
The renderer shows each step three ways by replacing ``@name`` with the
glossary symbol, with the number and unit, and by printing the result.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

PLACEHOLDER = re.compile(r"@([A-Za-z_][A-Za-z0-9_]*)")

VERDICTS = ("meets", "review", "fails")


class SpecError(ValueError):
    """A calc module's own declaration is inconsistent (a programming error)."""


# ---------------------------------------------------------------------------
# Glossary terms and ranges
# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Term:
    """One name in the shared glossary: symbol (LaTeX), meaning, unit (pint string).

    ``unit`` is "" for a dimensionless number (a ratio, a count, a per-unit value
    is declared "pu").  Choice (text) terms have unit "text".
    """

    symbol: str
    meaning: str
    unit: str


@dataclass(frozen=True)
class Range:
    """An allowed interval; ``None`` for an open end.  Written like "(0, 1]"."""

    low: float | None = None
    high: float | None = None
    low_closed: bool = True
    high_closed: bool = True

    @classmethod
    def parse(cls, text: str) -> Range:
        m = re.fullmatch(r"\s*([\[(])\s*([^,]*?)\s*,\s*([^,]*?)\s*([\])])\s*", text)
        if not m:
            raise SpecError(f"range {text!r} is not of the form '(low, high]'")

        def end(s: str) -> float | None:
            return None if s in ("", "-inf", "inf", "+inf") else float(s)

        return cls(end(m.group(2)), end(m.group(3)), m.group(1) == "[", m.group(4) == "]")

    def contains(self, x: float) -> bool:
        if self.low is not None and (x < self.low or (x == self.low and not self.low_closed)):
            return False
        if self.high is not None and (x > self.high or (x == self.high and not self.high_closed)):
            return False
        return True

    def text(self) -> str:
        lo = "-inf" if self.low is None else f"{self.low:g}"
        hi = "inf" if self.high is None else f"{self.high:g}"
        return f"{'[' if self.low_closed and self.low is not None else '('}{lo}, {hi}" \
               f"{']' if self.high_closed and self.high is not None else ')'}"


# ---------------------------------------------------------------------------
# Declarations
# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Column:
    """One column of a table input: label, unit (pint string) and allowed range."""

    label: str
    unit: str
    range: str | None = None

    @property
    def allowed(self) -> Range:
        return Range.parse(self.range) if self.range else Range()


@dataclass(frozen=True)
class Field:
    """One column of a records file (a load list): header key, meaning, unit.

    unit: a pint unit string for numbers (a cell may be "250 kW" or a plain
    number in this unit), "text" for free text, or "choice" with ``choices``.
    default None makes the cell required; unique=True rejects repeated values.
    """

    key: str
    meaning: str
    unit: str = ""
    range: str | None = None
    choices: tuple[str, ...] = ()
    default: float | str | None = None
    unique: bool = False

    @property
    def allowed(self) -> Range:
        return Range.parse(self.range) if self.range else Range()


@dataclass(frozen=True)
class SourceRow:
    """Where a record came from: project file and line (CSV) or sheet row (XLSX)."""

    file: str
    line: int

    @property
    def label(self) -> str:
        return f"{self.file}:{self.line}"


class Record(Mapping[str, Any]):
    """One row of a records file, its cells in the declared units, and its source."""

    def __init__(self, data: Mapping[str, Any], source: SourceRow):
        self._data = dict(data)
        self.source = source

    def __getitem__(self, key: str) -> Any:
        return self._data[key]

    def __iter__(self) -> Iterator[str]:
        return iter(self._data)

    def __len__(self) -> int:
        return len(self._data)

    def __repr__(self) -> str:
        return f"Record({self._data!r}, {self.source.label})"


@dataclass(frozen=True)
class Input:
    """A declared input.  ``name`` is a glossary name; symbol, meaning and unit
    come from the glossary unless given here.

    kind: "number" (a float in ``unit``), "choice" (one of ``choices``),
    "table" (rows of numbers, one per ``columns`` entry, at least ``min_rows``;
    compute receives a tuple of row tuples in the column units) or "records"
    (a CSV or XLSX file in the project with one column per ``fields`` entry;
    compute receives a tuple of Record, each knowing its file and line).
    default: used when the project omits the key (None means required).
    """

    name: str
    range: str | None = None
    default: float | str | tuple | None = None
    choices: tuple[str, ...] = ()
    columns: tuple[Column, ...] = ()
    fields: tuple[Field, ...] = ()
    min_rows: int = 1
    note: str = ""
    # filled from the glossary by CalcSpec
    symbol: str = ""
    meaning: str = ""
    unit: str = ""

    @property
    def kind(self) -> str:
        if self.fields:
            return "records"
        if self.columns:
            return "table"
        return "choice" if self.choices else "number"

    @property
    def allowed(self) -> Range:
        return Range.parse(self.range) if self.range else Range()

    @property
    def required(self) -> bool:
        return self.default is None


@dataclass(frozen=True)
class Output:
    """A declared output; ``key`` marks it for the handbook's summary table."""

    name: str
    key: bool = False
    note: str = ""
    symbol: str = ""
    meaning: str = ""
    unit: str = ""


@dataclass(frozen=True)
class Step:
    """One line of the hand calculation: ``@output = expression``.

    ``expression`` is LaTeX with ``@name`` placeholders; ``source`` is a key of
    the module's references and ``locator`` the clause, equation or example.
    """

    output: str
    expression: str
    source: str
    locator: str = ""
    note: str = ""

    def names(self) -> list[str]:
        return PLACEHOLDER.findall(self.expression)


@dataclass(frozen=True)
class Check:
    """A design criterion: ``value relation limit``.

    value: an output name.  limit: a number or an input/output name.
    review_band: if the criterion holds but the value lies within this fraction
    of the limit, the verdict is "review" instead of "meets".
    """

    id: str
    criterion: str
    value: str
    relation: str
    limit: float | str
    source: str
    locator: str = ""
    review_band: float = 0.0

    def __post_init__(self) -> None:
        if self.relation not in ("<=", ">=", "<", ">"):
            raise SpecError(f"check {self.id}: relation {self.relation!r} not one of <= >= < >")


@dataclass(frozen=True)
class Reference:
    """A published source: full citation with edition, and what it is used for."""

    key: str
    citation: str
    note: str = ""


@dataclass(frozen=True)
class FigureSpec:
    """A figure the module draws from data (see Chart)."""

    name: str
    title: str
    caption: str


@dataclass(frozen=True)
class TableSpec:
    name: str
    title: str
    caption: str = ""



# the handbook's default outline: its groups of calculations, in reading order
DISCIPLINES = ("generation", "excitation", "conversion chains", "auxiliary supply and transformers",
               "fault levels", "plant balance")

@dataclass
class CalcSpec:
    """``discipline`` places the calculation in the handbook's default outline (one of
    DISCIPLINES, in that order), so the document reads by system, not by run order."""

    kind: str
    title: str
    purpose: str
    inputs: Sequence[Input]
    outputs: Sequence[Output]
    steps: Sequence[Step]
    checks: Sequence[Check]
    references: Sequence[Reference]
    cautions: Sequence[str]
    figures: Sequence[FigureSpec] = ()
    tables: Sequence[TableSpec] = ()
    glossary: Mapping[str, Term] = field(default_factory=dict)
    discipline: str = ""  # required in effect: checked against DISCIPLINES below

    def __post_init__(self) -> None:
        if self.discipline not in DISCIPLINES:
            raise SpecError(f"{self.kind}: discipline {self.discipline!r} is not one of {DISCIPLINES}")
        self.inputs = tuple(self._fill(i) for i in self.inputs)
        self.outputs = tuple(self._fill(o) for o in self.outputs)
        names = [i.name for i in self.inputs] + [o.name for o in self.outputs]
        dup = {n for n in names if names.count(n) > 1}
        if dup:
            raise SpecError(f"{self.kind}: names declared twice: {sorted(dup)}")
        refs = {r.key for r in self.references}
        known = set(names)
        for s in self.steps:
            if s.output not in self.output_names:
                raise SpecError(f"{self.kind}: step for undeclared output {s.output!r}")
            for n in s.names():
                if n not in known:
                    raise SpecError(f"{self.kind}: step {s.output} uses undeclared @{n}")
            if s.source not in refs:
                raise SpecError(f"{self.kind}: step {s.output} cites unknown reference {s.source!r}")
        for c in self.checks:
            if c.value not in self.output_names:
                raise SpecError(f"{self.kind}: check {c.id} value {c.value!r} is not an output")
            if isinstance(c.limit, str) and c.limit not in known:
                raise SpecError(f"{self.kind}: check {c.id} limit {c.limit!r} is not declared")
            if c.source not in refs:
                raise SpecError(f"{self.kind}: check {c.id} cites unknown reference {c.source!r}")

    def _fill(self, item: Any) -> Any:
        term = self.glossary.get(item.name)
        if term is None:
            raise SpecError(f"{self.kind}: {item.name!r} is not in the glossary")
        from dataclasses import replace

        return replace(
            item,
            symbol=item.symbol or term.symbol,
            meaning=item.meaning or term.meaning,
            unit=item.unit or term.unit,
        )

    @property
    def input_names(self) -> list[str]:
        return [i.name for i in self.inputs]

    @property
    def output_names(self) -> list[str]:
        return [o.name for o in self.outputs]

    def input(self, name: str) -> Input:
        for i in self.inputs:
            if i.name == name:
                return i
        raise KeyError(name)

    def output(self, name: str) -> Output:
        for o in self.outputs:
            if o.name == name:
                return o
        raise KeyError(name)

    def reference(self, key: str) -> Reference:
        for r in self.references:
            if r.key == key:
                return r
        raise KeyError(key)


@dataclass(frozen=True)
class PublishedCase:
    """A check of a module's functions against a published number.

    A module lists these in ``PUBLISHED_CASES``; the test suite asserts every one
    and the handbook's verification appendix runs and shows them at build time.
    ``tolerance`` is absolute, in ``unit``, and ``basis`` says why it is that wide
    (usually the digits the source prints).
    """

    case: str
    source: str
    expected: float
    unit: str
    tolerance: float
    basis: str
    compute: Callable[[], float]

    def run(self) -> tuple[float, bool]:
        value = float(self.compute())
        return value, abs(value - self.expected) <= self.tolerance


# ---------------------------------------------------------------------------
# What compute() receives and returns
# ---------------------------------------------------------------------------


class Values(Mapping[str, Any]):
    """Read-only inputs in declared units, by attribute or by key."""

    def __init__(self, data: Mapping[str, Any]):
        self._data = dict(data)

    def __getattr__(self, name: str) -> Any:
        try:
            return self._data[name]
        except KeyError:
            raise AttributeError(name) from None

    def __getitem__(self, name: str) -> Any:
        return self._data[name]

    def __iter__(self) -> Iterator[str]:
        return iter(self._data)

    def __len__(self) -> int:
        return len(self._data)


@dataclass
class Series:
    """A line on a chart.  style: "solid", "dashed", "dotted"."""

    label: str
    x: Sequence[float]
    y: Sequence[float]
    style: str = "solid"


@dataclass
class Marker:
    label: str
    x: float
    y: float


@dataclass
class Chart:
    """Figure data, drawn by the engine (matplotlib stays out of calcs/)."""

    x_label: str
    y_label: str
    series: list[Series]
    markers: list[Marker] = field(default_factory=list)
    equal_aspect: bool = False
    x_range: tuple[float, float] | None = None
    y_range: tuple[float, float] | None = None


@dataclass
class EnergyFlow:
    """Energy-flow (Sankey) figure data: what comes in and where it goes.

    inflows: (label, value); outflows: (label, value, "product" or "loss").
    The values must balance; the figure is drawn by the engine.
    """

    unit: str
    inflows: list[tuple[str, float]]
    outflows: list[tuple[str, float, str]]


@dataclass
class LineElement:
    """One element of a key single-line diagram.

    symbol: "grid", "transformer", "generator", "busbar", "breaker", "motor",
    "load" (IEC 60617 graphical symbols are drawn by the renderer).
    parent: the element it hangs from (the diagram is a tree; the root has None).
    link: the calc instance whose page the element opens ("" for none).
    """

    id: str
    symbol: str
    label: str
    parent: str | None = None
    link: str = ""
    anchor: str = ""


@dataclass
class SingleLine:
    """Key single-line diagram data; drawn inline so every element is a link."""

    elements: list[LineElement]


@dataclass
class Table:
    """A small result table: column headers with units, rows of numbers/text."""

    columns: list[tuple[str, str]]
    rows: list[list[Any]]


@dataclass
class Result:
    outputs: dict[str, float | str]
    charts: dict[str, Chart | EnergyFlow | SingleLine] = field(default_factory=dict)
    tables: dict[str, Table] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)


@dataclass(frozen=True)
class CheckResult:
    check: Check
    value: float
    limit: float
    verdict: str


def evaluate_check(check: Check, value: float, limit: float) -> CheckResult:
    """Compare a computed value with its limit; never clamps, only judges."""
    ops = {
        "<=": value <= limit,
        ">=": value >= limit,
        "<": value < limit,
        ">": value > limit,
    }
    if not math.isfinite(value) or not ops[check.relation]:
        verdict = "fails"
    elif check.review_band and abs(value - limit) <= check.review_band * max(abs(limit), 1e-300):
        verdict = "review"
    else:
        verdict = "meets"
    return CheckResult(check, value, limit, verdict)
