"""Line numbers for TOML keys.

``tomllib`` parses but forgets positions; a reviewer needs "file:line" for
every input.  This scanner walks the same text line by line and maps each key
path (tuple of str, with int indexes for arrays of tables) to the line that
defines it.  It assumes the text already parsed with tomllib, so it only has to
be right for valid TOML, and it is used for messages and links, never values.
"""

from __future__ import annotations

import re

Path = tuple[str | int, ...]

_BARE = r"[A-Za-z0-9_-]+"
_KEYPART = rf'(?:{_BARE}|"(?:[^"\\]|\\.)*"|\'[^\']*\')'
_DOTTED = rf"{_KEYPART}(?:\s*\.\s*{_KEYPART})*"
_TABLE = re.compile(rf"^\s*\[\s*({_DOTTED})\s*\]\s*(#.*)?$")
_ARRAY = re.compile(rf"^\s*\[\[\s*({_DOTTED})\s*\]\]\s*(#.*)?$")
_KEYVAL = re.compile(rf"^\s*({_DOTTED})\s*=\s*(.*)$")
_PART = re.compile(_KEYPART)


def _split(dotted: str) -> tuple[str, ...]:
    out = []
    for m in _PART.finditer(dotted):
        p = m.group(0)
        if p[0] in "\"'":
            p = p[1:-1]
        out.append(p)
    return tuple(out)


def _close_run(value: str, i: int, quote: str) -> int | None:
    """At ``value[i]`` inside a multi-line string: the index after its closing delimiter if
    one starts here, else None.  A run of 3 to 5 quotes closes the string at the run's end
    (TOML lets one or two quotes of the content touch the delimiter)."""
    if not value.startswith(quote * 3, i):
        return None
    j = i + 3
    while j < len(value) and value[j] == quote and j - i < 5:
        j += 1
    return j


def _scan(value: str, open_string: str | None) -> tuple[int, str | None]:
    """Bracket depth change over one line's value fragment, and the multi-line string
    (three double or three single quotes) still open at its end; ``open_string`` is the one
    open at the fragment's start.  Escapes count in basic strings only: an escaped quote
    before two more never closes a multi-line basic string, and a literal string has no
    escapes at all."""
    depth = 0
    i = 0
    n = len(value)
    while i < n:
        if open_string:
            q = open_string[0]
            if q == '"' and value[i] == "\\":
                i += 2  # an escaped character, or a line-ending backslash
                continue
            j = _close_run(value, i, q)
            if j is None:
                i += 1
                continue
            open_string = None
            i = j
            continue
        c = value[i]
        if c in "\"'" and value.startswith(c * 3, i):
            open_string = c * 3
            i += 3
        elif c == '"':
            i += 1
            while i < n and value[i] != '"':
                i += 2 if value[i] == "\\" else 1
            i += 1
        elif c == "'":
            end = value.find("'", i + 1)
            i = n if end < 0 else end + 1
        elif c == "#":
            break
        else:
            if c in "[{":
                depth += 1
            elif c in "]}":
                depth -= 1
            i += 1
    return depth, open_string


def _inline_keys(value: str) -> list[tuple[str, ...]]:
    """Keys of a one-line inline table ``{ a = 1, b.c = 2 }`` (first level)."""
    v = value.strip()
    if not v.startswith("{"):
        return []
    keys = []
    for m in re.finditer(rf"[{{,]\s*({_DOTTED})\s*=", v):
        keys.append(_split(m.group(1)))
    return keys


def key_lines(text: str) -> dict[Path, int]:
    lines: dict[Path, int] = {}
    table: Path = ()
    counters: dict[Path, int] = {}
    depth = 0
    open_string: str | None = None
    for n, raw in enumerate(text.splitlines(), start=1):
        if n == 1:
            raw = raw.removeprefix("\ufeff")  # a byte-order mark is accepted by the loader
        if open_string or depth > 0:
            # inside a value that spans lines: no keys or headers here
            d, open_string = _scan(raw, open_string)
            depth += d
            continue
        m = _ARRAY.match(raw)
        if m:
            parts = _split(m.group(1))
            base = _resolve(parts[:-1], counters) + parts[-1:]
            idx = counters.get(base, -1) + 1
            counters[base] = idx
            table = base + (idx,)
            lines.setdefault(base, n)  # the array itself: its first table's line
            lines.setdefault(table, n)
            continue
        m = _TABLE.match(raw)
        if m:
            table = _resolve(_split(m.group(1)), counters)
            lines.setdefault(table, n)
            continue
        m = _KEYVAL.match(raw)
        if m:
            path = table + _split(m.group(1))
            lines.setdefault(path, n)
            for sub in _inline_keys(m.group(2)):
                lines.setdefault(path + sub, n)
            d, open_string = _scan(m.group(2), None)
            depth += d
    return lines


def _resolve(parts: tuple[str, ...], counters: dict[Path, int]) -> Path:
    """Map a header like ``instance.inputs`` onto the latest ``[[instance]]``."""
    out: Path = ()
    for p in parts:
        out = out + (p,)
        if out in counters:
            out = out + (counters[out],)
    return out


def line_of(lines: dict[Path, int], path: Path) -> int | None:
    """The line of ``path`` or of its nearest enclosing table."""
    p = tuple(path)
    while p:
        if p in lines:
            return lines[p]
        p = p[:-1]
    return None
