"""The offline search index (a script: file:// pages cannot fetch JSON)."""

from __future__ import annotations

import json
from functools import lru_cache

from basisbook.rendering.calc_page import TABLE_ROWS_SHOWN
from basisbook.rendering.mathfmt import number_text, unit_text
from basisbook.rendering.source_pages import source_page
from basisbook.running.engine import CalcRun


@lru_cache(maxsize=4096)
def plain_symbol(latex: str) -> str:
    """LaTeX symbol as searchable text: S_\\mathrm{r} -> S_r, \\cos\\varphi -> cos varphi."""
    import re

    t = re.sub(r"\\(mathrm|text|operatorname)\{([^{}]*)\}", r"\2", latex)
    t = re.sub(r"\\([A-Za-z]+)", r"\1 ", t)
    return re.sub(r"[{}\s]+", " ", t).replace(" _", "_").strip()


# Greek letters by the names an engineer types without the symbol (eta for η); the index
# carries this map so the search box reduces a query's Greek characters the same way
GREEK = {"α": "alpha", "β": "beta", "γ": "gamma", "δ": "delta", "Δ": "Delta", "ε": "epsilon",
         "ϵ": "epsilon", "ζ": "zeta", "η": "eta", "θ": "theta", "ϑ": "theta", "κ": "kappa",
         "λ": "lambda", "μ": "mu", "ν": "nu", "ξ": "xi", "π": "pi", "ρ": "rho", "σ": "sigma",
         "τ": "tau", "φ": "phi", "ϕ": "phi", "Φ": "Phi", "χ": "chi", "ψ": "psi", "ω": "omega",
         "Ω": "Omega"}


@lru_cache(maxsize=4096)
def symbol_key(latex: str) -> str:
    """The symbol as the search box compares it: I''_\\mathrm{k,G} -> I"kG, x_\\mathrm{d} -> xd,
    S_\\mathrm{rT} -> SrT, \\eta_\\mathrm{el} -> etael.  Double primes become one ``"`` (typed as
    ``"``, ``''`` or ``″``), Greek letters their names; subscript marks, braces, commas and
    spaces go.  ``search.js`` reduces a query the same way, so ``Ik"`` finds I″k."""
    import re

    t = latex
    for _ in range(3):
        t = re.sub(r"\\(?:mathrm|text|operatorname|mathit|mathbf)\{([^{}]*)\}", r"\1", t)
    t = re.sub(r"\^\{?\\prime\\prime\}?|''|″", '"', t)
    t = re.sub(r"\^\{?\\prime\}?|′", "'", t)
    t = re.sub(r"\\(left|right|,|;|!|quad)", "", t)
    t = re.sub(r"\\var(phi|theta|epsilon|rho|sigma|pi)(?![A-Za-z])", r"\\\1", t)  # one name per letter
    t = re.sub(r"\\([A-Za-z]+)", lambda m: m.group(1), t)  # \eta -> eta, \cos -> cos
    t = "".join(GREEK.get(ch, ch) for ch in t)
    return re.sub(r"[\s_{}^,\\]", "", t)


def search_index(runs: list[CalcRun]) -> str:
    """The offline search index as a script (file:// pages cannot fetch JSON).

    Each entry: ``t`` its label, ``k`` its kind, ``h`` where it links, ``s`` the words it is
    found by; a quantity also ``y`` its symbol key (``symbol_key``), ``v`` its value with unit
    and ``p`` the page it is on.  A result links to the step that computes it.
    """
    entries: list[dict[str, str]] = []
    for r in runs:
        title = r.instance.title
        stepped = {s.output for s in r.spec.steps}
        entries.append({"t": title, "k": "calculation", "h": f"{r.id}.html",
                        "s": f"{r.id} {r.spec.title}"})
        for decl in r.spec.inputs:
            iv = r.inputs[decl.name]
            value = ""
            if decl.kind == "number":
                value = f"{number_text(iv.value)} {unit_text(decl.unit)}".strip()  # type: ignore[arg-type]
            elif decl.kind == "choice":
                value = str(iv.value)
            entries.append({"t": f"{r.id}.{decl.name}", "k": "input", "h": f"{r.id}.html#in-{decl.name}",
                            "s": f"{plain_symbol(decl.symbol)} {decl.meaning}", "y": symbol_key(decl.symbol),
                            "v": value, "p": title})
            if decl.kind == "records":
                # as many rows as a page shows; a longer list is searched in its CSV
                for rec in iv.value[:TABLE_ROWS_SHOWN]:  # type: ignore[index]
                    words = " ".join(str(v) for v in rec.values() if isinstance(v, str))
                    entries.append({"t": f"{rec.get('tag', rec.source.label)}", "k": "load-list row",
                                    "h": f"{source_page(rec.source.file)}#L{rec.source.line}",
                                    "s": f"{words} {r.id}", "p": title})
        for o in r.spec.outputs:
            v = r.outputs[o.name]
            value = f"{number_text(v)} {unit_text(o.unit)}".strip() if isinstance(v, (int, float)) else str(v)
            anchor = f"step-{o.name}" if o.name in stepped else f"out-{o.name}"
            entries.append({"t": f"{r.id}.{o.name}", "k": "result", "h": f"{r.id}.html#{anchor}",
                            "s": f"{plain_symbol(o.symbol)} {o.meaning}", "y": symbol_key(o.symbol),
                            "v": value, "p": title})
    # \u003c keeps any "<" from project text inert even if this file were inlined
    data = json.dumps(entries, ensure_ascii=True, sort_keys=True, separators=(",", ":")).replace("<", "\\u003c")
    greek = json.dumps(GREEK, ensure_ascii=True, sort_keys=True, separators=(",", ":"))
    return "window.BASISBOOK_SEARCH = " + data + ";\nwindow.BASISBOOK_GREEK = " + greek + ";\n"
