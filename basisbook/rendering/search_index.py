"""The offline search index (a script: file:// pages cannot fetch JSON)."""

from __future__ import annotations

import json
from functools import lru_cache

from basisbook.rendering.source_pages import source_page
from basisbook.running.engine import CalcRun


@lru_cache(maxsize=4096)
def plain_symbol(latex: str) -> str:
    """LaTeX symbol as searchable text: S_\\mathrm{r} -> S_r, \\cos\\varphi -> cos varphi."""
    import re

    t = re.sub(r"\\(mathrm|text|operatorname)\{([^{}]*)\}", r"\2", latex)
    t = re.sub(r"\\([A-Za-z]+)", r"\1 ", t)
    return re.sub(r"[{}\s]+", " ", t).replace(" _", "_").strip()


def search_index(runs: list[CalcRun]) -> str:
    """The offline search index as a script (file:// pages cannot fetch JSON)."""
    entries: list[dict[str, str]] = []
    for r in runs:
        entries.append({"t": r.instance.title, "k": "calculation", "h": f"{r.id}.html",
                        "s": f"{r.id} {r.spec.title}"})
        for decl in r.spec.inputs:
            iv = r.inputs[decl.name]
            entries.append({"t": f"{r.id}.{decl.name}", "k": "input", "h": f"{r.id}.html#in-{decl.name}",
                            "s": f"{plain_symbol(decl.symbol)} {decl.meaning}"})
            if decl.kind == "records":
                for rec in iv.value:  # type: ignore[union-attr]
                    words = " ".join(str(v) for v in rec.values() if isinstance(v, str))
                    entries.append({"t": f"{rec.get('tag', rec.source.label)}", "k": "load-list row",
                                    "h": f"{source_page(rec.source.file)}#L{rec.source.line}",
                                    "s": f"{words} {r.id}"})
        for o in r.spec.outputs:
            entries.append({"t": f"{r.id}.{o.name}", "k": "result", "h": f"{r.id}.html#out-{o.name}",
                            "s": f"{plain_symbol(o.symbol)} {o.meaning}"})
    # \u003c keeps any "<" from project text inert even if this file were inlined
    data = json.dumps(entries, ensure_ascii=True, sort_keys=True, separators=(",", ":")).replace("<", "\\u003c")
    return "window.BASISBOOK_SEARCH = " + data + ";\n"

