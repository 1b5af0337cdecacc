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


def _depth_change(value: str) -> tuple[int, str | None]:
    """Bracket depth change over a value fragment, and an open multi-line string."""
    depth = 0
    i = 0
    while i < len(value):
        c = value[i]
        if value.startswith('"""', i) or value.startswith("'''", i):
            q = value[i : i + 3]
            end = value.find(q, i + 3)
            if end < 0:
                return depth, q
            i = end + 3
            continue
        if c == '"':
            i += 1
            while i < len(value) and value[i] != '"':
                i += 2 if value[i] == "\\" else 1
        elif c == "'":
            end = value.find("'", i + 1)
            i = len(value) if end < 0 else end
        elif c == "#":
            break
        elif c in "[{":
            depth += 1
        elif c in "]}":
            depth -= 1
        i += 1
    return depth, None


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
        if open_string:
            if open_string in raw:
                # the rest of the closing line belongs to the same value
                rest = raw.split(open_string, 1)[1]
                open_string = None
                d, open_string = _depth_change(rest)
                depth += d
            continue
        if depth > 0:
            d, open_string = _depth_change(raw)
            depth += d
            continue
        m = _ARRAY.match(raw)
        if m:
            parts = _split(m.group(1))
            base = _resolve(parts[:-1], counters) + parts[-1:]
            idx = counters.get(base, -1) + 1
            counters[base] = idx
            table = base + (idx,)
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
            d, open_string = _depth_change(m.group(2))
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
